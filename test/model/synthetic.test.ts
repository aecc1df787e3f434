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
