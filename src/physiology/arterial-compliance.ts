/**
 * Arterial compliance, stroke-volume-to-pulse-pressure estimate: C ≈ SV / (SBP − DBP)  (mL/mmHg).
 * A common estimate (common practice); it overstates compliance when brachial
 * amplification widens the cuff pulse pressure.
 * Worked example: 70 mL over 40 mmHg → 1.75 mL/mmHg.
 */
export function arterialCompliance(strokeVolume: number, systolic: number, diastolic: number): number {
  return strokeVolume / (systolic - diastolic);
}
