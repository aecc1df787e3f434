/**
 * Normalized time of the onset of ejection (arterial end-diastole) for the
 * single-beat method: tNd = PEP / (PEP + ET)  (ms / ms, dimensionless), PEP
 * from QRS onset to the onset of aortic flow, ET the duration of aortic flow.
 * Chen CH et al., J Am Coll Cardiol 2001;38:2028–2034; the definition as quoted
 * by two independent secondary implementations that cite it (the paper's own
 * text was not read; docs/methods-verification.md §12).
 * Worked example (computed here): PEP 90 ms, ET 290 ms → 90/380 = 0.23684.
 */
export function normalizedEjectionOnset(preEjectionPeriod: number, ejectionTime: number): number {
  return preEjectionPeriod / (preEjectionPeriod + ejectionTime);
}
