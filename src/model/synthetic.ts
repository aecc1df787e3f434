/**
 * Known truth for the single-beat method: virtual adults with known Emax,
 * simulated to steady state, observed as echo and cuff would observe them,
 * and estimated by the same assessment a visit gets.
 *
 * Each virtual adult (seeded; chunk c of N uses random stream c):
 *   Emax uniform 0.5–5 mmHg/mL, V0 −50 to +40 mL, R 0.7–2.5 mmHg·s/mL,
 *   C 0.6–2.5 mL/mmHg, HR 45–120 bpm, EDV 70–280 mL, EDP 5–20 mmHg
 *   (method-notes §13 ranges, from memory), Zc 5–10 % of R (from memory),
 *   systolic duration: PEP and ET from the Weissler 1968 regressions for men
 *   at the drawn heart rate, each scaled by a factor uniform 0.85–1.15.
 * Filling: the Klotz curve through (EDV, EDP) with the source pressure at EDP.
 * Observed (what echo and cuff would report): EDV, ESV (at aortic valve
 * closure), EF, SBP and DBP of the aortic pressure, HR, PEP (QRS onset to
 * aortic opening, so including the electromechanical delay) and ET.
 * Estimated: the assessment of those numbers (single-beat Ees, tNd, Ea).
 * True Ees two ways: the model's Emax, and a virtual preload reduction
 * (virtual-occlusion.ts). Subjects that do not reach a steady state, or
 * whose observations fall outside the tool's accepted input ranges, are
 * counted and kept with a reason.
 *
 * What this measures is agreement within the model: the single-beat
 * method's normalized elastance curve was fitted to human ventricles and a
 * double Hill ventricle has its own curve, so the bias depends on the
 * shape; both shapes are run and reported. Nothing is tuned to make the
 * estimator look good.
 */
import type { RandomGenerator } from 'pure-rand/types/RandomGenerator';
import { computeResults } from '../assessment/graph/index.js';
import { parseInputs } from '../assessment/inputs.js';
import { randomStreams } from '../assessment/monte-carlo.js';
import { InputError } from '../errors.js';
import { simulateToSteadyState, type HeartModel } from './beat.js';
import type { ElastanceShape } from './double-hill.js';
import { heartModelFrom } from './subject-model.js';
import { normalSystolicIntervals } from './systolic-intervals.js';
import { centredMoments, virtualOcclusion } from './virtual-occlusion.js';

export const VIRTUAL_RANGES = {
  emax: [0.5, 5],
  v0: [-50, 40],
  resistance: [0.7, 2.5],
  compliance: [0.6, 2.5],
  hr: [45, 120],
  edv: [70, 280],
  edp: [5, 20],
  zcFraction: [0.05, 0.1],
  timingFactor: [0.85, 1.15],
} as const;

export interface VirtualHeart {
  emax: number;
  v0: number;
  resistance: number;
  compliance: number;
  zc: number;
  hr: number;
  edv: number;
  edp: number;
  pep: number;
  et: number;
}

export interface SyntheticRow {
  id: number;
  shape: ElastanceShape;
  heart: VirtualHeart;
  observed: { edv: number; esv: number; ef: number; sbp: number; dbp: number; hr: number; pep: number; et: number } | null;
  trueEes: number;
  occlusionEes: number | null;
  estimatedEes: number | null;
  tNd: number | null;
  ea: number | null;
  eaEes: number | null;
  /** why estimatedEes (or the whole row) is missing */
  reason?: string;
}

function uniform(rng: RandomGenerator, [lo, hi]: readonly [number, number]): number {
  const u = ((rng.next() >>> 0) + 0.5) / 4294967296;
  return lo + u * (hi - lo);
}

/** What was observed at one visit, for `--near`: the hearts kept are those whose simulated observations fall within NEAR_WINDOWS of these. */
export interface NearTarget {
  ef: number;
  sbp: number;
  dbp: number;
  hr: number;
  edv: number;
  tNd: number;
}

