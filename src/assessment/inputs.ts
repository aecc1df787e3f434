/**
 * The inputs of one visit: the raw shape as entered (flags, visit file,
 * prompts, subject files, batch rows) and the parsed form in internal units.
 * One zod schema checks the shape; the field registry supplies units, ranges
 * and messages. Every problem is reported together, each naming its field.
 */
import { z } from 'zod';
import { InputError, showValue, type InputProblem } from '../errors.js';
import { toInternalUnit } from '../units/quantity.js';
import {
  BSA_METHODS, MAP_METHODS, NUMERIC_FIELDS, PES_METHODS, RHYTHMS, SEXES, VALVE_FLAGS,
  describeRange, type BsaMethod, type MapMethod, type NumericField, type NumericKey, type PesMethod, type Rhythm, type Sex,
} from './fields.js';

const rawValue = z.union([z.number(), z.string()]);
const rawReadings = z.union([rawValue, z.array(rawValue).min(1).max(20)]);

const numericShape = Object.fromEntries(
  NUMERIC_FIELDS.map((f) => [f.key, (f.multiple ? rawReadings : rawValue).optional()]),
) as Record<NumericKey, z.ZodOptional<typeof rawReadings>>;

/** A visit's inputs as entered: numbers in default units or text with a unit. */
export const RawInputsSchema = z
  .object({
    ...numericShape,
    rhythm: z.enum(RHYTHMS).optional(),
    aorticStenosis: z.boolean().optional(),
    aorticRegurgitation: z.boolean().optional(),
    mitralRegurgitation: z.boolean().optional(),
    outflowObstruction: z.boolean().optional(),
    pesMethod: z.enum(PES_METHODS).optional(),
    mapMethod: z.enum(MAP_METHODS).optional(),
    bsaMethod: z.enum(BSA_METHODS).optional(),
    sex: z.enum(SEXES).optional(),
    /** Measurement error overrides per input: absolute in the input's unit, or "N%". */
    errors: z.record(z.string(), rawValue).optional(),
  })
  .strict();

export type RawInputs = z.infer<typeof RawInputsSchema>;

/** Parsed inputs in internal units (mmHg, mL, ms, bpm, %, cm, kg); null when absent. */
export interface VisitInputs {
  sbpReadings: number[];
  dbpReadings: number[];
  sbp: number;
  dbp: number;
  hr: number | null;
  edv: number;
  esv: number;
  ef: number | null;
  sv: number | null;
  lvotDiameter: number | null;
  lvotVti: number | null;
  pep: number;
  et: number;
  height: number | null;
  weight: number | null;
  age: number | null;
  pesMeasured: number | null;
  edp: number | null;
  eOverEPrime: number | null;
  lvids: number | null;
  pwts: number | null;
  rhythm: Rhythm;
  aorticStenosis: boolean;
  aorticRegurgitation: boolean;
  mitralRegurgitation: boolean;
  outflowObstruction: boolean;
  pesMethod: PesMethod;
  mapMethod: MapMethod;
  bsaMethod: BsaMethod;
  sex: Sex | null;
  /** Raw error overrides, interpreted by the uncertainty model. */
  errors: Record<string, string | number>;
}

const ENUM_ACCEPTED: Record<string, string> = {
  rhythm: RHYTHMS.join(', '),
  pesMethod: PES_METHODS.join(', '),
  mapMethod: MAP_METHODS.join(', '),
  bsaMethod: BSA_METHODS.join(', '),
  sex: SEXES.join(', '),
  aorticStenosis: 'true or false',
  aorticRegurgitation: 'true or false',
  mitralRegurgitation: 'true or false',
  outflowObstruction: 'true or false',
};

function fieldFlag(key: string): string {
  const n = NUMERIC_FIELDS.find((f) => f.key === key);
  if (n) return n.flag;
  const v = VALVE_FLAGS.find((f) => f.key === key);
  if (v) return v.flag;
  return key.replace(/[A-Z]/g, (c) => '-' + c.toLowerCase());
}

/** Shape check of a raw object (from a file or a row); problems name the field. */
export function checkRawShape(raw: unknown, where = 'inputs'): RawInputs {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw)) {
    throw new InputError({ field: where, value: showValue(raw), accepted: 'a JSON object of measurement keys' });
  }
  const result = RawInputsSchema.safeParse(raw);
  if (result.success) return result.data;
  const problems: InputProblem[] = [];
  for (const issue of result.error.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) {
        problems.push({ field: key, value: showValue((raw as Record<string, unknown>)[key]), reason: 'unknown key', accepted: `one of ${Object.keys(RawInputsSchema.shape).join(', ')}` });
      }
      continue;
    }
    const key = String(issue.path[0] ?? where);
    const value = (raw as Record<string, unknown>)[key];
    const numeric = NUMERIC_FIELDS.find((f) => f.key === key);
    const accepted = numeric
      ? `${numeric.multiple ? 'a number or a list of numbers' : 'a number'} (optionally text with a unit), ${describeRange(numeric)}`
      : key === 'errors'
        ? 'an object of input keys to an error (number in the input unit, or "N%")'
        : (ENUM_ACCEPTED[key] ?? issue.message);
    problems.push({ field: fieldFlag(key), value: showValue(value), accepted });
  }
  throw new InputError(dedupe(problems));
}

