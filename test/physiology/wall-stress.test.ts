import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { DYN_PER_CM2_PER_MMHG, wallStressMeridional, wallStressThinWall } from '../../src/physiology/wall-stress.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

describe('end-systolic wall stress (law of Laplace; Reichek N et al., Circulation 1982)', () => {
  it('1 mmHg = 1333.22 dyn/cm² (mathjs unit definitions)', () => {
    const reference = math.unit('1 mmHg').toNumber('dyn/cm^2');
    expect(reference).toBeCloseTo(1333.22, 2);
    expect(Math.abs(DYN_PER_CM2_PER_MMHG - reference) / reference).toBeLessThan(1e-5);
  });

  it('Reichek meridional stress, formula from the abstract: P 120 mmHg, LVIDs 3.0 cm, PWTs 1.4 cm → 58.56 × 10³ dyn/cm² (computed here)', () => {
    expect(wallStressMeridional(120, 3.0, 1.4)).toBeCloseTo(58.56, 2);
  });

  it('a typical adult geometry lies within 1 SD of the published normal mean 64.8 ± 19.5 × 10³ dyn/cm² (Reichek 1982 abstract)', () => {
    const sigma = wallStressMeridional(118, 3.1, 1.2);
    expect(Math.abs(sigma - 64.8)).toBeLessThan(19.5);
  });

  it('thin-wall Laplace σ = P·r/(2h), converted with mathjs: P 120 mmHg, r 1.5 cm, h 1.4 cm', () => {
    const expected = math.unit(120 * 1.5 / (2 * 1.4), 'mmHg').toNumber('dyn/cm^2') / 1000;
    expect(wallStressThinWall(120, 1.5, 1.4)).toBeCloseTo(expected, 2);
    expect(wallStressThinWall(120, 1.5, 1.4)).toBeCloseTo(85.71, 2);
  });

  it('the two forms agree once the thick-wall correction is removed: (1 + h/D) → 1 and 0.334 ≈ 1.3332/4 give Laplace with r = D/2', () => {
    const toKdyn = math.unit('1 mmHg').toNumber('dyn/cm^2') / 1000; // 1.33322 (mathjs)
    for (const [p, d, h] of [[120, 3.0, 1.4], [150, 4.2, 1.0], [95, 5.5, 0.8], [180, 2.4, 1.6]] as const) {
      const meridional = wallStressMeridional(p, d, h);
      const uncorrected = meridional * (1 + h / d); // removes the thick-wall correction
      const thin = wallStressThinWall(p, d / 2, h);
      // 0.334 vs 1.33322/4 = 0.333305: the published rounding, 0.21 % apart.
      expect(Math.abs(uncorrected / thin - 1)).toBeLessThan(0.0025);
      // With the exact constant in place of 0.334 they are the same formula (mathjs rounds mmHg to 133.322 Pa: 1e-5).
      expect(Math.abs((uncorrected * (toKdyn / 4 / 0.334)) / thin - 1)).toBeLessThan(1e-5);
    }
  });

  it('the thick-wall correction always lowers the stress, the more so the thicker the wall relative to the cavity', () => {
    const thin = (d: number, h: number) => wallStressThinWall(120, d / 2, h);
    expect(wallStressMeridional(120, 3, 1.5) / thin(3, 1.5)).toBeLessThan(wallStressMeridional(120, 5, 0.8) / thin(5, 0.8));
    expect(wallStressMeridional(120, 3, 1.5)).toBeLessThan(thin(3, 1.5));
  });
});
