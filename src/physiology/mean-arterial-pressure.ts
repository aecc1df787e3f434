/**
 * Mean arterial pressure from cuff pressures (mmHg).
 *
 * MAP = DBP + (SBP − DBP)/3 — common practice; the default.
 * Worked example: 120/80 → 93.33 mmHg.
 */
export function meanArterialPressure(systolic: number, diastolic: number): number {
  return diastolic + (systolic - diastolic) / 3;
}

/**
 * MAP = DBP + 0.412 × (SBP − DBP) — Meaney E et al., Heart 2000;84:64.
 * Worked example: 120/80 → 96.48 mmHg.
 */
export function meanArterialPressureMeaney(systolic: number, diastolic: number): number {
  return diastolic + 0.412 * (systolic - diastolic);
}
