/**
 * The ODE integrator: the classical fourth-order Runge–Kutta method with a
 * fixed step (Press WH et al., Numerical Recipes, §16.1; any numerical
 * analysis text). Fixed, not adaptive, so every beat is sampled on the same
 * grid: the elastance curve is tabulated once per beat at half steps, runs
 * are reproducible to the bit, and the cost is known in advance.
 *
 * The step used by the heart model is 0.5 ms (MODEL_STEP_MS). The stiffest
 * time constants of the model are Zc/Ees during ejection (10 ms or more for
 * Zc ≥ 0.05 mmHg·s/mL and Ees ≤ 5 mmHg/mL) and Rin/(dPed/dV) during filling
 * (about 8 ms or more): RK4 is stable for h/τ up to about 2.8 and accurate
 * to well under 0.1 % at h/τ = 0.05. The valves switch between steps, so
 * valve events are located to within one step (0.5 ms).
 *
 * `derivative(halfStep, y, dy)` receives the index of the time on the
 * half-step grid (t = halfStep · h/2), so tabulated inputs need no
 * interpolation.
 */

export const MODEL_STEP_MS = 0.5;

export type Derivative = (halfStep: number, y: Float64Array, dy: Float64Array) => void;

export interface Rk4Scratch {
  k1: Float64Array;
  k2: Float64Array;
  k3: Float64Array;
  k4: Float64Array;
  tmp: Float64Array;
}

export function rk4Scratch(n: number): Rk4Scratch {
  return { k1: new Float64Array(n), k2: new Float64Array(n), k3: new Float64Array(n), k4: new Float64Array(n), tmp: new Float64Array(n) };
}

/** One RK4 step of size h from the time at half-step index `halfStep`; y is updated in place. */
export function rk4Step(f: Derivative, halfStep: number, y: Float64Array, h: number, s: Rk4Scratch): void {
  const n = y.length;
  const { k1, k2, k3, k4, tmp } = s;
  f(halfStep, y, k1);
  for (let i = 0; i < n; i++) tmp[i] = y[i]! + 0.5 * h * k1[i]!;
  f(halfStep + 1, tmp, k2);
  for (let i = 0; i < n; i++) tmp[i] = y[i]! + 0.5 * h * k2[i]!;
  f(halfStep + 1, tmp, k3);
  for (let i = 0; i < n; i++) tmp[i] = y[i]! + h * k3[i]!;
  f(halfStep + 2, tmp, k4);
  for (let i = 0; i < n; i++) y[i] = y[i]! + (h / 6) * (k1[i]! + 2 * k2[i]! + 2 * k3[i]! + k4[i]!);
}
