/**
 * `elastimate record edit <file> <visit> [flags]` and `record remove <file> <visit>`:
 * change or drop one visit after a confirmation (a prompt on a terminal,
 * `--yes` in scripts), keeping a backup of the file as it was.
 */
import { sanitizeText } from '../text/sanitize.js';
import { NUMERIC_FIELDS, VALVE_FLAGS } from '../assessment/fields.js';
import { RawInputsSchema, type RawInputs } from '../assessment/inputs.js';
import { InputError, showValue } from '../errors.js';
import { findVisit, insertVisit, tidyEntered, visitInputs } from '../records/series.js';
import { readSubjectFile, updateSubjectFile } from '../records/store.js';
import type { SubjectFile, SubjectInfo, Visit } from '../records/subject-schema.js';
import { gatherRaw } from './assess-command.js';
import { allowSameDate, calendarDate, confirmChange, info, parseBirthYear, parseNoteOption, parseVisitDate, recheckSameDate, systemClock, type Clock } from './record-common.js';

const INPUT_KEYS = Object.keys(RawInputsSchema.shape) as (keyof RawInputs)[];

/** `--unset` names: flag spelling or camelCase. */
function unsetKey(name: string): keyof RawInputs {
  const text = name.trim();
  const byFlag = NUMERIC_FIELDS.find((f) => f.flag === text)?.key ?? VALVE_FLAGS.find((v) => v.flag === text)?.key;
  const camel = text.replace(/-([a-z])/g, (_s, c: string) => c.toUpperCase());
  const key = byFlag ?? (INPUT_KEYS.includes(camel as keyof RawInputs) ? (camel as keyof RawInputs) : undefined);
  if (!key) throw new InputError({ field: 'unset', value: showValue(name), accepted: `an input name: ${NUMERIC_FIELDS.map((f) => f.flag).join(', ')}, rhythm, …` });
  return key;
}

/** A value before or after an edit, as a change line shows it: user text through the one sanitiser. */
function shown(v: unknown): string {
  return v === undefined ? '(none)' : sanitizeText(typeof v === 'string' ? v : JSON.stringify(v));
}

function sameVisit(a: Visit, b: Visit): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}

/** Locate the visit the user confirmed; if another process changed it meanwhile, stop. */
function positionOf(current: SubjectFile | null, visit: Visit, path: string): number {
  const at = current ? current.visits.findIndex((v) => sameVisit(v, visit)) : -1;
  if (at === -1) {
    throw new InputError({ field: 'subject file', value: showValue(path), reason: 'the visit changed or disappeared while waiting for confirmation; nothing was written', accepted: 'run the command again' });
  }
  return at;
}

