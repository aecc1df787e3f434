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
import { RESULT_KEYS, RESULT_UNITS, type ResultKey, type Results } from '../assessment/graph/index.js';
import { NUMERIC_FIELDS, VALVE_FLAGS, type NumericKey } from '../assessment/fields.js';
import type { VisitInputs } from '../assessment/inputs.js';
import type { FlagSink } from '../assessment/checks.js';
import type { Flag, Quantity } from '../assessment/result.js';
import type { Comparison } from '../records/compare.js';
import { sanitizeText } from '../text/sanitize.js';
import { bareNumber } from '../units/quantity.js';
import { decimalsFor, formatNumber } from './format.js';

/** RFC 4180 line end. */
export const CRLF = '\r\n';

/**
 * Whether a text cell would be taken for a formula by a spreadsheet: it
 * begins with `=`, `+`, `-`, `@`, a tab or a carriage return (OWASP, "CSV
 * Injection") and is not a plain number (`-2.5` and `+3` are numbers, never
 * formulas, and stay numbers).
 */
function looksLikeFormula(cell: string): boolean {
  return FORMULA_START[cell.charCodeAt(0)] === 1 && bareNumber(cell) !== bareNumber(cell); // NaN: not a plain number
}

/** The first characters of a formula: = + - @ tab CR (1), by character code. */
const FORMULA_START = new Uint8Array(128);
for (const c of '=+-@\t\r') FORMULA_START[c.charCodeAt(0)] = 1;

/** The characters a text cell is copied with as they are (1), by code: printable ASCII but the comma and the double quote. */
const PLAIN_CHARACTER = new Uint8Array(128);
for (let c = 0x20; c < 0x7f; c++) if (c !== 44 && c !== 34) PLAIN_CHARACTER[c] = 1;

/**
 * The one CSV cell guard, for every CSV the tool writes (export and batch):
 * a text cell a spreadsheet would run as a formula gets a leading single
 * quote, as the OWASP CSV-injection guidance recommends; any other cell,
 * numbers included, is returned as it is. Composes with the text sanitiser:
 * sanitise first, then guard.
 */
export function guardCell(cell: string): string {
  return looksLikeFormula(cell) ? `'${cell}` : cell;
}

/**
 * Rows as RFC 4180 text: every cell through guardCell, then quoted by d3-dsv
 * when it holds a comma, a double quote or a line break (doubling the
 * quotes); each row ends with CRLF.
 */
export function csvText(rows: readonly (readonly string[])[]): string {
  let text = '';
  for (const row of rows) text += csvFormatRow(row.map(safeCell)) + CRLF;
  return text;
}

/**
 * A text cell's content before quoting: control characters other than tab and
 * line breaks (which CSV quoting carries) made visible by the one sanitiser,
 * so no raw ESC or C1 byte reaches a file that a terminal or spreadsheet opens.
 */
export function csvCellText(cell: string): string {
  return sanitizeText(cell, { keepWhitespace: true });
}

/** A text cell as every CSV of the tool writes it: the sanitiser first, then the cell guard. */
export function safeCell(cell: string): string {
  return guardCell(csvCellText(cell));
}


const SCALE = [1, 10, 100, 1000, 1e4, 1e5, 1e6, 1e7, 1e8];

/** Decimals of a CSV number per unit (csvNumber), looked up once per unit rather than once per cell. */
const csvDecimals = new Map<string, number>();
export function decimalsOf(unit: string): number {
  let d = csvDecimals.get(unit);
  if (d === undefined) {
    d = Math.min(decimalsFor(unit) + 2, SCALE.length - 1);
    csvDecimals.set(unit, d);
  }
  return d;
}

/** The documented unit and decimals of each result key, in RESULT_KEYS order, so the hot path skips the lookup. */
const RESULT_UNIT_LIST: readonly string[] = RESULT_KEYS.map((key) => RESULT_UNITS[key]);
const RESULT_DECIMALS: readonly number[] = RESULT_UNIT_LIST.map(decimalsOf);

