/**
 * One row of a cohort spreadsheet → raw inputs → results, for `elastimate
 * batch` (docs/batch.md). Pure and lean: per row it builds the raw inputs
 * from the recognised cells, runs the same parseInputs and graph evaluation as
 * `assess` (the numbers equal assess's `results`; written into one results
 * object per thread, not a new one per row), the same checks, and formats
 * the cells. mathjs loads only if a cell carries a unit.
 *
 * Columns are recognised by name, ignoring case and punctuation, so `lvot-vti`,
 * `lvotVti` and `LVOT_VTI` are one column. Everything else passes through.
 */
import { dsvFormat } from 'd3-dsv';
import { visitChecks } from '../assessment/checks.js';
import { computeResultsInto, scratchResults } from '../assessment/graph/index.js';
import { BSA_METHODS, MAP_METHODS, NUMERIC_FIELDS, PES_METHODS, RHYTHMS, SEXES, VALVE_FLAGS, type NumericKey } from '../assessment/fields.js';
import { MAX_READINGS, acceptedShape, parseFieldValues } from '../assessment/checked-inputs.js';
import type { RawInputs } from '../assessment/inputs.js';
import { METHODS_VERSION } from '../assessment/result.js';
import { RESULT_KEYS, type Results } from '../assessment/graph/index.js';
import type { VisitInputs } from '../assessment/inputs.js';
import { InputError, describeProblem, showValue } from '../errors.js';
import { CsvBytes, FlagCodes, csvNumber, decimalsOf, notComputableCell, resultCells, resultColumns, trailingColumns } from '../render/csv.js';
import { KINDS, bareNumber, toInternalUnit } from '../units/quantity.js';
import type { BadRecord, Dialect } from './csv-records.js';

type ColumnKind =
  | { kind: 'number'; key: string; multiple: boolean; field: number }
  | { kind: 'choice'; key: string; codes: ReadonlyMap<string, string>; accepted: string; flag: string };

function normalise(name: string): string {
  return name.toLowerCase().replace(/[^a-z0-9]/g, '');
}

/** A coded cell as looked up: lower case, without spaces, hyphens, underscores or dots. */
function codeOf(cell: string): string {
  return cell.toLowerCase().replace(/[\s\-_.]/g, '');
}

/** Codings of the choice columns (docs/batch.md): every spelling → the value the flag takes. */
function coding(values: readonly string[], aliases: Record<string, string> = {}): ReadonlyMap<string, string> {
  const codes = new Map<string, string>();
  for (const v of values) codes.set(codeOf(v), v);
  for (const [alias, v] of Object.entries(aliases)) codes.set(codeOf(alias), v);
  return codes;
}

const RHYTHM_CODES = coding(RHYTHMS, { sr: 'sinus', nsr: 'sinus', 'sinus rhythm': 'sinus', af: 'atrial-fibrillation', afib: 'atrial-fibrillation' });
const SEX_CODES = coding(SEXES, { f: 'female', m: 'male' });
/** Yes/no findings; an empty cell (or a missing-value mark) is no. */
const FINDING_CODES = new Map<string, string>([
  ...['1', 'yes', 'y', 'true', 'present'].map((w): [string, string] => [w, 'yes']),
  ...['0', 'no', 'n', 'false', 'absent'].map((w): [string, string] => [w, 'no']),
]);

const choice = (key: string, codes: ReadonlyMap<string, string>, accepted: string, flag: string): ColumnKind => ({ kind: 'choice', key, codes, accepted, flag });

