/**
 * The Monte Carlo kernel: one draw of the inputs in, every result out, over
 * reusable Float64Arrays and without per-draw objects beyond what the
 * physiology functions themselves return. It re-implements no formula: it
 * calls the same functions of src/physiology/* in the same composition as
 * compute.ts, and a test checks that at the nominal inputs it reproduces
 * computeResults exactly, key by key.
 *
 * Randomness is passed in as a seed: xoroshiro128+ from pure-rand, one
 * independent stream per input (streams are 2⁶⁴ steps apart by the
 * generator's jump), normal deviates by Marsaglia's polar method (common
 * practice). One stream per input keeps an input's draws the same whether or
 * not other inputs are present, and lets the one-at-a-time sensitivity runs
 * reuse exactly the deviates of the main run (common random numbers).
 */
import { xoroshiro128plus } from 'pure-rand/generator/xoroshiro128plus';
import type { RandomGenerator } from 'pure-rand/types/RandomGenerator';
import { arterialCompliance } from '../physiology/arterial-compliance.js';
import { arterialElastance, arterialElastanceFromResistance, indexedToBodySurface } from '../physiology/arterial-elastance.js';
import { bodySurfaceAreaDuBois, bodySurfaceAreaMosteller } from '../physiology/body-surface-area.js';
import { cardiacIndex, cardiacOutput } from '../physiology/cardiac-output.js';
import { couplingRatio, couplingRatioFromEjectionFraction } from '../physiology/coupling.js';
import { ejectionFractionFromVolumes } from '../physiology/ejection-fraction.js';
import { endSystolicPressureFromSystolic, endSystolicPressureWeighted } from '../physiology/end-systolic-pressure.js';
import { meanArterialPressure, meanArterialPressureMeaney } from '../physiology/mean-arterial-pressure.js';
import { normalizedElastanceAverage, normalizedElastanceEstimate } from '../physiology/normalized-elastance.js';
import { normalizedEjectionOnset } from '../physiology/normalized-time.js';
import { totalPeripheralResistance, woodUnitsToDyn } from '../physiology/peripheral-resistance.js';
import { endSystolicElastanceNoIntercept, endSystolicElastanceSingleBeat } from '../physiology/single-beat-elastance.js';
import { strokeVolumeDoppler, strokeVolumeFromVolumes } from '../physiology/stroke-volume.js';
import { volumeIntercept } from '../physiology/volume-intercept.js';
import { RESULT_KEYS, defaultChoice, type MethodChoice, type ResultKey } from './compute.js';
import { ERROR_INPUT_KEYS, type ErrorInputKey } from './error-model.js';
import type { VisitInputs } from './inputs.js';

/** Input slots of a draw vector, in ERROR_INPUT_KEYS order. */
export const SLOT: Readonly<Record<ErrorInputKey, number>> = Object.fromEntries(ERROR_INPUT_KEYS.map((k, i) => [k, i])) as Record<ErrorInputKey, number>;
export const SLOT_COUNT = ERROR_INPUT_KEYS.length;

const S_SBP = SLOT.sbp;
const S_DBP = SLOT.dbp;
const S_HR = SLOT.hr;
const S_EDV = SLOT.edv;
const S_ESV = SLOT.esv;
const S_EF = SLOT.ef;
const S_SV = SLOT.sv;
const S_LVOTD = SLOT.lvotDiameter;
const S_VTI = SLOT.lvotVti;
const S_PEP = SLOT.pep;
const S_ET = SLOT.et;
const S_PESM = SLOT.pesMeasured;
const S_HEIGHT = SLOT.height;
const S_WEIGHT = SLOT.weight;

/** Output positions, in RESULT_KEYS order. */
export const OUTPUT_INDEX: Readonly<Record<ResultKey, number>> = Object.fromEntries(RESULT_KEYS.map((k, i) => [k, i])) as Record<ResultKey, number>;
export const OUTPUT_COUNT = RESULT_KEYS.length;
const O = OUTPUT_INDEX;

/** Why Ees was not computable in a draw. */
export const DRAW_OK = 0;
/** A drawn input left its physical domain (a value ≤ 0, DBP ≥ SBP, ESV ≥ EDV, EF ≥ 100 %). */
export const DRAW_INADMISSIBLE = 1;
/** tNd outside the window where the normalized-elastance curve is defined. */
export const DRAW_TND_OUTSIDE = 2;
/** DBP ≤ ENd(est)·Pes, or ENd(est) ≤ 0: the single-beat Ees is not positive. */
export const DRAW_EES_NOT_POSITIVE = 3;