/**
 * Windows of `--near` (chosen here, stated in docs/model.md): about the
 * measurement error of each observation (method-notes §9), never the fitted
 * Ees, which would be circular.
 */
export const NEAR_WINDOWS = { ef: 5, sbp: 10, dbp: 8, hr: 8, edvFraction: 0.15, tNd: 0.03 } as const;

export function isNear(o: NonNullable<SyntheticRow['observed']>, tNd: number | null, t: NearTarget): boolean {
  const w = NEAR_WINDOWS;
  return Math.abs(o.ef - t.ef) <= w.ef && Math.abs(o.sbp - t.sbp) <= w.sbp && Math.abs(o.dbp - t.dbp) <= w.dbp && Math.abs(o.hr - t.hr) <= w.hr &&
    Math.abs(o.edv / t.edv - 1) <= w.edvFraction && tNd !== null && Math.abs(tNd - t.tNd) <= w.tNd;
}

/** One virtual heart from a stream; with a target, heart rate and EDV (observed directly) are drawn within its windows, the rest as widely as ever. */
export function drawHeart(rng: RandomGenerator, near?: NearTarget): VirtualHeart {
  const r = VIRTUAL_RANGES;
  const hr = near ? uniform(rng, [near.hr - NEAR_WINDOWS.hr, near.hr + NEAR_WINDOWS.hr]) : uniform(rng, r.hr);
  const resistance = uniform(rng, r.resistance);
  const normal = normalSystolicIntervals(hr, 'male');
  const heart = {
    emax: uniform(rng, r.emax),
    v0: uniform(rng, r.v0),
    resistance,
    compliance: uniform(rng, r.compliance),
    zc: resistance * uniform(rng, r.zcFraction),
    hr,
    edv: near ? uniform(rng, [near.edv * (1 - NEAR_WINDOWS.edvFraction), near.edv * (1 + NEAR_WINDOWS.edvFraction)]) : uniform(rng, r.edv),
    edp: uniform(rng, r.edp),
    // Weissler 1968, men (systolic-intervals.ts), scaled per heart.
    pep: normal.pep * uniform(rng, r.timingFactor),
    et: normal.et * uniform(rng, r.timingFactor),
  };
  return heart;
}

export function heartModelOf(h: VirtualHeart, shape: ElastanceShape): HeartModel | null {
  const built = heartModelFrom({
    ees: h.emax, v0: h.v0, edv: h.edv, edp: h.edp, hr: h.hr, pep: h.pep, et: h.et, shape,
    arteries: { resistance: h.resistance, compliance: h.compliance, characteristicImpedance: h.zc }, sourcePressure: h.edp,
  });
  return built.ok ? built.model : null;
}

/** Simulate, observe, estimate and occlude one virtual heart. */
export function syntheticRow(id: number, h: VirtualHeart, shape: ElastanceShape, occlude = true): SyntheticRow {
  const row: SyntheticRow = { id, shape, heart: h, observed: null, trueEes: h.emax, occlusionEes: null, estimatedEes: null, tNd: null, ea: null, eaEes: null };
  const model = heartModelOf(h, shape);
  if (model === null) return { ...row, reason: 'no diastolic curve for this EDV and EDP' };
  const steady = simulateToSteadyState(model);
  if (!steady.ok) return { ...row, reason: steady.reason };
  const b = steady.beat;
  row.observed = { edv: b.edv, esv: b.esv, ef: b.ef, sbp: b.sbp, dbp: b.dbp, hr: h.hr, pep: b.pep, et: b.et };
  if (occlude) {
    const occ = virtualOcclusion(model, b.endState);
    if (occ.ok) row.occlusionEes = occ.fit.slope;
  }
  try {
    const round = (x: number, d: number) => Number(x.toFixed(d));
    // The single-beat estimator is the graph of quantities, as for any visit.
    const results = computeResults(parseInputs({
      sbp: round(b.sbp, 1), dbp: round(b.dbp, 1), hr: round(h.hr, 1), edv: round(b.edv, 1), esv: round(b.esv, 1),
      ef: round(b.ef, 1), pep: round(b.pep, 1), et: round(b.et, 1),
    }));
    row.estimatedEes = results.ees.value;
    row.tNd = results.tNd.value;
    row.ea = results.ea.value;
    row.eaEes = results.eaEes.value;
    if (results.ees.reason) row.reason = results.ees.reason;
  } catch (err) {
    if (!(err instanceof InputError)) throw err;
    row.reason = `${OUTSIDE_INPUTS}: ${err.message.split('\n')[0]}`;
  }
  return row;
}

