/**
 * The measurement-error model behind the uncertainty of every estimate: one
 * standard deviation per input, in the input's internal unit, each with its
 * provenance. Errors are independent and normal (an assumption: in practice
 * EDV and ESV errors, and SBP and DBP device errors, are positively correlated,
 * which this model ignores; see docs/uncertainty.md).
 *
 * Overrides come from `--error input=value` (repeatable) or a visit file's
 * `errors` object: a bare number or a value with a unit is an absolute SD in
 * the input's unit ("sbp=6", "sbp=0.8kPa", "pep=8 ms"); a trailing % is a
 * percentage of the input's value as used ("edv=12%"). For EF a bare number is
 * in EF points ("ef=4") and "ef=5%" is 5 % OF the EF (3 points at EF 60 %).
 * An override sets the SD of the value as used, i.e. of the mean when several
 * cuff readings were given.
 */
import { InputError, showValue, type InputProblem } from '../errors.js';
import { toInternalUnit } from '../units/quantity.js';
import { fieldByKey } from './fields.js';
import { visitPlan } from './graph/index.js';
import { GRAPH_INPUT_KEYS, type GraphInputKey } from './graph/inputs.js';
import type { VisitInputs } from './inputs.js';

/** The inputs whose error can reach a result: those the graph of quantities reads (age, E/e′, EDP and wall dimensions feed none). */
export const ERROR_INPUT_KEYS = GRAPH_INPUT_KEYS;
export type ErrorInputKey = GraphInputKey;

export interface DefaultError {
  /** 'absolute': SD in the input's unit; 'relative': SD as a fraction of the value. */
  kind: 'absolute' | 'relative';
  value: number;
  /** Provenance label: "ISO 81060-2", "literature", "common practice", "from memory". */
  provenance: string;
  /** Where the number comes from, in a sentence. */
  source: string;
}

/**
 * Cuff pressure: the SD of device-minus-reference differences that a validated
 * device may show, split into a part that repeated readings cannot remove
 * (the device's bias in this subject) and a part that they average out.
 *
 * ISO 81060-2 (criterion 1, verified: Biomed Eng Lett 2019;9:37, Table 3):
 * SD of single-reading differences ≤ 8 mmHg. Criterion 2 (from memory; its
 * existence confirmed in PMC7154042, which reports it as "SD of the averaged
 * paired determinations per participant"): SD of the per-subject mean of 3
 * paired readings ≤ 6.95 mmHg at zero mean difference. A device at both limits
 * has  s² + r² = 8²  and  s² + r²/3 = 6.95²,  so (derived here)
 * r² = (8² − 6.95²)·3/2 → r = 4.85 mmHg (random, per reading) and
 * s = √(8² − r²) = 6.36 mmHg (systematic). The SD of a mean of n readings is
 * √(s² + r²/n): 8.0 for one reading, 6.95 for three, 6.72 for five.
 * Repeating the cuff reading therefore tightens the pressure only down to s.
 */
export const CUFF_ERROR = (() => {
  const perReading = 8;
  const meanOfThree = 6.95;
  const random = Math.sqrt(((perReading ** 2 - meanOfThree ** 2) * 3) / 2);
  const systematic = Math.sqrt(perReading ** 2 - random ** 2);
  return { perReading, meanOfThree, random, systematic } as const;
})();

/** SD (mmHg) of the mean of n cuff readings under CUFF_ERROR. */
export function cuffMeanSd(readings: number): number {
  const n = Math.max(1, readings);
  return Math.sqrt(CUFF_ERROR.systematic ** 2 + CUFF_ERROR.random ** 2 / n);
}

const CUFF_SOURCE =
  'ISO 81060-2 limits for a validated cuff device: SD ≤ 8 mmHg per reading (criterion 1) and ≤ 6.95 mmHg for the mean of 3 (criterion 2, from memory); split into 6.36 mmHg systematic + 4.85 mmHg random per reading, only the random part shrinking with more readings (derived here)';

