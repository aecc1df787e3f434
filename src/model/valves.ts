/**
 * Valves that open and close on pressure: ideal diodes. A valve passes
 * forward flow (upstream − downstream pressure) / resistance when the upstream
 * pressure is higher and nothing otherwise; no regurgitation, no inertia
 * (common practice in lumped heart models; valve disease is not modelled).
 *
 * - Mitral: from a constant source pressure (the filling pressure, tuned so
 *   that the steady beat has the subject's EDV) through an inflow resistance.
 * - Aortic: from the ventricle into the Windkessel, the characteristic
 *   impedance Zc being the resistance: Q = (Plv − Pc)/Zc, so the aortic
 *   pressure Pc + Zc·Q equals the ventricular pressure while the valve is
 *   open, and the valve closes when the ventricular pressure falls below Pc.
 * Units: pressure mmHg, resistance mmHg·s/mL, flow mL/s.
 */

/**
 * Resistance of the filling path (mitral valve and atrium lumped), mmHg·s/mL.
 * An assumed value of the order used in lumped models (0.005–0.01); with it,
 * filling of a normal heart is nearly complete at resting heart rates. Not
 * fitted: the fit tunes the source pressure instead.
 */
export const INFLOW_RESISTANCE = 0.01;

/** Forward flow through an ideal diode valve (mL/s). */
export function valveFlow(upstream: number, downstream: number, resistance: number): number {
  const d = upstream - downstream;
  return d > 0 ? d / resistance : 0;
}