/** What a draw needs to know about the visit: method choices and which inputs exist. Built once per run. */
export interface KernelSetup {
  /** 0: 0.9 × SBP, 1: (2·SBP + DBP)/3, 2: measured. */
  pesMethod: 0 | 1 | 2;
  meaney: boolean;
  dubois: boolean;
  /** 0: no Doppler SV, 1: entered directly, 2: from LVOT diameter and VTI. */
  doppler: 0 | 1 | 2;
  useDoppler: boolean;
  hasHr: boolean;
  hasEf: boolean;
  hasBsa: boolean;
  hasPesMeasured: boolean;
}

export function kernelSetup(inputs: VisitInputs, choice: MethodChoice = defaultChoice(inputs)): KernelSetup {
  const doppler: 0 | 1 | 2 = inputs.sv !== null ? 1 : inputs.lvotDiameter !== null && inputs.lvotVti !== null ? 2 : 0;
  return {
    pesMethod: choice.pesMethod === 'sbp90' ? 0 : choice.pesMethod === 'weighted' ? 1 : 2,
    meaney: inputs.mapMethod === 'meaney',
    dubois: inputs.bsaMethod === 'dubois',
    doppler,
    useDoppler: choice.strokeVolumeSource === 'doppler' && doppler !== 0,
    hasHr: inputs.hr !== null,
    hasEf: inputs.ef !== null,
    hasBsa: inputs.height !== null && inputs.weight !== null,
    hasPesMeasured: inputs.pesMeasured !== null,
  };
}

/** The visit's inputs as a draw vector; absent inputs are NaN. */
export function nominalVector(inputs: VisitInputs): Float64Array {
  const x = new Float64Array(SLOT_COUNT).fill(Number.NaN);
  for (const key of ERROR_INPUT_KEYS) {
    const v = inputs[key];
    if (v !== null) x[SLOT[key]] = v;
  }
  return x;
}

/**
 * One draw: inputs x (SLOT order) → every result into out (OUTPUT_INDEX
 * order; NaN where not computable). Returns DRAW_OK or why Ees is missing.
 * Mirrors computeResults in compute.ts; composition only, no formula.
 */
export function evaluateDraw(k: KernelSetup, x: Float64Array, out: Float64Array): number {
  const sbp = x[S_SBP]!;
  const dbp = x[S_DBP]!;
  const edv = x[S_EDV]!;
  const esv = x[S_ESV]!;
  const pep = x[S_PEP]!;
  const et = x[S_ET]!;
  const hr = x[S_HR]!;
  const efReported = x[S_EF]!;
  // Physical domain of a draw: normal errors can push a value past it.
  if (!(sbp > 0 && dbp > 0 && dbp < sbp && esv > 0 && edv > esv && pep > 0 && et > 0) ||
    (k.hasHr && !(hr > 0)) ||
    (k.hasEf && !(efReported > 0 && efReported < 100)) ||
    (k.doppler === 1 && !(x[S_SV]! > 0)) ||
    (k.doppler === 2 && !(x[S_LVOTD]! > 0 && x[S_VTI]! > 0)) ||
    (k.pesMethod === 2 && !(x[S_PESM]! > 0)) ||
    (k.hasBsa && !(x[S_HEIGHT]! > 0 && x[S_WEIGHT]! > 0))) {
    out.fill(Number.NaN);
    return DRAW_INADMISSIBLE;
  }

  const pes = k.pesMethod === 0 ? endSystolicPressureFromSystolic(sbp) : k.pesMethod === 1 ? endSystolicPressureWeighted(sbp, dbp) : k.hasPesMeasured ? x[S_PESM]! : Number.NaN;
  out[O.pes] = pes;
  const map = k.meaney ? meanArterialPressureMeaney(sbp, dbp) : meanArterialPressure(sbp, dbp);
  out[O.map] = map;
  out[O.pp] = sbp - dbp;

  const svVolumetric = strokeVolumeFromVolumes(edv, esv);
  out[O.svVolumetric] = svVolumetric;
  const svDoppler = k.doppler === 1 ? x[S_SV]! : k.doppler === 2 ? strokeVolumeDoppler(x[S_LVOTD]!, x[S_VTI]!) : Number.NaN;
  out[O.svDoppler] = svDoppler;
  const sv = k.useDoppler ? svDoppler : svVolumetric;
  out[O.sv] = sv;

  const efVolumes = ejectionFractionFromVolumes(edv, esv);
  out[O.efVolumes] = efVolumes;
  const ef = k.hasEf ? efReported : efVolumes;
  out[O.ef] = ef;

  const co = k.hasHr ? cardiacOutput(sv, hr) : Number.NaN;
  out[O.co] = co;
  const bsa = k.hasBsa ? (k.dubois ? bodySurfaceAreaDuBois(x[S_HEIGHT]!, x[S_WEIGHT]!) : bodySurfaceAreaMosteller(x[S_HEIGHT]!, x[S_WEIGHT]!)) : Number.NaN;
  out[O.bsa] = bsa;
  out[O.ci] = k.hasHr && k.hasBsa ? cardiacIndex(co, bsa) : Number.NaN;
  const tpr = k.hasHr ? totalPeripheralResistance(map, co) : Number.NaN;
  out[O.tpr] = tpr;
  out[O.tprDyn] = k.hasHr ? woodUnitsToDyn(tpr) : Number.NaN;
  out[O.compliance] = arterialCompliance(sv, sbp, dbp);

  const ea = arterialElastance(pes, sv);
  out[O.ea] = ea;
  out[O.eaIndexed] = k.hasBsa ? indexedToBodySurface(ea, bsa) : Number.NaN;
  out[O.eaResistance] = k.hasHr ? arterialElastanceFromResistance(tpr, hr) : Number.NaN;

  const tNd = normalizedEjectionOnset(pep, et);
  out[O.tNd] = tNd;
  out[O.eesNoIntercept] = endSystolicElastanceNoIntercept(pes, esv);
  out[O.eaEesFromEf] = couplingRatioFromEjectionFraction(ef / 100);
  const endAvg = normalizedElastanceAverage(tNd).value;
  if (endAvg === null || !(pes === pes)) {
    out[O.endAvg] = endAvg ?? Number.NaN;
    out[O.endEst] = Number.NaN;
    out[O.ees] = Number.NaN;
    out[O.eesIndexed] = Number.NaN;
    out[O.eaEes] = Number.NaN;
    out[O.v0] = Number.NaN;
    return endAvg === null ? DRAW_TND_OUTSIDE : DRAW_EES_NOT_POSITIVE;
  }
  out[O.endAvg] = endAvg;
  const endEst = normalizedElastanceEstimate(ef / 100, dbp, pes, endAvg);
  out[O.endEst] = endEst;
  const ees = endSystolicElastanceSingleBeat(dbp, pes, endEst, sv).value;
  if (ees === null) {
    out[O.ees] = Number.NaN;
    out[O.eesIndexed] = Number.NaN;
    out[O.eaEes] = Number.NaN;
    out[O.v0] = Number.NaN;
    return DRAW_EES_NOT_POSITIVE;
  }
  out[O.ees] = ees;
  out[O.eesIndexed] = k.hasBsa ? indexedToBodySurface(ees, bsa) : Number.NaN;
  out[O.eaEes] = couplingRatio(ea, ees);
  out[O.v0] = volumeIntercept(esv, pes, ees);
  return DRAW_OK;
}

