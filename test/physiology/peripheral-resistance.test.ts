import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { WOOD_TO_DYN, totalPeripheralResistance, woodUnitsToDyn, woodUnitsToMmHgSecondPerMl } from '../../src/physiology/peripheral-resistance.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

describe('total peripheral resistance', () => {
  it('TPR = MAP / CO: 93.33 mmHg over 4.2 L/min is 22.22 Wood units (common practice)', () => {
    expect(totalPeripheralResistance(93.33, 4.2)).toBeCloseTo(22.22, 2);
  });

  it('Wood unit → dyn·s·cm⁻⁵ factor equals mathjs: 1 mmHg·min/L in dyn·s/cm⁵ (mathjs unit definitions)', () => {
    const factor = math.unit('1 mmHg minute / L').toNumber('dyn s / cm^5');
    // mathjs takes 1 mmHg = 133.322 Pa; the code uses 133.3224 Pa: agreement to 1e-5 relative.
    expect(Math.abs(WOOD_TO_DYN - factor) / factor).toBeLessThan(1e-5);
    expect(Math.abs(woodUnitsToDyn(22.22) - 22.22 * factor) / (22.22 * factor)).toBeLessThan(1e-5);
  });

  it('the factor rounds to the customary 80 (common practice)', () => {
    expect(Math.round(WOOD_TO_DYN)).toBe(80);
  });

  it('1 mmHg = 1333.22 dyn/cm², the constant behind the factor (mathjs)', () => {
    expect(math.unit('1 mmHg').toNumber('dyn / cm^2')).toBeCloseTo(1333.22, 2);
    expect((WOOD_TO_DYN * 1000) / 60).toBeCloseTo(math.unit('1 mmHg').toNumber('dyn / cm^2'), 2);
  });

  it('Wood units → mmHg·s/mL (the model heart\'s resistance unit) equals mathjs: 1 mmHg·min/L in mmHg·s/mL (mathjs unit definitions)', () => {
    const factor = math.unit('1 mmHg minute / L').toNumber('mmHg s / mL');
    for (const wood of [1, 19.04, 22.22]) expect(woodUnitsToMmHgSecondPerMl(wood)).toBeCloseTo(wood * factor, 12);
  });
});
