/**
 * Normalized time of end-systole for the single-beat method:
 * tNd = PEP / (PEP + ET)  (ms / ms, dimensionless), PEP from QRS onset to the
 * onset of aortic flow, ET the duration of aortic flow.
 * Chen CH et al., J Am Coll Cardiol 2001;38:2028–2034.
 * Worked example: PEP 90 ms, ET 290 ms → 0.23684.
 */
export function normalizedEjectionOnset(preEjectionPeriod: number, ejectionTime: number): number {
  return preEjectionPeriod / (preEjectionPeriod + ejectionTime);
}