const RECOGNISED: ReadonlyMap<string, ColumnKind> = new Map<string, ColumnKind>([
  ...NUMERIC_FIELDS.map((f, field): [string, ColumnKind] => [normalise(f.key), { kind: 'number', key: f.key, multiple: f.multiple === true, field }]),
  ...VALVE_FLAGS.map((v): [string, ColumnKind] => [normalise(v.key), choice(v.key, FINDING_CODES, '1/0, yes/no, y/n, true/false or present/absent (empty = no)', v.flag)]),
  ['rhythm', choice('rhythm', RHYTHM_CODES, 'sinus (or SR, NSR), atrial fibrillation (or AF, AFib), other', 'rhythm')],
  ['pesmethod', choice('pesMethod', coding(PES_METHODS), PES_METHODS.join(', '), 'pes-method')],
  ['mapmethod', choice('mapMethod', coding(MAP_METHODS), MAP_METHODS.join(', '), 'map-method')],
  ['bsamethod', choice('bsaMethod', coding(BSA_METHODS), BSA_METHODS.join(', '), 'bsa-method')],
  ['sex', choice('sex', SEX_CODES, 'F, M, female or male (any case)', 'sex')],
]);

/**
 * A missing value as spreadsheets and statistics packages write it: an empty
 * cell, NA, N/A (any case), "." (SPSS, SAS) or "-".
 */
export function isMissingMark(cell: string): boolean {
  switch (cell.length) {
    case 0:
      return true;
    case 1:
      return cell === '.' || cell === '-';
    case 2:
      return (cell.charCodeAt(0) | 32) === 110 && (cell.charCodeAt(1) | 32) === 97; // NA in any case
    case 3:
      return cell.toLowerCase() === 'n/a';
    default:
      return false;
  }
}

/**
 * A header as written: the name, and a unit in round or square brackets at
 * its end (`SBP (mmHg)`, `EDV [mL]`), split off when the rest names an input.
 */
function headerName(raw: string): { column: ColumnKind | undefined; unit: string } {
  const whole = RECOGNISED.get(normalise(raw));
  if (whole) return { column: whole, unit: '' };
  const m = /^(.*?)\s*[([]\s*([^()[\]]*?)\s*[)\]]\s*$/.exec(raw);
  const column = m ? RECOGNISED.get(normalise(m[1]!)) : undefined;
  return column ? { column, unit: m![2]! } : { column: undefined, unit: '' };
}

/** Spellings of each default unit taken as no unit at all. */
const DEFAULT_UNIT_WORDS: Record<string, readonly string[]> = { years: ['years', 'year', 'yrs', 'yr', 'y'], bpm: ['bpm', '/min', 'min-1', 'beats/min'], mmHg: ['mmhg', 'mm hg'] };

/**
 * The unit a header gives a numeric column: '' for the field's own unit,
 * else the unit, checked once here (mathjs loads only for such a unit).
 */
function headerUnit(unit: string, index: number, header: string, field: number): string {
  const f = NUMERIC_FIELDS[field]!;
  const lower = unit.trim().toLowerCase();
  if (lower === '' || lower === f.unit.toLowerCase() || (DEFAULT_UNIT_WORDS[f.unit] ?? []).includes(lower)) return '';
  const accepted = `a unit of the input's kind in brackets: ${KINDS[f.kind].examples}`;
  if (f.kind !== 'ratio') {
    try {
      toInternalUnit(f.flag, `1 ${unit}`, f.kind);
      return unit.trim();
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
    }
  }
  throw new InputError({ field: `column ${index + 1}`, value: showValue(header), reason: `the unit ${showValue(unit)} is not one for ${f.label}`, accepted: f.kind === 'ratio' ? `${f.unit || 'no unit'} for this input` : accepted });
}

export interface BatchLayout {
  /** The input header as read. */
  header: string[];
  /** The separator and decimal mark (records/csv-records.ts detectDialect). */
  dialect: Dialect;
  /** Input column positions that feed the computation, and the unit a header gives a numeric column ('' for its own). */
  recognised: { index: number; column: ColumnKind; unit: string }[];
  /** Numeric inputs as used (registry positions), one output column each after the input columns; `decimals` as csvNumber writes the unit. */
  used: { field: number; key: NumericKey; unit: string; decimals: number }[];
  /** The output header: input columns, inputs as used, result columns, flags, notComputable, methodsVersion, error. */
  outputHeader: string[];
}

/** The comma-separated dialect of RFC 4180. */
export const COMMA: Dialect = { separator: ',', decimalComma: false };

/** The output column of a numeric input as used: its key with the suffix `Used` (as the results that report a value used are named). */
function usedName(key: string): string {
  return `${key}Used`;
}

