/**
 * How sure are we: Monte Carlo propagation of input measurement error through
 * the whole computation, variance shares per input, the single-beat method's
 * own error against invasive Ees, and the noise of a change between visits.
 * Pure: inputs, an error model, a seed and a draw count in; numbers out. The
 * main results stay those of assess(); this adds intervals around them.
 *
 * Method (docs/uncertainty.md):
 * - Each input with an error gets x = x₀ + SD·z, z standard normal, all inputs
 *   independent; a value drawn outside its physical domain (≤ 0, DBP ≥ SBP,
 *   ESV ≥ EDV) makes the results that depend on it not computable in that
 *   draw, and when that costs Ees the draw is counted as "inadmissible".
 * - 95 % interval: 2.5th and 97.5th percentiles over the draws in which the
 *   quantity is computable; the not-computable fraction is reported beside it.
 * - Sensitivity: one input at a time (the others at their values), the output
 *   variance over the same deviates as the main run; shares = variance of one
 *   input / sum over inputs. It ignores interactions; `additivity` (sum of the
 *   one-at-a-time variances / variance with all inputs varying) shows how far
 *   that matters.
 * - Method error: Chen CH et al., JACC 2001;38:2028 (abstract): invasive
 *   Ees = 0.86·Ees(sb) + 0.40, SEE 0.64 mmHg/mL, n = 72. Reported separately
 *   (interval of invasive Ees predicted from the estimate) and combined with
 *   the measurement error in a second interval.
 */
import type { RandomGenerator } from 'pure-rand/types/RandomGenerator';
import { InputError, showValue } from '../errors.js';
import { COUPLING_CUTOFF } from '../physiology/coupling.js';
import { woodUnitsToDyn } from '../physiology/peripheral-resistance.js';
import type { Assessment } from './assess.js';
import { RESULT_KEYS, computeResults, defaultChoice, type MethodChoice, type ResultKey, type Results } from './compute.js';
import { errorModelFor, type ErrorInputKey, type ErrorModel, type InputErrorSpec } from './error-model.js';
import type { VisitInputs } from './inputs.js';
import {
  DRAW_INADMISSIBLE, DRAW_OK, DRAW_TND_OUTSIDE, OUTPUT_COUNT, OUTPUT_INDEX, SLOT, SLOT_COUNT,
  evaluateDraw, fillNormals, interval95, kernelSetup, nominalVector, randomStreams, sampleVariance, summarize, type KernelSetup,
} from './monte-carlo.js';

export const UNCERTAINTY_DEFAULTS = { draws: 20_000, seed: 1 } as const;
export const DRAWS_RANGE = { min: 1_000, max: 500_000 } as const;
export const SEED_RANGE = { min: 0, max: 4_294_967_295 } as const;
/** Draws per input for the one-at-a-time sensitivity runs (at most the main run's count). */
export const SENSITIVITY_DRAWS = 5_000;
export const SENSITIVITY_KEYS = ['ea', 'ees', 'eaEes', 'v0'] as const;
export type SensitivityKey = (typeof SENSITIVITY_KEYS)[number];

/** Chen CH et al., J Am Coll Cardiol 2001;38:2028–2034, abstract: invasive vs single-beat Ees. */
export const CHEN_CALIBRATION = {
  slope: 0.86,
  intercept: 0.40,
  /** Standard error of estimate, mmHg/mL. */
  see: 0.64,
  n: 72,
  source: 'Chen CH et al., J Am Coll Cardiol 2001;38:2028 (abstract): invasive Ees = 0.86·Ees(sb) + 0.40, r = 0.91, SEE 0.64 mmHg/mL, n = 72',
} as const;

const GENERATOR = 'xoroshiro128+ (pure-rand), one stream per input by jump; normal deviates by the Marsaglia polar method';
const CHUNK = 4096;
/** Streams 0…SLOT_COUNT−1 belong to the inputs; this one to the method error. */
const METHOD_STREAM = SLOT_COUNT;
/** Streams per visit; a second visit in a comparison starts after the first's. */
const STREAMS_PER_VISIT = SLOT_COUNT + 1;

