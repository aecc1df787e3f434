import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { simulateToSteadyState } from '../../src/model/beat.js';
import { agreement, drawHeart, heartModelOf, syntheticChunk } from '../../src/model/synthetic.js';
import { leastSquaresLine, virtualOcclusion } from '../../src/model/virtual-occlusion.js';
import { randomStreams } from '../../src/assessment/monte-carlo.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

describe('virtual preload reduction (consistency check of the simulation: it must recover the Emax it was given)', () => {
  it.each(['hill-a', 'hill-b'] as const)('%s: the occlusion slope recovers Emax within 1 % for ten virtual hearts', (shape) => {
    const rng = randomStreams(3, 1)[0]!;
    let checked = 0;
    for (let i = 0; i < 10; i++) {
      const h = drawHeart(rng);
      const m = heartModelOf(h, shape);
      if (!m) continue;
      const s = simulateToSteadyState(m);
      if (!s.ok) continue;
      const occ = virtualOcclusion(m, s.beat.endState);
      expect(occ.ok).toBe(true);
      if (occ.ok) {
        expect(Math.abs(occ.fit.slope / h.emax - 1)).toBeLessThan(0.01);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(5);
  });
  it('least squares agrees with mathjs (slope = cov/var)', () => {
    const xs = [40, 52, 61, 75, 90];
    const ys = [70, 91, 105, 131, 158];
    const line = leastSquaresLine(xs, ys)!;
    const mx = math.mean(xs) as number;
    const my = math.mean(ys) as number;
    const cov = xs.reduce((a, x, i) => a + (x - mx) * (ys[i]! - my), 0) / (xs.length - 1);
    expect(line.slope).toBeCloseTo(cov / (math.variance(xs) as unknown as number), 10);
  });
});

describe('the cohort summary is computed from the rows (Bland & Altman, Lancet 1986;1:307)', () => {
  const rows = syntheticChunk(11, 0, 25, ['hill-b']);
  it('bias, limits of agreement and r recomputed with mathjs from the rows', () => {
    const s = agreement(rows, 'trueEes');
    const pairs = rows.filter((r) => r.estimatedEes !== null);
    expect(s.computable).toBe(pairs.length);
    const d = pairs.map((r) => r.estimatedEes! - r.trueEes);
    const bias = math.mean(d) as number;
    const sd = math.std(d) as unknown as number; // sample SD (n − 1), mathjs default
    expect(s.bias!).toBeCloseTo(bias, 10);
    expect(s.loa![0]).toBeCloseTo(bias - 1.96 * sd, 10);
    expect(s.loa![1]).toBeCloseTo(bias + 1.96 * sd, 10);
    const est = pairs.map((r) => r.estimatedEes!);
    const tru = pairs.map((r) => r.trueEes);
    const r = (math.corr as (a: number[], b: number[]) => number)(est, tru);
    expect(s.r!).toBeCloseTo(r, 10);
  });
  it('the same seed gives the same rows', () => {
    expect(syntheticChunk(11, 0, 25, ['hill-b'])).toEqual(rows);
  });
});

describe('--near: hearts chosen by what was observed (consistency of the filter, not an outside check)', () => {
  const target = { ef: 60, sbp: 125, dbp: 75, hr: 70, edv: 120, tNd: 0.27 };
  const inside = { edv: 125, esv: 50, ef: 60, sbp: 130, dbp: 78, hr: 74, pep: 90, et: 260 };
  it('a heart inside every window is kept; one outside any single window is not', async () => {
    const { isNear, NEAR_WINDOWS } = await import('../../src/model/synthetic.js');
    expect(isNear(inside, 0.27, target)).toBe(true);
    expect(isNear({ ...inside, ef: target.ef + NEAR_WINDOWS.ef + 0.1 }, 0.27, target)).toBe(false);
    expect(isNear({ ...inside, sbp: target.sbp - NEAR_WINDOWS.sbp - 0.1 }, 0.27, target)).toBe(false);
    expect(isNear({ ...inside, dbp: target.dbp + NEAR_WINDOWS.dbp + 0.1 }, 0.27, target)).toBe(false);
    expect(isNear({ ...inside, hr: target.hr + NEAR_WINDOWS.hr + 0.1 }, 0.27, target)).toBe(false);
    expect(isNear({ ...inside, edv: target.edv * (1 + NEAR_WINDOWS.edvFraction) + 0.1 }, 0.27, target)).toBe(false);
    expect(isNear(inside, target.tNd + NEAR_WINDOWS.tNd + 0.001, target)).toBe(false);
    expect(isNear(inside, null, target)).toBe(false);
  });
  it('heart rate and EDV are drawn within their windows; Emax as widely as without a target', () => {
    const rng = randomStreams(5, 1)[0]!;
    const emax: number[] = [];
    for (let i = 0; i < 200; i++) {
      const h = drawHeart(rng, target);
      expect(Math.abs(h.hr - target.hr)).toBeLessThanOrEqual(8);
      expect(Math.abs(h.edv / target.edv - 1)).toBeLessThanOrEqual(0.15);
      emax.push(h.emax);
    }
    expect(Math.min(...emax)).toBeLessThan(1);
    expect(Math.max(...emax)).toBeGreaterThan(4.5);
  });
});
