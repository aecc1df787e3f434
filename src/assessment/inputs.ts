/**
 * The inputs of one visit: the raw shape as entered (flags, visit file,
 * prompts, subject files, batch rows) and the parsed form in internal units.
 * One zod schema checks the shape; the field registry supplies units, ranges
 * and messages. Every problem is reported together, each naming its field.
 */
import { z } from 'zod';
import { InputError, showValue, type InputProblem } from '../errors.js';
import { unknownErrorInput } from './error-model.js';
import { MAX_READINGS, acceptedShape, dedupe, isAbsent, parseCheckedInputs } from './checked-inputs.js';
import {
  BSA_METHODS, MAP_METHODS, NUMERIC_FIELDS, PES_METHODS, RHYTHMS, SEXES, VALVE_FLAGS,
  describeRange, type BsaMethod, type MapMethod, type NumericKey, type PesMethod, type Rhythm, type Sex,
} from './fields.js';

export { parseCheckedInputs };

const rawValue = z.union([z.number(), z.string()]);
const rawReadings = z.union([rawValue, z.array(rawValue).min(1).max(MAX_READINGS)]);

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
  if (result.success) {
    // zod drops an `errors` entry named "__proto__" (it cannot be an own key of a plain object):
    // an entry that did not survive names no input, and is refused, never dropped in silence.
    const given = (raw as Record<string, unknown>).errors;
    const kept = result.data.errors ?? {};
    const lost = typeof given === 'object' && given !== null ? Object.keys(given).filter((k) => !Object.hasOwn(kept, k)) : [];
    if (lost.length) throw new InputError(lost.map(unknownErrorInput));
    return result.data;
  }
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
      ? acceptedShape(numeric)
      : key === 'errors'
        ? 'an object of input keys to an error (number in the input unit, or "N%")'
        : (ENUM_ACCEPTED[key] ?? issue.message);
    problems.push({ field: fieldFlag(key), value: showValue(value), accepted });
  }
  throw new InputError(dedupe(problems));
}

/** Fields still missing for a computation (the required ones). */
export function missingRequired(raw: RawInputs): string[] {
  return NUMERIC_FIELDS.filter((f) => f.required && isAbsent(raw[f.key])).map((f) => f.flag);
}

/**
 * Parse raw inputs into internal units, checking units, ranges and the
 * relations between fields. Throws one InputError listing every problem.
 */
export function parseInputs(rawIn: unknown): VisitInputs {
  return parseCheckedInputs(checkRawShape(rawIn));
}
