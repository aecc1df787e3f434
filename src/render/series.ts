/**
 * Views of a subject's series: the visit table with the change from the
 * previous visit, the explained comparison of two visits, and their JSON
 * forms (docs/subject-file.md). Pure: data and a Style in, text or plain
 * objects out. Numbers go through render/format.ts; JSON through stringifySafe.
 */
import type { Assessment } from '../assessment/assess.js';
import { STANDING_CAVEATS } from '../assessment/caveats.js';
import type { ChangeKey, ChangePart, ChangeRow, Comparison } from '../records/compare.js';
import type { SeriesEntry } from '../records/series.js';
import type { SubjectFile } from '../records/subject-schema.js';
import { decimalsFor, formatNumber, formatValue, pad, padLeft } from './format.js';
import { couplingNote, listInWords } from '../assessment/labels.js';
import { INPUT_UNITS } from './json.js';
import { plainStyle, type Style } from './style.js';
import { bullet, wrap, wrapIndented } from './terminal.js';
import { sanitizeText } from '../text/sanitize.js';

export const SERIES_FORMAT = 'elastimate-series';
export const COMPARISON_FORMAT = 'elastimate-comparison';
/** 2: the result keys of docs/json-output.md, format version 2. */
export const SERIES_FORMAT_VERSION = 2;

/** A visit as the comparison views name it. */
export interface VisitRef {
  index: number;
  date: string;
}

function signed(value: number, decimals: number): string {
  const text = formatNumber(value, decimals);
  return value > 0 && text !== formatNumber(0, decimals) ? `+${text}` : text;
}

function percent(value: number | null): string {
  return value === null ? '—' : `${signed(value, 0)} %`;
}

function subjectLine(file: SubjectFile, visits: number): string {
  const s = file.subject;
  const parts = [`subject ${s.id}`];
  if (s.sex) parts.push(s.sex);
  if (s.birthYear !== undefined) parts.push(`born ${s.birthYear}`);
  if (s.height !== undefined) parts.push(`height ${typeof s.height === 'number' ? formatValue(s.height, 'cm') : s.height}`);
  parts.push(`${visits} visit${visits === 1 ? '' : 's'}`);
  return sanitizeText(parts.join(' · '));
}

function methodsLine(methodsVersion: string): string {
  return `methods ${methodsVersion}; results computed now from the stored inputs; research use only, not a diagnosis`;
}

interface Column {
  title: string;
  unit: string;
  width: number;
  cell(entry: SeriesEntry, change: Comparison | null): string;
}

function changeMark(row: ChangeRow | undefined): string {
  if (!row || row.percentChange === null) return '';
  const mark = (row.verdict === 'beyond-noise' ? '*' : '') + (row.noise?.exceeds ? '†' : '');
  return ` ${signed(row.percentChange, 0)}%${mark}`;
}

function valueWithChange(key: ChangeKey, entry: SeriesEntry, change: Comparison | null): string {
  const q = entry.assessment.results[key];
  const base = formatNumber(q.value, decimalsFor(q.unit));
  return base + (change ? changeMark(change.rows.find((r) => r.key === key)) : '');
}

const COLUMNS: Column[] = [
  { title: '#', unit: '', width: 3, cell: (e) => String(e.index) },
  { title: 'date', unit: '', width: 12, cell: (e) => e.date },
  { title: 'HR', unit: 'bpm', width: 5, cell: (e) => formatNumber(e.assessment.inputs.hr, 0) },
  { title: 'SBP/DBP', unit: 'mmHg', width: 9, cell: (e) => `${formatNumber(e.assessment.inputs.sbp, 0)}/${formatNumber(e.assessment.inputs.dbp, 0)}` },
  { title: 'EF', unit: '%', width: 5, cell: (e) => formatNumber(e.assessment.results.efUsed.value, 0) },
  { title: 'SV', unit: 'mL', width: 5, cell: (e) => formatNumber(e.assessment.results.svUsed.value, 0) },
  { title: 'Pes', unit: 'mmHg', width: 11, cell: (e, c) => valueWithChange('pes', e, c) },
  { title: 'Ea', unit: 'mmHg/mL', width: 12, cell: (e, c) => valueWithChange('ea', e, c) },
  { title: 'Ees', unit: 'mmHg/mL', width: 12, cell: (e, c) => valueWithChange('ees', e, c) },
  { title: 'Ea/Ees', unit: '', width: 12, cell: (e, c) => valueWithChange('eaEes', e, c) },
];