export interface UncertaintyOptions {
  draws?: number;
  seed?: number;
  /** Run the one-at-a-time sensitivity (default true). */
  sensitivity?: boolean;
}

/** A whole number with thousands separators, 100000 → "100,000" (without Intl, which is slow to load). */
export function formatCount(n: number): string {
  return String(n).replace(/\B(?=(\d{3})+(?!\d))/g, ',');
}

/** `--draws`: an integer in DRAWS_RANGE; InputError naming `draws` otherwise. */
export function parseDraws(raw: unknown): number {
  return parseInteger('draws', raw, DRAWS_RANGE.min, DRAWS_RANGE.max);
}

/** `--seed`: an integer in SEED_RANGE; InputError naming `seed` otherwise. */
export function parseSeed(raw: unknown): number {
  return parseInteger('seed', raw, SEED_RANGE.min, SEED_RANGE.max);
}

function parseInteger(field: string, raw: unknown, min: number, max: number): number {
  const accepted = `a whole number from ${formatCount(min)} to ${formatCount(max)}`;
  let v: number;
  if (typeof raw === 'number') v = raw;
  else if (typeof raw === 'string' && /^\s*\d+(\.\d+)?([eE]\+?\d+)?\s*$/.test(raw)) v = Number(raw);
  else throw new InputError({ field, value: showValue(raw), accepted });
  if (!Number.isInteger(v)) throw new InputError({ field, value: showValue(raw), reason: 'not a whole number', accepted });
  if (v < min || v > max) throw new InputError({ field, value: showValue(raw), reason: 'outside the accepted range', accepted });
  return v;
}

export interface Spread {
  /** The main result, identical to assess()'s. */
  value: number;
  mean: number;
  sd: number;
  /** 2.5th and 97.5th percentiles over the computable draws. */
  ci95: [number, number];
  /** Share of all draws in which this quantity was computable. */
  computableFraction: number;
}

export interface Share {
  input: ErrorInputKey;
  share: number;
}

export interface EesAvailability {
  /** Share of all draws in which Ees was not computable (sum of the three below). */
  notComputableFraction: number;
  inadmissibleInputs: number;
  tNdOutsideWindow: number;
  eesNotPositive: number;
}

export interface MethodErrorReport {
  source: string;
  slope: number;
  intercept: number;
  see: number;
  /** 0.86·Ees + 0.40 at the main Ees: the invasive Ees the estimate predicts. */
  calibratedEes: number | null;
  /** Method error only: invasive Ees predicted from the main Ees, 95 %. */
  eesMethodOnly: [number, number] | null;
  /** Measurement and method error together, 95 %. */
  eesCombined: [number, number] | null;
  eaEesMethodOnly: [number, number] | null;
  eaEesCombined: [number, number] | null;
}

export interface UncertaintyReport {
  draws: number;
  seed: number;
  generator: string;
  errorModel: InputErrorSpec[];
  /** Per result key computable at the main inputs. */
  outputs: Partial<Record<ResultKey, Spread>>;
  ees: EesAvailability;
  coupling: {
    cutoff: number;
    /** P(Ea/Ees > cutoff) over the draws in which Ea/Ees is computable; measurement error only. */
    probabilityAbove: number | null;
    /** The same with the method's own error added. */
    probabilityAboveWithMethodError: number | null;
    computableDraws: number;
    source: string;
  };
  methodError: MethodErrorReport;
  sensitivity: Record<SensitivityKey, Share[]>;
  sensitivityMethod: {
    drawsPerInput: number;
    /** Sum of one-at-a-time variances over the variance with all inputs varying; near 1 when interactions are small. */
    additivity: Partial<Record<SensitivityKey, number>>;
  };
  /** The input that drives most of the variance of Ees (of Ea/Ees when Ees has no shares). */
  driver: { output: 'ees' | 'eaEes'; input: ErrorInputKey; flag: string; label: string; share: number } | null;
}