export async function runRecordEdit(path: string, selector: string, opts: Record<string, unknown>, inputFile: string | undefined, clock: Clock = systemClock): Promise<void> {
  const file = readSubjectFile(path);
  const hit = findVisit(file, selector);
  const given = gatherRaw(opts, inputFile);
  const sex = given.sex;
  delete given.sex;
  const birthYear = parseBirthYear(opts.birthYear);
  const unset = ((opts.unset as string[] | undefined) ?? []).map(unsetKey);
  const date = opts.date !== undefined ? parseVisitDate(opts.date, calendarDate(clock())) : hit.visit.date;
  const note = opts.note !== undefined ? parseNoteOption(opts.note) : hit.visit.note;

  const inputs: Record<string, unknown> = { ...hit.visit.inputs, ...given };
  if (given.errors || hit.visit.inputs.errors) inputs.errors = { ...(hit.visit.inputs.errors ?? {}), ...(given.errors ?? {}) };
  for (const key of unset) delete inputs[key];
  const editedInputs = tidyEntered(inputs as RawInputs);
  // An imported input keeps its source (docs/sr-import.md) only while its value is unchanged.
  const sources = Object.fromEntries(
    Object.entries(hit.visit.sources ?? {}).filter(([k]) => JSON.stringify((editedInputs as Record<string, unknown>)[k]) === JSON.stringify((hit.visit.inputs as Record<string, unknown>)[k])),
  );
  const edited: Visit = { date, inputs: editedInputs, ...(note !== undefined && note !== '' ? { note } : {}), ...(Object.keys(sources).length > 0 ? { sources } : {}) };
  const subject: SubjectInfo = { ...file.subject, ...(sex !== undefined ? { sex } : {}), ...(birthYear !== undefined ? { birthYear } : {}) };

  const changes: string[] = [];
  const tidyBefore = tidyEntered(hit.visit.inputs);
  for (const key of new Set([...Object.keys(tidyBefore), ...Object.keys(edited.inputs)]) as Set<keyof RawInputs>) {
    const before = tidyBefore[key];
    const after = edited.inputs[key];
    if (JSON.stringify(before) !== JSON.stringify(after)) changes.push(`${key}: ${shown(before)} → ${shown(after)}`);
  }
  if (edited.date !== hit.visit.date) changes.push(`date: ${hit.visit.date} → ${edited.date}`);
  if (edited.note !== hit.visit.note) changes.push(`note: ${shown(hit.visit.note)} → ${shown(edited.note)}`);
  if (subject.sex !== file.subject.sex) changes.push(`subject sex: ${shown(file.subject.sex)} → ${shown(subject.sex)}`);
  if (subject.birthYear !== file.subject.birthYear) changes.push(`subject birth year: ${shown(file.subject.birthYear)} → ${shown(subject.birthYear)}`);
  if (changes.length === 0) {
    throw new InputError({ field: 'changes', value: '', reason: 'nothing to change', accepted: 'measurement flags, --input, --unset, --note, --date, --sex or --birth-year with a new value' });
  }
  // The edited visit must still compute, with the subject's data underneath.
  visitInputs(subject, edited);

  const others = file.visits.filter((_v, i) => i !== hit.position);
  if (date !== hit.visit.date && !(await allowSameDate(opts, others, date))) {
    process.stdout.write('Nothing changed.\n');
    return;
  }
  const what = `changing visit ${hit.index} (${hit.visit.date}) of subject ${sanitizeText(file.subject.id)}`;
  process.stdout.write(`${what[0]!.toUpperCase()}${what.slice(1)}:\n${changes.map((c) => `  ${c}`).join('\n')}\n`);
  if (!(await confirmChange(opts, 'Save this change? A backup of the file is kept.', what))) {
    process.stdout.write('Nothing changed.\n');
    return;
  }
  const result = await updateSubjectFile(
    path,
    (current) => {
      const at = positionOf(current, hit.visit, path);
      const visits = current!.visits.filter((_v, i) => i !== at);
      // Another process may have put a visit on the new date meanwhile.
      if (date !== hit.visit.date) recheckSameDate(opts, others, visits, date);
      return insertVisit({ ...current!, subject: { ...current!.subject, ...(sex !== undefined ? { sex } : {}), ...(birthYear !== undefined ? { birthYear } : {}) }, visits }, edited);
    },
    { now: clock(), backup: true },
  );
  process.stdout.write(`Saved ${path}.\n`);
  for (const b of result.backups) info(`the file as it was is kept as ${b}`);
}

export async function runRecordRemove(path: string, selector: string, opts: Record<string, unknown>): Promise<void> {
  const file = readSubjectFile(path);
  const hit = findVisit(file, selector);
  const what = `removing visit ${hit.index} (${hit.visit.date}) of subject ${sanitizeText(file.subject.id)}`;
  process.stdout.write(`${what[0]!.toUpperCase()}${what.slice(1)}${hit.visit.note ? ` (note: ${sanitizeText(hit.visit.note.replace(/\s+/g, ' ').slice(0, 80))})` : ''}.\n`);
  if (!(await confirmChange(opts, `Remove visit ${hit.index}? A backup of the file is kept.`, what))) {
    process.stdout.write('Nothing changed.\n');
    return;
  }
  const result = await updateSubjectFile(
    path,
    (current) => {
      const at = positionOf(current, hit.visit, path);
      return { ...current!, visits: current!.visits.filter((_v, i) => i !== at) };
    },
    { now: new Date(), backup: true },
  );
  process.stdout.write(`Removed visit ${hit.index} from ${path}; ${result.file.visits.length} visit(s) remain.\n`);
  for (const b of result.backups) info(`the file as it was is kept as ${b}`);
}
