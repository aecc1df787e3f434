/**
 * Ventricular–arterial coupling ratio: Ea / Ees  (dimensionless).
 * Sunagawa 1983; values above 1.2 were taken as abnormal coupling in an echo
 * study of heart-failure patients (PubMed 19004668).
 * Worked example: Ea 1.5429, Ees 1.5258 → 1.0112.
 */
export function couplingRatio(arterialElastance: number, endSystolicElastance: number): number {
  return arterialElastance / endSystolicElastance;
}

/** The published cut-off above which coupling was taken as abnormal (PubMed 19004668). */
export const COUPLING_CUTOFF = 1.2;

/**
 * The V0-free identity: with V0 = 0, EF = Ees / (Ees + Ea), so Ea/Ees = 1/EF − 1
 * (EF as a fraction). A cross-check, not a method.
 * Worked example: EF 0.60 → 0.6667.
 */
export function couplingRatioFromEjectionFraction(ejectionFractionFraction: number): number {
  return 1 / ejectionFractionFraction - 1;
}
