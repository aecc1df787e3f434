/**
 * How systole's duration follows heart rate: the regressions of left
 * ventricular ejection time (ET) and pre-ejection period (PEP) on heart rate
 * in normal adults of Weissler AM, Harris WS, Schoenfeld CD, "Systolic time
 * intervals in heart failure in man", Circulation 1968;37:149–159:
 *
 *   ET  = 413 − 1.7·HR ms (men),  418 − 1.6·HR ms (women)
 *   PEP = 131 − 0.4·HR ms (men),  133 − 0.4·HR ms (women)
 *
 * The coefficients are from memory (../shared/method-notes.md §13); the
 * primary text was not reachable. What was found: the existence of Weissler's
 * heart-rate regressions for adults 19–65 years is stated in Wanderman KL et
 * al. (Circulation, systolic time intervals in adolescents) and in Lewis RP et
 * al., "A critical review of the systolic time intervals", Circulation
 * 1977;56:146; an independent resting regression in 18 men, ET = 379 − 1.8·HR
 * (Lance VQ, Spodick DH), has nearly the same slope. A sign that the slopes
 * are of the right size, not a verification of the intercepts.
 *
 * Use here: a projection to another heart rate keeps the subject's own
 * intervals and moves them along the published slopes,
 *   ET(HR′)  = ET  + sET ·(HR′ − HR),
 *   PEP(HR′) = PEP + sPEP·(HR′ − HR),
 * so the subject's deviation from the normal intercept is kept. Women's
 * slopes when the sex is recorded as female, men's otherwise.
 * Worked example (computed here): ET 290 ms, PEP 90 ms at 70 bpm, man, to
 * 90 bpm → ET 256 ms, PEP 82 ms.
 */

export interface SystolicIntervalSlopes {
  /** ms per bpm */
  ejectionTime: number;
  preEjectionPeriod: number;
}

export const WEISSLER_SLOPES: Readonly<Record<'male' | 'female', SystolicIntervalSlopes>> = {
  male: { ejectionTime: -1.7, preEjectionPeriod: -0.4 },
  female: { ejectionTime: -1.6, preEjectionPeriod: -0.4 },
};

/** The regressions' intercepts, ms (from memory, as above). */
export const WEISSLER_INTERCEPTS: Readonly<Record<'male' | 'female', SystolicIntervals>> = {
  male: { pep: 131, et: 413 },
  female: { pep: 133, et: 418 },
};

/** The normal PEP and ET at a heart rate by the Weissler regressions (men's unless female). */
export function normalSystolicIntervals(hr: number, sex: 'male' | 'female' | null): SystolicIntervals {
  const key = sex === 'female' ? 'female' : 'male';
  const a = WEISSLER_INTERCEPTS[key];
  const s = WEISSLER_SLOPES[key];
  return { pep: a.pep + s.preEjectionPeriod * hr, et: a.et + s.ejectionTime * hr };
}

export interface SystolicIntervals {
  /** ms */
  pep: number;
  /** ms */
  et: number;
}

/** The subject's PEP and ET moved along the Weissler slopes from one heart rate to another. */
export function systolicIntervalsAtHeartRate(measured: SystolicIntervals, fromHr: number, toHr: number, sex: 'male' | 'female' | null): SystolicIntervals {
  const s = WEISSLER_SLOPES[sex === 'female' ? 'female' : 'male'];
  const dHr = toHr - fromHr;
  return { pep: measured.pep + s.preEjectionPeriod * dHr, et: measured.et + s.ejectionTime * dHr };
}
