/**
 * Shared pieces of the `record` commands: subject-level options, warnings,
 * confirmation, and the series views (also used by `demo`).
 */
import { InputError, showValue } from '../errors.js';
import { attachNoiseChecks, changesAlongSeries, compareVisits } from '../records/compare.js';
import { assessSeries, findVisit, type SeriesEntry } from '../records/series.js';
import { BIRTH_YEAR_RANGE, VisitSchema, isCalendarDate, type SubjectFile, type Visit } from '../records/subject-schema.js';
import { comparisonToJson, renderComparison, renderSeries, renderSeriesReferral, seriesToJson } from '../render/series.js';
import { stringifySafe } from '../render/json.js';
import { METHODS_VERSION } from '../assessment/result.js';
import { canPrompt } from './assess-command.js';
import { terminalStyle } from './output.js';
import { toolVersion } from './package-info.js';
import { SAME_DATE_FLAG } from './record-commands.js';

export { info, warn } from './messages.js';

/** `--date`: a real calendar date, YYYY-MM-DD. */
export function parseDateOption(value: unknown, field = 'date'): string {
  if (typeof value !== 'string' || value.trim() === '') {
    throw new InputError({ field, value: '', reason: 'required', accepted: `--${field} YYYY-MM-DD, e.g. --${field} 2024-03-18` });
  }
  const text = value.trim();
  if (!isCalendarDate(text)) throw new InputError({ field, value: showValue(value), accepted: 'a calendar date written YYYY-MM-DD, e.g. 2024-03-18' });
  return text;
}

/** Where the record commands read "now" from: the system clock, or a fixed one in tests. */
export type Clock = () => Date;
export const systemClock: Clock = () => new Date();

/** The date a clock shows on the user's own calendar (local time), YYYY-MM-DD. */
export function calendarDate(at: Date): string {
  const two = (n: number): string => String(n).padStart(2, '0');
  return `${String(at.getFullYear()).padStart(4, '0')}-${two(at.getMonth() + 1)}-${two(at.getDate())}`;
}

/** `--date` of a visit: a calendar date (see parseDateOption) that is not after `today` (YYYY-MM-DD). */
export function parseVisitDate(value: unknown, today: string, field = 'date'): string {
  const date = parseDateOption(value, field);
  if (date > today) {
    throw new InputError({ field, value: showValue(value), reason: `in the future (today is ${today})`, accepted: 'a visit date up to today, written YYYY-MM-DD' });
  }
  return date;
}

/** "a visit" or "3 visits". */
function visitCount(n: number): string {
  return n === 1 ? 'a visit' : `${n} visits`;
}

/** Visits of `visits` on `date`. */
function countOn(visits: readonly Visit[], date: string): number {
  return visits.filter((v) => v.date === date).length;
}

/** The refusal of a second visit on one date when nobody said it is intended. */
export function sameDateError(date: string, existing: number): InputError {
  return new InputError({
    field: 'date',
    value: showValue(date),
    reason: `the subject file already has ${visitCount(existing)} on that date`,
    accepted: `another date, or ${SAME_DATE_FLAG} if a second visit on the same date is intended`,
  });
}

/**
 * Whether a visit may go on `date` when `others` (the file's other visits) already has one there: a
 * second visit on one date is usually a slip of the date, so with --same-date go ahead; on a
 * terminal ask; elsewhere refuse (exit 2). Resolves false when the user declines at the prompt.
 */
export async function allowSameDate(opts: Record<string, unknown>, others: readonly Visit[], date: string): Promise<boolean> {
  const existing = countOn(others, date);
  if (existing === 0 || opts.sameDate === true) return true;
  if (!canPrompt(opts)) throw sameDateError(date, existing);
  const { confirm } = await import('@inquirer/prompts');
  return confirm({ message: `The subject file already has ${visitCount(existing)} on ${date}. Add another visit on that date?`, default: false });
}

/**
 * Inside the locked update: refuse when another process put a visit on `date` after allowSameDate
 * looked at `before` (unless --same-date). `now` is the file's other visits as they are on disk.
 */
export function recheckSameDate(opts: Record<string, unknown>, before: readonly Visit[], now: readonly Visit[], date: string): void {
  const count = countOn(now, date);
  if (opts.sameDate !== true && count > countOn(before, date)) throw sameDateError(date, count);
}

