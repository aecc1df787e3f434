import { describe, expect, it } from 'vitest';
import { FILLING_PRESSURE_METHOD, NAGUEH_SD_MMHG, fillingPressureFromEOverEPrime } from '../../src/physiology/filling-pressure.js';

describe('filling pressure from E/e′ (Nagueh SF et al., J Am Coll Cardiol 1997;30:1527)', () => {
  it('PCWP = 1.24·(E/e′) + 1.9: E/e′ 10 → 14.3 mmHg (worked value from the abstract regression)', () => {
    expect(fillingPressureFromEOverEPrime(10)).toBeCloseTo(14.3, 10);
  });
  it('E/e′ 15 → 20.5 mmHg, near the derivation cohort mean wedge pressure of 20 ± 8 mmHg (abstract)', () => {
    expect(fillingPressureFromEOverEPrime(15)).toBeCloseTo(20.5, 10);
  });
  it('slope 1.24 mmHg per unit of E/e′ (abstract): a rise of 4 in E/e′ adds 4.96 mmHg', () => {
    expect(fillingPressureFromEOverEPrime(14) - fillingPressureFromEOverEPrime(10)).toBeCloseTo(4.96, 10);
  });
  it('is labelled as an estimate, names lateral e′ and keeps the derivation SD of 3.8 mmHg (abstract)', () => {
    expect(FILLING_PRESSURE_METHOD).toMatch(/estimate/);
    expect(FILLING_PRESSURE_METHOD).toMatch(/lateral e′/);
    expect(NAGUEH_SD_MMHG).toBe(3.8);
  });
});
