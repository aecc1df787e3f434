/**
 * Shared pieces of the `record` commands: subject-level options, warnings,
 * confirmation, and the series views (also used by `demo`).
 */
import { InputError, showValue } from '../errors.js';
import { changesAlongSeries, compareVisits } from '../records/compare.js';
import { assessSeries, findVisit, type SeriesEntry } from '../records/series.js';
import { BIRTH_YEAR_RANGE, VisitSchema, isCalendarDate, type SubjectFile } from '../records/subject-schema.js';
import { comparisonToJson, renderComparison, renderSeries, renderSeriesReferral, seriesToJson } from '../render/series.js';
import { stringifySafe } from '../render/json.js';
import { METHODS_VERSION } from '../assessment/result.js';
import { canPrompt } from './assess-command.js';
import { terminalStyle } from './output.js';
import { toolVersion } from './package-info.js';

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
  // --uncertainty: 95 % ranges per visit and the noise of each change (docs/uncertainty.md).
  const uncertainty = opts.uncertainty ? await Promise.all([import('../assessment/uncertainty.js'), import('../render/uncertainty.js')]) : null;
  const ranges = uncertainty ? uncertainty[0].seriesUncertainty(entries, changes) : null;
  if (ranges) entries = ranges.entries;
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
  const noise = changeNoiseChecks(a.assessment.inputs, b.assessment.inputs);
  for (const row of comparison.rows) {
    const check = noise[row.key];
    if (check) row.noise = check;
  }
  const from = { index: a.index, date: a.date };
  const to = { index: b.index, date: b.date };
  if (opts.json) {
    process.stdout.write(stringifySafe(comparisonToJson(file, from, to, comparison, toolVersion(), b.assessment.referral)) + '\n');
  } else {
    process.stdout.write(renderComparison(file, from, to, comparison, await terminalStyle(), b.assessment.referral) + '\n');
  }
}
