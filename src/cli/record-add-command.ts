/**
 * `elastimate record add <file> --subject ID --date YYYY-MM-DD [flags | --input visit.json] [--note text]`
 * Appends a visit, creating the subject file with the first one. Missing
 * inputs are asked for on a terminal, offering the previous visit's values
 * for what rarely changes; elsewhere they are one error listing them all.
 */
import { sanitizeText } from '../text/sanitize.js';
import { assess } from '../assessment/assess.js';
import { missingRequired, type RawInputs } from '../assessment/inputs.js';
import { VALVE_FLAGS } from '../assessment/fields.js';
import { InputError, showValue } from '../errors.js';
import { pseudonymWarnings } from '../records/pseudonym.js';
import { insertVisit, tidyEntered, visitInputs, visitRawInputs, visitsInOrder } from '../records/series.js';
import { readSubjectFileIfExists, updateSubjectFile } from '../records/store.js';
import { SubjectIdSchema, newSubjectFile, type SubjectFile, type SubjectInfo, type Visit } from '../records/subject-schema.js';
import { formatQuantity } from '../render/format.js';
import { canPrompt, gatherRaw, missingError } from './assess-command.js';
import { info, parseBirthYear, parseDateOption, parseNoteOption, warn } from './record-common.js';

/** What the previous visit offers as defaults: things that rarely change. */
export function suggestionsFrom(file: SubjectFile | null): Partial<RawInputs> {
  if (!file || file.visits.length === 0) return {};
  const ordered = visitsInOrder(file);
  const last = ordered[ordered.length - 1]!.visit;
  const merged = visitRawInputs(file, last);
  const out: Partial<RawInputs> = {};
  // Body size from the latest visit that recorded it (a visit may have skipped it); rhythm and valve
  // findings describe the latest state, so they come from the last visit only.
  for (const key of ['height', 'weight'] as const) {
    for (let i = ordered.length - 1; i >= 0; i--) {
      const value = visitRawInputs(file, ordered[i]!.visit)[key];
      if (value !== undefined) {
        out[key] = value;
        break;
      }
    }
  }
  if (merged.rhythm !== undefined) out.rhythm = merged.rhythm;
  if (merged.sex !== undefined) out.sex = merged.sex;
  for (const v of VALVE_FLAGS) if (merged[v.key] !== undefined) out[v.key] = merged[v.key];
  return out;
}

function checkSubjectId(value: unknown): string {
  const parsed = SubjectIdSchema.safeParse(typeof value === 'string' ? value : undefined);
  if (!parsed.success) {
    throw new InputError({ field: 'subject', value: showValue(value), accepted: parsed.error.issues[0]?.message ?? 'a pseudonymous id, e.g. CO-203' });
  }
  return parsed.data;
}

/** The subject as it should be after this visit: id, and sex and birth year when given. */
function subjectAfter(existing: SubjectInfo | null, id: string | undefined, sex: SubjectInfo['sex'], birthYear: number | undefined, path: string): SubjectInfo {
  if (existing) {
    if (id !== undefined && id !== existing.id) {
      throw new InputError({ field: 'subject', value: showValue(id), reason: `${path} holds subject ${JSON.stringify(existing.id)}`, accepted: `${JSON.stringify(existing.id)}, or leave --subject out` });
    }
    if (sex !== undefined && existing.sex !== undefined && sex !== existing.sex) {
      throw new InputError({ field: 'sex', value: showValue(sex), reason: `subject ${existing.id} is recorded as ${existing.sex}`, accepted: `${existing.sex} (change it with record edit --sex)` });
    }
    if (birthYear !== undefined && existing.birthYear !== undefined && birthYear !== existing.birthYear) {
      throw new InputError({ field: 'birth-year', value: showValue(birthYear), reason: `subject ${existing.id} is recorded as born ${existing.birthYear}`, accepted: `${existing.birthYear} (change it with record edit --birth-year)` });
    }
    return { ...existing, ...(sex !== undefined ? { sex } : {}), ...(birthYear !== undefined ? { birthYear } : {}) };
  }
  if (id === undefined) {
    throw new InputError({ field: 'subject', value: '', reason: `${path} does not exist yet, so this visit creates it`, accepted: '--subject <pseudonymous id>, e.g. --subject CO-203' });
  }
  return { id, ...(sex !== undefined ? { sex } : {}), ...(birthYear !== undefined ? { birthYear } : {}) };
}

