/**
 * The normalized time course of ventricular elastance: the "double Hill"
 * function of Stergiopulos N, Meister JJ, Westerhof N, "Determinants of stroke
 * volume and systolic and diastolic aortic pressure", Am J Physiol
 * 1996;270:H2050–H2059:
 *
 *   En(t) = k · [(t/a1)^n1 / (1 + (t/a1)^n1)] · [1 / (1 + (t/a2)^n2)]
 *
 * The first factor is the contraction (a Hill rise), the second the
 * relaxation; k scales the peak to 1. Time t is counted from the onset of
 * contraction. Two parameter sets circulate in open implementations that cite
 * the paper, both with time normalised to the time of peak elastance (the
 * paper's own table was not read; ../shared/method-notes.md §13):
 *
 *   set A: a1 0.7,   a2 1.17,          n1 1.9,  n2 21.9
 *   set B: a1 0.708, a2 1.677 × 0.708, n1 1.32, n2 21.9
 *
 * Here k and the exact time of the peak are computed numerically (the raw
 * curves peak at 0.997 and 1.001 of the nominal time), and time is rescaled
 * so that the peak of En is exactly 1 at exactly tn = 1.
 *
 * Why it matters (computed here): at tn = 0.24 set A gives En 0.18 and set B
 * 0.32, where the human average curve of the single-beat method (Chen 2001)
 * gives 0.34. The two sets are different ventricles as far as the single-beat
 * estimator is concerned, so both are offered and every output names the set
 * it used. Projections use set B by default: its early systolic course is the
 * closer of the two to the human ventricles the single-beat method was built
 * on, which is what a model of one subject's ventricle should resemble. The
 * choice is a modelling assumption, not a measurement.
 */

export type ElastanceShape = 'hill-a' | 'hill-b';
export const ELASTANCE_SHAPES: readonly ElastanceShape[] = ['hill-a', 'hill-b'];
export const DEFAULT_ELASTANCE_SHAPE: ElastanceShape = 'hill-b';

export interface DoubleHillParameters {
  /** Time constants in units of the nominal time of peak elastance. */
  a1: number;
  a2: number;
  n1: number;
  n2: number;
}

export const DOUBLE_HILL_SETS: Readonly<Record<ElastanceShape, { parameters: DoubleHillParameters; label: string }>> = {
  'hill-a': {
    parameters: { a1: 0.7, a2: 1.17, n1: 1.9, n2: 21.9 },
    label: 'double Hill, set A (a1 0.7, a2 1.17, n1 1.9, n2 21.9; Stergiopulos 1996 as quoted in open code)',
  },
  'hill-b': {
    parameters: { a1: 0.708, a2: 1.677 * 0.708, n1: 1.32, n2: 21.9 },
    label: 'double Hill, set B (a1 0.708, a2 1.677·a1, n1 1.32, n2 21.9; Stergiopulos 1996 as quoted in open code)',
  },
};

/** The unscaled double Hill product at time t (same time unit as a1, a2). */
export function doubleHill(t: number, p: DoubleHillParameters): number {
  if (!(t > 0)) return 0;
  const rise = Math.pow(t / p.a1, p.n1);
  const fall = Math.pow(t / p.a2, p.n2);
  return rise / (1 + rise) / (1 + fall);
}

interface Calibration {
  /** Time of the raw peak, in nominal units. */
  peakTime: number;
  /** 1 / raw peak value. */
  k: number;
}

const calibrations = new Map<ElastanceShape, Calibration>();

/** Peak of the raw curve: a coarse scan, then golden-section refinement (the curve is unimodal). */
function calibrate(shape: ElastanceShape): Calibration {
  const cached = calibrations.get(shape);
  if (cached) return cached;
  const p = DOUBLE_HILL_SETS[shape].parameters;
  let best = 0;
  let bestT = 0;
  for (let t = 0.01; t <= 3; t += 0.01) {
    const v = doubleHill(t, p);
    if (v > best) {
      best = v;
      bestT = t;
    }
  }
  let lo = bestT - 0.01;
  let hi = bestT + 0.01;
  const g = (Math.sqrt(5) - 1) / 2;
  for (let i = 0; i < 60; i++) {
    const m1 = hi - g * (hi - lo);
    const m2 = lo + g * (hi - lo);
    if (doubleHill(m1, p) > doubleHill(m2, p)) hi = m2;
    else lo = m1;
  }
  const peakTime = (lo + hi) / 2;
  const c = { peakTime, k: 1 / doubleHill(peakTime, p) };
  calibrations.set(shape, c);
  return c;
}

/**
 * Normalized elastance En(tn), tn = time since contraction onset / time to
 * peak elastance: 0 at tn ≤ 0, exactly 1 at tn = 1, falling to near 0 by
 * tn ≈ 1.5. Never NaN for finite tn.
 */
export function normalizedElastance(tn: number, shape: ElastanceShape): number {
  if (!(tn > 0)) return 0;
  const c = calibrate(shape);
  return c.k * doubleHill(tn * c.peakTime, DOUBLE_HILL_SETS[shape].parameters);
}