/** Plan the output from the input header. Refuses empty or repeated column names. */
export function planBatch(header: readonly string[], dialect: Dialect = COMMA): BatchLayout {
  const seen = new Map<string, number>();
  const recognised: BatchLayout['recognised'] = [];
  const recognisedKeys = new Map<string, string>();
  header.forEach((raw, index) => {
    const name = raw.trim();
    if (name === '') {
      throw new InputError({ field: `column ${index + 1}`, value: '', reason: 'the header cell is empty', accepted: 'a name for every column' });
    }
    const lower = name.toLowerCase();
    if (seen.has(lower)) {
      throw new InputError({ field: `column ${index + 1}`, value: showValue(name), reason: `same name as column ${seen.get(lower)! + 1}`, accepted: 'distinct column names' });
    }
    seen.set(lower, index);
    const { column, unit } = headerName(name);
    if (column) {
      const earlier = recognisedKeys.get(column.key);
      if (earlier !== undefined) {
        throw new InputError({ field: `column ${index + 1}`, value: showValue(name), reason: `names the same input as column ${showValue(earlier)}`, accepted: 'each input in one column' });
      }
      recognisedKeys.set(column.key, name);
      recognised.push({ index, column, unit: column.kind === 'number' ? headerUnit(unit, index, name, column.field) : '' });
    }
  });
  if (!recognised.some((r) => r.column.key === 'sbp')) {
    const required = NUMERIC_FIELDS.filter((f) => f.required).map((f) => f.flag).join(', ');
    throw new InputError({ field: 'header', value: showValue(header.join(dialect.separator)), reason: 'no measurement columns recognised', accepted: `columns named like the flags: ${required}, and optionally hr, ef, sv, height, weight, … (docs/batch.md)` });
  }
  const taken = new Set(seen.keys());
  const resultNames = new Set<string>(RESULT_KEYS);
  const used = recognised
    .flatMap((r) => (r.column.kind === 'number' ? [r.column.field] : []))
    .sort((x, y) => x - y)
    .map((field) => ({ field, key: NUMERIC_FIELDS[field]!.key, unit: NUMERIC_FIELDS[field]!.unit, decimals: decimalsOf(NUMERIC_FIELDS[field]!.unit) }))
    // A result that reports the value used for an input (svUsed, efUsed) is that input's column as used already.
    .filter((u) => !resultNames.has(usedName(u.key)));
  const usedNames = used.map((u) => usedName(u.key));
  const trailing = [...resultColumns(), ...trailingColumns()];
  const clash = [...usedNames, ...trailing.map((c) => c.name)].find((name) => taken.has(name.toLowerCase()));
  if (clash) {
    throw new InputError({ field: `column ${showValue(clash)}`, value: showValue(clash), reason: 'the output needs this name for a result column', accepted: `an input without a column named ${clash} (rename or drop it)` });
  }
  return {
    header: [...header],
    dialect,
    recognised,
    used,
    outputHeader: [...header, ...usedNames, ...trailing.map((c) => c.name)],
  };
}

/** A number typed with a decimal comma (`120,5`, `-0,25 L`) with a decimal point instead; other text as it is. */
function decimalPoint(text: string): string {
  const comma = text.indexOf(',');
  if (comma === -1 || text.indexOf(',', comma + 1) !== -1 || text.includes('.')) return text;
  return /^[+-]?\d*,\d/.test(text) ? `${text.slice(0, comma)}.${text.slice(comma + 1)}` : text;
}

/** Plain numbers (with a decimal comma where the file uses one) separated by spaces: several readings. */
function spacedReadings(cell: string, decimalComma: boolean): string[] | undefined {
  if (cell.indexOf(' ') === -1 && cell.indexOf('\t') === -1) return undefined;
  const parts = cell.split(/\s+/);
  return parts.every((p) => {
    const n = bareNumber(decimalComma ? decimalPoint(p) : p);
    return n === n;
  })
    ? parts
    : undefined;
}

