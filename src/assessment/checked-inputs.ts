/**
 * Raw inputs of a known shape → the parsed inputs of one visit, in internal
 * units: units converted, ranges and the relations between fields checked,
 * every problem reported together, each naming its field. inputs.ts checks
 * the shape first (parseInputs); a batch row, built cell by cell, comes here
 * directly. Kept apart from the zod schema so that a batch worker thread
 * loads no schema library.
 */
import { InputError, showValue, type InputProblem } from '../errors.js';
import { toInternalUnit } from '../units/quantity.js';
import { NUMERIC_FIELDS, describeRange, type NumericField, type NumericKey, type PesMethod } from './fields.js';
import type { RawInputs, VisitInputs } from './inputs.js';

/** At most this many readings of one input (several readings are averaged). */
export const MAX_READINGS = 20;

/** What a numeric input accepts, as the shape check (inputs.ts checkRawShape) says it. */
export function acceptedShape(f: NumericField): string {
  return `${f.multiple ? 'a number or a list of numbers' : 'a number'} (optionally text with a unit), ${describeRange(f)}`;
}

export function isAbsent(v: unknown): boolean {
  return v === undefined || v === null || v === '' || (Array.isArray(v) && v.length === 0);
}

/** Problems with a repeated field and value listed once. */
export function dedupe(problems: InputProblem[]): InputProblem[] {
  const seen = new Set<string>();
  return problems.filter((p) => {
    const k = p.field + '|' + p.value;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}

/** Registry positions of the required fields. */
const REQUIRED_AT: readonly number[] = NUMERIC_FIELDS.flatMap((f, i) => (f.required ? [i] : []));
const FIELD_INDEX = Object.fromEntries(NUMERIC_FIELDS.map((f, i) => [f.key, i])) as Record<NumericKey, number>;

/** parseFieldValues's means, by registry position (NaN: absent or refused), kept between calls: it runs once per batch row. */
const fieldMeans = new Float64Array(NUMERIC_FIELDS.length);

/** The mean of a field's readings, null when absent or refused. */
function meanOf(i: number): number | null {
  const m = fieldMeans[i]!;
  return m === m ? m : null;
}

/**
 * Parse raw inputs whose shape is already known to be right (checkRawShape,
 * or a batch row built cell by cell) into internal units. Throws one
 * InputError listing every problem.
 */
export function parseCheckedInputs(raw: RawInputs): VisitInputs {
  const given = new Array<unknown>(NUMERIC_FIELDS.length);
  for (let i = 0; i < NUMERIC_FIELDS.length; i++) given[i] = raw[NUMERIC_FIELDS[i]!.key];
  return parseFieldValues(given, raw);
}

/**
 * parseCheckedInputs with the numeric inputs given by registry position
 * (NUMERIC_FIELDS order; undefined when absent) rather than by key, as a
 * batch row reads them from its columns; every other input comes from
 * `raw`, whose numeric keys are not read. The hot path of a batch (once per
 * row): one pass over the registry, no per-field arrays or closures for
 * single values; the problems and their order are those of the registry.
 * With `into` (a batch, whose rows are computed and written one at a time),
 * the inputs are written into that object rather than a new one.
 */
export function parseFieldValues(given: readonly unknown[], raw: RawInputs, into?: VisitInputs): VisitInputs {
  const problems: InputProblem[] = [];
  for (const i of REQUIRED_AT) {
    const f = NUMERIC_FIELDS[i]!;
    if (isAbsent(given[i])) problems.push({ field: f.flag, value: '', reason: 'required', accepted: `${f.label}, ${describeRange(f)}` });
  }

  // Per field (registry order): the mean of its readings in internal units, NaN when absent or refused.
  const means = fieldMeans;
  let sbpReadings: number[] | undefined;
  let dbpReadings: number[] | undefined;
  for (let i = 0; i < NUMERIC_FIELDS.length; i++) {
    const f = NUMERIC_FIELDS[i]!;
    const value = given[i];
    means[i] = Number.NaN;
    if (isAbsent(value)) continue;
    const list = Array.isArray(value) ? (value as unknown[]) : undefined;
    const count = list ? list.length : 1;
    let sum = 0;
    let accepted = 0;
    // The readings of a field that takes several, as many slots as readings (no room to grow: one per batch row).
    const parsed: number[] | undefined = f.multiple ? new Array<number>(count) : undefined;
    for (let j = 0; j < count; j++) {
      const item: unknown = list ? list[j] : value;
      const v = readValue(f, item, problems);
      if (v === null) continue;
      sum += v;
      if (parsed) parsed[accepted] = v;
      accepted++;
    }
    if (accepted !== count) continue;
    means[i] = sum / count;
    if (f.key === 'sbp') sbpReadings = parsed;
    else if (f.key === 'dbp') dbpReadings = parsed;
  }

  const sbp = meanOf(FIELD_INDEX.sbp);
  const dbp = meanOf(FIELD_INDEX.dbp);
  const edv = meanOf(FIELD_INDEX.edv);
  const esv = meanOf(FIELD_INDEX.esv);
  if (sbp !== null && dbp !== null && dbp >= sbp) {
    problems.push({ field: 'dbp', value: showValue(round(dbp)), reason: `not below SBP ${round(sbp)} mmHg`, accepted: 'DBP lower than SBP' });
  }
  if (edv !== null && esv !== null && esv >= edv) {
    problems.push({ field: 'esv', value: showValue(round(esv)), reason: `not below EDV ${round(edv)} mL`, accepted: 'ESV lower than EDV' });
  }
  const lvotDiameter = meanOf(FIELD_INDEX.lvotDiameter);
  const lvotVti = meanOf(FIELD_INDEX.lvotVti);
  if ((lvotDiameter === null) !== (lvotVti === null) && problems.length === 0) {
    const field = lvotDiameter === null ? 'lvot-diameter' : 'lvot-vti';
    problems.push({ field, value: '', reason: 'Doppler stroke volume needs both LVOT diameter and VTI', accepted: 'both lvot-diameter and lvot-vti, or neither' });
  }
  const ivc = meanOf(FIELD_INDEX.ivc);
  const ivcCollapse = meanOf(FIELD_INDEX.ivcCollapse);
  if ((ivc === null) !== (ivcCollapse === null) && problems.length === 0) {
    const field = ivc === null ? 'ivc' : 'ivc-collapse';
    problems.push({ field, value: '', reason: 'estimated right-atrial pressure needs both the IVC diameter and its collapse', accepted: 'both ivc and ivc-collapse, or neither' });
  }
  const pesMeasured = meanOf(FIELD_INDEX.pesMeasured);
  const pesMethod: PesMethod = raw.pesMethod ?? (pesMeasured !== null ? 'measured' : 'sbp90');
  if (pesMethod === 'measured' && pesMeasured === null && !isAbsent(raw.pesMethod)) {
    problems.push({ field: 'pes-measured', value: '', reason: 'pes-method "measured" needs the measured value', accepted: 'a measured end-systolic pressure, 40–260 mmHg' });
  }
  if (problems.length > 0) throw new InputError(dedupe(problems));

  // Every field assigned, in this order (the order of the keys in JSON), whether the object is new or reused.
  const inputs = into ?? ({} as VisitInputs);
  inputs.sbpReadings = sbpReadings ?? [];
  inputs.dbpReadings = dbpReadings ?? [];
  inputs.sbp = sbp as number;
  inputs.dbp = dbp as number;
  inputs.hr = meanOf(FIELD_INDEX.hr);
  inputs.edv = edv as number;
  inputs.esv = esv as number;
  inputs.ef = meanOf(FIELD_INDEX.ef);
  inputs.sv = meanOf(FIELD_INDEX.sv);
  inputs.lvotDiameter = lvotDiameter;
  inputs.lvotVti = lvotVti;
  inputs.pep = meanOf(FIELD_INDEX.pep) as number;
  inputs.et = meanOf(FIELD_INDEX.et) as number;
  inputs.height = meanOf(FIELD_INDEX.height);
  inputs.weight = meanOf(FIELD_INDEX.weight);
  inputs.age = meanOf(FIELD_INDEX.age);
  inputs.pesMeasured = pesMeasured;
  inputs.edp = meanOf(FIELD_INDEX.edp);
  inputs.eOverEPrime = meanOf(FIELD_INDEX.eOverEPrime);
  inputs.lvids = meanOf(FIELD_INDEX.lvids);
  inputs.pwts = meanOf(FIELD_INDEX.pwts);
  inputs.tapse = meanOf(FIELD_INDEX.tapse);
  inputs.trVelocity = meanOf(FIELD_INDEX.trVelocity);
  inputs.rap = meanOf(FIELD_INDEX.rap);
  inputs.ivc = ivc;
  inputs.ivcCollapse = ivcCollapse;
  inputs.rhythm = raw.rhythm ?? 'sinus';
  inputs.aorticStenosis = raw.aorticStenosis ?? false;
  inputs.aorticRegurgitation = raw.aorticRegurgitation ?? false;
  inputs.mitralRegurgitation = raw.mitralRegurgitation ?? false;
  inputs.outflowObstruction = raw.outflowObstruction ?? false;
  inputs.pesMethod = pesMethod;
  inputs.mapMethod = raw.mapMethod ?? 'third';
  inputs.bsaMethod = raw.bsaMethod ?? 'mosteller';
  inputs.sex = raw.sex ?? null;
  inputs.errors = raw.errors ?? {};
  return inputs;
}

/** One reading in internal units, or null after recording why it was refused. */
function readValue(f: NumericField, item: unknown, problems: InputProblem[]): number | null {
  try {
    const v = toInternalUnit(f.flag, item, f.kind);
    if (v < f.min || v > f.max) {
      problems.push({ field: f.flag, value: showValue(item), reason: 'outside the accepted range', accepted: `${f.label}, ${describeRange(f)}` });
      return null;
    }
    return v;
  } catch (err) {
    if (err instanceof InputError) {
      problems.push(...err.problems.map((p) => ({ ...p, accepted: `${p.accepted}; range ${describeRange(f)}` })));
      return null;
    }
    throw err;
  }
}

function round(x: number): number {
  return Math.round(x * 10) / 10;
}