/** One simulated visit: per-key values per draw (NaN where not computable) and running sums. */
interface Simulation {
  draws: number;
  values: (Float32Array | null)[];
  nominal: Float64Array;
  status: Uint32Array;
  above: number;
  ratioCount: number;
  aboveCombined: number;
  combinedCount: number;
  combinedEes: Float32Array | null;
  combinedEaEes: Float32Array | null;
  onlyEes: Float32Array | null;
  onlyEaEes: Float32Array | null;
}

interface Plan {
  setup: KernelSetup;
  nominalInputs: Float64Array;
  active: { slot: number; sd: number }[];
  nominalOutputs: Float64Array;
}

function planFor(inputs: VisitInputs, choice: MethodChoice, model: ErrorModel): Plan {
  const setup = kernelSetup(inputs, choice);
  const nominalInputs = nominalVector(inputs);
  const active = model.inputs.filter((e) => e.sd > 0).map((e) => ({ slot: SLOT[e.input], sd: e.sd }));
  const nominalOutputs = new Float64Array(OUTPUT_COUNT);
  evaluateDraw(setup, nominalInputs, nominalOutputs);
  return { setup, nominalInputs, active, nominalOutputs };
}

/**
 * The main run. With `method` (the main Ea and the calibrated Ees 0.86·Ees + 0.40),
 * each draw also carries the method error: combined (this draw's Ees mapped to
 * invasive Ees with its own SEE deviate) and method-only (the main Ees with the
 * same deviate), so every interval comes from the same draws.
 */
function simulate(plan: Plan, draws: number, streams: RandomGenerator[], keys: readonly number[], method: { ea: number | null; calibrated: number } | null): Simulation {
  const { active, nominalOutputs } = plan;
  const values: (Float32Array | null)[] = new Array<Float32Array | null>(OUTPUT_COUNT).fill(null);
  for (const j of keys) values[j] = new Float32Array(draws);
  const withMethodError = method !== null;
  const run: RunState = {
    plan,
    x: Float64Array.from(plan.nominalInputs),
    out: new Float64Array(OUTPUT_COUNT),
    values,
    stored: Int32Array.from(keys.filter((j) => values[j] !== null)),
    status: new Uint32Array(4),
    z: active.map(() => new Float64Array(CHUNK)),
    slots: Int32Array.from(active, (a) => a.slot),
    sds: Float64Array.from(active, (a) => a.sd),
    w: new Float64Array(CHUNK),
    combinedEes: withMethodError ? new Float32Array(draws) : null,
    combinedEaEes: withMethodError ? new Float32Array(draws) : null,
    onlyEes: withMethodError ? new Float32Array(draws) : null,
    onlyEaEes: withMethodError && method.ea !== null ? new Float32Array(draws) : null,
    ea0: method?.ea ?? Number.NaN,
    calibrated: method?.calibrated ?? Number.NaN,
    counts: new Float64Array(4),
  };
  for (let start = 0; start < draws; start += CHUNK) {
    const n = Math.min(CHUNK, draws - start);
    for (let a = 0; a < run.slots.length; a++) fillNormals(streams[run.slots[a]!]!, run.z[a]!, n);
    if (withMethodError) fillNormals(streams[METHOD_STREAM]!, run.w, n);
    runChunk(run, start, n);
  }
  const c = run.counts;
  return {
    draws, values, nominal: nominalOutputs, status: run.status, above: c[0]!, ratioCount: c[1]!, aboveCombined: c[2]!, combinedCount: c[3]!,
    combinedEes: run.combinedEes, combinedEaEes: run.combinedEaEes, onlyEes: run.onlyEes, onlyEaEes: run.onlyEaEes,
  };
}

