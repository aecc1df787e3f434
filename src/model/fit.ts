/**
 * Fitting the model to one subject: the filling (source) pressure and the
 * three Windkessel elements are adjusted until the simulated steady beat
 * reproduces the subject's EDV, stroke volume, SBP and DBP.
 *
 * Fixed, not fitted: Emax = the single-beat Ees, V0 as estimated, the
 * diastolic curve, the heart rate and the time to peak elastance (from PEP
 * and ET). Fitted (four unknowns for four targets): source pressure, R, C, Zc.
 *
 * Method: Levenberg–Marquardt (Levenberg 1944; Marquardt 1963) on the
 * logarithms of the four parameters (so they stay positive), residuals
 * relative, r_i = (simulated_i − target_i)/target_i, Jacobian by forward
 * differences of 1 % in each parameter, each simulation warm-started from the
 * last steady state. Stops when every |r_i| < FIT_STOP (0.1 %) or after
 * FIT_MAX_ITERATIONS iterations. The fit is accepted when every |r_i| ≤
 * FIT_TOLERANCE (2 %); otherwise it fails, with the residuals and the reason,
 * and nothing is projected.
 */
import { simulateToSteadyState, type HeartModel, type ModelState, type SimulatedBeat } from './beat.js';
import { solveLinear } from './linear-solve.js';

export const FIT_TARGET_KEYS = ['edv', 'sv', 'sbp', 'dbp'] as const;
export type FitTargetKey = (typeof FIT_TARGET_KEYS)[number];
export type FitTargets = Record<FitTargetKey, number>;

/** Largest accepted relative residual of each target. */
export const FIT_TOLERANCE = 0.02;
/** The fit stops early when every residual is below this. */
export const FIT_STOP = 0.001;
export const FIT_MAX_ITERATIONS = 25;

/** Bounds of the fitted parameters (wide physiological limits). */
const BOUNDS: readonly [number, number][] = [
  [0.5, 60], // source pressure, mmHg
  [0.1, 15], // R, mmHg·s/mL
  [0.05, 20], // C, mL/mmHg
  [0.002, 1], // Zc, mmHg·s/mL
];

export interface FitSuccess {
  ok: true;
  model: HeartModel;
  beat: SimulatedBeat;
  state: ModelState;
  residuals: Record<FitTargetKey, number>;
  iterations: number;
  /** the last Jacobian used, for warm-starting neighbouring fits */
  jacobian: number[][] | null;
}
export interface FitFailure {
  ok: false;
  reason: string;
  residuals?: Record<FitTargetKey, number>;
}
export type FitOutcome = FitSuccess | FitFailure;

function toVector(m: HeartModel): number[] {
  return [m.sourcePressure, m.arteries.resistance, m.arteries.compliance, m.arteries.characteristicImpedance].map(Math.log);
}

function fromVector(base: HeartModel, x: number[]): HeartModel {
  const v = x.map((xi, i) => Math.min(BOUNDS[i]![1], Math.max(BOUNDS[i]![0], Math.exp(xi))));
  return { ...base, sourcePressure: v[0]!, arteries: { resistance: v[1]!, compliance: v[2]!, characteristicImpedance: v[3]! } };
}

function clampVector(x: number[]): number[] {
  return x.map((xi, i) => Math.min(Math.log(BOUNDS[i]![1]), Math.max(Math.log(BOUNDS[i]![0]), xi)));
}

interface Evaluation {
  model: HeartModel;
  beat: SimulatedBeat;
  r: number[];
  cost: number;
}

function evaluate(base: HeartModel, x: number[], targets: FitTargets, start: ModelState | undefined): Evaluation | { reason: string } {
  const model = fromVector(base, x);
  const out = simulateToSteadyState(model, start ? { start } : {});
  if (!out.ok) return { reason: out.reason };
  const r = FIT_TARGET_KEYS.map((k) => (out.beat[k] - targets[k]) / targets[k]);
  return { model, beat: out.beat, r, cost: r.reduce((s, ri) => s + ri * ri, 0) };
}

export function residualRecord(r: readonly number[]): Record<FitTargetKey, number> {
  return Object.fromEntries(FIT_TARGET_KEYS.map((k, i) => [k, r[i]!])) as Record<FitTargetKey, number>;
}

function maxAbs(r: readonly number[]): number {
  return r.reduce((m, ri) => Math.max(m, Math.abs(ri)), 0);
}

export interface FitOptions {
  maxIterations?: number;
  /** a steady state to start each simulation from (warm start) */
  start?: ModelState;
  /** a Jacobian of the residuals in log-parameters from a neighbouring fit (warm start) */
  jacobian?: number[][];
}

