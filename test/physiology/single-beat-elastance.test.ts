import { describe, expect, it } from 'vitest';
import { endSystolicElastanceNoIntercept, endSystolicElastanceSingleBeat } from '../../src/physiology/single-beat-elastance.js';

// The formula as printed in the Chen 2001 abstract (Chen CH et al., J Am Coll Cardiol 2001;38:2028):
// E(es(sb)) = [P(d) − (E(Nd(est)) × P(s) × 0.9)] / (E(Nd(est)) × SV), P(s), P(d) the arm-cuff
// pressures. No published worked value exists (docs/methods-verification.md §1), so the values
// below are worked by hand here from that formula, each step written out: they check the code's
// arithmetic and argument order, not the method's validity.
// The published calibration Ees = 0.86·Ees(sb) + 0.40 is applied by the program in the uncertainty
// report, and checked there against the program's output (test/assessment/uncertainty.test.ts).

describe('single-beat Ees (Chen 2001 formula; values worked by hand here)', () => {
  it('DBP 80, Pes 108, ENd(est) 0.37243, SV 70 (method notes §4, invented inputs) → 1.5258 mmHg/mL', () => {
    // ENd·Pes = 0.37243 × 108 = 40.22244; 80 − 40.22244 = 39.77756; ENd·SV = 0.37243 × 70 = 26.0701;
    // 39.77756 / 26.0701 = 1.525792
    expect(endSystolicElastanceSingleBeat(80, 108, 0.37243, 70).value).toBeCloseTo(1.525792, 6);
  });

  it('SBP 160, DBP 95, ENd(est) 0.42, SV 55 (invented) → 1.494372 mmHg/mL', () => {
    // Pes = 0.9 × 160 = 144; ENd·Pes = 0.42 × 144 = 60.48; 95 − 60.48 = 34.52; ENd·SV = 0.42 × 55 = 23.1;
    // 34.52 / 23.1 = 1.494372
    expect(endSystolicElastanceSingleBeat(95, 0.9 * 160, 0.42, 55).value).toBeCloseTo(1.494372, 6);
  });

  it('SBP 100, DBP 65, ENd(est) 0.30, SV 90 (invented) → 38/27 = 1.407407 mmHg/mL', () => {
    // Pes = 90; ENd·Pes = 27; 65 − 27 = 38; ENd·SV = 0.30 × 90 = 27; 38 / 27 = 1.407407
    expect(endSystolicElastanceSingleBeat(65, 0.9 * 100, 0.3, 90).value).toBeCloseTo(38 / 27, 9);
  });

  it('is not computable when DBP ≤ ENd(est)·Pes, with that reason (Ees would be zero or negative)', () => {
    // ENd(est) 0.5 × Pes 160 = 80 mmHg: a DBP of 80 or less makes the numerator zero or negative.
    for (const dbp of [80, 79, 60]) {
      const r = endSystolicElastanceSingleBeat(dbp, 160, 0.5, 70);
      expect(r.value).toBeNull();
      expect(r.reason).toMatch(/DBP .* ≤ ENd\(est\) × Pes/);
    }
    // DBP 81: (81 − 80) / (0.5 × 70) = 1/35 = 0.028571 mmHg/mL, small but positive.
    expect(endSystolicElastanceSingleBeat(81, 160, 0.5, 70).value).toBeCloseTo(1 / 35, 9);
  });

  it('is not computable when ENd(est) is not positive', () => {
    expect(endSystolicElastanceSingleBeat(80, 108, 0, 70).value).toBeNull();
    expect(endSystolicElastanceSingleBeat(80, 108, -0.1, 70).value).toBeNull();
  });

  it('crude Pes/ESV (assumes V0 = 0, common practice): 108 mmHg over 50 mL → 2.16 mmHg/mL', () => {
    expect(endSystolicElastanceNoIntercept(108, 50)).toBeCloseTo(2.16, 12);
  });
});
