/**
 * The end-diastolic pressure–volume relation (EDPVR) from one measured point,
 * by the single-beat method of Klotz S et al., "Single-beat estimation of
 * end-diastolic pressure-volume relationship: a novel method with potential
 * for noninvasive application", Am J Physiol Heart Circ Physiol 2006;291:H403,
 * and the authors' protocol, Klotz S, Dickstein ML, Burkhoff D, Nat Protoc
 * 2007;2:2152. The constants and formulas below are as quoted by a secondary
 * open implementation that cites the protocol; the papers' own text was not
 * read (docs/methods-verification.md §5).
 *
 * The method rests on one empirical finding: normalised for the volume at
 * which the curve starts (V0) and the volume at 30 mmHg (V30), human EDPVRs
 * collapse onto one curve EDP = An·ENDV^Bn, An = 27.78 mmHg, Bn = 2.76. From a
 * single (EDV, EDP):
 *
 *   V0  = EDV·(0.6 − 0.006·EDP)                         (mL; EDP in mmHg)
 *   V30 = V0 + (EDV − V0) / (EDP/An)^(1/Bn)             (mL)
 *   β   = ln(EDP/30) / ln(EDV/V30)                      (dimensionless)
 *   α   = 30 / V30^β                                    (mmHg/mL^β)
 *   P(V) = α·V^β                                        (mmHg)
 *
 * So the curve passes through (EDV, EDP) and through (V30, 30 mmHg).
 *
 * Where it breaks (computed here): β's denominator vanishes when V30 = EDV,
 * which happens at EDP = An = 27.78 mmHg (not at 30), and its numerator at
 * EDP = 30. Between the two the formula gives β ≤ 0, a curve that does not
 * rise with volume; just below 27.78 mmHg β grows without bound. The 30-mmHg
 * anchor is therefore unusable for high filling pressures. For EDP above
 * 22 mmHg we anchor instead at 15 mmHg, V15 = V0 + 0.8·(V30 − V0), and take
 *
 *   β = ln(EDP/15) / ln(EDV/V15),   α = EDP / EDV^β.
 *
 * This is the method's own branch for high pressures (Klotz 2006; Klotz,
 * Dickstein & Burkhoff, Nat Protoc 2007), as quoted by the same secondary
 * implementation. Its own singular point (V15 = EDV) sits at
 * EDP = An·0.8^Bn ≈ 15.0 mmHg, far below the 22-mmHg switch, so neither branch
 * is ever used near its singularity. The two branches do not join smoothly at
 * 22 mmHg (β jumps by about a fifth); that is a property of the method, and
 * the reason is stated wherever the curve is shown.
 *
 * Units: volume mL, pressure mmHg.
 * Worked example (computed here): EDV 120 mL, EDP 10 mmHg → V0 64.8 mL,
 * V30 144.73 mL, β 5.8630, α 6.4529e−12; P(120) = 10 mmHg, P(144.73) = 30 mmHg.
 * At EDP 22 mmHg β is 6.76 by the 30-mmHg anchor and 5.37 by the 15-mmHg one.
 */

/** Normalised-curve constants of Klotz 2006 (as quoted by a secondary implementation citing Klotz 2007). */
export const KLOTZ_AN_MMHG = 27.78;
export const KLOTZ_BN = 2.76;
/** Above this end-diastolic pressure the 15-mmHg anchor replaces the 30-mmHg one. */
export const KLOTZ_SWITCH_MMHG = 22;

export interface EndDiastolicCurve {
  /** P = alpha·V^beta, P in mmHg, V in mL. */
  alpha: number;
  beta: number;
  /** Volume at which the normalised curve starts, mL. */
  unstressedVolume: number;
  /** The second point the curve is forced through: (V30, 30) or (V15, 15). */
  anchorVolume: number;
  anchorPressure: 30 | 15;
  /** The measured or estimated point it was built from. */
  edv: number;
  edp: number;
}

export type EndDiastolicCurveOutcome = { curve: EndDiastolicCurve; reason?: undefined } | { curve: null; reason: string };

/**
 * The Klotz single-beat EDPVR through (EDV, EDP). Never throws and never
 * returns a non-finite curve: impossible points give a reason instead.
 */
export function endDiastolicCurveFromOnePoint(edv: number, edp: number): EndDiastolicCurveOutcome {
  if (!(Number.isFinite(edv) && edv > 0)) return { curve: null, reason: `EDV ${show(edv)} mL is not a positive volume` };
  if (!(Number.isFinite(edp) && edp > 0)) return { curve: null, reason: `EDP ${show(edp)} mmHg is not a positive pressure` };
  const unstressedVolume = edv * (0.6 - 0.006 * edp);
  if (!(unstressedVolume > 0)) {
    return { curve: null, reason: `EDP ${show(edp)} mmHg is beyond the single-beat EDPVR (V0 = EDV·(0.6 − 0.006·EDP) would not be positive)` };
  }
  const v30 = unstressedVolume + (edv - unstressedVolume) / Math.pow(edp / KLOTZ_AN_MMHG, 1 / KLOTZ_BN);
  let beta: number;
  let alpha: number;
  let anchorVolume: number;
  let anchorPressure: 30 | 15;
  if (edp <= KLOTZ_SWITCH_MMHG) {
    anchorVolume = v30;
    anchorPressure = 30;
    beta = Math.log(edp / 30) / Math.log(edv / v30);
    alpha = 30 / Math.pow(v30, beta);
  } else {
    anchorVolume = unstressedVolume + 0.8 * (v30 - unstressedVolume);
    anchorPressure = 15;
    beta = Math.log(edp / 15) / Math.log(edv / anchorVolume);
    alpha = edp / Math.pow(edv, beta);
  }
  if (!(Number.isFinite(beta) && beta > 0 && Number.isFinite(alpha) && alpha > 0 && Number.isFinite(anchorVolume))) {
    return { curve: null, reason: `no rising EDPVR through EDV ${show(edv)} mL and EDP ${show(edp)} mmHg` };
  }
  return { curve: { alpha, beta, unstressedVolume, anchorVolume, anchorPressure, edv, edp } };
}

/** Pressure on the curve at a volume: P = α·V^β (mmHg). 0 for V ≤ 0. */
export function pressureOnEndDiastolicCurve(curve: EndDiastolicCurve, volume: number): number {
  if (!(volume > 0)) return 0;
  return curve.alpha * Math.pow(volume, curve.beta);
}

/** Volume on the curve at a pressure: V = (P/α)^(1/β) (mL). 0 for P ≤ 0. */
export function volumeOnEndDiastolicCurve(curve: EndDiastolicCurve, pressure: number): number {
  if (!(pressure > 0)) return 0;
  return Math.pow(pressure / curve.alpha, 1 / curve.beta);
}

function show(x: number): string {
  return Number.isFinite(x) ? String(Math.round(x * 10) / 10) : 'not a number';
}