/**
 * The right heart along the series, under the table, for the visits with a PASP: PASP and
 * TAPSE/PASP with the change from the previous visit (marked as in the table; a change shows
 * only when both visits have the value, as `compareVisits` gives it). Empty without any PASP.
 */
function rightHeartSeriesLines(entries: readonly SeriesEntry[], changes: readonly (Comparison | null)[], s: Style): string[] {
  const lines: string[] = [];
  entries.forEach((e, i) => {
    if (e.assessment.results.pasp.value === null) return;
    const change = changes[i] ?? null;
    const coupling = e.assessment.results.tapsePasp.value === null ? '' : `   TAPSE/PASP ${valueWithChange('tapsePasp', e, change)} mm/mmHg`;
    lines.push(`  ${pad(String(e.index), 3)} PASP ${valueWithChange('pasp', e, change)} mmHg${coupling}`);
  });
  return lines.length ? ['', s.heading('Right heart (changes from the previous visit, marked as above)'), ...lines] : [];
}

/**
 * The series table. `changes[i]` compares entry i−1 with entry i (null for the
 * first visit). Changes are relative to the previous visit; * marks a change
 * beyond the least significant change.
 */
export function renderSeries(file: SubjectFile, entries: readonly SeriesEntry[], changes: readonly (Comparison | null)[], style: Style = plainStyle): string {
  const s = style;
  const out: string[] = [];
  const methodsVersion = entries[0]?.assessment.methodsVersion ?? changes.find((c) => c)?.methodsVersion;
  out.push(s.strong(`elastimate series: ${subjectLine(file, entries.length)}`));
  if (methodsVersion) out.push(s.dim(methodsLine(methodsVersion)));
  out.push('');
  if (entries.length === 0) {
    out.push('  No visits yet: add one with `elastimate record add`.');
  } else {
    const row = (cells: string[]) => '  ' + cells.map((c, i) => pad(c, COLUMNS[i]!.width)).join(' ').trimEnd();
    out.push(s.heading(row(COLUMNS.map((c) => c.title))));
    out.push(s.dim(row(COLUMNS.map((c) => c.unit))));
    entries.forEach((e, i) => out.push(row(COLUMNS.map((c) => c.cell(e, changes[i] ?? null)))));
    out.push('');
    const legend = ['Changes are from the previous visit; * marks a change beyond the least significant change (2.77 × the repeat CV); unmarked changes are within it. `elastimate record compare` explains any two visits.'];
    if (changes.some((c) => c?.rows.some((r) => r.noise))) legend.push('† marks a change whose 95 % interval from the propagated input error excludes zero (Monte Carlo).');
    for (const text of legend) out.push(...wrapIndented(text, s.width, '  ').map((l) => s.dim(l)));
    out.push('');
    out.push(s.heading('Coupling'));
    for (const e of entries) {
      const q = e.assessment.results.eaEes;
      const note = couplingNote(q.value);
      out.push(`  ${pad(String(e.index), 3)} Ea/Ees ${q.value === null ? `not computable (${q.reason ?? 'missing input'})` : `${formatNumber(q.value, decimalsFor(q.unit))}: ${note}`}`);
    }
    out.push(...rightHeartSeriesLines(entries, changes, s));
  }

  const notes = entries.filter((e) => e.visit.note);
  if (notes.length) {
    out.push('');
    out.push(s.heading('Notes'));
    for (const e of notes) {
      const lines = wrap(sanitizeText((e.visit.note ?? '').replace(/\s+/g, ' ')), s.width - 6);
      lines.forEach((l, i) => out.push(`  ${i === 0 ? pad(`${e.index}`, 4) : '    '}${l}`));
    }
  }

  const flagged = entries.filter((e) => e.assessment.flags.some((f) => f.level !== 'note'));
  out.push('');
  out.push(s.heading('Checks and caveats'));
  for (const e of flagged) {
    for (const f of e.assessment.flags.filter((x) => x.level !== 'note')) {
      const tag = f.level === 'attention' ? s.attention('[attention]') : s.caution('[caution]  ');
      const lines = wrap(f.message, s.width - 16);
      lines.forEach((l, i) => out.push(`  ${i === 0 ? `${pad(String(e.index), 3)} ${tag} ` : ' '.repeat(16)}${l}`));
    }
  }
  if (flagged.length === 0 && entries.length > 0) out.push('  No visit crossed a check threshold or broke a method assumption.');
  for (const c of STANDING_CAVEATS) out.push(...bullet(c, s.width, s.dim('•')));
  out.push('');
  return out.join('\n');
}