/** Fit source pressure, R, C and Zc so the steady beat reproduces the targets. `start` holds the fixed parameters and the first guess. */
export function fitHeartModel(startModel: HeartModel, targets: FitTargets, options: FitOptions = {}): FitOutcome {
  const maxIterations = options.maxIterations ?? FIT_MAX_ITERATIONS;
  let x = clampVector(toVector(startModel));
  const first = evaluate(startModel, x, targets, options.start);
  if (!('r' in first)) return { ok: false, reason: `the model at its starting values does not beat steadily: ${first.reason}` };
  let current: Evaluation = first;
  let lambda = 1e-2;
  let iterations = 0;
  const h = 0.01;
  // A Jacobian handed in (from a neighbouring fit) is used and updated by Broyden's rule
  // (Broyden CG, Math Comput 1965;19:577) until a step fails; then one is computed.
  let broyden: number[][] | null = options.jacobian ? options.jacobian.map((row) => [...row]) : null;
  let lastJ: number[][] | null = null;
  while (iterations < maxIterations && maxAbs(current.r) >= FIT_STOP) {
    iterations++;
    let J: number[][];
    if (broyden) J = broyden;
    else {
      J = current.r.map(() => [0, 0, 0, 0]);
      for (let j = 0; j < 4; j++) {
        const xp = [...x];
        xp[j] = xp[j]! + h;
        const e = evaluate(startModel, xp, targets, current.beat.endState);
        if (!('r' in e)) return { ok: false, reason: `the model stops beating steadily near the fit: ${e.reason}`, residuals: residualRecord(current.r) };
        for (let i = 0; i < 4; i++) J[i]![j] = (e.r[i]! - current.r[i]!) / h;
      }
    }
    lastJ = J;
    if (broyden) {
      const delta = solveLinear(J, current.r.map((v) => -v));
      const scale = delta ? Math.min(1, 0.7 / Math.max(1e-12, maxAbs(delta))) : 0;
      const xn = delta ? clampVector(x.map((xi, i) => xi + scale * delta[i]!)) : x;
      const e = delta ? evaluate(startModel, xn, targets, current.beat.endState) : null;
      if (e && 'r' in e && e.cost < current.cost) {
        const dx = xn.map((v, i) => v - x[i]!);
        const dxx = dx.reduce((acc, v) => acc + v * v, 0);
        if (dxx > 0) {
          const jdx = J.map((row) => row.reduce((acc, v, j) => acc + v * dx[j]!, 0));
          broyden = J.map((row, i) => row.map((v, j) => v + ((e.r[i]! - current.r[i]! - jdx[i]!) * dx[j]!) / dxx));
        }
        x = xn;
        current = e;
      } else {
        broyden = null;
      }
      continue;
    }
    const JtJ = [0, 1, 2, 3].map((a) => [0, 1, 2, 3].map((b) => J.reduce((s, row) => s + row[a]! * row[b]!, 0)));
    const Jtr = [0, 1, 2, 3].map((a) => J.reduce((s, row, i) => s + row[a]! * current.r[i]!, 0));
    let improved = false;
    for (let attempt = 0; attempt < 8 && !improved; attempt++) {
      const A = JtJ.map((row, a) => row.map((v, b) => (a === b ? v + lambda * Math.max(v, 1e-9) : v)));
      const delta = solveLinear(A, Jtr.map((v) => -v));
      if (delta === null) {
        lambda *= 10;
        continue;
      }
      // Limit any one step to a factor of e^0.7 ≈ 2 in a parameter.
      const scale = Math.min(1, 0.7 / Math.max(1e-12, maxAbs(delta)));
      const xn = clampVector(x.map((xi, i) => xi + scale * delta[i]!));
      const e = evaluate(startModel, xn, targets, current.beat.endState);
      if ('r' in e && e.cost < current.cost) {
        x = xn;
        current = e;
        lambda = Math.max(1e-7, lambda / 3);
        improved = true;
      } else {
        lambda *= 4;
      }
    }
    if (!improved) break;
  }
  const residuals = residualRecord(current.r);
  if (maxAbs(current.r) > FIT_TOLERANCE) {
    const worst = FIT_TARGET_KEYS.map((k, i) => ({ k, v: current.r[i]! })).filter((e) => Math.abs(e.v) > FIT_TOLERANCE);
    const names: Record<FitTargetKey, string> = { edv: 'EDV', sv: 'stroke volume', sbp: 'SBP', dbp: 'DBP' };
    return {
      ok: false,
      reason: `no set of filling pressure, resistance, compliance and characteristic impedance reproduces ${worst.map((w) => `${names[w.k]} (off by ${(100 * w.v).toFixed(1)} %)`).join(', ')} within ${100 * FIT_TOLERANCE} % with this Ees, V0 and timing`,
      residuals,
    };
  }
  return { ok: true, model: current.model, beat: current.beat, state: current.beat.endState, residuals, iterations, jacobian: lastJ };
}