/**
 * A number for a CSV cell: '' when missing or not finite, else rounded to two
 * decimals more than the report shows for its unit (render/format.ts
 * decimalsFor), without trailing zeros: 1.5429, 108, -27.79. The value is
 * scaled to a whole number, written as digits and the decimal point put
 * back, which is several times faster than toFixed. (`batch` writes the same
 * digits as bytes: CsvBytes.)
 */
export function csvNumber(value: number | null | undefined, unit: string): string {
  return numberText(value, decimalsOf(unit));
}

function numberText(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '';
  const scaled = Math.round(Math.abs(value) * SCALE[decimals]!);
  if (!Number.isSafeInteger(scaled)) return formatNumber(value, 0);
  if (scaled === 0) return '0';
  let digits = String(scaled);
  let d = decimals;
  while (d > 0 && digits.charCodeAt(digits.length - 1) === 48) {
    digits = digits.slice(0, -1);
    d--;
  }
  if (d > 0) digits = digits.length > d ? `${digits.slice(0, digits.length - d)}.${digits.slice(digits.length - d)}` : `0.${'0'.repeat(d - digits.length)}${digits}`;
  return value < 0 ? `-${digits}` : digits;
}

/** The tens and units digit of 0…99, as bytes: numbers are written two digits at a time. */
const PAIR_HIGH = Uint8Array.from({ length: 100 }, (_v, i) => 48 + Math.floor(i / 10));
const PAIR_LOW = Uint8Array.from({ length: 100 }, (_v, i) => 48 + (i % 10));

/**
 * CSV written straight into UTF-8 bytes, for `batch`, whose output is a
 * hundred thousand rows of forty-odd cells: no text per cell, no joined
 * lines, and the bytes go to the file (or from a worker thread to the
 * writer) as they are. Text cells are quoted by d3-dsv (csvFormatValue) as
 * csvText does; numbers are written digit by digit exactly as csvNumber
 * writes them (a test compares the two).
 */
export class CsvBytes {
  private buf: Buffer;
  private pos = 0;

  constructor(private readonly capacity = 1 << 18) {
    this.buf = Buffer.allocUnsafeSlow(capacity);
  }

  private room(bytes: number): void {
    if (this.pos + bytes <= this.buf.length) return;
    const next = Buffer.allocUnsafeSlow(Math.max(this.buf.length * 2, this.pos + bytes));
    this.buf.copy(next, 0, 0, this.pos);
    this.buf = next;
  }

  /**
   * A text cell. Printable ASCII without a comma or a double quote that
   * does not begin like a formula (nearly every cell) is copied as it is,
   * which is what d3-dsv's csvFormatValue returns for it; any other cell goes
   * through safeCell (sanitiser, then cell guard), is quoted by
   * csvFormatValue where needed and encoded as UTF-8 by Node.
   */
  text(cell: string): void {
    const n = cell.length;
    this.room(n);
    const buf = this.buf;
    const start = this.pos;
    let plain = FORMULA_START[cell.charCodeAt(0)] !== 1;
    let p = start;
    for (let i = 0; plain && i < n; i++) {
      const c = cell.charCodeAt(i);
      if (c >= 128 || PLAIN_CHARACTER[c] !== 1) plain = false;
      else buf[p++] = c;
    }
    if (plain) {
      this.pos = p;
      return;
    }
    const t = csvFormatValue(safeCell(cell));
    this.room(t.length * 3);
    this.pos = start + this.buf.write(t, start, 'utf8');
  }

  /** Where the last plainLine stopped: the LF or CR that ends the line, or the end of the text. */
  lineEnd = 0;