/**
 * Independent random streams from one seed: stream i is the seeded
 * xoroshiro128+ jumped i + 1 times (each jump is 2⁶⁴ steps).
 */
export function randomStreams(seed: number, count: number, offset = 0): RandomGenerator[] {
  const base = xoroshiro128plus(seed);
  for (let i = 0; i < offset; i++) base.jump!();
  const streams: RandomGenerator[] = [];
  for (let i = 0; i < count; i++) {
    base.jump!();
    streams.push(base.clone());
  }
  return streams;
}

/** 2⁻³¹: one step of a signed 32-bit generator output scaled to (−1, 1). */
const STEP = 2 ** -31;

/**
 * Standard normal deviates from one stream by Marsaglia's polar method
 * (Marsaglia G, Bray TA, SIAM Review 1964;6:260; common practice): u, v
 * uniform on (−1, 1), s = u² + v², rejected unless s < 1; then
 * u·√(−2 ln s / s) and v·√(−2 ln s / s) are independent standard normals.
 * u and v come straight from the generator's 32-bit outputs, as pure-rand's
 * documentation shows for throughput: the signed output n gives
 * (n + ½)·2⁻³¹, symmetric about 0 and never 0 (resolution 2⁻³¹, ample for
 * 95 % ranges). Fills `target[0..count)`; a stream read in even-sized
 * chunks gives the same sequence as one long read.
 */
export function fillNormals(rng: RandomGenerator, target: Float64Array, count = target.length): Float64Array {
  let i = 0;
  while (i < count) {
    const u = (rng.next() | 0) * STEP + STEP / 2;
    const v = (rng.next() | 0) * STEP + STEP / 2;
    const s = u * u + v * v;
    if (s >= 1) continue;
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    target[i++] = u * f;
    if (i < count) target[i++] = v * f;
  }
  return target;
}

/**
 * The p-quantile of the first n entries of a, by selection (a is reordered),
 * with linear interpolation between order statistics (Hyndman–Fan type 7,
 * the default of R and NumPy; common practice). n ≥ 1.
 */
export function quantileInPlace(a: Float64Array, n: number, p: number): number {
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const vLo = select(a, 0, n - 1, lo);
  if (lo + 1 >= n || h === lo) return vLo;
  // The next order statistic is the minimum of the part above lo.
  let vHi = Number.POSITIVE_INFINITY;
  for (let i = lo + 1; i < n; i++) if (a[i]! < vHi) vHi = a[i]!;
  return vLo + (h - lo) * (vHi - vLo);
}