/** `--note`: free text within the subject-file schema's limit (checked here so nothing fails at write time). */
export function parseNoteOption(value: unknown): string | undefined {
  if (value === undefined) return undefined;
  const text = String(value);
  const checked = VisitSchema.shape.note.safeParse(text);
  if (!checked.success) {
    throw new InputError({ field: 'note', value: showValue(text), accepted: checked.error.issues[0]?.message ?? 'a shorter note' });
  }
  return text;
}

/** `--birth-year`: a whole year. */
export function parseBirthYear(value: unknown): number | undefined {
  if (value === undefined) return undefined;
  const text = String(value).trim();
  const year = Number(text);
  if (!/^\d{4}$/.test(text) || year < BIRTH_YEAR_RANGE.min || year > BIRTH_YEAR_RANGE.max) {
    throw new InputError({ field: 'birth-year', value: showValue(value), accepted: `a year from ${BIRTH_YEAR_RANGE.min} to ${BIRTH_YEAR_RANGE.max}, e.g. 1978` });
  }
  return year;
}

/**
 * Ask before a destructive change. With --yes, go ahead; on a terminal, ask;
 * otherwise refuse (exit 2) rather than wait on standard input.
 */
export async function confirmChange(opts: Record<string, unknown>, question: string, what: string): Promise<boolean> {
  if (opts.yes === true) return true;
  if (!canPrompt(opts)) {
    throw new InputError({ field: 'confirmation', value: '', reason: `${what} needs confirmation and prompts are off (not a terminal)`, accepted: '--yes to confirm without a prompt' });
  }
  const { confirm } = await import('@inquirer/prompts');
  return confirm({ message: question, default: false });
}

/** The series of a subject file as text or JSON. */
export async function printSeries(file: SubjectFile, opts: { json?: boolean; uncertainty?: boolean }): Promise<SeriesEntry[]> {
  let entries = assessSeries(file);
  const changes = changesAlongSeries(entries.map((e) => e.assessment));
  // --uncertainty: 95 % intervals per visit and the noise of each change (docs/uncertainty.md).
  const uncertainty = opts.uncertainty ? await Promise.all([import('../assessment/uncertainty.js'), import('../render/uncertainty.js')]) : null;
  const ranges = uncertainty ? uncertainty[0].seriesUncertainty(entries) : null;
  if (ranges) {
    entries = ranges.entries;
    changes.forEach((change, i) => {
      const checks = ranges.checks[i];
      if (change && checks) attachNoiseChecks(change, checks);
    });
  }
  if (opts.json) {
    const methods = entries[0]?.assessment.methodsVersion ?? METHODS_VERSION;
    process.stdout.write(stringifySafe(seriesToJson(file, entries, changes, toolVersion(), methods)) + '\n');
  } else {
    const style = await terminalStyle();
    const extra = uncertainty && ranges ? uncertainty[1].seriesIntervalLines(entries, ranges.reports, style).join('\n') + '\n' : '';
    const referral = entries.length > 0 ? (extra ? '\n' : '') + renderSeriesReferral(entries, style) : '';
    process.stdout.write(renderSeries(file, entries, changes, style) + '\n' + extra + referral);
  }
  return entries;
}

/** The explained change between two visits, chosen by number or date. */
export async function printComparison(file: SubjectFile, fromSelector: string, toSelector: string, opts: { json?: boolean }): Promise<void> {
  const entries = assessSeries(file);
  const pick = (selector: string): SeriesEntry => {
    const hit = findVisit(file, selector);
    return entries.find((e) => e.index === hit.index)!;
  };
  const a = pick(fromSelector);
  const b = pick(toSelector);
  const comparison = compareVisits(a.assessment, b.assessment);
  // The uncertainty of the inputs (docs/uncertainty.md): each change's 95 % interval and whether it exceeds that noise.
  const { changeNoiseChecks } = await import('../assessment/uncertainty.js');
  attachNoiseChecks(comparison, changeNoiseChecks(a.assessment.inputs, b.assessment.inputs));
  const from = { index: a.index, date: a.date };
  const to = { index: b.index, date: b.date };
  if (opts.json) {
    process.stdout.write(stringifySafe(comparisonToJson(file, from, to, comparison, toolVersion(), b.assessment.referral)) + '\n');
  } else {
    process.stdout.write(renderComparison(file, from, to, comparison, await terminalStyle(), b.assessment.referral) + '\n');
  }
}