  /**
   * One line of text without a double quote, from `start` up to the next LF
   * or CR (or `end`), its cells separated by `sep`. When it has exactly
   * `starts.length - 1` cells and each is one that text() copies as it is
   * (printable ASCII, no comma, not beginning like a formula), the line is
   * written exactly as cells() writes its cells, in one pass, the start of
   * cell k goes into starts[k] and one past the line's end into
   * starts[count], and the count comes back. Otherwise nothing is written
   * and the answer is -1. Either way lineEnd is set.
   */
  plainLine(text: string, start: number, end: number, sep: number, starts: Int32Array): number {
    this.room(end - start);
    const buf = this.buf;
    let p = this.pos;
    let plain = true;
    let count = 0;
    let cellStart = true;
    let i = start;
    starts[0] = start;
    for (; i < end; i++) {
      const c = text.charCodeAt(i);
      if (c === sep) {
        buf[p++] = 44;
        if (++count < starts.length) starts[count] = i + 1;
        cellStart = true;
        continue;
      }
      if (c === 10 || c === 13) break;
      if (c >= 128 || PLAIN_CHARACTER[c] !== 1 || (cellStart && FORMULA_START[c] === 1)) plain = false;
      buf[p++] = c;
      cellStart = false;
    }
    this.lineEnd = i;
    if (!plain || ++count !== starts.length - 1) return -1;
    starts[count] = i + 1;
    this.pos = p;
    return count;
  }

  /** The first `width` cells (missing ones empty), as text cells separated by commas. */
  cells(cells: readonly string[], width: number): void {
    for (let i = 0; i < width; i++) {
      if (i > 0) {
        this.room(1);
        this.buf[this.pos++] = 44;
      }
      this.text(cells[i] ?? '');
    }
  }

  /** The cell separator. */
  comma(): void {
    this.room(1);
    this.buf[this.pos++] = 44;
  }

  /** The RFC 4180 line end, CRLF. */
  endRow(): void {
    this.room(2);
    this.buf[this.pos++] = 13;
    this.buf[this.pos++] = 10;
  }

  /** csvNumber(value, unit), written as bytes. */
  number(value: number | null | undefined, unit: string): void {
    this.numberWith(value, decimalsOf(unit));
  }

  /** A comma, then csvNumber(value, unit) for a unit whose decimals (csvDecimals) were looked up once. */
  commaNumber(value: number | null | undefined, decimals: number): void {
    this.room(1);
    this.buf[this.pos++] = 44;
    this.numberWith(value, decimals);
  }

  private numberWith(value: number | null | undefined, decimals: number): void {
    if (value === null || value === undefined) return;
    const y = Math.abs(value) * SCALE[decimals]!;
    if (!(y < 2147483647)) {
      // Large or not finite (rare): as csvNumber writes it.
      const text = numberText(value, decimals);
      if (text !== '') this.text(text);
      return;
    }
    // The usual case: Math.round(y) from int32 arithmetic. Truncating y + 0.5 is that rounding, except
    // where the sum itself rounds up to the next whole number (y just below a half, as 0.49999999999999994):
    // then x - 0.5, exact for any int32, lies above y, and x is one too many.
    let x = (y + 0.5) | 0;
    if (x - 0.5 > y) x--;
    this.room(24);
    const buf = this.buf;
    let p = this.pos;
    if (x === 0) {
      buf[p] = 48;
      this.pos = p + 1;
      return;
    }
    if (value < 0) buf[p++] = 45;
    // Trailing zeros of the decimals dropped, then the digits written from the right, two at a time.
    let d = decimals;
    while (d > 0) {
      const t = (x / 10) | 0;
      if (x !== t * 10) break;
      x = t;
      d--;
    }
    const n = x < 10 ? 1 : x < 100 ? 2 : x < 1000 ? 3 : x < 1e4 ? 4 : x < 1e5 ? 5 : x < 1e6 ? 6 : x < 1e7 ? 7 : x < 1e8 ? 8 : x < 1e9 ? 9 : 10;
    const end = p + (n > d ? n - d : 1) + (d > 0 ? d + 1 : 0);
    let q = end;
    if (d > 0) {
      let k = d;
      for (; k >= 2; k -= 2) {
        const t = (x / 100) | 0;
        const r = x - t * 100;
        buf[--q] = PAIR_LOW[r]!;
        buf[--q] = PAIR_HIGH[r]!;
        x = t;
      }
      if (k === 1) {
        const t = (x / 10) | 0;
        buf[--q] = 48 + (x - t * 10);
        x = t;
      }
      buf[--q] = 46;
    }
    while (x >= 100) {
      const t = (x / 100) | 0;
      const r = x - t * 100;
      buf[--q] = PAIR_LOW[r]!;
      buf[--q] = PAIR_HIGH[r]!;
      x = t;
    }
    if (x >= 10) {
      buf[--q] = PAIR_LOW[x]!;
      buf[--q] = PAIR_HIGH[x]!;
    } else if (q > p) buf[--q] = 48 + x;
    while (q > p) buf[--q] = 48; // the zero before the point of a value below one
    this.pos = end;
  }