/**
 * One numeric cell as the unit layer takes it: a decimal comma read as a
 * point (semicolon files), a header's unit added to a bare number, and each
 * changed text noted beside the text as typed (`typed`), so that a message
 * quotes what the spreadsheet holds.
 */
function numericText(text: string, unit: string, decimalComma: boolean, typed: Map<string, string> | undefined): string {
  let t = decimalComma ? decimalPoint(text) : text;
  if (unit !== '' && bareNumber(t) === bareNumber(t)) t = `${t} ${unit}`;
  if (t !== text) typed?.set(showValue(t), showValue(text));
  return t;
}

/**
 * A row's cell as read: its text or, from a line read whole (BatchSheet
 * plainPiece), the value of a bare number in a numeric column whose header
 * gives no unit: what readCells would make of that text.
 */
type ReadCell = string | number;

/**
 * Read one row's cells; empty cells and missing-value marks are absent. The
 * numeric inputs go into `numbers` by registry position (NUMERIC_FIELDS
 * order: the text as entered, or a list of readings), every other input into
 * the raw inputs returned. With `checkShape`, a cell of no readings (";") or
 * too many is refused as parseInputs's shape check refuses it, since
 * parseFieldValues skips that check; every other cell gives a raw value of
 * the right shape. Several readings of one input are separated by `;` (not in
 * semicolon files), `|`, or spaces between plain numbers.
 */
function readCells(layout: BatchLayout, cells: readonly ReadCell[], numbers: unknown[], checkShape: boolean, typed?: Map<string, string>): RawInputs {
  const raw: Record<string, unknown> = {};
  const decimalComma = layout.dialect.decimalComma;
  let badLists: number[] | undefined;
  for (const { index, column, unit } of layout.recognised) {
    const read = cells[index];
    if (typeof read === 'number') {
      // Only a numeric column's cell is read as a number (BatchSheet plainPiece).
      if (column.kind === 'number') numbers[column.field] = read;
      continue;
    }
    const cell = (read ?? '').trim();
    if (isMissingMark(cell)) continue;
    switch (column.kind) {
      case 'number': {
        const list = !column.multiple ? undefined : cell.includes(';') || cell.includes('|') ? cell.split(/[;|]/).map((s) => s.trim()).filter((s) => s !== '') : spacedReadings(cell, decimalComma);
        if (list) {
          if (checkShape && (list.length === 0 || list.length > MAX_READINGS)) (badLists ??= []).push(column.field);
          numbers[column.field] = decimalComma || unit !== '' ? list.map((r) => numericText(r, unit, decimalComma, typed)) : list;
        } else numbers[column.field] = decimalComma || unit !== '' ? numericText(cell, unit, decimalComma, typed) : cell;
        break;
      }
      case 'choice': {
        const value = column.codes.get(codeOf(cell));
        if (value === undefined) throw new InputError({ field: column.flag, value: showValue(cell), accepted: column.accepted });
        raw[column.key] = column.codes === FINDING_CODES ? value === 'yes' : value;
        break;
      }
    }
  }
  if (badLists) {
    // Refused as checkRawShape refuses them, in registry order.
    throw new InputError(badLists.sort((a, b) => a - b).map((i) => ({ field: NUMERIC_FIELDS[i]!.flag, value: showValue(numbers[i]), accepted: acceptedShape(NUMERIC_FIELDS[i]!) })));
  }
  return raw as RawInputs;
}

/** Raw inputs from one row's cells; empty cells are absent. */
export function rawFromCells(layout: BatchLayout, cells: readonly string[]): RawInputs {
  const numbers: unknown[] = [];
  const raw = readCells(layout, cells, numbers, false) as Record<string, unknown>;
  NUMERIC_FIELDS.forEach((f, i) => {
    if (numbers[i] !== undefined) raw[f.key] = numbers[i];
  });
  return raw as RawInputs;
}

/** How many result and trailing cells follow the input cells (the inputs as used among them). */
function trailingCount(layout: BatchLayout): number {
  return layout.outputHeader.length - layout.header.length;
}

