/**
 * End-systolic wall stress: the force per unit area the myocardium bears at
 * the end of ejection, the load the muscle itself feels ("afterload" in the
 * muscle-mechanics sense). Two forms of the law of Laplace.
 *
 * Pressure used: the brachial cuff systolic pressure. Reichek et al. validated
 * their formula with cuff SBP as P (it correlated with LV end-systolic
 * micromanometer pressure, r = 0.89; docs/methods-verification.md §7), so this
 * is the published form; the thin-wall form gets the same pressure so that
 * the two differ only in geometry. Using Pes (0.9 × SBP) instead would lower
 * both by 10 %.
 *
 * Units: pressure mmHg, lengths cm, stress in 10³ dyn/cm² (kdyn/cm²), the unit
 * the echo literature reports; 1 mmHg = 1333.22 dyn/cm² (101325/760 Pa ×
 * 10 dyn/cm² per Pa, exact arithmetic on the unit definitions).
 */
export const DYN_PER_CM2_PER_MMHG = (101325 / 760) * 10;

/**
 * Thin-walled sphere, law of Laplace: σ = P·r / (2h).
 * r: cavity radius (LVIDs/2), h: wall thickness (PWTs), both in cm.
 * Returns 10³ dyn/cm².
 * Worked example (computed here): P 120 mmHg, r 1.5 cm, h 1.4 cm →
 * 64.29 mmHg → 85.71 × 10³ dyn/cm².
 */
export function wallStressThinWall(pressureMmHg: number, radiusCm: number, thicknessCm: number): number {
  return ((pressureMmHg * radiusCm) / (2 * thicknessCm)) * (DYN_PER_CM2_PER_MMHG / 1000);
}

/**
 * End-systolic meridional wall stress (thick-wall correction):
 * σ = 0.334·P·LVIDs / [PWTs·(1 + PWTs/LVIDs)]   (10³ dyn/cm²; P in mmHg, cm).
 * Reichek N, Wilson J, St John Sutton M, Plappert TA, Goldberg S, Hirshfeld JW,
 * "Noninvasive determination of left ventricular end-systolic stress:
 * validation of the method and initial application", Circulation 1982;65:99
 * (formula and unit confirmed from the abstract; volume and pages from memory).
 * 0.334 ≈ 1.3332/4 carries the mmHg → 10³ dyn/cm² conversion and the 1/4 of
 * Laplace written with the diameter; (1 + h/D) is the thick-wall correction.
 * Published means: normal 64.8 ± 19.5 × 10³ dyn/cm² (n = 22).
 * Worked example (computed here): P 120 mmHg, LVIDs 3.0 cm, PWTs 1.4 cm → 58.56.
 */
export function wallStressMeridional(pressureMmHg: number, lvidsCm: number, pwtsCm: number): number {
  return (0.334 * pressureMmHg * lvidsCm) / (pwtsCm * (1 + pwtsCm / lvidsCm));
}