export const SYNTHETIC_CHUNK = 25;
/** Reason prefix of a heart whose observations the tool would refuse as inputs (an implausible adult). */
export const OUTSIDE_INPUTS = 'the simulated observations fall outside the accepted inputs';

/** Rows of chunk `chunk` (subjects chunk·25 … ), for every shape, from stream `chunk` of the seed. */
export function syntheticChunk(seed: number, chunk: number, count: number, shapes: readonly ElastanceShape[], occlude = true, near?: NearTarget): SyntheticRow[] {
  const rng = randomStreams(seed, 1, chunk)[0]!;
  const rows: SyntheticRow[] = [];
  for (let i = 0; i < count; i++) {
    const h = drawHeart(rng, near);
    const id = chunk * SYNTHETIC_CHUNK + i + 1;
    for (const shape of shapes) {
      if (!near) {
        rows.push(syntheticRow(id, h, shape, occlude));
        continue;
      }
      // Near a subject: simulate and observe first; the occlusion only for the hearts kept.
      const row = syntheticRow(id, h, shape, false);
      if (row.observed === null || !isNear(row.observed, row.tNd, near)) continue;
      rows.push(occlude ? syntheticRow(id, h, shape, true) : row);
    }
  }
  return rows;
}

export interface AgreementSummary {
  n: number;
  computable: number;
  /** mean of (estimated − true), mmHg/mL */
  bias: number | null;
  /** bias ± 1.96·SD (Bland JM, Altman DG, Lancet 1986;1:307) */
  loa: [number, number] | null;
  /** Pearson correlation of estimated and true */
  r: number | null;
  failures: { tNdOutsideWindow: number; eesNotPositive: number; notSimulated: number; outsideInputRanges: number; other: number };
}

/** Bland–Altman agreement of estimated Ees with a reference (Emax or the occlusion slope). */
export function agreement(rows: readonly SyntheticRow[], reference: 'trueEes' | 'occlusionEes'): AgreementSummary {
  const pairs = rows.filter((r) => r.estimatedEes !== null && r[reference] !== null).map((r) => [r.estimatedEes!, r[reference]!] as const);
  const failures = { tNdOutsideWindow: 0, eesNotPositive: 0, notSimulated: 0, outsideInputRanges: 0, other: 0 };
  for (const r of rows) {
    if (r.estimatedEes !== null) continue;
    if (r.observed === null) failures.notSimulated++;
    else if (r.reason?.startsWith(OUTSIDE_INPUTS)) failures.outsideInputRanges++;
    else if (/tNd/.test(r.reason ?? '')) failures.tNdOutsideWindow++;
    else if (/not positive|≤/.test(r.reason ?? '')) failures.eesNotPositive++;
    else failures.other++;
  }
  const n = pairs.length;
  if (n < 2) return { n: rows.length, computable: n, bias: null, loa: null, r: null, failures };
  const d = pairs.map(([e, t]) => e - t);
  const differences = centredMoments(d, d);
  const bias = differences.mx;
  const sd = Math.sqrt(differences.sxx / (n - 1));
  const { sxx, syy, sxy } = centredMoments(pairs.map(([e]) => e), pairs.map(([, t]) => t));
  const r = sxx > 0 && syy > 0 ? sxy / Math.sqrt(sxx * syy) : null;
  return { n: rows.length, computable: n, bias, loa: [bias - 1.96 * sd, bias + 1.96 * sd], r, failures };
}
