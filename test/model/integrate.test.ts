import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { rk4Scratch, rk4Step } from '../../src/model/integrate.js';
import { solveLinear } from '../../src/model/linear-solve.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

describe('fixed-step RK4 (classical Runge–Kutta; Press et al., Numerical Recipes §16.1)', () => {
  it('dy/dt = −y from 1 over 1 s in 100 steps matches e^−1 to the method\'s fourth-order error (< 1e−9)', () => {
    const y = new Float64Array([1]);
    const s = rk4Scratch(1);
    for (let k = 0; k < 100; k++) rk4Step((_j, yy, dy) => { dy[0] = -yy[0]!; }, 2 * k, y, 0.01, s);
    expect(Math.abs(y[0]! - Math.exp(-1))).toBeLessThan(1e-9);
  });
  it('halving the step cuts the error about 16-fold (fourth order), harmonic oscillator against cos t', () => {
    const run = (n: number) => {
      const y = new Float64Array([1, 0]);
      const s = rk4Scratch(2);
      for (let k = 0; k < n; k++) rk4Step((_j, yy, dy) => { dy[0] = yy[1]!; dy[1] = -yy[0]!; }, 2 * k, y, 2 / n, s);
      return Math.abs(y[0]! - Math.cos(2));
    };
    const ratio = run(50) / run(100);
    expect(ratio).toBeGreaterThan(14);
    expect(ratio).toBeLessThan(18);
  });
  it('the derivative is called at the half-step grid indices 2k, 2k+1, 2k+1, 2k+2', () => {
    const seen: number[] = [];
    rk4Step((j, _y, dy) => { seen.push(j); dy[0] = 0; }, 6, new Float64Array([0]), 1, rk4Scratch(1));
    expect(seen).toEqual([6, 7, 7, 8]);
  });
});

describe('small linear solver (checked against mathjs lusolve)', () => {
  it('a 4×4 system agrees with mathjs', () => {
    const A = [[4, 1, 0.5, 2], [1, 3, 0.2, 0], [0.5, 0.2, 5, 1], [2, 0, 1, 6]];
    const b = [1, 2, 3, 4];
    const ref = (math.lusolve(A, b) as number[][]).map((r) => r[0]!);
    const x = solveLinear(A, b)!;
    x.forEach((xi, i) => expect(xi).toBeCloseTo(ref[i]!, 12));
  });
  it('a singular system gives null, not NaN', () => {
    expect(solveLinear([[1, 2], [2, 4]], [1, 2])).toBeNull();
  });
});

describe("Aitken's Δ² extrapolation of the beat-to-beat approach (Aitken 1926)", () => {
  it('a geometric sequence s_n = L + c·λⁿ is extrapolated to its limit L exactly', async () => {
    const { accelerate } = await import('../../src/model/beat.js');
    const seq = (n: number) => ({ volume: 120 + 8 * 0.6 ** n, compliancePressure: 80 - 12 * 0.8 ** n });
    const s = accelerate(seq(1), seq(2), seq(3));
    expect(s.volume).toBeCloseTo(120, 10);
    expect(s.compliancePressure).toBeCloseTo(80, 10);
  });
  it('an oscillating or diverging sequence is left alone (the last state is kept)', async () => {
    const { accelerate } = await import('../../src/model/beat.js');
    const s = accelerate({ volume: 100, compliancePressure: 80 }, { volume: 110, compliancePressure: 70 }, { volume: 105, compliancePressure: 50 });
    expect(s).toEqual({ volume: 105, compliancePressure: 50 });
  });
});