/** Default error of each input, with its provenance. */
export const DEFAULT_ERRORS: Record<ErrorInputKey, DefaultError> = {
  sbp: { kind: 'absolute', value: CUFF_ERROR.perReading, provenance: 'ISO 81060-2', source: CUFF_SOURCE },
  dbp: { kind: 'absolute', value: CUFF_ERROR.perReading, provenance: 'ISO 81060-2', source: CUFF_SOURCE },
  hr: { kind: 'absolute', value: 3, provenance: 'from memory', source: 'variation of heart rate during an echo study (from memory)' },
  edv: {
    kind: 'relative', value: 0.10, provenance: 'literature',
    source: '2D echo test–retest: CV 7–19 % (PubMed 9076390); individual 95 % limits ±15 % (PubMed 6875114, SD ≈ 8 %); 10 % chosen',
  },
  esv: {
    kind: 'relative', value: 0.15, provenance: 'literature',
    source: '2D echo test–retest: CV 7–19 % (PubMed 9076390); individual 95 % limits ±25 % (PubMed 6875114, SD ≈ 13 %); 15 % chosen',
  },
  ef: {
    kind: 'absolute', value: 5, provenance: 'from memory',
    source: '±5 EF points (from memory); individual 95 % limits ±10 (PubMed 6875114) and a smallest detectable change of 14 % (Baron 2019) are of the same order',
  },
  sv: { kind: 'relative', value: 0.10, provenance: 'from memory', source: 'Doppler stroke volume entered directly, LVOT diameter and VTI errors combined (from memory)' },
  lvotDiameter: { kind: 'absolute', value: 0.1, provenance: 'from memory', source: 'LVOT diameter measurement, about ±1 mm (from memory); squared in the area, so it dominates Doppler SV error' },
  lvotVti: { kind: 'relative', value: 0.05, provenance: 'from memory', source: 'LVOT VTI averaged over several beats (from memory)' },
  pep: {
    kind: 'absolute', value: 10, provenance: 'literature',
    source: 'echo PEP within-person SD 1.6–12 ms (PMC6179208); 10 ms, near the upper end',
  },
  et: { kind: 'absolute', value: 10, provenance: 'from memory', source: 'ejection time, as for PEP (from memory; not confirmed)' },
  pesMeasured: {
    kind: 'absolute', value: CUFF_ERROR.perReading, provenance: 'ISO 81060-2',
    source: 'a measured Pes (e.g. tonometry) is calibrated to the cuff, so it inherits the cuff limit of 8 mmHg (this project\'s assumption)',
  },
  height: { kind: 'absolute', value: 1, provenance: 'from memory', source: 'measured height, about ±1 cm (from memory)' },
  weight: { kind: 'absolute', value: 1, provenance: 'from memory', source: 'measured weight, about ±1 kg (from memory)' },
};

/** One input's error as used in a Monte Carlo run. */
export interface InputErrorSpec {
  input: ErrorInputKey;
  /** The flag spelling, e.g. `lvot-diameter`. */
  flag: string;
  label: string;
  unit: string;
  /** The input's value as used (the mean of readings for cuff pressures). */
  value: number;
  /** Standard deviation in the input's unit. */
  sd: number;
  /** 'default' or 'override' (from --error or the visit file). */
  given: 'default' | 'override';
  /** How the SD was set, e.g. "10 % of 118 mL" or "mean of 3 readings". */
  basis: string;
  provenance: string;
  source: string;
}

export interface ErrorModel {
  inputs: InputErrorSpec[];
}

interface ParsedOverride {
  kind: 'absolute' | 'relative';
  value: number;
  text: string;
}

const PERCENT = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*%\s*$/;

function keyOf(raw: string): string {
  return raw.trim().replace(/-([a-z])/g, (_s, c: string) => c.toUpperCase());
}

function isErrorKey(key: string): key is ErrorInputKey {
  return (ERROR_INPUT_KEYS as readonly string[]).includes(key);
}

function acceptedFor(key: ErrorInputKey): string {
  const f = fieldByKey(key);
  const unit = f.unit === '%' ? 'EF points' : f.unit;
  return `a standard deviation ≥ 0: a number in ${unit} (up to ${f.max}${f.unit === '%' ? '' : ' ' + f.unit}), a value with a unit, or a percentage of the value from 0 % to 100 %`;
}

/** The problem of an error-model entry that names no input whose error reaches a result. */
export function unknownErrorInput(rawKey: string): InputProblem {
  return {
    field: 'error',
    value: showValue(rawKey),
    reason: 'not an input whose error reaches a result',
    accepted: `one of ${ERROR_INPUT_KEYS.map((k) => fieldByKey(k).flag).join(', ')}`,
  };
}

/** Interpret one override; throws InputError naming `error.<flag>`. */
export function parseErrorOverride(rawKey: string, raw: unknown): { input: ErrorInputKey; kind: 'absolute' | 'relative'; value: number; text: string } {
  const key = keyOf(rawKey);
  if (!isErrorKey(key)) throw new InputError(unknownErrorInput(rawKey));
  const f = fieldByKey(key);
  const field = `error.${f.flag}`;
  const parsed = interpret(field, key, raw);
  return { input: key, ...parsed };
}

