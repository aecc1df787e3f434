import { describe, expect, it } from 'vitest';
import { meanArterialPressure, meanArterialPressureMeaney } from '../../src/physiology/mean-arterial-pressure.js';

describe('mean arterial pressure', () => {
  it('DBP + PP/3 (common practice): 120/80 → 93.33 mmHg', () => {
    expect(meanArterialPressure(120, 80)).toBeCloseTo(80 + 40 / 3, 10);
    expect(meanArterialPressure(120, 80)).toBeCloseTo(93.33, 2);
  });
  it('equals the usual (2·DBP + SBP)/3 form (common practice)', () => {
    expect(meanArterialPressure(150, 95)).toBeCloseTo((2 * 95 + 150) / 3, 10);
  });
  it('DBP + 0.412·PP (Meaney E et al., Heart 2000;84:64, the coefficient as quoted from it in Hypertens Res 2016): 120/80 → 80 + 0.412 × 40 = 96.48 mmHg', () => {
    expect(meanArterialPressureMeaney(120, 80)).toBeCloseTo(96.48, 10);
  });
  it('Meaney 2000\'s 0.412 lies within the spread of a later brachial-tonometry study, where MAP sat 42.2 ± 5.5 % of the way up the pulse pressure (PubMed 32694334, n = 1526)', () => {
    const fraction = (meanArterialPressureMeaney(140, 90) - 90) / (140 - 90);
    expect(Math.abs(fraction - 0.422)).toBeLessThan(0.055);
  });
});