/** Keep in the visit only what the visit itself says (not the subject's height, sex or age from the birth year). */
function visitOnly(completed: RawInputs, fromSubject: RawInputs, givenForVisit: RawInputs): RawInputs {
  const out: Record<string, unknown> = { ...completed };
  for (const key of Object.keys(fromSubject) as (keyof RawInputs)[]) {
    if (givenForVisit[key] === undefined && JSON.stringify(completed[key]) === JSON.stringify(fromSubject[key])) delete out[key];
  }
  return out as RawInputs;
}

export async function runRecordAdd(path: string, opts: Record<string, unknown>, inputFile: string | undefined): Promise<void> {
  const id = opts.subject === undefined ? undefined : checkSubjectId(opts.subject);
  const birthYear = parseBirthYear(opts.birthYear);
  const note = parseNoteOption(opts.note);
  const given = gatherRaw(opts, inputFile);
  // A DICOM SR (--sr): its values under the given ones; the visit date defaults to its study date.
  const sr = opts.sr !== undefined ? await import('./sr-input.js') : null;
  const imported = sr ? await sr.gatherSr(opts) : null;
  const date = parseDateOption(opts.date ?? imported?.studyDate ?? undefined);
  const { raw, sources } = sr ? sr.underGiven(imported, given) : { raw: given, sources: {} };
  const sex = raw.sex;
  delete raw.sex;

  const existing = readSubjectFileIfExists(path);
  const subject = subjectAfter(existing?.subject ?? null, id, sex, birthYear, path);
  if (!existing || id !== undefined) for (const w of pseudonymWarnings(subject.id)) warn(w);

  // What the subject contributes (height, sex, age), under what this visit gives.
  const fromSubject = visitRawInputs(subject, { date, inputs: {} });
  let merged: RawInputs = { ...fromSubject, ...raw };
  const missing = missingRequired(merged);
  if (missing.length > 0) {
    if (!canPrompt(opts)) throw missingError(missing);
    const { collectInteractively } = await import('./prompts.js');
    merged = await collectInteractively(merged, { suggestions: suggestionsFrom(existing) });
  }
  const inputs = tidyEntered(visitOnly(merged, fromSubject, raw));
  const kept = sr ? sr.sourcesStillUsed(sources, imported, inputs) : {};
  const visit: Visit = { date, inputs, ...(note !== undefined ? { note } : {}), ...(Object.keys(kept).length > 0 ? { sources: kept } : {}) };
  // Validate now, with the subject's data underneath, so nothing invalid is stored.
  const assessment = assess(visitInputs(subject, visit));

  const result = await updateSubjectFile(
    path,
    (current) => {
      // Re-check against what is on disk now: another process may have written meanwhile.
      const base = current ?? newSubjectFile(subject);
      const updatedSubject = subjectAfter(current ? current.subject : null, subject.id, subject.sex, subject.birthYear, path);
      return insertVisit({ ...base, subject: updatedSubject }, visit);
    },
    { now: new Date() },
  );

  const ordered = visitsInOrder(result.file);
  const mine = ordered.filter((v) => v.visit.date === date);
  const index = mine[mine.length - 1]?.index ?? ordered.length;
  if (mine.length > 1) warn(`${mine.length} visits on ${date} (numbers ${mine.map((v) => v.index).join(', ')}); refer to them by number`);
  for (const b of result.backups) info(`the file was upgraded to the current format; the previous version is kept as ${b}`);
  const r = assessment.results;
  process.stdout.write(
    `${result.created ? 'Created' : 'Updated'} ${path}: subject ${sanitizeText(result.file.subject.id)}, visit ${index} of ${ordered.length} on ${date}.\n` +
      `  Ea ${formatQuantity(r.ea)}, Ees ${formatQuantity(r.ees)}, Ea/Ees ${formatQuantity(r.eaEes)} (methods ${assessment.methodsVersion}; research use only, not a diagnosis).\n` +
      (assessment.flags.some((f) => f.level !== 'note') ? `  ${assessment.flags.filter((f) => f.level !== 'note').length} check(s) fired: see \`elastimate record show ${path}\`.\n` : ''),
  );
}