/** The paste-ready referral note under its heading, as the assess report prints it. */
function referralLines(heading: string, referral: string, s: Style): string[] {
  return ['', s.heading(heading), ...wrapIndented(referral, s.width, '  ')];
}

/** The referral note of the latest visit of a series, printed last under the series table (and its ranges). */
export function renderSeriesReferral(entries: readonly SeriesEntry[], style: Style = plainStyle): string {
  const latest = entries[entries.length - 1];
  if (!latest) return '';
  return referralLines(`Referral note for visit ${latest.index} (${latest.date}), the latest (paste-ready)`, latest.assessment.referral, style).slice(1).join('\n') + '\n';
}

function ratioText(row: ChangeRow): string {
  return `±${formatNumber(row.lsc.logLimit, 3)} in ln (+${formatNumber(row.lsc.percentUp, 0)} % / −${formatNumber(row.lsc.percentDown, 0)} %)`;
}

/** Whether the 95 % interval of the change from the inputs' uncertainty includes zero, in words. */
function noiseWords(row: ChangeRow): string | null {
  if (!row.noise) return null;
  return row.noise.exceeds ? 'excludes zero: larger than the uncertainty of the inputs' : 'includes zero: within the uncertainty of the inputs';
}

function noiseText(row: ChangeRow): string | null {
  if (!row.noise) return null;
  const d = decimalsFor(row.unit) + 1;
  const [lo, hi] = row.noise.interval95;
  return `input uncertainty: the 95 % interval of the change, ${signed(lo, d)} to ${signed(hi, d)}${row.unit ? ' ' + row.unit : ''}, ${noiseWords(row)}. Source: ${row.noise.source}`;
}

/** The verdict of a row in words, as every table of changes shows it (both yardsticks when both were computed). */
export function judgementWords(row: ChangeRow): string {
  if (row.verdict === 'not-computable') return 'not computable';
  const lsc = row.verdict === 'beyond-noise' ? 'beyond the least significant change' : 'within the least significant change';
  if (!row.noise) return lsc;
  return `${lsc}; 95 % interval from the inputs ${row.noise.exceeds ? 'excludes' : 'includes'} zero`;
}

const SHORT_NAMES: Record<ChangeKey, string> = { pes: 'Pes', ea: 'Ea', ees: 'Ees', eaEes: 'Ea/Ees', pasp: 'PASP', tapsePasp: 'TAPSE/PASP' };

function shortName(row: ChangeRow): string {
  return SHORT_NAMES[row.key];
}

/** One plain sentence per row: what changed and what each yardstick says. */
export function changeSentence(row: ChangeRow): string {
  const name = shortName(row);
  if (row.verdict === 'not-computable' || row.percentChange === null) {
    return `${name}: the change is not computable (${row.reason ?? 'missing at one of the visits'}).`;
  }
  const direction = row.percentChange > 0 ? 'rose' : row.percentChange < 0 ? 'fell' : 'stayed the same';
  const size = row.percentChange === 0 ? '' : ` by ${formatNumber(Math.abs(row.percentChange), 0)} %`;
  const lsc = `the least significant change (${ratioText(row)}, repeat CV ${formatNumber(row.lsc.cv * 100, 1)} %)`;
  let sentence =
    row.verdict === 'beyond-noise'
      ? `${name} ${direction}${size}: beyond ${lsc}, more than repeat-measurement noise would explain.`
      : `${name} ${direction}${size}: within ${lsc}, so repeat-measurement noise could explain it.`;
  if (row.noise) sentence += ` The 95 % interval of the change from this subject's input uncertainty ${row.noise.exceeds ? 'excludes zero' : 'includes zero'}.`;
  return sentence;
}

