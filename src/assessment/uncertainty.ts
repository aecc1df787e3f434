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
import type { Assessment } from './assess.js';
import { ERROR_INPUT_KEYS, errorModelFor, type ErrorInputKey, type ErrorModel, type InputErrorSpec } from './error-model.js';
import { compileDraws, type DrawProgram } from './graph/draws.js';
import { RESULT_KEYS, computeResults, defaultChoice, visitPlan, type MethodChoice, type Plan, type ResultKey, type Results } from './graph/index.js';
import { SLOT_COUNT as GRAPH_SLOTS, evaluatePlan, inputVector, inputsOf, isInputSlot, keyOfSlot, slotOf } from './graph/plan.js';
import type { VisitInputs } from './inputs.js';
import { fillNormals, interval95, randomStreams, sampleVariance, summarize } from './monte-carlo.js';

export const UNCERTAINTY_DEFAULTS = { draws: 20_000, seed: 1 } as const;
export const DRAWS_RANGE = { min: 1_000, max: 500_000 } as const;
export const SEED_RANGE = { min: 0, max: 4_294_967_295 } as const;
/** Draws per input for the one-at-a-time sensitivity runs (at most the main run's count). */
export const SENSITIVITY_DRAWS = 5_000;
export const SENSITIVITY_KEYS = ['ea', 'ees', 'eaEes', 'v0', 'tapsePasp'] as const;
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
/** Random stream of each input: its position in the error model's (and the graph's) input order. */
const STREAM = Object.fromEntries(ERROR_INPUT_KEYS.map((k, i) => [k, i])) as Record<ErrorInputKey, number>;
const STREAM_COUNT = ERROR_INPUT_KEYS.length;
/** Streams 0…STREAM_COUNT−1 belong to the inputs; this one to the method error. */
const METHOD_STREAM = STREAM_COUNT;
/** Streams per visit; a second visit in a comparison starts after the first's. */
const STREAMS_PER_VISIT = STREAM_COUNT + 1;

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
  interval95: [number, number];
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
  values: Map<ResultKey, Float32Array>;
  /** Draws in which Ees was lost, by the slot where it was lost (graph/draws.ts countLosses). */
  eesLosses: Float64Array;
  above: number;
  ratioCount: number;
  aboveCombined: number;
  combinedCount: number;
  combinedEes: Float32Array | null;
  combinedEaEes: Float32Array | null;
  onlyEes: Float32Array | null;
  onlyEaEes: Float32Array | null;
}

/** A visit prepared for draws: its plan of the graph, the values at its inputs, and the inputs that carry an error. */
export interface RunPlan {
  graph: Plan;
  nominal: Float64Array;
  active: { input: ErrorInputKey; stream: number; sd: number }[];
}

/** A visit prepared for draws under a method choice and an error model (by default the visit's own, with its overrides). */
export function runPlanFor(inputs: VisitInputs, choice: MethodChoice = defaultChoice(inputs), model: ErrorModel = errorModelFor(inputs)): RunPlan {
  const graph = visitPlan(inputs, choice);
  const nominal = inputVector(inputs);
  evaluatePlan(graph, nominal, []);
  const active = model.inputs.filter((e) => e.sd > 0).map((e) => ({ input: e.input, stream: STREAM[e.input], sd: e.sd }));
  return { graph, nominal, active };
}

/** The outputs a run computes: the stored keys, and Ea, Ees and Ea/Ees for the coupling and the method error. */
function wantedIn(keys: readonly ResultKey[]): ResultKey[] {
  return [...keys, 'ea', 'ees', 'eaEes'];
}

/** Draws 0…n−1 of a column into a run's single-precision store from `start` (a loop: typed-array set across types is slower). */
function copyInto(target: Float32Array, source: Float64Array, start: number, n: number): void {
  for (let i = 0; i < n; i++) target[start + i] = source[i]!;
}

/** The next n draws of every input with an error into its column: x₀ + SD·z, z the next deviates of the input's own stream. */
function drawChunk(plan: RunPlan, columns: readonly Float64Array[], streams: readonly RandomGenerator[], n: number): void {
  const { active, nominal } = plan;
  for (let a = 0; a < active.length; a++) {
    const { input, stream, sd } = active[a]!;
    fillNormals(streams[stream]!, columns[a]!, n, nominal[slotOf(input)]!, sd);
  }
}