interface RunState {
  plan: Plan;
  x: Float64Array;
  out: Float64Array;
  values: (Float32Array | null)[];
  stored: Int32Array;
  status: Uint32Array;
  z: Float64Array[];
  slots: Int32Array;
  sds: Float64Array;
  w: Float64Array;
  combinedEes: Float32Array | null;
  combinedEaEes: Float32Array | null;
  onlyEes: Float32Array | null;
  onlyEaEes: Float32Array | null;
  ea0: number;
  calibrated: number;
  /** above, ratioCount, aboveCombined, combinedCount. */
  counts: Float64Array;
}

const I_EA = OUTPUT_INDEX.ea;
const I_EES = OUTPUT_INDEX.ees;
const I_EAEES = OUTPUT_INDEX.eaEes;

/** Draws start … start + n − 1 of the main run, deviates already in run.z and run.w. */
function runChunk(run: RunState, start: number, n: number): void {
  const { x, out, values, stored, status, z, slots, sds, w, counts, combinedEes, combinedEaEes, onlyEes, onlyEaEes, ea0, calibrated } = run;
  const setup = run.plan.setup;
  const nominalInputs = run.plan.nominalInputs;
  const { slope, intercept, see } = CHEN_CALIBRATION;
  const activeCount = slots.length;
  const storedCount = stored.length;
  for (let i = 0; i < n; i++) {
    for (let a = 0; a < activeCount; a++) {
      const s = slots[a]!;
      x[s] = nominalInputs[s]! + sds[a]! * z[a]![i]!;
    }
    status[evaluateDraw(setup, x, out)]!++;
    const d = start + i;
    for (let q = 0; q < storedCount; q++) {
      const j = stored[q]!;
      values[j]![d] = out[j]!;
    }
    const ratio = out[I_EAEES]!;
    if (ratio - ratio === 0) {
      counts[1]!++;
      if (ratio > COUPLING_CUTOFF) counts[0]!++;
    }
    if (onlyEes !== null) {
      const onlyInvasive = calibrated + see * w[i]!;
      onlyEes[d] = onlyInvasive;
      if (onlyEaEes !== null) onlyEaEes[d] = onlyInvasive > 0 ? ea0 / onlyInvasive : Number.NaN;
      const ees = out[I_EES]!;
      if (ees - ees === 0) {
        const invasive = slope * ees + intercept + see * w[i]!;
        combinedEes![d] = invasive;
        if (invasive > 0) {
          const r = out[I_EA]! / invasive;
          combinedEaEes![d] = r;
          counts[3]!++;
          if (r > COUPLING_CUTOFF) counts[2]!++;
        } else combinedEaEes![d] = Number.NaN;
      } else {
        combinedEes![d] = Number.NaN;
        combinedEaEes![d] = Number.NaN;
      }
    }
  }
}

function intervalOf(src: Float32Array | null, scratch: Float64Array): [number, number] | null {
  const summary = src ? summarize(src, 0, scratch) : null;
  // Draws are stored in single precision: seven significant digits are what they hold.
  return summary ? [Number(summary.low.toPrecision(7)), Number(summary.high.toPrecision(7))] : null;
}

/**
 * Heart rate, height and weight reach no sensitivity key (Ea, Ees, Ea/Ees and
 * V0 do not depend on them): their share is exactly zero, so they are not run.
 */
const SENSITIVITY_INPUT_SLOTS = new Set(
  (['sbp', 'dbp', 'edv', 'esv', 'ef', 'sv', 'lvotDiameter', 'lvotVti', 'pep', 'et', 'pesMeasured'] as const).map((k) => SLOT[k]),
);