function driverSentence(row: ChangeRow): string | null {
  const parts = (row.parts ?? []).filter((p): p is ChangePart & { logChange: number } => p.logChange !== null);
  if (!row.parts || parts.length !== row.parts.length || row.logChange === null || parts.length === 0) return null;
  const main = [...parts].sort((x, y) => Math.abs(y.logChange) - Math.abs(x.logChange))[0]!;
  if (Math.abs(main.logChange) < 0.005) return null;
  const label = main.label.replace(/\s*\(.*\)$/, '');
  return `Of the change in ln ${shortName(row)} (${signed(row.logChange, 3)}), the largest part is ${label}: ${signed(main.logChange, 3)}.`;
}

function namesOr(list: string[], none: string): string {
  return list.length ? listInWords(list) : none;
}

/**
 * Plain sentences summarising a comparison: the two yardsticks, each once,
 * and what each says; where they disagree, which one the verdict follows.
 * The verdict (beyond or within noise) is the least significant change's.
 */
export function comparisonSummary(c: Comparison): string[] {
  const lines: string[] = [];
  const computed = c.rows.filter((r) => r.verdict !== 'not-computable');
  const beyond = computed.filter((r) => r.verdict === 'beyond-noise').map(shortName);
  const within = computed.filter((r) => r.verdict === 'within-noise').map(shortName);
  const missing = c.rows.filter((r) => r.verdict === 'not-computable').map(shortName);
  const first = 'Yardstick 1, the method\'s least significant change (how much a repeat measurement of the same person varies, from published repeatability): ';
  if (computed.length === 0) {
    lines.push(first + 'no change could be computed.');
  } else if (beyond.length === 0) {
    lines.push(first + `every change (${listInWords(within)}) is within it, so none is shown to be real.`);
  } else {
    lines.push(first + `beyond it: ${listInWords(beyond)}; within it: ${namesOr(within, 'none')}.`);
  }
  if (missing.length) lines.push(`Not computable at one of the visits: ${listInWords(missing)}.`);
  const checked = computed.filter((r) => r.noise);
  if (checked.length > 0) {
    const excludes = checked.filter((r) => r.noise!.exceeds).map(shortName);
    const includes = checked.filter((r) => !r.noise!.exceeds).map(shortName);
    lines.push(
      'Yardstick 2, the propagated uncertainty of this subject\'s own inputs (Monte Carlo): the 95 % interval of the change ' +
        (excludes.length === 0
          ? `includes zero for every change (${listInWords(includes)}).`
          : includes.length === 0
            ? `excludes zero for every change (${listInWords(excludes)}).`
            : `excludes zero for ${listInWords(excludes)} and includes zero for ${listInWords(includes)}.`),
    );
    const disagree = checked.filter((r) => (r.verdict === 'beyond-noise') !== r.noise!.exceeds).map(shortName);
    if (disagree.length) {
      lines.push(
        `The two yardsticks differ for ${listInWords(disagree)}. The least significant change also counts visit-to-visit variation that this subject's inputs do not show, so the verdict (beyond or within noise) follows it.`,
      );
    }
  }
  for (const row of c.rows) {
    lines.push(changeSentence(row));
    const driver = driverSentence(row);
    if (driver) lines.push(driver);
  }
  return lines;
}

