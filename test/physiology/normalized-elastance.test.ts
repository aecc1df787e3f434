import { describe, expect, it } from 'vitest';
import {
  NORMALIZED_ELASTANCE_COEFFICIENTS, TND_DOMAIN, normalizedElastanceAverage, normalizedElastanceEstimate,
} from '../../src/physiology/normalized-elastance.js';

// Chen CH et al., J Am Coll Cardiol 2001;38:2028–2034. The abstract gives the method but not the
// coefficients: the polynomial and the ENd(est) coefficients below are as quoted by two independent
// secondary implementations that cite Chen 2001, copied from the project's method notes §11; the
// paper's own table was not read. These tests check the code against that copy, not the paper.
const METHOD_NOTES_COEFFICIENTS = [0.35695, -7.2266, 74.249, -307.39, 684.54, -856.92, 571.95, -159.1];

function polynomialTermByTerm(t: number): number {
  return METHOD_NOTES_COEFFICIENTS.reduce((sum, a, i) => sum + a * t ** i, 0);
}

describe('ENd(avg), the group-averaged normalized elastance (Chen 2001; coefficients as quoted by secondary implementations)', () => {
  it('holds the eight coefficients against a copy of method notes §11 (a copy of the list, not the paper)', () => {
    expect([...NORMALIZED_ELASTANCE_COEFFICIENTS]).toEqual(METHOD_NOTES_COEFFICIENTS);
  });

  it('tNd 0.23684 → 0.33614 (worked example of the method notes, computed here from the quoted coefficients)', () => {
    expect(normalizedElastanceAverage(90 / 380).value).toBeCloseTo(0.33614, 5);
  });

  it('equals the term-by-term sum Σ aᵢ·tNdⁱ across the domain', () => {
    for (let t = TND_DOMAIN.low; t <= TND_DOMAIN.high; t += 0.01) {
      expect(normalizedElastanceAverage(t).value).toBeCloseTo(polynomialTermByTerm(t), 10);
    }
  });

  it('table of values in docs/methods-verification.md (computed there from the same coefficients)', () => {
    const table: [number, number][] = [[0.1, 0.1298], [0.15, 0.1938], [0.2, 0.2781], [0.25, 0.355], [0.3, 0.4165], [0.35, 0.4645], [0.4, 0.5046], [0.5, 0.5809]];
    for (const [t, expected] of table) expect(normalizedElastanceAverage(t).value).toBeCloseTo(expected, 4);
  });

  it('rises monotonically inside the validity window, as a normalized elastance must during isovolumic contraction', () => {
    let previous = -Infinity;
    for (let t = TND_DOMAIN.low; t <= TND_DOMAIN.high; t += 0.005) {
      const v = normalizedElastanceAverage(t).value as number;
      expect(v).toBeGreaterThan(previous);
      previous = v;
    }
  });

  it('is not computable outside the window, with the reason', () => {
    for (const t of [0.05, 0.9, -1]) {
      const r = normalizedElastanceAverage(t);
      expect(r.value).toBeNull();
      expect(r.reason).toMatch(/outside/);
    }
    expect(normalizedElastanceAverage(Number.NaN).value).toBeNull();
  });
});

describe('ENd(est) (Chen 2001; coefficients as quoted by secondary implementations)', () => {
  it('EF 0.60, DBP 80, Pes 108, ENd(avg) 0.33614 → 0.37243 (worked example of the method notes)', () => {
    const byHand = 0.0275 - 0.165 * 0.6 + 0.3656 * (80 / 108) + 0.515 * 0.33614;
    expect(normalizedElastanceEstimate(0.6, 80, 108, 0.33614)).toBeCloseTo(byHand, 12);
    expect(normalizedElastanceEstimate(0.6, 80, 108, 0.33614)).toBeCloseTo(0.37243, 5);
  });
  it('falls with EF and rises with DBP/Pes and ENd(avg) (signs of the quoted coefficients)', () => {
    const base = normalizedElastanceEstimate(0.6, 80, 108, 0.336);
    expect(normalizedElastanceEstimate(0.3, 80, 108, 0.336)).toBeGreaterThan(base);
    expect(normalizedElastanceEstimate(0.6, 90, 108, 0.336)).toBeGreaterThan(base);
    expect(normalizedElastanceEstimate(0.6, 80, 108, 0.4)).toBeGreaterThan(base);
  });
});