function dedupe(problems: InputProblem[]): InputProblem[] {
  const seen = new Set<string>();
  return problems.filter((p) => {
    const k = p.field + '|' + p.value;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}

const REQUIRED_FIELDS: readonly NumericField[] = NUMERIC_FIELDS.filter((f) => f.required);
const FIELD_INDEX = Object.fromEntries(NUMERIC_FIELDS.map((f, i) => [f.key, i])) as Record<NumericKey, number>;

/** Fields still missing for a computation (the required ones). */
export function missingRequired(raw: RawInputs): string[] {
  return NUMERIC_FIELDS.filter((f) => f.required && isAbsent(raw[f.key])).map((f) => f.flag);
}

function isAbsent(v: unknown): boolean {
  return v === undefined || v === null || v === '' || (Array.isArray(v) && v.length === 0);
}

/**
 * Parse raw inputs into internal units, checking units, ranges and the
 * relations between fields. Throws one InputError listing every problem.
 */
export function parseInputs(rawIn: unknown): VisitInputs {
  return parseCheckedInputs(checkRawShape(rawIn));
}

/**
 * The same, for raw inputs whose shape is already known to be right (a batch
 * row built cell by cell): skips the schema pass, which dominates a
 * 100,000-row batch.
 */
export function parseCheckedInputs(raw: RawInputs): VisitInputs {
  // Hot path of a batch (once per row): one pass over the registry, no per-field arrays or
  // closures for single values; the problems and their order are those of the registry.
  const problems: InputProblem[] = [];
  for (const f of REQUIRED_FIELDS) {
    if (isAbsent(raw[f.key])) problems.push({ field: f.flag, value: '', reason: 'required', accepted: `${f.label}, ${describeRange(f)}` });
  }

  // Per field (registry order): the mean of its readings in internal units, null when absent or refused.
  const means: (number | null)[] = new Array<number | null>(NUMERIC_FIELDS.length);
  let sbpReadings: number[] | undefined;
  let dbpReadings: number[] | undefined;
  for (let i = 0; i < NUMERIC_FIELDS.length; i++) {
    const f = NUMERIC_FIELDS[i]!;
    const given = raw[f.key];
    means[i] = null;
    if (isAbsent(given)) continue;
    const list = Array.isArray(given) ? given : undefined;
    const count = list ? list.length : 1;
    let sum = 0;
    let accepted = 0;
    const parsed: number[] | undefined = f.multiple ? [] : undefined;
    for (let j = 0; j < count; j++) {
      const item: unknown = list ? list[j] : given;
      const v = readValue(f, item, problems);
      if (v === null) continue;
      sum += v;
      accepted++;
      parsed?.push(v);
    }
    if (accepted !== count) continue;
    means[i] = sum / count;
    if (f.key === 'sbp') sbpReadings = parsed;
    else if (f.key === 'dbp') dbpReadings = parsed;
  }

  const one = (k: NumericKey): number | null => means[FIELD_INDEX[k]]!;
  const sbp = one('sbp');
  const dbp = one('dbp');
  const edv = one('edv');
  const esv = one('esv');
  if (sbp !== null && dbp !== null && dbp >= sbp) {
    problems.push({ field: 'dbp', value: showValue(round(dbp)), reason: `not below SBP ${round(sbp)} mmHg`, accepted: 'DBP lower than SBP' });
  }
  if (edv !== null && esv !== null && esv >= edv) {
    problems.push({ field: 'esv', value: showValue(round(esv)), reason: `not below EDV ${round(edv)} mL`, accepted: 'ESV lower than EDV' });
  }
  const lvotDiameter = one('lvotDiameter');
  const lvotVti = one('lvotVti');
  if ((lvotDiameter === null) !== (lvotVti === null) && problems.length === 0) {
    const field = lvotDiameter === null ? 'lvot-diameter' : 'lvot-vti';
    problems.push({ field, value: '', reason: 'Doppler stroke volume needs both LVOT diameter and VTI', accepted: 'both lvot-diameter and lvot-vti, or neither' });
  }
  const pesMeasured = one('pesMeasured');
  const pesMethod: PesMethod = raw.pesMethod ?? (pesMeasured !== null ? 'measured' : 'sbp90');
  if (pesMethod === 'measured' && pesMeasured === null && !isAbsent(raw.pesMethod)) {
    problems.push({ field: 'pes-measured', value: '', reason: 'pes-method "measured" needs the measured value', accepted: 'a measured end-systolic pressure, 40–260 mmHg' });
  }
  if (problems.length > 0) throw new InputError(dedupe(problems));

  return {
    sbpReadings: sbpReadings ?? [],
    dbpReadings: dbpReadings ?? [],
    sbp: sbp as number,
    dbp: dbp as number,
    hr: one('hr'),
    edv: edv as number,
    esv: esv as number,
    ef: one('ef'),
    sv: one('sv'),
    lvotDiameter,
    lvotVti,
    pep: one('pep') as number,
    et: one('et') as number,
    height: one('height'),
    weight: one('weight'),
    age: one('age'),
    pesMeasured,
    edp: one('edp'),
    eOverEPrime: one('eOverEPrime'),
    lvids: one('lvids'),
    pwts: one('pwts'),
    rhythm: raw.rhythm ?? 'sinus',
    aorticStenosis: raw.aorticStenosis ?? false,
    aorticRegurgitation: raw.aorticRegurgitation ?? false,
    mitralRegurgitation: raw.mitralRegurgitation ?? false,
    outflowObstruction: raw.outflowObstruction ?? false,
    pesMethod,
    mapMethod: raw.mapMethod ?? 'third',
    bsaMethod: raw.bsaMethod ?? 'mosteller',
    sex: raw.sex ?? null,
    errors: raw.errors ?? {},
  };
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
