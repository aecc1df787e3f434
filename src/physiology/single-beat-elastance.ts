import { computed, notComputable, type Outcome } from './outcome.js';

/**
 * End-systolic elastance by the single-beat normalized-elastance method:
 * Ees(sb) = [DBP − ENd(est) × Pes] / [ENd(est) × SV]  (mmHg / mL), with
 * Pes = 0.9 × SBP in the original. Chen CH et al., J Am Coll Cardiol
 * 2001;38:2028–2034 (validated against invasive Ees 0.4–8.4 mmHg/mL;
 * SEE 0.64 mmHg/mL).
 * When DBP ≤ ENd(est) × Pes the estimate is zero or negative: not computable.
 * Worked example (computed here): DBP 80, Pes 108, ENd(est) 0.37243, SV 70 → 1.5258.
 */
export function endSystolicElastanceSingleBeat(
  diastolic: number,
  endSystolicPressure: number,
  estimatedNormalizedElastance: number,
  strokeVolume: number,
): Outcome {
  if (!(estimatedNormalizedElastance > 0)) {
    return notComputable(`ENd(est) ${estimatedNormalizedElastance.toFixed(3)} is not positive`);
  }
  const pressureAtOnset = estimatedNormalizedElastance * endSystolicPressure;
  if (diastolic <= pressureAtOnset) {
    return notComputable(
      `DBP ${diastolic.toFixed(0)} mmHg ≤ ENd(est) × Pes = ${pressureAtOnset.toFixed(1)} mmHg, so the single-beat Ees is not positive`,
    );
  }
  return computed((diastolic - pressureAtOnset) / (estimatedNormalizedElastance * strokeVolume));
}

/**
 * Crude alternative, labelled as such: Ees ≈ Pes / ESV (assumes V0 = 0). Common practice.
 * Worked example: Pes 108 mmHg, ESV 50 mL → 2.16 mmHg/mL.
 */
export function endSystolicElastanceNoIntercept(endSystolicPressure: number, endSystolicVolume: number): number {
  return endSystolicPressure / endSystolicVolume;
}