/** What one row gives: its inputs as used, results and flags, or why it could not be computed. */
type RowOutcome = { inputs: VisitInputs; results: Results; flagsCell: string; error?: undefined } | { error: string };

/** computeRow's numeric inputs by registry position, kept between rows. */
const rowNumbers = new Array<unknown>(NUMERIC_FIELDS.length).fill(undefined);

/*
 * The inputs, results and flags cell of the row computeRow computed last, one of each per thread and
 * rewritten for every row (parseFieldValues into, graph/plan.ts resultsInto, FlagCodes): a row's cells
 * are written before the next row is computed.
 */
let rowInputs: VisitInputs | undefined;
let rowResults: Results | undefined;
const rowFlags = new FlagCodes();

/** A message naming the text as typed where the unit layer saw it changed (a decimal comma read as a point). */
function asTyped(err: InputError, typed: Map<string, string>): string {
  return err.problems.map((p) => describeProblem({ ...p, value: typed.get(p.value) ?? p.value })).join('; ');
}

/**
 * The computation of one row, exactly as `assess` does it: the raw inputs
 * from the cells, parseInputs (its shape check done cell by cell, the rest by
 * parseFieldValues), the graph and the checks (visitChecks). Never throws for bad
 * input: the reason (one line) comes back instead.
 */
function computeRow(layout: BatchLayout, cells: readonly ReadCell[]): RowOutcome {
  const width = layout.header.length;
  if (cells.length > width && cells.slice(width).some((c) => typeof c !== 'string' || c.trim() !== '')) {
    return { error: `row has ${cells.length} cells but the header has ${width}; extra cells: ${cells.slice(width).map(showValue).join(', ')}` };
  }
  const typed = layout.dialect.decimalComma ? new Map<string, string>() : undefined;
  try {
    // parseInputs(rawFromCells(layout, cells)), with the numbers passed by position (in one array kept between rows).
    const numbers = rowNumbers.fill(undefined);
    const inputs = parseFieldValues(numbers, readCells(layout, cells, numbers, true, typed), (rowInputs ??= {} as VisitInputs));
    const results = computeResultsInto((rowResults ??= scratchResults()), inputs);
    // Only the codes are written: the checks go straight into the flags cell.
    visitChecks(inputs, results, false, rowFlags.start());
    return { inputs, results, flagsCell: rowFlags.cell };
  } catch (err) {
    if (err instanceof InputError) return { error: typed?.size ? asTyped(err, typed) : err.message.split('\n').join('; ') };
    throw err;
  }
}

/** The reason written for a record whose quotes do not pair up (records/csv-records.ts). */
export function badRecordError(bad: BadRecord, header: readonly string[]): string {
  const name = header[bad.column - 1];
  return describeProblem({
    field: `line ${bad.line}, column ${bad.column}${name !== undefined ? ` (${showValue(name.trim())})` : ''}`,
    value: showValue(bad.text),
    reason: `a double quote opens this cell and ${bad.reason}, so the line was read as plain text and not computed; reading went on with the next line`,
    accepted: 'a quoted cell closed on the same line, or spanning lines in a record with as many cells as the header; a quote inside a quoted cell doubled ("")',
  });
}

/**
 * The output cells of one row: the input cells as read (padded or cut to the
 * header), the inputs as used, then results, flags, reasons, methods version
 * and error. Never throws for bad input: the reason goes to the error column.
 */
export function batchRow(layout: BatchLayout, cells: readonly string[]): string[] {
  return outputCells(layout, cells, computeRow(layout, cells));
}

/** batchRow of a record whose quotes do not pair up. */
export function badRecordRow(layout: BatchLayout, bad: BadRecord): string[] {
  return outputCells(layout, bad.cells, { error: badRecordError(bad, layout.header) });
}

function outputCells(layout: BatchLayout, cells: readonly string[], row: RowOutcome): string[] {
  const width = layout.header.length;
  const out: string[] = [];
  for (let i = 0; i < width; i++) out.push(cells[i] ?? '');
  if (row.error !== undefined) {
    for (let i = trailingCount(layout) - 2; i > 0; i--) out.push('');
    out.push(METHODS_VERSION, row.error);
    return out;
  }
  for (const u of layout.used) out.push(csvNumber(row.inputs[u.key], u.unit));
  for (const cell of resultCells(row.results)) out.push(cell);
  out.push(row.flagsCell, notComputableCell(row.results), METHODS_VERSION, '');
  return out;
}

