/**
 * Pulse pressure: PP = SBP − DBP  (mmHg), from the same cuff readings.
 * Common practice (any physiology handbook).
 * Worked example: 120/80 → 40 mmHg.
 */
export function pulsePressure(systolic: number, diastolic: number): number {
  return systolic - diastolic;
}