/** Variance of each sensitivity key with only one input varying, over the same deviates as the main run. */
function oneAtATime(plan: Plan, seed: number, drawsPerInput: number): Map<number, Float64Array> {
  const { setup, nominalInputs, active, nominalOutputs } = plan;
  const keys = SENSITIVITY_KEYS.map((k) => OUTPUT_INDEX[k]);
  const x = Float64Array.from(nominalInputs);
  const out = new Float64Array(OUTPUT_COUNT);
  const z = new Float64Array(CHUNK);
  const result = new Map<number, Float64Array>();
  const streams = randomStreams(seed, SLOT_COUNT);
  for (const { slot, sd } of active) {
    if (!SENSITIVITY_INPUT_SLOTS.has(slot)) continue;
    const rng = streams[slot]!;
    const count = new Float64Array(keys.length);
    const sum = new Float64Array(keys.length);
    const sumSq = new Float64Array(keys.length);
    for (let start = 0; start < drawsPerInput; start += CHUNK) {
      const n = Math.min(CHUNK, drawsPerInput - start);
      fillNormals(rng, z, n);
      for (let i = 0; i < n; i++) {
        x[slot] = nominalInputs[slot]! + sd * z[i]!;
        evaluateDraw(setup, x, out);
        for (let q = 0; q < keys.length; q++) {
          const j = keys[q]!;
          const v = out[j]!;
          if (v - v === 0) {
            const dv = v - nominalOutputs[j]!;
            count[q]!++;
            sum[q]! += dv;
            sumSq[q]! += dv * dv;
          }
        }
      }
    }
    x[slot] = nominalInputs[slot]!;
    const variance = new Float64Array(keys.length);
    for (let q = 0; q < keys.length; q++) variance[q] = sampleVariance(count[q]!, sum[q]!, sumSq[q]!);
    result.set(slot, variance);
  }
  return result;
}


function sharesFrom(variances: { input: ErrorInputKey; variance: number }[]): Share[] {
  const total = variances.reduce((a, b) => a + b.variance, 0);
  if (!(total > 0)) return [];
  // An input whose effect cancels (SV in Ea/Ees) leaves only rounding noise: not a share.
  const kept = variances.filter((v) => v.variance > total * 1e-12);
  const keptTotal = kept.reduce((a, b) => a + b.variance, 0);
  return kept
    .map((v) => ({ input: v.input, share: v.variance / keptTotal }))
    .sort((a, b) => b.share - a.share || (a.input < b.input ? -1 : a.input > b.input ? 1 : 0));
}

/** Result keys whose draws equal another key's in this run (key → the key stored). */
function duplicateKeys(setup: KernelSetup): Map<ResultKey, ResultKey> {
  const same = new Map<ResultKey, ResultKey>();
  same.set(setup.useDoppler ? 'svDoppler' : 'svVolumetric', 'sv');
  if (!setup.hasEf) same.set('efVolumes', 'ef');
  same.set('tprDyn', 'tpr');
  return same;
}

function checkedOptions(options: UncertaintyOptions): { draws: number; seed: number } {
  return {
    draws: options.draws === undefined ? UNCERTAINTY_DEFAULTS.draws : parseDraws(options.draws),
    seed: options.seed === undefined ? UNCERTAINTY_DEFAULTS.seed : parseSeed(options.seed),
  };
}

/**
 * The uncertainty of one visit. `results` (from assess) supplies the main
 * values; they are not recomputed from the draws.
 */
