import { describe, expect, it } from 'vitest';
import { doubleHill, DOUBLE_HILL_SETS, ELASTANCE_SHAPES, normalizedElastance } from '../../src/model/double-hill.js';

describe('double Hill normalized elastance (Stergiopulos, Meister, Westerhof, Am J Physiol 1996;270:H2050)', () => {
  it.each(ELASTANCE_SHAPES)('%s: peak exactly 1 at tn = 1, found by a brute-force scan independent of the code\'s search', (shape) => {
    expect(normalizedElastance(1, shape)).toBeCloseTo(1, 12);
    let best = 0;
    let bestT = 0;
    for (let t = 0.5; t <= 1.5; t += 1e-4) {
      const v = normalizedElastance(t, shape);
      if (v > best) {
        best = v;
        bestT = t;
      }
    }
    expect(best).toBeLessThan(1 + 1e-9);
    expect(bestT).toBeCloseTo(1, 3);
  });

  it.each(ELASTANCE_SHAPES)('%s: 0 before contraction, never NaN, relaxed (< 2 %) by tn 1.6', (shape) => {
    expect(normalizedElastance(0, shape)).toBe(0);
    expect(normalizedElastance(-1, shape)).toBe(0);
    expect(normalizedElastance(Number.NaN, shape)).toBe(0);
    expect(normalizedElastance(1.6, shape)).toBeLessThan(0.02);
  });

  it('the raw product is the published double Hill form (formula as in method-notes §13, written out here)', () => {
    const p = DOUBLE_HILL_SETS['hill-a'].parameters;
    const t = 0.5;
    const expected = ((t / 0.7) ** 1.9 / (1 + (t / 0.7) ** 1.9)) * (1 / (1 + (t / 1.17) ** 21.9));
    expect(doubleHill(t, p)).toBeCloseTo(expected, 14);
  });

  it('at tn 0.24 the two sets give about 0.18 (set A) and 0.32 (set B), the values quoted in issue 12 (computed there, not published)', () => {
    expect(normalizedElastance(0.24, 'hill-a')).toBeCloseTo(0.18, 2);
    expect(normalizedElastance(0.24, 'hill-b')).toBeCloseTo(0.32, 2);
  });
});
