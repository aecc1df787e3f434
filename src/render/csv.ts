/**
 * The tidy table: one row per visit, for R, Python or SPSS. RFC 4180 CSV
 * (comma, double quotes, CRLF line ends, a header row, UTF-8 without BOM),
 * formatted by d3-dsv. Column names and units are
 * documented in docs/csv-export.md; `exportDictionary()` lists them.
 *
 * Cells: numbers in the internal unit of the column with up to two decimals
 * more than the report shows (trailing zeros dropped), empty when missing or
 * not computable; yes/no findings as 1/0; text as is. Never NaN, Infinity
 * or undefined.
 */
import { csvFormatRow, csvFormatValue } from 'd3-dsv';
import type { Assessment } from '../assessment/assess.js';
import { RESULT_KEYS, type ResultKey, type Results } from '../assessment/compute.js';
import { NUMERIC_FIELDS, VALVE_FLAGS, type NumericKey } from '../assessment/fields.js';
import type { VisitInputs } from '../assessment/inputs.js';
import type { Flag } from '../assessment/result.js';
import { decimalsFor, formatNumber } from './format.js';

/** RFC 4180 line end. */
export const CRLF = '\r\n';

/**
 * Rows as RFC 4180 text: d3-dsv quotes a cell that holds a comma, a double
 * quote or a line break (doubling the quotes); each row ends with CRLF.
 */
export function csvText(rows: readonly (readonly string[])[]): string {
  let text = '';
  for (const row of rows) text += csvFormatRow(row) + CRLF;
  return text;
}

/** One row's cells as RFC 4180 text without the line end (d3-dsv quotes where needed). */
export function csvRowText(cells: readonly string[]): string {
  return csvFormatRow(cells);
}

/** One cell as RFC 4180 text (d3-dsv: quoted when it holds a comma, a double quote or a line break). */
export function csvCellText(cell: string): string {
  return csvFormatValue(cell);
}

/** Units of the result keys (docs/json-output.md); a test checks them against computed results. */
export const RESULT_UNITS: Partial<Record<ResultKey, string>> = {
  pes: 'mmHg', map: 'mmHg', pp: 'mmHg', sv: 'mL', svVolumetric: 'mL', svDoppler: 'mL', ef: '%', efVolumes: '%',
  co: 'L/min', ci: 'L/min/m²', bsa: 'm²', tpr: 'WU', tprDyn: 'dyn·s·cm⁻⁵', compliance: 'mL/mmHg',
  ea: 'mmHg/mL', eaIndexed: 'mmHg·m²/mL', eaResistance: 'mmHg/mL', tNd: '', endAvg: '', endEst: '',
  ees: 'mmHg/mL', eesIndexed: 'mmHg·m²/mL', eaEes: '', eaEesFromEf: '', v0: 'mL', eesNoIntercept: 'mmHg/mL',
};

const SCALE = [1, 10, 100, 1000, 1e4, 1e5, 1e6, 1e7, 1e8];

/** Decimals per unit, looked up once per unit rather than once per cell. */
const csvDecimals = new Map<string, number>();
function decimalsOf(unit: string): number {
  let d = csvDecimals.get(unit);
  if (d === undefined) {
    d = Math.min(decimalsFor(unit) + 2, SCALE.length - 1);
    csvDecimals.set(unit, d);
  }
  return d;
}

/** Decimal parts (".5", ".0427") by decimals and scaled value, written once and reused (up to 5 decimals). */
const FRACTIONS: (string | undefined)[][] = [];
function fractionText(decimals: number, part: number): string {
  const scale = SCALE[decimals]!;
  const known = FRACTIONS[decimals] ?? (scale <= 1e5 ? (FRACTIONS[decimals] = new Array<string | undefined>(scale)) : undefined);
  let text = known?.[part];
  if (text === undefined) {
    const digits = String(part + scale).slice(1); // zero-padded to `decimals` digits
    let end = digits.length;
    while (digits.charCodeAt(end - 1) === 48) end--; // trailing zeros dropped
    text = `.${digits.slice(0, end)}`;
    if (known) known[part] = text;
  }
  return text;
}