export function assessUncertainty(inputs: VisitInputs, options: UncertaintyOptions = {}, choice: MethodChoice = defaultChoice(inputs), results: Results = computeResults(inputs, choice)): UncertaintyReport {
  const { draws, seed } = checkedOptions(options);
  const model = errorModelFor(inputs);
  const plan = planFor(inputs, choice, model);
  const computable = RESULT_KEYS.map((k) => OUTPUT_INDEX[k]).filter((j) => results[RESULT_KEYS[j]!].value !== null);
  // Results that are the same draw under another name are stored once (e.g. SV used = Doppler SV).
  const sameAs = duplicateKeys(plan.setup);
  const keys = computable.filter((j) => !sameAs.has(RESULT_KEYS[j]!));
  const ees0 = results.ees.value;
  const method = ees0 === null ? null : { ea: results.ea.value, calibrated: CHEN_CALIBRATION.slope * ees0 + CHEN_CALIBRATION.intercept };
  const sim = simulate(plan, draws, randomStreams(seed, STREAMS_PER_VISIT), keys, method);
  const scratch = new Float64Array(draws);

  const outputs: Partial<Record<ResultKey, Spread>> = {};
  for (const j of keys) {
    const key = RESULT_KEYS[j]!;
    const value = results[key].value as number;
    const summary = summarize(sim.values[j]!, value, scratch);
    if (summary === null) continue;
    const { n, mean, sd, low, high } = summary;
    outputs[key] = {
      value,
      mean,
      sd,
      // Draws are stored in single precision: seven significant digits are what they hold.
      ci95: [Number(low.toPrecision(7)), Number(high.toPrecision(7))],
      computableFraction: n / draws,
    };
  }
  for (const [key, source] of sameAs) {
    if (key === 'tprDyn') continue;
    const spread = outputs[source];
    if (spread && results[key].value !== null) outputs[key] = { ...spread, ci95: [...spread.ci95], value: results[key].value as number };
  }
  // TPR in dyn·s·cm⁻⁵ is TPR in Wood units times a constant: its draws map one to one.
  const tpr = outputs.tpr;
  if (tpr && results.tprDyn.value !== null) {
    outputs.tprDyn = {
      value: results.tprDyn.value,
      mean: woodUnitsToDyn(tpr.mean),
      sd: woodUnitsToDyn(tpr.sd),
      ci95: [Number(woodUnitsToDyn(tpr.ci95[0]).toPrecision(7)), Number(woodUnitsToDyn(tpr.ci95[1]).toPrecision(7))],
      computableFraction: tpr.computableFraction,
    };
  }

  const eesNotOk = draws - sim.status[DRAW_OK]!;
  const ees: EesAvailability = {
    notComputableFraction: eesNotOk / draws,
    inadmissibleInputs: sim.status[DRAW_INADMISSIBLE]! / draws,
    tNdOutsideWindow: sim.status[DRAW_TND_OUTSIDE]! / draws,
    eesNotPositive: (eesNotOk - sim.status[DRAW_INADMISSIBLE]! - sim.status[DRAW_TND_OUTSIDE]!) / draws,
  };
  const ratioDraws = sim.ratioCount;

  const methodError = methodErrorReport(method?.calibrated ?? null, sim, scratch);

  const sensitivity: Record<SensitivityKey, Share[]> = { ea: [], ees: [], eaEes: [], v0: [] };
  const additivity: Partial<Record<SensitivityKey, number>> = {};
  const drawsPerInput = Math.min(draws, SENSITIVITY_DRAWS);
  if (options.sensitivity !== false) {
    const perInput = oneAtATime(plan, seed, drawsPerInput);
    SENSITIVITY_KEYS.forEach((key, q) => {
      if (!outputs[key]) return;
      const list = model.inputs.filter((e) => e.sd > 0 && perInput.has(SLOT[e.input])).map((e) => ({ input: e.input, variance: perInput.get(SLOT[e.input])![q]! }));
      sensitivity[key] = sharesFrom(list);
      const total = outputs[key].sd ** 2;
      if (total > 0) additivity[key] = list.reduce((a, b) => a + b.variance, 0) / total;
    });
  }
  const driverOutput: 'ees' | 'eaEes' = sensitivity.ees.length ? 'ees' : 'eaEes';
  const top = sensitivity[driverOutput][0];
  const topSpec = top ? model.inputs.find((e) => e.input === top.input) : undefined;

  return {
    draws,
    seed,
    generator: GENERATOR,
    errorModel: model.inputs,
    outputs,
    ees,
    coupling: {
      cutoff: COUPLING_CUTOFF,
      // Only around a main Ea/Ees: a share of the few draws that happen to be computable would mislead.
      probabilityAbove: results.eaEes.value !== null && ratioDraws > 0 ? sim.above / ratioDraws : null,
      probabilityAboveWithMethodError: results.eaEes.value !== null && sim.combinedCount > 0 ? sim.aboveCombined / sim.combinedCount : null,
      computableDraws: ratioDraws,
      source: 'Ea/Ees > 1.2 taken as abnormal coupling in an echo study of heart-failure patients (Cheng HM et al., Eur J Heart Fail 2008;10:1192; PubMed 19004668)',
    },
    methodError,
    sensitivity,
    sensitivityMethod: { drawsPerInput, additivity },
    driver: top && topSpec ? { output: driverOutput, input: top.input, flag: topSpec.flag, label: topSpec.label, share: top.share } : null,
  };
}