  /** resultCells(r), each preceded by a comma. */
  resultCells(r: Results): void {
    // computeResults writes its keys in RESULT_KEYS order, and walking an object's own keys in
    // their order is much faster than looking each up by a name that changes with every cell:
    // the names are checked against RESULT_KEYS on the way, and looked up by name from the
    // first one that differs (which computeResults never gives).
    let i = 0;
    for (const key in r) {
      if (key !== RESULT_KEYS[i]) break;
      this.resultCell(r[key as ResultKey], i++);
    }
    for (; i < RESULT_KEYS.length; i++) this.resultCell(r[RESULT_KEYS[i]!], i);
  }

  private resultCell(q: Quantity, i: number): void {
    this.room(1);
    this.buf[this.pos++] = 44;
    this.numberWith(q.value, q.unit === RESULT_UNIT_LIST[i] ? RESULT_DECIMALS[i]! : decimalsOf(q.unit));
  }

  /**
   * The bytes written so far (a view of a buffer of its own, never Node's shared pool, so it may be
   * transferred); the writer starts afresh, with room for a quarter more than this take held, so
   * that pieces of like size are written without growing (and copying) the buffer.
   */
  take(): Uint8Array {
    const bytes = this.buf.subarray(0, this.pos);
    this.buf = Buffer.allocUnsafeSlow(Math.max(this.capacity, this.pos + (this.pos >> 2)));
    this.pos = 0;
    return bytes;
  }
}

/** The results whose absence is worth a reason in the `notComputable` column (the rest need an input not given). */
const EXPLAINED_KEYS: readonly ResultKey[] = ['pes', 'ea', 'tNd', 'normalizedElastanceAvg', 'normalizedElastanceEst', 'ees', 'eaEes', 'v0'];

export interface ColumnSpec {
  name: string;
  unit: string;
  description: string;
}

/** The numeric inputs as used (averaged readings, internal units), in registry order. */
const INPUT_NUMERIC: readonly NumericKey[] = NUMERIC_FIELDS.map((f) => f.key);
/** Method choices and sex, after rhythm and the valve findings. */
const INPUT_CHOICES = ['pesMethod', 'mapMethod', 'bsaMethod', 'sex'] as const;


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

export function resultColumns(): ColumnSpec[] {
  return RESULT_KEYS.map((key) => ({ name: key, unit: RESULT_UNITS[key], description: `results.${key}.value of the JSON output (docs/json-output.md)` }));
}

/** The trailing columns every table shares. */
export function trailingColumns(): ColumnSpec[] {
  return [
    { name: 'flags', unit: '', description: 'codes of the checks that fired, separated by ";" (e.g. ef-gap;rhythm)' },
    { name: 'notComputable', unit: '', description: 'why pes, ea, tNd, normalizedElastanceAvg, normalizedElastanceEst, ees, eaEes or v0 is empty: "key: reason" separated by "; " (other results are empty only when an input they need was not given)' },
    { name: 'methodsVersion', unit: '', description: 'version of the methods that produced the results' },
    { name: 'error', unit: '', description: 'why the row could not be computed (then every result is empty)' },
  ];
}

