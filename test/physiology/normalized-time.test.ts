import { describe, expect, it } from 'vitest';
import { normalizedEjectionOnset } from '../../src/physiology/normalized-time.js';

describe('normalized time tNd = PEP / (PEP + ET)', () => {
  it('PEP 90 ms, ET 290 ms → 0.23684 (definition of Chen CH et al., JACC 2001, as quoted by secondary implementations; example computed here)', () => {
    expect(normalizedEjectionOnset(90, 290)).toBeCloseTo(90 / 380, 12);
    expect(normalizedEjectionOnset(90, 290)).toBeCloseTo(0.23684, 5);
  });
  it('a PEP/ET ratio of 0.423 (the cut-off of Cheng HM et al., Eur J Heart Fail 2008;10:1192) corresponds to tNd = 0.423/1.423 = 0.2973', () => {
    const pep = 0.423 * 300;
    expect(normalizedEjectionOnset(pep, 300)).toBeCloseTo(0.423 / 1.423, 10);
    expect(normalizedEjectionOnset(pep, 300)).toBeCloseTo(0.2973, 4);
  });
  it('does not depend on the time unit (seconds or milliseconds give the same ratio)', () => {
    expect(normalizedEjectionOnset(0.09, 0.29)).toBeCloseTo(normalizedEjectionOnset(90, 290), 12);
  });
});