function methodErrorReport(calibrated: number | null, sim: Simulation, scratch: Float64Array): MethodErrorReport {
  const { slope, intercept, see, source } = CHEN_CALIBRATION;
  return {
    source, slope, intercept, see,
    calibratedEes: calibrated,
    eesMethodOnly: calibrated === null ? null : intervalOf(sim.onlyEes, scratch),
    eesCombined: calibrated === null ? null : intervalOf(sim.combinedEes, scratch),
    eaEesMethodOnly: calibrated === null ? null : intervalOf(sim.onlyEaEes, scratch),
    eaEesCombined: calibrated === null || sim.onlyEaEes === null ? null : intervalOf(sim.combinedEaEes, scratch),
  };
}

/** The main results with their 95 % intervals attached (`ci95`); values unchanged. */
export function withIntervals(results: Results, report: UncertaintyReport): Results {
  const copy = { ...results };
  for (const key of RESULT_KEYS) {
    const spread = report.outputs[key];
    if (spread && results[key].value !== null) copy[key] = { ...results[key], ci95: spread.ci95 };
  }
  return copy;
}

export const CHANGE_KEYS = ['pes', 'ea', 'ees', 'eaEes'] as const;
export type ChangeKey = (typeof CHANGE_KEYS)[number];

export interface ChangeNoise {
  /** Second visit minus first, main results. */
  observed: number | null;
  /** 95 % interval of the change: observed change less the noise quantiles. */
  ci95: [number, number] | null;
  /** 95 % range of the change that measurement noise alone produces around zero. */
  noise95: [number, number] | null;
  /** The observed change lies outside the noise range (the interval of the change excludes 0). */
  exceeds: boolean | null;
  /** Share of draw pairs in which both visits had the quantity. */
  computableFraction: number;
  source: string;
}

export interface ChangeUncertainty {
  draws: number;
  seed: number;
  changes: Record<ChangeKey, ChangeNoise>;
}

/**
 * The change between two visits of one subject and the noise around it, for
 * Pes, Ea, Ees and Ea/Ees. Each visit is drawn independently (its own streams from
 * the seed) with its own error model; the noise of the change is
 * d = (B_k − B₀) − (A_k − A₀) over paired draws k. Measurement error only: the
 * method's calibration error (Chen 2001 SEE) is largely shared by two visits of
 * one subject and is not added here.
 */