/**
 * batchRow's cells written as one line of RFC 4180 bytes: the same cells in
 * the same order, text quoted by d3-dsv where needed, numbers as csvNumber
 * writes them (a test compares this with csvText of batchRow).
 */
/** Writes the inputs as used of one row, each after a comma (usedWriter). */
type UsedWriter = (out: CsvBytes, inputs: VisitInputs) => void;

/**
 * The inputs-as-used cells of a layout, each after a comma, as CsvBytes.commaNumber writes them: generated
 * once per layout from the registry's keys (checked to be plain identifiers, never from user data), as
 * reads by name are much faster than reads by a key that changes with every cell of every row.
 */
function usedWriter(layout: BatchLayout): UsedWriter {
  const body = layout.used.map((u) => {
    if (!/^[A-Za-z][A-Za-z0-9]*$/.test(u.key) || !Number.isInteger(u.decimals)) throw new Error(`input key ${u.key} is not a plain identifier`);
    return `out.commaNumber(inputs.${u.key}, ${u.decimals});`;
  });
  return new Function('out', 'inputs', body.join('\n')) as UsedWriter;
}

function writeRow(out: CsvBytes, layout: BatchLayout, cells: readonly string[], row: RowOutcome, writeUsed: UsedWriter): void {
  out.cells(cells, layout.header.length);
  writeTrailing(out, layout, row, writeUsed);
}

/** What follows a row's input cells: the inputs as used, results, flags, reasons, methods version and error, then the line end. */
function writeTrailing(out: CsvBytes, layout: BatchLayout, row: RowOutcome, writeUsed: UsedWriter): void {
  if (row.error !== undefined) {
    for (let i = trailingCount(layout) - 2; i > 0; i--) out.comma();
    out.comma();
    out.text(METHODS_VERSION);
    out.comma();
    out.text(row.error);
  } else {
    writeUsed(out, row.inputs);
    out.resultCells(row.results);
    out.comma();
    out.text(row.flagsCell);
    out.comma();
    out.text(notComputableCell(row.results));
    out.comma();
    out.text(METHODS_VERSION);
    out.comma(); // the error cell, empty
  }
  out.endRow();
}

/**
 * One `elastimate batch` run, fed pieces of text that end on a record
 * boundary and whose quotes pair up (records/csv-records.ts RecordSplitter),
 * in the dialect the splitter detected. The first non-empty record is the
 * header (planBatch), unless a layout is given (a worker thread gets the
 * header from the main thread); every later non-empty record is one output
 * line. Records are computed as d3-dsv parses them and written as bytes, so
 * a piece keeps neither its rows nor their text. `rows` counts the records
 * read (each gives one output row), `failed` those with an error.
 */
export class BatchSheet {
  layout: BatchLayout | undefined;
  rows = 0;
  failed = 0;
  private readonly out = new CsvBytes();
  private readonly dialect: Dialect;
  private readonly parser: ReturnType<typeof dsvFormat>;
  /** The layout's inputs-as-used writer, made at the first row. */
  private writeUsed: UsedWriter | undefined;
  /** plainPiece's scratch: cell starts of a line, its cells (only those read are set), the positions read. */
  private starts: Int32Array | undefined;
  private lineCells: ReadCell[] | undefined;
  private readAt: Int32Array | undefined;
  private readAsNumber: Uint8Array | undefined;

  constructor(layout?: BatchLayout, dialect: Dialect = layout?.dialect ?? COMMA) {
    this.layout = layout;
    this.dialect = dialect;
    this.parser = dsvFormat(dialect.separator);
  }