/** The explained change between two visits. */
export function renderComparison(file: SubjectFile, from: VisitRef, to: VisitRef, c: Comparison, style: Style = plainStyle, referral?: string): string {
  const s = style;
  const out: string[] = [];
  out.push(s.strong(`elastimate comparison: subject ${sanitizeText(file.subject.id)}, visit ${from.index} (${from.date}) → visit ${to.index} (${to.date})`));
  out.push(s.dim(methodsLine(c.methodsVersion)));
  for (const row of c.rows) {
    out.push('');
    const d = decimalsFor(row.unit);
    const values = `${formatNumber(row.from, d)} → ${formatNumber(row.to, d)}${row.unit ? ' ' + row.unit : ''}`;
    out.push(s.heading(row.label));
    if (row.logChange === null || row.difference === null) {
      out.push(`  ${values}: change not computable (${row.reason ?? 'missing at one of the visits'})`);
      continue;
    }
    const verdict = row.verdict === 'beyond-noise' ? s.attention('beyond noise') : s.dim('within noise');
    out.push(`  ${pad(values, 30)}${pad(`${signed(row.difference, Math.min(d + 1, 3))}${row.unit ? ' ' + row.unit : ''}`, 18)}${pad(`${percent(row.percentChange)}`, 9)}Δln ${padLeft(signed(row.logChange, 3), 7)}   ${verdict}`);
    out.push(s.dim(`  least significant change ${ratioText(row)}; repeat CV ${formatNumber(row.lsc.cv * 100, 1)} %: ${row.lsc.source}`));
    const noise = noiseText(row);
    if (noise) out.push(`  ${noise}`);
    if (row.parts) {
      out.push(`  of which (Δln, adding up to ${signed(row.logChange, 3)}):`);
      for (const p of row.parts) {
        out.push(`    ${pad(p.label, 46)}${p.logChange === null ? s.dim(`not computable (${p.reason ?? ''})`) : padLeft(signed(p.logChange, 3), 7)}`);
      }
    }
  }
  out.push('');
  out.push(s.heading('In plain words'));
  for (const line of comparisonSummary(c)) out.push(...bullet(line, s.width));
  for (const caution of c.cautions) out.push(...bullet(caution, s.width, s.caution('!')));
  for (const caveat of STANDING_CAVEATS) out.push(...bullet(caveat, s.width, s.dim('•')));
  if (referral !== undefined) out.push(...referralLines(`Referral note for visit ${to.index} (${to.date}) (paste-ready)`, referral, s));
  out.push('');
  return out.join('\n');
}

/** The JSON of one comparison (`record compare --json`); `referral` is the note for the later visit of the two. */
export function comparisonToJson(file: SubjectFile, from: VisitRef, to: VisitRef, c: Comparison, toolVersion: string, referral?: string): Record<string, unknown> {
  return {
    format: COMPARISON_FORMAT,
    formatVersion: SERIES_FORMAT_VERSION,
    tool: { name: 'elastimate', version: toolVersion },
    methodsVersion: c.methodsVersion,
    subject: file.subject.id,
    from,
    to,
    rows: c.rows,
    cautions: c.cautions,
    summary: comparisonSummary(c),
    caveats: STANDING_CAVEATS,
    ...(referral !== undefined ? { referral } : {}),
  };
}

function visitJson(e: SeriesEntry, change: Comparison | null): Record<string, unknown> {
  const a: Assessment = e.assessment;
  const v: Record<string, unknown> = {
    index: e.index,
    date: e.date,
    entered: e.visit.inputs,
    inputs: { ...a.inputs },
    results: a.results,
    flags: a.flags,
    referral: a.referral,
  };
  if (e.visit.note !== undefined) v.note = e.visit.note;
  v.changeFromPrevious = change ? { rows: change.rows, cautions: change.cautions, summary: comparisonSummary(change) } : null;
  return v;
}

/** The JSON of a series (`record show --json`): results in the same shape as `assess --json`. */
export function seriesToJson(file: SubjectFile, entries: readonly SeriesEntry[], changes: readonly (Comparison | null)[], toolVersion: string, methodsVersion: string): Record<string, unknown> {
  return {
    format: SERIES_FORMAT,
    formatVersion: SERIES_FORMAT_VERSION,
    tool: { name: 'elastimate', version: toolVersion },
    methodsVersion,
    subject: file.subject,
    inputUnits: INPUT_UNITS,
    visits: entries.map((e, i) => visitJson(e, changes[i] ?? null)),
    caveats: STANDING_CAVEATS,
  };
}