export function changeUncertainty(first: VisitInputs, second: VisitInputs, options: UncertaintyOptions = {}): ChangeUncertainty {
  const { draws, seed } = checkedOptions(options);
  const keys = CHANGE_KEYS.map((k) => OUTPUT_INDEX[k]);
  const runs = [first, second].map((inputs, visit) => {
    const choice = defaultChoice(inputs);
    const results = computeResults(inputs, choice);
    const plan = planFor(inputs, choice, errorModelFor(inputs));
    const sim = simulate(plan, draws, randomStreams(seed, STREAMS_PER_VISIT, visit * STREAMS_PER_VISIT), keys, null);
    return { results, sim };
  });
  const [a, b] = runs as [(typeof runs)[number], (typeof runs)[number]];
  const scratch = new Float64Array(draws);
  const changes = {} as Record<ChangeKey, ChangeNoise>;
  const source = `Monte Carlo, ${formatCount(draws)} independent draws per visit, seed ${seed}; input measurement error only (docs/uncertainty.md)`;
  for (const key of CHANGE_KEYS) {
    const j = OUTPUT_INDEX[key];
    const a0 = a.results[key].value;
    const b0 = b.results[key].value;
    const va = a.sim.values[j];
    const vb = b.sim.values[j];
    if (a0 === null || b0 === null || !va || !vb) {
      changes[key] = { observed: null, ci95: null, noise95: null, exceeds: null, computableFraction: 0, source };
      continue;
    }
    let n = 0;
    for (let k = 0; k < draws; k++) {
      const d = vb[k]! - b0 - (va[k]! - a0);
      if (d - d === 0) scratch[n++] = d;
    }
    const observed = b0 - a0;
    if (n === 0) {
      changes[key] = { observed, ci95: null, noise95: null, exceeds: null, computableFraction: 0, source };
      continue;
    }
    const [low, high] = interval95(scratch, n);
    // Draws are stored in single precision: seven significant digits are what they hold.
    const noise95: [number, number] = [Number(low.toPrecision(7)), Number(high.toPrecision(7))];
    changes[key] = {
      observed,
      ci95: [Number((observed - noise95[1]).toPrecision(7)), Number((observed - noise95[0]).toPrecision(7))],
      noise95,
      exceeds: observed > noise95[1] || observed < noise95[0],
      computableFraction: n / draws,
      source,
    };
  }
  return { draws, seed, changes };
}

/** A change's noise in the shape `record compare` rows carry (src/records/compare.ts `NoiseCheck`). */
export interface ChangeNoiseCheck {
  ci95: [number, number];
  exceeds: boolean;
  source: string;
}

/** changeUncertainty reduced to what a comparison row shows; keys whose change is not computable are left out. */
export function changeNoiseChecks(first: VisitInputs, second: VisitInputs, options: UncertaintyOptions = {}): Partial<Record<ChangeKey, ChangeNoiseCheck>> {
  const { changes } = changeUncertainty(first, second, options);
  const checks: Partial<Record<ChangeKey, ChangeNoiseCheck>> = {};
  for (const key of CHANGE_KEYS) {
    const c = changes[key];
    if (c.ci95 !== null && c.exceeds !== null) checks[key] = { ci95: c.ci95, exceeds: c.exceeds, source: c.source };
  }
  return checks;
}

/**
 * A subject's series with intervals: each visit's results get their 95 %
 * ranges (no sensitivity runs), and each change from the previous visit gets
 * its noise check. Entries are copied; the comparison rows are filled in place.
 */
export function seriesUncertainty<E extends { assessment: Assessment }>(
  entries: readonly E[],
  changes: readonly ({ rows: { key: string; noise?: ChangeNoiseCheck }[] } | null)[],
  options: UncertaintyOptions = {},
): { entries: E[]; reports: UncertaintyReport[] } {
  const reports = entries.map((e) => assessUncertainty(e.assessment.inputs, { ...options, sensitivity: false }, e.assessment.choice, e.assessment.results));
  const withRanges = entries.map((e, i) => ({ ...e, assessment: { ...e.assessment, results: withIntervals(e.assessment.results, reports[i]!) } }));
  changes.forEach((change, i) => {
    if (!change || i === 0) return;
    const checks = changeNoiseChecks(entries[i - 1]!.assessment.inputs, entries[i]!.assessment.inputs, options);
    for (const row of change.rows) {
      const check = checks[row.key as ChangeKey];
      if (check) row.noise = check;
    }
  });
  return { entries: withRanges, reports };
}
