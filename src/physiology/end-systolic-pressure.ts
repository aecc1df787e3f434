/**
 * End-systolic pressure (Pes) from the arm cuff.
 *
 * Pes ≈ 0.9 × brachial SBP  (mmHg → mmHg)
 * The factor is stated in the Chen 2001 abstract (Chen CH et al., JACC
 * 2001;38:2028: "P(s) × 0.9") and in later papers (e.g. Cardiovasc Ultrasound
 * 2010;8:48, table of formulas). Kelly RP et al., Circulation 1992;86:513
 * validated Ea = Pes/SV and simple estimates from arm pressures, but its
 * abstract does not state the factor (method notes §11).
 * Worked example: SBP 120 mmHg → Pes 108 mmHg.
 */
export function endSystolicPressureFromSystolic(systolic: number): number {
  return 0.9 * systolic;
}

/**
 * Pes ≈ (2·SBP + DBP) / 3  (mmHg). An estimate seen in the literature; its
 * primary source is not verified here, so the report labels it as such.
 * Worked example: 120/80 mmHg → 106.67 mmHg.
 */
export function endSystolicPressureWeighted(systolic: number, diastolic: number): number {
  return (2 * systolic + diastolic) / 3;
}
