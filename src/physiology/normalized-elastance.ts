import { computed, notComputable, type Outcome } from './outcome.js';

/**
 * Group-averaged normalized elastance at the onset of ejection:
 * ENd(avg) = Σ aᵢ · tNdⁱ, i = 0…7  (dimensionless), with
 * a = 0.35695, −7.2266, 74.249, −307.39, 684.54, −856.92, 571.95, −159.1.
 * Chen CH et al., J Am Coll Cardiol 2001;38:2028–2034. The coefficients are as
 * quoted by two independent secondary implementations that cite Chen 2001; the
 * paper's own table was not read (docs/methods-verification.md §1).
 * Worked example (computed here): tNd 0.23684 → 0.33614.
 */
export const NORMALIZED_ELASTANCE_COEFFICIENTS = [0.35695, -7.2266, 74.249, -307.39, 684.54, -856.92, 571.95, -159.1] as const;

/**
 * Validity window on tNd. The polynomial was fitted to human curves over the
 * physiological range; outside [0.08, 0.85] it is no longer monotonic and has
 * no meaning (computed here from the coefficients). Typical adults have tNd
 * of about 0.2–0.35; values outside TYPICAL are flagged but still computed.
 */
export const TND_DOMAIN = { low: 0.08, high: 0.85 } as const;
export const TND_TYPICAL = { low: 0.15, high: 0.45 } as const;

export function normalizedElastanceAverage(tNd: number): Outcome {
  if (!(tNd >= TND_DOMAIN.low && tNd <= TND_DOMAIN.high)) {
    return notComputable(
      `tNd ${tNd.toFixed(3)} is outside ${TND_DOMAIN.low}–${TND_DOMAIN.high}, where the normalized-elastance curve is defined`,
    );
  }
  let sum = 0;
  for (let i = NORMALIZED_ELASTANCE_COEFFICIENTS.length - 1; i >= 0; i--) {
    sum = sum * tNd + (NORMALIZED_ELASTANCE_COEFFICIENTS[i] as number);
  }
  return computed(sum);
}

/**
 * Subject-specific normalized elastance at the onset of ejection:
 * ENd(est) = 0.0275 − 0.165·EF + 0.3656·(DBP / Pes) + 0.515·ENd(avg)
 * (EF as a fraction; DBP and Pes in mmHg, Pes = 0.9·SBP). Chen CH et al., JACC
 * 2001;38:2028; coefficients as quoted by two independent secondary
 * implementations that cite it (the paper's own table was not read).
 * Worked example (computed here): EF 0.60, DBP 80, Pes 108, ENd(avg) 0.33614 → 0.37243.
 */
export function normalizedElastanceEstimate(
  ejectionFractionFraction: number,
  diastolic: number,
  endSystolicPressure: number,
  averageNormalizedElastance: number,
): number {
  return (
    0.0275 -
    0.165 * ejectionFractionFraction +
    0.3656 * (diastolic / endSystolicPressure) +
    0.515 * averageNormalizedElastance
  );
}
