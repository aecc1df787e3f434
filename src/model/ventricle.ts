/**
 * Left-ventricular pressure in the time-varying elastance model (Suga H,
 * Sagawa K, Shoukas AA, "Load independence of the instantaneous pressure-
 * volume ratio of the canine left ventricle and effects of epinephrine and
 * heart rate on the ratio", Circ Res 1973;32:314–322; Suga H, Sagawa K, Circ
 * Res 1974;35:117): during systole the ventricle behaves as an elastance
 * rising to Emax = Ees, P = E(t)·(V − V0), whatever the load.
 *
 * The passive side here is the subject's single-beat end-diastolic curve
 * (Klotz 2006, src/physiology/end-diastolic-pressure-volume.ts), and the two
 * are blended by the activation a(t) = En(t) ∈ [0, 1]:
 *
 *   P(V, t) = a(t)·Ees·(V − V0) + (1 − a(t))·Ped(V),   Ped(V) = α·V^β
 *
 * (the same blending of an active linear and a passive nonlinear relation as
 * in many lumped models; a modelling choice, stated). At the peak, a = 1 and
 * the point lies exactly on the end-systolic line P = Ees·(V − V0); in
 * diastole, a = 0 and it lies on the passive curve.
 * Units: volume mL, pressure mmHg, elastance mmHg/mL.
 * Worked example (computed here): Ees 1.5, V0 −20, α 6.4529e−12, β 5.863,
 * V 60 mL, a 0.5 → 0.5·1.5·80 + 0.5·α·60^β = 60 + 0.12 = 60.12 mmHg.
 */

export interface PassiveCurve {
  /** P = alpha·V^beta (mmHg, mL) */
  alpha: number;
  beta: number;
}

export interface VentricleProperties {
  /** Emax, mmHg/mL */
  ees: number;
  /** volume intercept of the end-systolic line, mL (may be negative) */
  v0: number;
  passive: PassiveCurve;
}

/** Passive pressure on the diastolic curve, 0 at V ≤ 0. */
export function passivePressure(curve: PassiveCurve, volume: number): number {
  if (!(volume > 0)) return 0;
  return curve.alpha * Math.exp(curve.beta * Math.log(volume));
}

/** P(V, t) for activation a ∈ [0, 1]. */
export function ventricularPressure(v: VentricleProperties, volume: number, activation: number): number {
  const a = activation < 0 ? 0 : activation > 1 ? 1 : activation;
  return a * v.ees * (volume - v.v0) + (1 - a) * passivePressure(v.passive, volume);
}
