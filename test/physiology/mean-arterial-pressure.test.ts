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
  it('Meaney E et al., Heart 2000;84:64: DBP + 0.412·PP (coefficient from memory; matches the secondary abstract in Hypertens Res 2016): 120/80 → 96.48 mmHg', () => {
    expect(meanArterialPressureMeaney(120, 80)).toBeCloseTo(96.48, 10);
  });
  it('Meaney puts MAP 42.2 % of the way up the pulse pressure on average in brachial tonometry (PubMed 32694334: 42.2 ± 5.5 %); 0.412 is within that spread', () => {
    const fraction = (meanArterialPressureMeaney(140, 90) - 90) / (140 - 90);
    expect(Math.abs(fraction - 0.422)).toBeLessThan(0.055);
  });
});
