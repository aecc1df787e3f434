/**
 * Volume-axis intercept of the end-systolic pressure–volume line:
 * V0 = ESV − Pes / Ees  (mL). Single-beat V0 is often strongly negative in
 * normal hearts (Mihaileanu S et al., ESC Heart Fail 2020;7:2214): reported, not hidden.
 * Worked example: ESV 50 mL, Pes 108 mmHg, Ees 1.5258 mmHg/mL → −20.78 mL.
 */
export function volumeIntercept(endSystolicVolume: number, endSystolicPressure: number, endSystolicElastance: number): number {
  return endSystolicVolume - endSystolicPressure / endSystolicElastance;
}
