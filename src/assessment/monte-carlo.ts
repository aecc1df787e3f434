/**
 * Randomness and summaries for the Monte Carlo propagation (the draws
 * themselves evaluate the graph of quantities: graph/draws.ts).
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
 * 95 % ranges). Fills `target[0..count)` (with mean + sd·z when given); a
 * stream read in even-sized chunks gives the same sequence as one long read.
 */
export function fillNormals(rng: RandomGenerator, target: Float64Array, count = target.length, mean = 0, sd = 1): Float64Array {
  // Each deviate z is written as mean + sd·z: an input's draws around its value in the same pass (z itself
  // by default: 0 + 1·z is z exactly, z never being −0).
  let i = 0;
  while (i < count) {
    const u = (rng.next() | 0) * STEP + STEP / 2;
    const v = (rng.next() | 0) * STEP + STEP / 2;
    const s = u * u + v * v;
    if (s >= 1) continue;
    const f = Math.sqrt((-2 * Math.log(s)) / s);
    target[i++] = mean + sd * (u * f);
    if (i < count) target[i++] = mean + sd * (v * f);
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
 * The 2.5th and 97.5th percentiles of the first n entries of a (finite
 * values; a may be reordered), exactly as quantileInPlace gives them: see
 * summarize. n ≥ 1.
 */
export function interval95(a: Float64Array, n: number): [number, number] {
  // summarize compacts into its scratch array in place, so `a` can serve as both.
  const s = summarize(a.subarray(0, n), 0, a);
  return s ? [s.low, s.high] : [Number.NaN, Number.NaN];
}

/** Below this many draws, plain selection; above, the bracketed one-pass route. */
const BRACKET_MIN = 20_000;
const SAMPLE_SIZE = 2048;
/** Half-width of each bracket in probability: about 3.5 SD of a sample quantile at p = 0.025 (√(p(1−p)/2048) ≈ 0.0035). */
const BRACKET_HALF_WIDTH = 0.012;
const sampleBuffer = new Float64Array(SAMPLE_SIZE);
let lowBuffer = new Float64Array(0);
let highBuffer = new Float64Array(0);

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

export interface Summary {
  /** Finite values among the draws. */
  n: number;
  mean: number;
  sd: number;
  /** 2.5th and 97.5th percentiles (type 7), as interval95 gives them. */
  low: number;
  high: number;
}

/**
 * Count, mean, SD and 95 % interval of the finite values in one per-draw
 * array, NaN marking a draw where the value is not computable. For large
 * arrays one pass does it all: a systematic sample brackets both percentiles,
 * then the pass counts, sums (shifted by `centre`, so the sums do not cancel)
 * and collects the two brackets. Otherwise, or when a bracket misses, the
 * finite values are copied into `scratch` (which may be `src` itself) and
 * selected. Null when none is finite.
 */
export function summarize(src: Float32Array | Float64Array, centre: number, scratch: Float64Array): Summary | null {
  const len = src.length;
  if (len >= BRACKET_MIN) {
    const stride = Math.floor(len / SAMPLE_SIZE);
    let m = 0;
    for (let i = 0; i < SAMPLE_SIZE; i++) {
      const v = src[i * stride]!;
      if (v - v === 0) sampleBuffer[m++] = v;
    }
    if (m >= SAMPLE_SIZE / 2) {
      const sample = sampleBuffer.subarray(0, m).sort();
      const at = (q: number) => sample[Math.min(m - 1, Math.max(0, Math.round(q * (m - 1))))]!;
      const l0 = at(0.025 - BRACKET_HALF_WIDTH);
      const l1 = at(0.025 + BRACKET_HALF_WIDTH);
      const h0 = at(0.975 - BRACKET_HALF_WIDTH);
      const h1 = at(0.975 + BRACKET_HALF_WIDTH);
      const size = Math.ceil(len * 0.05) + 64;
      if (lowBuffer.length < size) {
        lowBuffer = new Float64Array(size);
        highBuffer = new Float64Array(size);
      }
      const lowBuf = lowBuffer;
      const highBuf = highBuffer;
      let n = 0;
      let sum = 0;
      let sumSq = 0;
      let belowLow = 0;
      let belowHigh = 0;
      let mLow = 0;
      let mHigh = 0;
      let overflow = false;
      for (let i = 0; i < len; i++) {
        const v = src[i]!;
        if (v - v !== 0) continue;
        n++;
        const d = v - centre;
        sum += d;
        sumSq += d * d;
        if (v < h0) {
          belowHigh++;
          if (v < l0) belowLow++;
          else if (v <= l1) {
            if (mLow < size) lowBuf[mLow++] = v;
            else overflow = true;
          }
        } else if (v <= h1) {
          if (mHigh < size) highBuf[mHigh++] = v;
          else overflow = true;
        }
      }
      if (!overflow && l1 < h0 && n >= BRACKET_MIN) {
        const low = fromBracket(lowBuf, mLow, belowLow, n, 0.025);
        const high = fromBracket(highBuf, mHigh, belowHigh, n, 0.975);
        if (low !== null && high !== null) return { n, mean: centre + sum / n, sd: Math.sqrt(sampleVariance(n, sum, sumSq)), low, high };
      }
    }
  }
  let n = 0;
  let sum = 0;
  let sumSq = 0;
  for (let i = 0; i < len; i++) {
    const v = src[i]!;
    if (v - v !== 0) continue;
    scratch[n++] = v;
    const d = v - centre;
    sum += d;
    sumSq += d * d;
  }
  if (n === 0) return null;
  const high = quantileInPlace(scratch, n, 0.975);
  const low = quantileInPlace(scratch, n, 0.025);
  return { n, mean: centre + sum / n, sd: Math.sqrt(sampleVariance(n, sum, sumSq)), low, high };
}

/** Sample variance from a count and sums of deviations from any fixed centre; 0 below two values. */
export function sampleVariance(n: number, sum: number, sumSq: number): number {
  if (n < 2) return 0;
  const v = (sumSq - (sum * sum) / n) / (n - 1);
  return v > 0 ? v : 0;
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