/**
 * A number for a CSV cell: '' when missing or not finite, else rounded to two
 * decimals more than the report shows for its unit (render/format.ts
 * decimalsFor), without trailing zeros: 1.5429, 108, -27.79. Hot path of
 * `batch`: the value is scaled to a whole number, split into its whole and
 * decimal parts, and the decimal part's text looked up, which is several
 * times faster than toFixed. The text is only digits, a leading minus and a
 * decimal point, so it never needs quotes in CSV.
 */
export function csvNumber(value: number | null | undefined, unit: string): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '';
  const decimals = decimalsOf(unit);
  const scale = SCALE[decimals]!;
  const scaled = Math.round(Math.abs(value) * scale);
  if (!Number.isSafeInteger(scaled)) return formatNumber(value, 0);
  if (scaled === 0) return '0';
  let whole = Math.floor(scaled / scale);
  let part = scaled - whole * scale;
  if (part < 0) {
    // The division rounded up (values near 2⁵³ only): take one back.
    whole -= 1;
    part += scale;
  }
  const text = part === 0 ? String(whole) : String(whole) + fractionText(decimals, part);
  return value < 0 ? `-${text}` : text;
}

/** The results whose absence is worth a reason in the `notComputable` column (the rest need an input not given). */
const EXPLAINED_KEYS: readonly ResultKey[] = ['pes', 'ea', 'tNd', 'endAvg', 'endEst', 'ees', 'eaEes', 'v0'];

export interface ColumnSpec {
  name: string;
  unit: string;
  description: string;
}

/** The numeric inputs as used (averaged readings, internal units), in registry order. */
const INPUT_NUMERIC: readonly NumericKey[] = NUMERIC_FIELDS.map((f) => f.key);
/** Method choices and sex, after rhythm and the valve findings. */
const INPUT_CHOICES = ['pesMethod', 'mapMethod', 'bsaMethod', 'sex'] as const;

/** Result column name: the JSON key, or `<key>_result` when an input column already has that name. */
export function resultColumnName(key: string, taken: ReadonlySet<string>): string {
  return taken.has(key.toLowerCase()) ? `${key}_result` : key;
}

export function inputColumns(): ColumnSpec[] {
  const cols: ColumnSpec[] = INPUT_NUMERIC.map((key) => {
    const f = NUMERIC_FIELDS.find((x) => x.key === key)!;
    return { name: key, unit: f.unit, description: `${f.label}${f.multiple ? ' (mean of the readings)' : ''}, as used` };
  });
  cols.push({ name: 'rhythm', unit: '', description: 'rhythm during the echo: sinus, atrial-fibrillation, other' });
  for (const v of VALVE_FLAGS) cols.push({ name: v.key, unit: '1/0', description: `${v.label}: 1 yes, 0 no` });
  cols.push(
    { name: 'pesMethod', unit: '', description: 'end-systolic pressure estimate: sbp90, weighted, measured' },
    { name: 'mapMethod', unit: '', description: 'mean pressure formula: third, meaney' },
    { name: 'bsaMethod', unit: '', description: 'body surface area formula: mosteller, dubois' },
    { name: 'sex', unit: '', description: 'female, male, or empty' },
  );
  return cols;
}

export function resultColumns(taken: ReadonlySet<string>): ColumnSpec[] {
  return RESULT_KEYS.map((key) => ({ name: resultColumnName(key, taken), unit: RESULT_UNITS[key] ?? '', description: `results.${key}.value of the JSON output (docs/json-output.md)` }));
}

/** The trailing columns every table shares. */
export function trailingColumns(taken: ReadonlySet<string>): ColumnSpec[] {
  return [
    { name: resultColumnName('flags', taken), unit: '', description: 'codes of the checks that fired, separated by ";" (e.g. ef-gap;rhythm)' },
    { name: resultColumnName('notComputable', taken), unit: '', description: 'why pes, ea, tNd, endAvg, endEst, ees, eaEes or v0 is empty: "key: reason" separated by "; " (other results are empty only when an input they need was not given)' },
    { name: resultColumnName('methodsVersion', taken), unit: '', description: 'version of the methods that produced the results' },
    { name: resultColumnName('error', taken), unit: '', description: 'why the row could not be computed (then every result is empty)' },
  ];
}

