/**
 * A virtual preload reduction ("vena cava occlusion"), as invasive studies
 * measure Ees: from the steady state, a run of beats with the filling
 * pressure falling, and the end-systolic points of the run fitted by a
 * straight line (common practice). The end-systolic point of each beat is
 * its point of maximal P/(V − V0), with V0 found by iteration from the
 * line's own intercept (the iterative method of Kono A et al., Circulation
 * 1984;70:1057, from memory): start with V0 = 0, take each beat's
 * max-elastance point, fit the line, replace V0 by its intercept, repeat
 * until V0 moves less than 0.1 mL (at most 20 times).
 *
 * Default run: 12 beats, filling pressure falling linearly to 40 % of its
 * steady value. Least squares: the usual ordinary fit of P on V.
 */
import { beatGrid, simulateBeat, type HeartModel, type ModelState, type PressureVolumePoint } from './beat.js';
import { rk4Scratch } from './integrate.js';

export const OCCLUSION_BEATS = 12;
export const OCCLUSION_FINAL_FRACTION = 0.4;

export interface LineFit {
  slope: number;
  intercept: number;
  /** volume intercept, −intercept/slope */
  v0: number;
}

/** Means and centred sums of squares and cross-products of paired values (n ≥ 1): the one place they are computed. */
export function centredMoments(xs: readonly number[], ys: readonly number[]): { n: number; mx: number; my: number; sxx: number; syy: number; sxy: number } {
  const n = xs.length;
  const mx = xs.reduce((a, b) => a + b, 0) / n;
  const my = ys.reduce((a, b) => a + b, 0) / n;
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    const dx = xs[i]! - mx;
    const dy = ys[i]! - my;
    sxx += dx * dx;
    syy += dy * dy;
    sxy += dx * dy;
  }
  return { n, mx, my, sxx, syy, sxy };
}

/** Ordinary least squares of y on x; null when x does not vary. */
export function leastSquaresLine(xs: readonly number[], ys: readonly number[]): { slope: number; intercept: number } | null {
  if (xs.length < 2) return null;
  const { mx, my, sxx, sxy } = centredMoments(xs, ys);
  if (!(sxx > 1e-9)) return null;
  const slope = sxy / sxx;
  return { slope, intercept: my - slope * mx };
}

export type OcclusionOutcome = { ok: true; fit: LineFit; points: PressureVolumePoint[] } | { ok: false; reason: string };

/** Run the occlusion from a steady state and fit the end-systolic line. */
export function virtualOcclusion(m: HeartModel, steady: ModelState, beats = OCCLUSION_BEATS, finalFraction = OCCLUSION_FINAL_FRACTION): OcclusionOutcome {
  const grid = beatGrid(m);
  const scratch = rk4Scratch(2);
  const loops: PressureVolumePoint[][] = [];
  let state = steady;
  for (let b = 1; b <= beats; b++) {
    const fraction = 1 - ((1 - finalFraction) * b) / beats;
    const out = simulateBeat({ ...m, sourcePressure: m.sourcePressure * fraction }, grid, state, true, scratch);
    if (!out.ok) break;
    loops.push(out.beat.loop ?? []);
    state = out.beat.endState;
  }
  if (loops.length < 3) return { ok: false, reason: 'fewer than three beats ejected during the preload reduction' };
  let v0 = 0;
  let line: { slope: number; intercept: number } | null = null;
  let points: PressureVolumePoint[] = [];
  for (let it = 0; it < 20; it++) {
    points = loops.map((loop) => {
      let best = loop[0]!;
      let bestE = -Infinity;
      for (const p of loop) {
        const span = p.volume - v0;
        if (span <= 0.5) continue;
        const e = p.pressure / span;
        if (e > bestE) {
          bestE = e;
          best = p;
        }
      }
      return best;
    });
    line = leastSquaresLine(points.map((p) => p.volume), points.map((p) => p.pressure));
    if (line === null || !(line.slope > 0)) return { ok: false, reason: 'the end-systolic points of the preload reduction do not rise with volume' };
    const next = -line.intercept / line.slope;
    const moved = Math.abs(next - v0);
    v0 = next;
    if (moved < 0.1) break;
  }
  return { ok: true, fit: { slope: line!.slope, intercept: line!.intercept, v0 }, points };
}