/** The changes `export` judges against the first visit of each subject (src/records/compare.ts). */
const VERDICT_KEYS = ['pes', 'ea', 'ees', 'eaEes', 'pasp', 'tapsePasp'] as const;

/** Export columns with the verdict of each change from the subject's first visit: the word `record compare 1 <visit> --json` gives. */
export function verdictColumns(): ColumnSpec[] {
  return VERDICT_KEYS.map((key) => ({
    name: `${key}ChangeFromFirst`,
    unit: '',
    description: `change in ${key} from the subject's first visit judged against the least significant change (src/records/compare.ts changeVerdict): beyond-noise, within-noise or not-computable; empty when the first visit could not be computed${key === 'pasp' || key === 'tapsePasp' ? ', or when either visit lacks the value' : ''}`,
  }));
}

/** Columns of `elastimate export`: subject, visit, date, note, inputs, results, verdicts, trailing columns. */
export function exportDictionary(): ColumnSpec[] {
  const inputs = inputColumns();
  return [
    { name: 'subject', unit: '', description: 'pseudonymous subject id' },
    { name: 'visit', unit: '', description: 'visit number in date order (1 = first)' },
    { name: 'date', unit: 'YYYY-MM-DD', description: 'visit date' },
    { name: 'note', unit: '', description: 'free-text note of the visit' },
    ...inputs,
    ...resultColumns(),
    ...verdictColumns(),
    ...trailingColumns(),
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

export function flagCell(flags: readonly Flag[]): string {
  let text = '';
  for (let i = 0; i < flags.length; i++) text = withFlagCode(text, flags[i]!.code);
  return text;
}

/** The flags cell with one more code: codes are separated by semicolons. */
function withFlagCode(cell: string, code: string): string {
  return cell === '' ? code : `${cell};${code}`;
}

/**
 * The flags cell of a visit built as its checks are made (a FlagSink for
 * visitChecks): what flagCell gives for checkVisit's flags, without an object
 * per flag. A batch keeps one per thread: `start` before each row.
 */
export class FlagCodes implements FlagSink {
  cell = '';

  start(): this {
    this.cell = '';
    return this;
  }

  add(code: string): void {
    this.cell = withFlagCode(this.cell, code);
  }
}

export function notComputableCell(r: Results): string {
  let text = '';
  for (const k of EXPLAINED_KEYS) {
    if (r[k].value !== null) continue;
    text += `${text ? '; ' : ''}${k}: ${r[k].reason ?? 'not computable'}`;
  }
  return text;
}

/**
 * One export row, values in exportDictionary() order, for an assessed visit;
 * `fromFirst` is compareVisits(first visit, this visit), null when the first
 * visit could not be computed.
 */
export function exportValues(subject: string, index: number, date: string, note: string | undefined, a: Assessment, fromFirst: Comparison | null): CellValue[] {
  const notComputable = notComputableCell(a.results);
  return [
    subject, index, date, note ?? null,
    ...inputValues(a.inputs),
    ...RESULT_KEYS.map((k) => a.results[k].value),
    ...VERDICT_KEYS.map((k) => fromFirst?.rows.find((r) => r.key === k)?.verdict ?? null),
    flagCell(a.flags) || null, notComputable || null, a.methodsVersion, null,
  ];
}

/** An export row for a visit whose stored inputs do not parse: the reason in the error column. */
export function exportErrorValues(subject: string, index: number, date: string, note: string | undefined, error: string, methodsVersion: string): CellValue[] {
  const blanks = (n: number): CellValue[] => Array.from({ length: n }, () => null);
  return [subject, index, date, note ?? null, ...blanks(inputColumns().length), ...blanks(RESULT_KEYS.length), ...blanks(VERDICT_KEYS.length), null, null, methodsVersion, error];
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