/**
 * Draws start … start + n − 1 of a visit's inputs into the input columns of a
 * draw program compiled for `plan.active` (then `program.run(n)` computes the
 * nodes): the very draws the main run of assessUncertainty makes with the
 * same seed and error model, so draw d of any other use of a visit's error
 * (the model's projections, src/model/scenario-intervals.ts) is draw d of
 * `assess --uncertainty`. `start` is even: a stream read in even-sized pieces
 * gives the sequence of one long read (fillNormals).
 */
export function drawVisitInputs(plan: RunPlan, program: DrawProgram, seed: number, start: number, n: number): void {
  if (start % 2 !== 0) throw new Error('draws are taken from an even position of the streams');
  const streams = randomStreams(seed, STREAM_COUNT);
  const skip = new Float64Array(Math.max(start, n));
  if (start > 0) for (const { stream } of plan.active) fillNormals(streams[stream]!, skip, start);
  const columns = plan.active.map((a) => program.input(a.input));
  drawChunk(plan, columns, streams, n);
}

/**
 * The main run. With `method` (the main Ea and the calibrated Ees 0.86·Ees + 0.40),
 * each draw also carries the method error: combined (this draw's Ees mapped to
 * invasive Ees with its own SEE deviate) and method-only (the main Ees with the
 * same deviate), so every interval comes from the same draws.
 */
function simulate(plan: RunPlan, draws: number, streams: RandomGenerator[], keys: readonly ResultKey[], method: { ea: number | null; calibrated: number } | null): Simulation {
  const { active, nominal } = plan;
  const program = compileDraws(plan.graph, nominal, active.map((a) => a.input), wantedIn(keys), CHUNK);
  const columns = active.map((a) => program.input(a.input));
  const values = new Map<ResultKey, Float32Array>(keys.map((k) => [k, new Float32Array(draws)]));
  const stored = [...values].map(([key, target]) => ({ target, source: program.output(key) }));
  const withMethodError = method !== null;
  const w = new Float64Array(CHUNK);
  const sim: Simulation = {
    draws, values, eesLosses: new Float64Array(GRAPH_SLOTS), above: 0, ratioCount: 0, aboveCombined: 0, combinedCount: 0,
    combinedEes: withMethodError ? new Float32Array(draws) : null,
    combinedEaEes: withMethodError ? new Float32Array(draws) : null,
    onlyEes: withMethodError ? new Float32Array(draws) : null,
    onlyEaEes: withMethodError && method.ea !== null ? new Float32Array(draws) : null,
  };
  const eaColumn = program.output('ea');
  const eesColumn = program.output('ees');
  const ratioColumn = program.output('eaEes');
  for (let start = 0; start < draws; start += CHUNK) {
    const n = Math.min(CHUNK, draws - start);
    drawChunk(plan, columns, streams, n);
    program.run(n);
    program.countLosses('ees', n, sim.eesLosses);
    for (const { target, source } of stored) copyInto(target, source, start, n);
    for (let i = 0; i < n; i++) {
      const ratio = ratioColumn[i]!;
      if (ratio - ratio === 0) {
        sim.ratioCount++;
        if (ratio > COUPLING_CUTOFF) sim.above++;
      }
    }
    if (withMethodError) {
      fillNormals(streams[METHOD_STREAM]!, w, n);
      methodErrorChunk(sim, method, eaColumn, eesColumn, w, start, n);
    }
  }
  return sim;
}

