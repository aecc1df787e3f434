/**
 * One row of a cohort spreadsheet → raw inputs → results, for `elastimate
 * batch` (docs/batch.md). Pure and lean: per row it builds the raw inputs
 * from the recognised cells, runs the same parseInputs and computeResults as
 * `assess` (the numbers equal assess's `results`), the same checks, and
 * formats the cells. mathjs loads only if a cell carries a unit.
 *
 * Columns are recognised by name, ignoring case and punctuation, so `lvot-vti`,
 * `lvotVti` and `LVOT_VTI` are one column. Everything else passes through.
 */
import { csvParseRows } from 'd3-dsv';
import { checkVisit } from '../assessment/checks.js';
import { computeResults } from '../assessment/graph/index.js';
import { BSA_METHODS, MAP_METHODS, NUMERIC_FIELDS, PES_METHODS, RHYTHMS, SEXES, VALVE_FLAGS } from '../assessment/fields.js';
import { MAX_READINGS, acceptedShape, parseFieldValues } from '../assessment/checked-inputs.js';
import type { RawInputs } from '../assessment/inputs.js';
import { METHODS_VERSION } from '../assessment/result.js';
import type { Results } from '../assessment/graph/index.js';
import type { Flag } from '../assessment/result.js';
import { InputError, showValue } from '../errors.js';
import { CsvBytes, flagCell, notComputableCell, resultCells, resultColumns, trailingColumns } from '../render/csv.js';

type ColumnKind =
  | { kind: 'number'; key: string; multiple: boolean; field: number }
  | { kind: 'choice'; key: string; allowed: readonly string[]; flag: string }
  | { kind: 'boolean'; key: string; flag: string };

function normalise(name: string): string {
  return name.toLowerCase().replace(/[^a-z0-9]/g, '');
}

const RECOGNISED: ReadonlyMap<string, ColumnKind> = new Map<string, ColumnKind>([
  ...NUMERIC_FIELDS.map((f, field): [string, ColumnKind] => [normalise(f.key), { kind: 'number', key: f.key, multiple: f.multiple === true, field }]),
  ...VALVE_FLAGS.map((v): [string, ColumnKind] => [normalise(v.key), { kind: 'boolean', key: v.key, flag: v.flag }]),
  ['rhythm', { kind: 'choice', key: 'rhythm', allowed: RHYTHMS, flag: 'rhythm' }],
  ['pesmethod', { kind: 'choice', key: 'pesMethod', allowed: PES_METHODS, flag: 'pes-method' }],
  ['mapmethod', { kind: 'choice', key: 'mapMethod', allowed: MAP_METHODS, flag: 'map-method' }],
  ['bsamethod', { kind: 'choice', key: 'bsaMethod', allowed: BSA_METHODS, flag: 'bsa-method' }],
  ['sex', { kind: 'choice', key: 'sex', allowed: SEXES, flag: 'sex' }],
]);

const TRUE_WORDS = new Set(['1', 'true', 'yes', 'y']);
const FALSE_WORDS = new Set(['0', 'false', 'no', 'n']);

export interface BatchLayout {
  /** The input header as read. */
  header: string[];
  /** Input column positions that feed the computation. */
  recognised: { index: number; column: ColumnKind }[];
  /** The output header: input columns, result columns, flags, notComputable, methodsVersion, error. */
  outputHeader: string[];
}

/** Plan the output from the input header. Refuses empty or repeated column names. */
export function planBatch(header: readonly string[]): BatchLayout {
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
    const column = RECOGNISED.get(normalise(name));
    if (column) {
      const earlier = recognisedKeys.get(column.key);
      if (earlier !== undefined) {
        throw new InputError({ field: `column ${index + 1}`, value: showValue(name), reason: `names the same input as column "${earlier}"`, accepted: 'each input in one column' });
      }
      recognisedKeys.set(column.key, name);
      recognised.push({ index, column });
    }
  });
  if (!recognised.some((r) => r.column.key === 'sbp')) {
    const required = NUMERIC_FIELDS.filter((f) => f.required).map((f) => f.flag).join(', ');
    throw new InputError({ field: 'header', value: showValue(header.join(',')), reason: 'no measurement columns recognised', accepted: `columns named like the flags: ${required}, and optionally hr, ef, sv, height, weight, … (docs/batch.md)` });
  }
  const taken = new Set(seen.keys());
  const trailing = [...resultColumns(), ...trailingColumns()];
  const clash = trailing.find((c) => taken.has(c.name.toLowerCase()));
  if (clash) {
    throw new InputError({ field: `column "${clash.name}"`, value: showValue(clash.name), reason: 'the output needs this name for a result column', accepted: `an input without a column named ${clash.name} (rename or drop it)` });
  }
  return {
    header: [...header],
    recognised,
    outputHeader: [...header, ...trailing.map((c) => c.name)],
  };
}

