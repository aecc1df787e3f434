/**
 * Left-sided filling pressure estimated from the ratio of mitral inflow E to
 * mitral annular e′ velocity:
 *
 *   PCWP ≈ 1.24·(E/e′) + 1.9      (mmHg; E/e′ dimensionless)
 *
 * Source: Nagueh SF, Middleton KJ, Kopelen HA, Zoghbi WA, Quiñones MA,
 * "Doppler tissue imaging: a noninvasive technique for evaluation of left
 * ventricular relaxation and estimation of filling pressures", J Am Coll
 * Cardiol 1997;30:1527 (abstract seen: r = 0.87, Doppler minus catheter
 * 0.1 ± 3.8 mmHg; docs/methods-verification.md §6). The relation was derived
 * with e′ from the LATERAL annulus; septal or averaged e′ (common in later
 * practice) shifts the estimate.
 *
 * Always an estimate, labelled as such wherever it is shown: in unexplained
 * dyspnoea the agreement with invasive wedge pressure was only within
 * −8.3 to +8.3 mmHg (Santos M et al., Circ Heart Fail 2015, abstract seen).
 * The wedge pressure stands in for LV end-diastolic pressure, which assumes
 * no mitral stenosis or significant mitral regurgitation (common practice).
 *
 * Worked example (computed here): E/e′ 10 → 14.3 mmHg.
 */
export const NAGUEH_SLOPE = 1.24;
export const NAGUEH_INTERCEPT_MMHG = 1.9;
/** SD of Doppler minus catheter in the derivation cohort (Nagueh 1997), mmHg. */
export const NAGUEH_SD_MMHG = 3.8;

export function fillingPressureFromEOverEPrime(eOverEPrime: number): number {
  return NAGUEH_SLOPE * eOverEPrime + NAGUEH_INTERCEPT_MMHG;
}

/** How the estimate is labelled in every view. */
export const FILLING_PRESSURE_METHOD = 'estimated from E/e′: 1.24·(E/e′) + 1.9 (Nagueh 1997, lateral e′); an estimate, ±8 mmHg';