  /** The output (UTF-8 CSV, CRLF line ends) of the complete records in `text`; the header line comes first, once. */
  piece(text: string): Uint8Array {
    const layout = this.layout;
    if (layout !== undefined && text.indexOf('"') === -1) this.plainPiece(layout, text);
    else {
      this.parser.parseRows(text, (cells) => {
        this.record(cells);
        return null; // keep nothing
      });
    }
    return this.out.take();
  }

  /**
   * A piece without a double quote, after the header: its records as d3-dsv's
   * parseRows reads such text (a record ends at LF, CRLF or a lone CR; a line
   * break at the end of the piece ends the last record; an empty line is no
   * record) and the same output. A line with as many cells as the header,
   * each plain, is copied whole as it is read (CsvBytes.plainLine); of its
   * cells only those the computation reads are read, a bare number in a
   * numeric column straight into its value, the rest as strings (and the
   * whole row as strings again when it has an error, whose message quotes
   * the cells as typed); any other line goes to record() as its cells.
   */
  private plainPiece(layout: BatchLayout, text: string): void {
    const width = layout.header.length;
    const starts = (this.starts ??= new Int32Array(width + 1));
    const cells = (this.lineCells ??= new Array<ReadCell>(width).fill(''));
    const read = (this.readAt ??= Int32Array.from(layout.recognised, (r) => r.index));
    // The columns whose bare numbers are read as numbers at once (readCells takes them as they are): those
    // without a unit in the header. (A bare number has no comma, so a decimal-comma file reads it alike.)
    const numeric = (this.readAsNumber ??= Uint8Array.from(layout.recognised, (r) => (r.column.kind === 'number' && r.unit === '' ? 1 : 0)));
    const sep = this.dialect.separator.charCodeAt(0);
    const writeUsed = (this.writeUsed ??= usedWriter(layout));
    const out = this.out;
    let n = text.length;
    if (text.charCodeAt(n - 1) === 10) n--;
    if (text.charCodeAt(n - 1) === 13) n--;
    let i = 0;
    while (i < n) {
      const count = out.plainLine(text, i, n, sep, starts);
      const end = out.lineEnd;
      if (count === width) {
        let parsed = false;
        for (let k = 0; k < read.length; k++) {
          const at = read[k]!;
          const from = starts[at]!;
          const to = starts[at + 1]! - 1;
          if (numeric[k] === 1) {
            const value = bareNumber(text, from, to);
            if (value === value) {
              cells[at] = value;
              parsed = true;
              continue;
            }
          }
          cells[at] = text.slice(from, to);
        }
        this.rows++;
        let row = computeRow(layout, cells);
        if (row.error !== undefined && parsed) {
          // The message quotes cells as typed: read the row again as text.
          for (let k = 0; k < read.length; k++) cells[read[k]!] = text.slice(starts[read[k]!]!, starts[read[k]! + 1]! - 1);
          row = computeRow(layout, cells);
        }
        if (row.error !== undefined) this.failed++;
        writeTrailing(out, layout, row, writeUsed);
      } else this.record(text.slice(i, end).split(this.dialect.separator)); // an empty line is no record there
      i = end + 1;
      if (text.charCodeAt(end) === 13 && text.charCodeAt(i) === 10) i++;
    }
  }

  /** The output of a record whose quotes do not pair up: its line's cells and the reason. */
  bad(bad: BadRecord): Uint8Array {
    const layout = this.layout;
    if (!layout) throw new Error('batch: a record before the header');
    this.rows++;
    this.failed++;
    writeRow(this.out, layout, bad.cells, { error: badRecordError(bad, layout.header) }, (this.writeUsed ??= usedWriter(layout)));
    return this.out.take();
  }

  private record(cells: string[]): void {
    if (cells.length === 1 && cells[0] === '') return; // an empty line
    const layout = this.layout;
    if (!layout) {
      this.layout = planBatch(cells, this.dialect);
      this.out.cells(this.layout.outputHeader, this.layout.outputHeader.length);
      this.out.endRow();
      return;
    }
    this.rows++;
    const row = computeRow(layout, cells);
    if (row.error !== undefined) this.failed++;
    writeRow(this.out, layout, cells, row, (this.writeUsed ??= usedWriter(layout)));
  }
}