/**
 * The 2.5th and 97.5th percentiles of the first n entries of a (a may be
 * reordered), exactly as quantileInPlace gives them. For large n it first
 * brackets each order statistic with a systematic sample (the idea of
 * Floyd–Rivest selection), then selects only within the bracket; when a
 * bracket misses, it falls back to selection over the whole array.
 */
export function interval95(a: Float64Array, n: number): [number, number] {
  if (n >= BRACKET_MIN) {
    const bracketed = bracketedInterval(a, n);
    if (bracketed) return bracketed;
  }
  const high = quantileInPlace(a, n, 0.975);
  return [quantileInPlace(a, n, 0.025), high];
}

const BRACKET_MIN = 20_000;
const SAMPLE_SIZE = 2048;
/** Half-width of each bracket in probability: about 3.5 SD of a sample quantile at p = 0.025 (√(p(1−p)/2048) ≈ 0.0035). */
const BRACKET_HALF_WIDTH = 0.012;
const sampleBuffer = new Float64Array(SAMPLE_SIZE);
let lowBuffer = new Float64Array(0);
let highBuffer = new Float64Array(0);

/** Both percentiles (type 7) of a[0..n), read-only, in one pass; null when a bracket misses. */
function bracketedInterval(a: Float64Array, n: number): [number, number] | null {
  const stride = Math.floor(n / SAMPLE_SIZE);
  const sample = sampleBuffer;
  for (let i = 0; i < SAMPLE_SIZE; i++) sample[i] = a[i * stride]!;
  sample.sort();
  const at = (q: number) => sample[Math.min(SAMPLE_SIZE - 1, Math.max(0, Math.round(q * (SAMPLE_SIZE - 1))))]!;
  const l0 = at(0.025 - BRACKET_HALF_WIDTH);
  const l1 = at(0.025 + BRACKET_HALF_WIDTH);
  const h0 = at(0.975 - BRACKET_HALF_WIDTH);
  const h1 = at(0.975 + BRACKET_HALF_WIDTH);
  if (!(l1 < h0)) return null;
  const size = Math.ceil(n * 0.05) + 64;
  if (lowBuffer.length < size) {
    lowBuffer = new Float64Array(size);
    highBuffer = new Float64Array(size);
  }
  const lowBuf = lowBuffer;
  const highBuf = highBuffer;
  let belowLow = 0;
  let belowHigh = 0;
  let mLow = 0;
  let mHigh = 0;
  for (let i = 0; i < n; i++) {
    const v = a[i]!;
    if (v < h0) {
      belowHigh++;
      if (v < l0) belowLow++;
      else if (v <= l1) {
        if (mLow === size) return null;
        lowBuf[mLow++] = v;
      }
    } else if (v <= h1) {
      if (mHigh === size) return null;
      highBuf[mHigh++] = v;
    }
  }
  const low = fromBracket(lowBuf, mLow, belowLow, n, 0.025);
  const high = fromBracket(highBuf, mHigh, belowHigh, n, 0.975);
  return low === null || high === null ? null : [low, high];
}

/** The p-quantile from a bracket holding m values with `below` values under it; null when it misses. */
function fromBracket(buf: Float64Array, m: number, below: number, n: number, p: number): number | null {
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const need = h > lo ? lo + 1 : lo;
  if (below > lo || below + m <= need) return null;
  const vLo = select(buf, 0, m - 1, lo - below);
  if (h === lo) return vLo;
  let vHi = Number.POSITIVE_INFINITY;
  for (let i = lo - below + 1; i < m; i++) if (buf[i]! < vHi) vHi = buf[i]!;
  return vLo + (h - lo) * (vHi - vLo);
}

/** Hoare-style quickselect with median-of-three pivots: the k-th smallest of a[left..right]. */
function select(a: Float64Array, left: number, right: number, k: number): number {
  let l = left;
  let r = right;
  while (r > l) {
    const mid = (l + r) >>> 1;
    // Median of three as the pivot.
    if (a[mid]! < a[l]!) swap(a, mid, l);
    if (a[r]! < a[l]!) swap(a, r, l);
    if (a[r]! < a[mid]!) swap(a, r, mid);
    const pivot = a[mid]!;
    let i = l;
    let j = r;
    while (i <= j) {
      while (a[i]! < pivot) i++;
      while (a[j]! > pivot) j--;
      if (i <= j) {
        swap(a, i, j);
        i++;
        j--;
      }
    }
    if (k <= j) r = j;
    else if (k >= i) l = i;
    else return a[k]!;
  }
  return a[k]!;
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i]!;
  a[i] = a[j]!;
  a[j] = t;
}
