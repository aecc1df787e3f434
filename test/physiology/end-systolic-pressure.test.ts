import { describe, expect, it } from 'vitest';
import { endSystolicPressureFromSystolic, endSystolicPressureWeighted } from '../../src/physiology/end-systolic-pressure.js';

describe('end-systolic pressure from the cuff', () => {
  it('0.9 × brachial SBP, the "P(s) × 0.9" term of the Chen 2001 single-beat formula (stated in the Chen CH et al. abstract, JACC 2001;38:2028; not in the Kelly 1992 abstract): 120 → 0.9 × 120 = 108 mmHg', () => {
    expect(endSystolicPressureFromSystolic(120)).toBeCloseTo(108, 12);
    expect(endSystolicPressureFromSystolic(150)).toBeCloseTo(135, 12);
  });
  it('(2·SBP + DBP)/3 (literature estimate, primary source not verified): 120/80 → 106.67 mmHg', () => {
    expect(endSystolicPressureWeighted(120, 80)).toBeCloseTo(320 / 3, 10);
  });
  it('the weighted estimate lies between DBP and SBP, two thirds of the way up the pulse pressure (algebra)', () => {
    const sbp = 142;
    const dbp = 88;
    expect(endSystolicPressureWeighted(sbp, dbp)).toBeCloseTo(dbp + (2 / 3) * (sbp - dbp), 10);
  });
});