/** The method error of draws start … start + n − 1 (see simulate). */
function methodErrorChunk(sim: Simulation, method: { ea: number | null; calibrated: number }, ea: Float64Array, ees: Float64Array, w: Float64Array, start: number, n: number): void {
  const { slope, intercept, see } = CHEN_CALIBRATION;
  // simulate allocates these three whenever there is a method error to draw.
  const onlyEes = sim.onlyEes!;
  const combinedEes = sim.combinedEes!;
  const combinedEaEes = sim.combinedEaEes!;
  const onlyEaEes = sim.onlyEaEes;
  const ea0 = method.ea ?? Number.NaN;
  const calibrated = method.calibrated;
  for (let i = 0; i < n; i++) {
    const d = start + i;
    const onlyInvasive = calibrated + see * w[i]!;
    onlyEes[d] = onlyInvasive;
    if (onlyEaEes !== null) onlyEaEes[d] = onlyInvasive > 0 ? ea0 / onlyInvasive : Number.NaN;
    const e = ees[i]!;
    if (e - e === 0) {
      const invasive = slope * e + intercept + see * w[i]!;
      combinedEes[d] = invasive;
      if (invasive > 0) {
        const r = ea[i]! / invasive;
        combinedEaEes[d] = r;
        sim.combinedCount++;
        if (r > COUPLING_CUTOFF) sim.aboveCombined++;
      } else combinedEaEes[d] = Number.NaN;
    } else {
      combinedEes[d] = Number.NaN;
      combinedEaEes[d] = Number.NaN;
    }
  }
}

function intervalOf(src: Float32Array | null, scratch: Float64Array): [number, number] | null {
  const summary = src ? summarize(src, 0, scratch) : null;
  // Draws are stored in single precision: seven significant digits are what they hold.
  return summary ? [Number(summary.low.toPrecision(7)), Number(summary.high.toPrecision(7))] : null;
}

/**
 * Variance of each sensitivity key with only one input varying, over the same
 * deviates as the main run. Only the inputs the keys depend on (the graph's
 * edges) are run; the others' share is exactly zero. The program is the main
 * run's (same inputs drawn, same outputs), with every drawn input but one held
 * at the visit's value: its compiled form is already warm.
 */
function oneAtATime(plan: RunPlan, seed: number, drawsPerInput: number, keys: readonly SensitivityKey[], wanted: readonly ResultKey[]): Map<ErrorInputKey, Float64Array> {
  const { graph, nominal, active } = plan;
  const reaching = new Set(keys.flatMap((k) => inputsOf(graph, k)));
  const program = compileDraws(graph, nominal, active.map((a) => a.input), wanted, CHUNK);
  const hold = (input: ErrorInputKey) => program.input(input).fill(nominal[slotOf(input)]!);
  for (const { input } of active) hold(input);
  const result = new Map<ErrorInputKey, Float64Array>();
  const streams = randomStreams(seed, STREAM_COUNT);
  const outputs = keys.map((k) => program.output(k));
  const centres = keys.map((k) => nominal[slotOf(k)]!);
  for (const { input, stream, sd } of active) {
    if (!reaching.has(input)) continue;
    const column = program.input(input);
    const count = new Float64Array(keys.length);
    const sum = new Float64Array(keys.length);
    const sumSq = new Float64Array(keys.length);
    for (let start = 0; start < drawsPerInput; start += CHUNK) {
      const n = Math.min(CHUNK, drawsPerInput - start);
      fillNormals(streams[stream]!, column, n, nominal[slotOf(input)]!, sd);
      program.run(n);
      for (let q = 0; q < keys.length; q++) accumulate(outputs[q]!, centres[q]!, n, q, count, sum, sumSq);
    }
    hold(input);
    const variance = new Float64Array(keys.length);
    for (let q = 0; q < keys.length; q++) variance[q] = sampleVariance(count[q]!, sum[q]!, sumSq[q]!);
    result.set(input, variance);
  }
  return result;
}