/**
 * Read one row's cells; empty cells are absent. The numeric inputs go into
 * `numbers` by registry position (NUMERIC_FIELDS order: the text as entered,
 * or a list of readings), every other input into the raw inputs returned.
 * With `checkShape`, a cell of no readings (";") or too many is refused as
 * parseInputs's shape check refuses it, since parseFieldValues skips that
 * check; every other cell gives a raw value of the right shape.
 */
function readCells(layout: BatchLayout, cells: readonly string[], numbers: unknown[], checkShape: boolean): RawInputs {
  const raw: Record<string, unknown> = {};
  let badLists: number[] | undefined;
  for (const { index, column } of layout.recognised) {
    const cell = (cells[index] ?? '').trim();
    if (cell === '') continue;
    switch (column.kind) {
      case 'number':
        if (column.multiple && cell.includes(';')) {
          const readings = cell.split(';').map((s) => s.trim()).filter((s) => s !== '');
          if (checkShape && (readings.length === 0 || readings.length > MAX_READINGS)) (badLists ??= []).push(column.field);
          numbers[column.field] = readings;
        } else numbers[column.field] = cell;
        break;
      case 'choice': {
        const value = cell.toLowerCase();
        if (!column.allowed.includes(value)) throw new InputError({ field: column.flag, value: showValue(cell), accepted: column.allowed.join(', ') });
        raw[column.key] = value;
        break;
      }
      case 'boolean': {
        const value = cell.toLowerCase();
        if (TRUE_WORDS.has(value)) raw[column.key] = true;
        else if (FALSE_WORDS.has(value)) raw[column.key] = false;
        else throw new InputError({ field: column.flag, value: showValue(cell), accepted: '1/0, yes/no or true/false (empty = no)' });
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

/** How many result and trailing cells follow the input cells. */
function trailingCount(layout: BatchLayout): number {
  return layout.outputHeader.length - layout.header.length;
}

/** What one row gives: its results and flags, or why it could not be computed. */
type RowOutcome = { results: Results; flags: Flag[]; error?: undefined } | { error: string };

/**
 * The computation of one row, exactly as `assess` does it: the raw inputs
 * from the cells, parseInputs (its shape check done cell by cell, the rest by
 * parseFieldValues), computeResults and checkVisit. Never throws for bad
 * input: the reason (one line) comes back instead.
 */
function computeRow(layout: BatchLayout, cells: readonly string[]): RowOutcome {
  const width = layout.header.length;
  if (cells.length > width && cells.slice(width).some((c) => c.trim() !== '')) {
    return { error: `row has ${cells.length} cells but the header has ${width}; extra cells: ${cells.slice(width).join(', ')}` };
  }
  try {
    // parseInputs(rawFromCells(layout, cells)), with the numbers passed by position.
    const numbers = new Array<unknown>(NUMERIC_FIELDS.length);
    const inputs = parseFieldValues(numbers, readCells(layout, cells, numbers, true));
    const results = computeResults(inputs);
    return { results, flags: checkVisit(inputs, results, false) }; // only the codes are written
  } catch (err) {
    if (err instanceof InputError) return { error: err.message.split('\n').join('; ') };
    throw err;
  }
}

/**
 * The output cells of one row: the input cells as read (padded or cut to the
 * header), then results, flags, reasons, methods version and error. Never
 * throws for bad input: the reason goes to the error column.
 */
export function batchRow(layout: BatchLayout, cells: readonly string[]): string[] {
  const width = layout.header.length;
  const out: string[] = [];
  for (let i = 0; i < width; i++) out.push(cells[i] ?? '');
  const row = computeRow(layout, cells);
  if (row.error !== undefined) {
    for (let i = trailingCount(layout) - 2; i > 0; i--) out.push('');
    out.push(METHODS_VERSION, row.error);
    return out;
  }
  for (const cell of resultCells(row.results)) out.push(cell);
  out.push(flagCell(row.flags), notComputableCell(row.results), METHODS_VERSION, '');
  return out;
}

/**
 * batchRow's cells written as one line of RFC 4180 bytes: the same cells in
 * the same order, text quoted by d3-dsv where needed, numbers as csvNumber
 * writes them (a test compares this with csvText of batchRow).
 */
function writeRow(out: CsvBytes, layout: BatchLayout, cells: readonly string[], row: RowOutcome): void {
  out.cells(cells, layout.header.length);
  if (row.error !== undefined) {
    for (let i = trailingCount(layout) - 2; i > 0; i--) out.comma();
    out.comma();
    out.text(METHODS_VERSION);
    out.comma();
    out.text(row.error);
  } else {
    out.resultCells(row.results);
    out.comma();
    out.text(flagCell(row.flags));
    out.comma();
    out.text(notComputableCell(row.results));
    out.comma();
    out.text(METHODS_VERSION);
    out.comma(); // the error cell, empty
  }
  out.endRow();
}

/**
 * One `elastimate batch` run, fed pieces of CSV text that end on a record
 * boundary (RecordPieces). The first non-empty record is the header
 * (planBatch), unless a layout is given (a worker thread gets the header
 * from the main thread); every later non-empty record is one output line.
 * Records are computed as d3-dsv parses them and written as bytes, so a
 * piece keeps neither its rows nor their text.
 */
export class BatchSheet {
  layout: BatchLayout | undefined;
  rows = 0;
  failed = 0;
  private readonly out = new CsvBytes();

  constructor(layout?: BatchLayout) {
    this.layout = layout;
  }

  /** The output (UTF-8 CSV, CRLF line ends) of the complete records in `text`; the header line comes first, once. */
  piece(text: string): Uint8Array {
    csvParseRows(text, (cells) => {
      this.record(cells);
      return null; // keep nothing
    });
    return this.out.take();
  }

  private record(cells: string[]): void {
    if (cells.length === 1 && cells[0] === '') return; // an empty line
    const layout = this.layout;
    if (!layout) {
      this.layout = planBatch(cells);
      this.out.cells(this.layout.outputHeader, this.layout.outputHeader.length);
      this.out.endRow();
      return;
    }
    const row = computeRow(layout, cells);
    this.rows++;
    if (row.error !== undefined) this.failed++;
    writeRow(this.out, layout, cells, row);
  }
}

/**
 * Cuts streamed CSV text at record boundaries so each piece can be parsed on
 * its own: a line break ends a record only outside double quotes (RFC 4180:
 * quotes inside a quoted cell come doubled, so counting them tells inside
 * from outside). Memory holds one chunk and the unfinished record.
 */
export class RecordPieces {
  private pending = '';
  private started = false;

  /** Feed text; returns the complete records so far ('' if none). */
  push(text: string): string {
    let all = this.pending + text;
    if (!this.started && all.length > 0) {
      this.started = true;
      if (all.charCodeAt(0) === 0xfeff) all = all.slice(1); // byte-order mark
    }
    let end = -1;
    if (all.indexOf('"') === -1) {
      end = all.lastIndexOf('\n'); // no quotes: every line break ends a record
    } else {
      let inQuotes = false;
      for (let i = 0; i < all.length; i++) {
        const c = all.charCodeAt(i);
        if (c === 34) inQuotes = !inQuotes;
        else if (c === 10 && !inQuotes) end = i;
      }
    }
    if (end === -1) {
      this.pending = all;
      return '';
    }
    this.pending = all.slice(end + 1);
    return all.slice(0, end + 1);
  }

  /** The rest at the end of the input (a last record without a line break). */
  end(): string {
    const rest = this.pending;
    this.pending = '';
    return rest;
  }
}