function interpret(field: string, key: ErrorInputKey, raw: unknown): ParsedOverride {
  const f = fieldByKey(key);
  const accepted = acceptedFor(key);
  if (typeof raw === 'string') {
    const m = PERCENT.exec(raw);
    if (m && m[1] !== undefined) {
      const pct = Number(m[1]);
      if (!Number.isFinite(pct) || pct < 0 || pct > 100) throw new InputError({ field, value: showValue(raw), reason: 'percentage outside 0–100 %', accepted });
      return { kind: 'relative', value: pct / 100, text: raw.trim() };
    }
  }
  if (typeof raw !== 'string' && typeof raw !== 'number') throw new InputError({ field, value: showValue(raw), accepted });
  let value: number;
  try {
    // For EF (a percentage field) a bare number is in points; "N%" was handled above as relative.
    value = toInternalUnit(field, raw, f.kind);
  } catch (err) {
    if (err instanceof InputError) throw new InputError({ field, value: showValue(raw), reason: 'not a number, a value with a unit, or a percentage', accepted });
    throw err;
  }
  if (!Number.isFinite(value)) throw new InputError({ field, value: showValue(raw), reason: 'not a number, a value with a unit, or a percentage', accepted });
  if (value < 0) throw new InputError({ field, value: showValue(raw), reason: 'negative', accepted });
  if (value > f.max) throw new InputError({ field, value: showValue(raw), reason: 'larger than the input\'s accepted range', accepted });
  return { kind: 'absolute', value, text: typeof raw === 'number' ? String(raw) : raw.trim() };
}

/** Check every override of a visit without building the model (for commands that only store them). */
export function validateErrorOverrides(errors: Readonly<Record<string, string | number>>): void {
  const problems = [];
  for (const [k, v] of Object.entries(errors)) {
    try {
      parseErrorOverride(k, v);
    } catch (err) {
      if (err instanceof InputError) problems.push(...err.problems);
      else throw err;
    }
  }
  if (problems.length) throw new InputError(problems);
}

/**
 * The inputs of this visit that reach a result, with their values as used:
 * those a computable result is computed from under the visit's own method
 * choices (the graph's edges), in the graph's input order.
 */
export function inputsInUse(inputs: VisitInputs): { input: ErrorInputKey; value: number }[] {
  const plan = visitPlan(inputs);
  const used = new Set<number>();
  for (const p of plan.order) for (const a of p.args) used.add(a);
  const list: { input: ErrorInputKey; value: number }[] = [];
  ERROR_INPUT_KEYS.forEach((input, slot) => {
    const value = inputs[input];
    if (used.has(slot) && value !== null) list.push({ input, value });
  });
  return list;
}

function formatSd(v: number): string {
  return Number(v.toPrecision(3)).toString();
}

/**
 * The error model of one visit: defaults from DEFAULT_ERRORS, overridden by
 * `inputs.errors`. Every override is validated (InputError naming the field),
 * including overrides for inputs this visit does not have, which are unused.
 */
export function errorModelFor(inputs: VisitInputs): ErrorModel {
  validateErrorOverrides(inputs.errors);
  const overrides = new Map<ErrorInputKey, ReturnType<typeof parseErrorOverride>>();
  for (const [k, v] of Object.entries(inputs.errors)) {
    const o = parseErrorOverride(k, v);
    overrides.set(o.input, o);
  }
  const specs: InputErrorSpec[] = [];
  for (const { input, value } of inputsInUse(inputs)) {
    const f = fieldByKey(input);
    const unitText = f.unit === '%' ? 'points' : f.unit;
    const o = overrides.get(input);
    let sd: number;
    let basis: string;
    let provenance: string;
    let source: string;
    if (o) {
      sd = o.kind === 'relative' ? o.value * value : o.value;
      basis = o.kind === 'relative' ? `${formatSd(o.value * 100)} % of ${formatSd(value)}${f.unit === '%' ? ' %' : ' ' + f.unit}` : `${formatSd(sd)} ${unitText}`;
      provenance = 'override';
      source = `given as "${o.text}"`;
    } else {
      const d = DEFAULT_ERRORS[input];
      provenance = d.provenance;
      source = d.source;
      if ((input === 'sbp' || input === 'dbp')) {
        const n = input === 'sbp' ? inputs.sbpReadings.length : inputs.dbpReadings.length;
        sd = cuffMeanSd(n);
        basis = n > 1 ? `mean of ${n} readings: √(6.36² + 4.85²/${n})` : 'one reading';
      } else if (d.kind === 'relative') {
        sd = d.value * value;
        basis = `${formatSd(d.value * 100)} % of ${formatSd(value)} ${f.unit}`;
      } else {
        sd = d.value;
        basis = `${formatSd(sd)} ${unitText}`;
      }
    }
    specs.push({ input, flag: f.flag, label: f.label, unit: f.unit, value, sd, given: o ? 'override' : 'default', basis, provenance, source });
  }
  return { inputs: specs };
}