/** Count, sum and sum of squares of the finite deviations from `centre` in draws 0…n−1 of a column, into position q. */
function accumulate(out: Float64Array, centre: number, n: number, q: number, count: Float64Array, sum: Float64Array, sumSq: Float64Array): void {
  let c = 0;
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i < n; i++) {
    const v = out[i]!;
    if (v - v === 0) {
      const dv = v - centre;
      c++;
      s1 += dv;
      s2 += dv * dv;
    }
  }
  count[q]! += c;
  sum[q]! += s1;
  sumSq[q]! += s2;
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
  const plan = runPlanFor(inputs, choice, model);
  // A result that passes another's value on (SV used = Doppler SV) has that result's draws: stored once.
  const aliasOf = new Map<ResultKey, ResultKey>();
  for (const p of plan.graph.nodes) if (p.alias !== null && results[p.key].value !== null) aliasOf.set(p.key, keyOfSlot(p.alias) as ResultKey);
  const keys = RESULT_KEYS.filter((k) => results[k].value !== null && !aliasOf.has(k));
  const ees0 = results.ees.value;
  const method = ees0 === null ? null : { ea: results.ea.value, calibrated: CHEN_CALIBRATION.slope * ees0 + CHEN_CALIBRATION.intercept };
  const sim = simulate(plan, draws, randomStreams(seed, STREAMS_PER_VISIT), keys, method);
  const scratch = new Float64Array(draws);

  const outputs: Partial<Record<ResultKey, Spread>> = {};
  for (const key of keys) {
    const value = results[key].value as number;
    const summary = summarize(sim.values.get(key)!, value, scratch);
    if (summary === null) continue;
    const { n, mean, sd, low, high } = summary;
    outputs[key] = {
      value,
      mean,
      sd,
      // Draws are stored in single precision: seven significant digits are what they hold.
      interval95: [Number(low.toPrecision(7)), Number(high.toPrecision(7))],
      computableFraction: n / draws,
    };
  }
  for (const key of RESULT_KEYS) {
    let source = aliasOf.get(key);
    while (source !== undefined && aliasOf.has(source)) source = aliasOf.get(source);
    const spread = source === undefined ? undefined : outputs[source];
    if (spread) outputs[key] = { ...spread, interval95: [...spread.interval95], value: results[key].value as number };
  }

  // Where Ees was lost in a draw: an input drawn outside its domain, tNd outside the curve's window, or Ees itself not positive.
  let inadmissible = 0;
  let lost = 0;
  sim.eesLosses.forEach((count, slot) => {
    lost += count;
    if (isInputSlot(slot)) inadmissible += count;
  });
  const tNdOutside = sim.eesLosses[slotOf('normalizedElastanceAvg')]!;
  const ees: EesAvailability = {
    notComputableFraction: lost / draws,
    inadmissibleInputs: inadmissible / draws,
    tNdOutsideWindow: tNdOutside / draws,
    eesNotPositive: (lost - inadmissible - tNdOutside) / draws,
  };
  const ratioDraws = sim.ratioCount;

  const methodError = methodErrorReport(method?.calibrated ?? null, sim, scratch);

  const sensitivity: Record<SensitivityKey, Share[]> = { ea: [], ees: [], eaEes: [], v0: [], tapsePasp: [] };
  const additivity: Partial<Record<SensitivityKey, number>> = {};
  const drawsPerInput = Math.min(draws, SENSITIVITY_DRAWS);
  if (options.sensitivity !== false) {
    const perInput = oneAtATime(plan, seed, drawsPerInput, SENSITIVITY_KEYS, wantedIn(keys));
    SENSITIVITY_KEYS.forEach((key, q) => {
      if (!outputs[key]) return;
      const list = model.inputs.filter((e) => e.sd > 0 && perInput.has(e.input)).map((e) => ({ input: e.input, variance: perInput.get(e.input)![q]! }));
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

/** The main results with their 95 % intervals attached (`interval95`); values unchanged. */
export function withIntervals(results: Results, report: UncertaintyReport): Results {
  const copy = { ...results };
  for (const key of RESULT_KEYS) {
    const spread = report.outputs[key];
    if (spread && results[key].value !== null) copy[key] = { ...results[key], interval95: spread.interval95 };
  }
  return copy;
}

export const CHANGE_KEYS = ['pes', 'ea', 'ees', 'eaEes', 'pasp', 'tapsePasp'] as const;
export type ChangeKey = (typeof CHANGE_KEYS)[number];

export interface ChangeNoise {
  /** Second visit minus first, main results. */
  observed: number | null;
  /** 95 % interval of the change: observed change less the noise quantiles. */
  interval95: [number, number] | null;
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
 * Pes, Ea, Ees, Ea/Ees, PASP and TAPSE/PASP. Each visit is drawn independently (its own streams from
 * the seed) with its own error model; the noise of the change is
 * d = (B_k − B₀) − (A_k − A₀) over paired draws k. Measurement error only: the
 * method's calibration error (Chen 2001 SEE) is largely shared by two visits of
 * one subject and is not added here.
 */
export function changeUncertainty(first: VisitInputs, second: VisitInputs, options: UncertaintyOptions = {}): ChangeUncertainty {
  const { draws, seed } = checkedOptions(options);
  const runs = [first, second].map((inputs, visit) => {
    const choice = defaultChoice(inputs);
    const results = computeResults(inputs, choice);
    const keys = CHANGE_KEYS.filter((k) => results[k].value !== null);
    const plan = runPlanFor(inputs, choice, errorModelFor(inputs));
    const sim = simulate(plan, draws, randomStreams(seed, STREAMS_PER_VISIT, visit * STREAMS_PER_VISIT), keys, null);
    return { results, sim };
  });
  const [a, b] = runs as [(typeof runs)[number], (typeof runs)[number]];
  const scratch = new Float64Array(draws);
  const changes = {} as Record<ChangeKey, ChangeNoise>;
  const source = `Monte Carlo, ${formatCount(draws)} independent draws per visit, seed ${seed}; input measurement error only (docs/uncertainty.md)`;
  for (const key of CHANGE_KEYS) {
    const a0 = a.results[key].value;
    const b0 = b.results[key].value;
    const va = a.sim.values.get(key);
    const vb = b.sim.values.get(key);
    if (a0 === null || b0 === null || !va || !vb) {
      changes[key] = { observed: null, interval95: null, noise95: null, exceeds: null, computableFraction: 0, source };
      continue;
    }
    let n = 0;
    for (let k = 0; k < draws; k++) {
      const d = vb[k]! - b0 - (va[k]! - a0);
      if (d - d === 0) scratch[n++] = d;
    }
    const observed = b0 - a0;
    if (n === 0) {
      changes[key] = { observed, interval95: null, noise95: null, exceeds: null, computableFraction: 0, source };
      continue;
    }
    const [low, high] = interval95(scratch, n);
    // Draws are stored in single precision: seven significant digits are what they hold.
    const noise95: [number, number] = [Number(low.toPrecision(7)), Number(high.toPrecision(7))];
    changes[key] = {
      observed,
      interval95: [Number((observed - noise95[1]).toPrecision(7)), Number((observed - noise95[0]).toPrecision(7))],
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
  interval95: [number, number];
  exceeds: boolean;
  source: string;
}

/** changeUncertainty reduced to what a comparison row shows; keys whose change is not computable are left out. */
export function changeNoiseChecks(first: VisitInputs, second: VisitInputs, options: UncertaintyOptions = {}): Partial<Record<ChangeKey, ChangeNoiseCheck>> {
  const { changes } = changeUncertainty(first, second, options);
  const checks: Partial<Record<ChangeKey, ChangeNoiseCheck>> = {};
  for (const key of CHANGE_KEYS) {
    const c = changes[key];
    if (c.interval95 !== null && c.exceeds !== null) checks[key] = { interval95: c.interval95, exceeds: c.exceeds, source: c.source };
  }
  return checks;
}

/**
 * A subject's series with intervals: each visit's results get their 95 %
 * ranges (no sensitivity runs), and each change from the previous visit its
 * noise checks (`checks[i]`, from visit i − 1 to visit i; null for the first
 * visit), for the caller to attach to its comparison rows
 * (records/compare.ts attachNoiseChecks). Entries are copied.
 */
export function seriesUncertainty<E extends { assessment: Assessment }>(
  entries: readonly E[],
  options: UncertaintyOptions = {},
): { entries: E[]; reports: UncertaintyReport[]; checks: (Partial<Record<ChangeKey, ChangeNoiseCheck>> | null)[] } {
  const reports = entries.map((e) => assessUncertainty(e.assessment.inputs, { ...options, sensitivity: false }, e.assessment.choice, e.assessment.results));
  const withRanges = entries.map((e, i) => ({ ...e, assessment: { ...e.assessment, results: withIntervals(e.assessment.results, reports[i]!) } }));
  const checks = entries.map((e, i) => (i === 0 ? null : changeNoiseChecks(entries[i - 1]!.assessment.inputs, e.assessment.inputs, options)));
  return { entries: withRanges, reports, checks };
}