/** Columns of `elastimate export`: subject, visit, date, note, inputs, results, trailing columns. */
export function exportDictionary(): ColumnSpec[] {
  const inputs = inputColumns();
  const taken = new Set(['subject', 'visit', 'date', 'note', ...inputs.map((c) => c.name.toLowerCase())]);
  return [
    { name: 'subject', unit: '', description: 'pseudonymous subject id' },
    { name: 'visit', unit: '', description: 'visit number in date order (1 = first)' },
    { name: 'date', unit: 'YYYY-MM-DD', description: 'visit date' },
    { name: 'note', unit: '', description: 'free-text note of the visit' },
    ...inputs,
    ...resultColumns(taken),
    ...trailingColumns(taken),
  ];
}

export type CellValue = string | number | boolean | null;

function inputValues(i: VisitInputs): CellValue[] {
  const values: CellValue[] = INPUT_NUMERIC.map((key) => i[key]);
  values.push(i.rhythm);
  for (const v of VALVE_FLAGS) values.push(i[v.key]);
  for (const key of INPUT_CHOICES) values.push(i[key] ?? null);
  return values;
}

export function resultCells(r: Results): string[] {
  return RESULT_KEYS.map((key) => csvNumber(r[key].value, r[key].unit));
}

/** resultCells(r) as CSV text, the cells joined by commas (numbers never need quotes: csvNumber). */
export function resultCellsText(r: Results): string {
  let text = '';
  for (let i = 0; i < RESULT_KEYS.length; i++) {
    const q = r[RESULT_KEYS[i]!];
    text += i === 0 ? csvNumber(q.value, q.unit) : `,${csvNumber(q.value, q.unit)}`;
  }
  return text;
}

export function flagCell(flags: readonly Flag[]): string {
  return flags.map((f) => f.code).join(';');
}

export function notComputableCell(r: Results): string {
  let text = '';
  for (const k of EXPLAINED_KEYS) {
    if (r[k].value !== null) continue;
    text += `${text ? '; ' : ''}${k}: ${r[k].reason ?? 'not computable'}`;
  }
  return text;
}

/** One export row, values in exportDictionary() order, for an assessed visit. */
export function exportValues(subject: string, index: number, date: string, note: string | undefined, a: Assessment): CellValue[] {
  const notComputable = notComputableCell(a.results);
  return [
    subject, index, date, note ?? null,
    ...inputValues(a.inputs),
    ...RESULT_KEYS.map((k) => a.results[k].value),
    flagCell(a.flags) || null, notComputable || null, a.methodsVersion, null,
  ];
}

/** An export row for a visit whose stored inputs do not parse: the reason in the error column. */
export function exportErrorValues(subject: string, index: number, date: string, note: string | undefined, error: string, methodsVersion: string): CellValue[] {
  const blanks = (n: number): CellValue[] => Array.from({ length: n }, () => null);
  return [subject, index, date, note ?? null, ...blanks(inputColumns().length), ...blanks(RESULT_KEYS.length), null, null, methodsVersion, error];
}

/** CSV cells for typed values: numbers through csvNumber in the column's unit, yes/no as 1/0, missing as ''. */
export function csvCells(values: readonly CellValue[], columns: readonly ColumnSpec[]): string[] {
  return values.map((v, i) => {
    if (v === null) return '';
    if (typeof v === 'boolean') return v ? '1' : '0';
    if (typeof v === 'number') return csvNumber(v, columns[i]?.unit ?? '');
    return v;
  });
}

/** A typed JSON record for the same row (non-finite numbers become null). */
export function jsonRecord(values: readonly CellValue[], columns: readonly ColumnSpec[]): Record<string, CellValue> {
  const record: Record<string, CellValue> = {};
  columns.forEach((c, i) => {
    const v = values[i] ?? null;
    record[c.name] = typeof v === 'number' && !Number.isFinite(v) ? null : v;
  });
  return record;
}
