import { describe, expect, it } from 'vitest';
import { endSystolicElastanceNoIntercept, endSystolicElastanceSingleBeat } from '../../src/physiology/single-beat-elastance.js';

/**
 * The formula as printed in the Chen 2001 abstract (Chen CH et al., J Am Coll Cardiol
 * 2001;38:2028): E(es(sb)) = [P(d) − (E(Nd(est)) × P(s) × 0.9)] / (E(Nd(est)) × SV),
 * with P(s), P(d) the arm-cuff pressures and SV the echo-Doppler stroke volume.
 */
function chenAbstract(ps: number, pd: number, normalizedElastanceEst: number, sv: number): number {
  return (pd - normalizedElastanceEst * ps * 0.9) / (normalizedElastanceEst * sv);
}

describe('single-beat Ees (Chen 2001)', () => {
  it('matches the abstract formula with Pes = 0.9 × SBP over a spread of inputs', () => {
    for (const [ps, pd, end, sv] of [[120, 80, 0.37243, 70], [160, 95, 0.42, 55], [100, 65, 0.3, 90]] as const) {
      const r = endSystolicElastanceSingleBeat(pd, 0.9 * ps, end, sv);
      expect(r.value).toBeCloseTo(chenAbstract(ps, pd, end, sv), 10);
    }
  });

  it('worked example of the method notes: DBP 80, Pes 108, ENd(est) 0.37243, SV 70 → 1.5258 mmHg/mL', () => {
    expect(endSystolicElastanceSingleBeat(80, 108, 0.37243, 70).value).toBeCloseTo(1.5258, 4);
  });

  it('the validated invasive relation Ees = 0.86 × Ees(sb) + 0.40 maps the worked example to 1.71 mmHg/mL (Chen 2001 abstract; SEE 0.64)', () => {
    const sb = endSystolicElastanceSingleBeat(80, 108, 0.37243, 70).value as number;
    expect(0.86 * sb + 0.4).toBeCloseTo(1.712, 3);
  });

  it('is not computable when DBP ≤ ENd(est)·Pes, with that reason (Ees would be zero or negative)', () => {
    const end = 0.5;
    const pes = 160;
    for (const dbp of [80, 79, 60]) {
      const r = endSystolicElastanceSingleBeat(dbp, pes, end, 70);
      expect(r.value).toBeNull();
      expect(r.reason).toMatch(/DBP .* ≤ ENd\(est\) × Pes/);
      // The abstract formula would give zero or a negative elastance here.
      expect(chenAbstract(pes / 0.9, dbp, end, 70)).toBeLessThanOrEqual(0);
    }
    expect(endSystolicElastanceSingleBeat(81, pes, end, 70).value).toBeGreaterThan(0);
  });

  it('is not computable when ENd(est) is not positive', () => {
    expect(endSystolicElastanceSingleBeat(80, 108, 0, 70).value).toBeNull();
    expect(endSystolicElastanceSingleBeat(80, 108, -0.1, 70).value).toBeNull();
  });

  it('crude Pes/ESV (assumes V0 = 0, common practice): 108 mmHg over 50 mL → 2.16 mmHg/mL', () => {
    expect(endSystolicElastanceNoIntercept(108, 50)).toBeCloseTo(2.16, 12);
  });
});
