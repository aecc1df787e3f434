import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import {
  JOULES_PER_MMHG_ML, mechanicalEfficiency, mechanicalEfficiencyFromElastances, mmHgMlToJoules, potentialEnergy,
  pressureVolumeArea, strokeWork, strokeWorkInElastanceModel,
} from '../../src/physiology/energetics.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

/**
 * The end-systolic point of the elastance model, solved as a linear system with mathjs:
 *   P − Ees·V = −Ees·V0     (end-systolic pressure–volume line)
 *   P + Ea·V  =  Ea·EDV     (arterial load line, Ea = Pes / SV)
 */
function endSystolicPoint(ea: number, ees: number, edv: number, v0: number): { pes: number; esv: number } {
  const solution = math.lusolve([[1, -ees], [1, ea]], [-ees * v0, ea * edv]) as number[][];
  return { pes: solution[0]![0]!, esv: solution[1]![0]! };
}

describe('elastance-model energetics (Suga; Burkhoff & Sagawa, Am J Physiol 1986;250:R1021)', () => {
  it('stroke work ≈ Pes × SV: 108 mmHg × 70 mL = 7560 mmHg·mL', () => {
    expect(strokeWork(108, 70)).toBe(7560);
  });

  it('1 mmHg·mL = 1.33322 × 10⁻⁴ J (mathjs unit definitions)', () => {
    // mathjs takes 1 mmHg = 133.322 Pa; the code uses 101325/760 = 133.32237 Pa: agreement to 1e-5 relative.
    expect(math.unit('1 mmHg').toNumber('Pa')).toBeCloseTo(133.322, 3);
    expect(JOULES_PER_MMHG_ML * 1e6).toBeCloseTo(133.322, 3); // J per (mmHg·10⁻⁶ m³) = Pa
    const reference = math.unit('1 mmHg mL').toNumber('J');
    expect(Math.abs(JOULES_PER_MMHG_ML - reference) / reference).toBeLessThan(1e-5);
    expect(JOULES_PER_MMHG_ML).toBeCloseTo(1.33322e-4, 9);
    const work = math.unit('7560 mmHg mL').toNumber('J');
    expect(Math.abs(mmHgMlToJoules(7560) - work) / work).toBeLessThan(1e-5);
    expect(mmHgMlToJoules(7560)).toBeCloseTo(1.0079, 4);
  });

  it('PE = Pes·(ESV − V0)/2 is the area under the end-systolic line from V0 to ESV (numerical integration, linear ESPVR)', () => {
    const ees = 1.5258;
    const v0 = -20.78;
    const esv = 50;
    const pes = ees * (esv - v0);
    // Trapezoid rule over the line P = Ees·(V − V0): exact for a straight line, done in 1000 steps anyway.
    const steps = 1000;
    const h = (esv - v0) / steps;
    let area = 0;
    for (let i = 0; i < steps; i++) {
      const a = ees * (v0 + i * h - v0);
      const b = ees * (v0 + (i + 1) * h - v0);
      area += ((a + b) / 2) * h;
    }
    expect(potentialEnergy(pes, esv, v0).value).toBeCloseTo(area, 6);
    // Derived form PE = Pes² / (2·Ees).
    expect(potentialEnergy(pes, esv, v0).value).toBeCloseTo(pes ** 2 / (2 * ees), 6);
  });

  it('PE is not computable when ESV is not above V0', () => {
    expect(potentialEnergy(100, 20, 20).value).toBeNull();
    expect(potentialEnergy(100, 10, 20).reason).toMatch(/not above V0/);
  });

  it('PVA = SW + PE (Suga H, Physiol Rev 1990;70:247): worked example 7560 + 3822 = 11382 mmHg·mL', () => {
    const pes = 108;
    const v0 = 50 - 108 / 1.52581;
    const pe = potentialEnergy(pes, 50, v0).value as number;
    expect(pe).toBeCloseTo(3822.2, 1);
    expect(pressureVolumeArea(7560, pe)).toBeCloseTo(11382.2, 1);
  });

  it('efficiency SW/PVA equals 1/(1 + Ea/(2·Ees)) for beats of the linear model (derived; Burkhoff & Sagawa 1986)', () => {
    for (const ees of [0.8, 1.5, 3]) {
      for (const ea of [0.5, 1.2, 2.4]) {
        for (const v0 of [-20, 0, 15]) {
          const edv = 130;
          const { pes, esv } = endSystolicPoint(ea, ees, edv, v0);
          const sw = strokeWork(pes, edv - esv);
          const pva = pressureVolumeArea(sw, potentialEnergy(pes, esv, v0).value as number);
          const direct = mechanicalEfficiency(sw, pva).value as number;
          expect(direct).toBeCloseTo(1 / (1 + ea / (2 * ees)), 10);
          expect(mechanicalEfficiencyFromElastances(ea, ees).value).toBeCloseTo(direct, 10);
        }
      }
    }
  });

  it('efficiency of the worked example: Ea 1.5429, Ees 1.5258 → 0.664 (derived formula)', () => {
    expect(mechanicalEfficiencyFromElastances(1.5429, 1.5258).value).toBeCloseTo(0.6642, 4);
    expect(mechanicalEfficiency(7560, 11382.2).value).toBeCloseTo(0.6642, 4);
  });

  it('efficiency rises as Ea/Ees falls (Burkhoff & Sagawa 1986)', () => {
    let previous = Infinity;
    for (let ratio = 0.1; ratio <= 3; ratio += 0.1) {
      const e = mechanicalEfficiencyFromElastances(ratio * 2, 2).value as number;
      expect(e).toBeLessThan(previous);
      previous = e;
    }
  });

  it('efficiency is not computable when PVA is 0 or negative, or Ees is not positive', () => {
    expect(mechanicalEfficiency(0, 0).value).toBeNull();
    expect(mechanicalEfficiency(10, -5).reason).toMatch(/PVA/);
    expect(mechanicalEfficiencyFromElastances(1, 0).value).toBeNull();
    expect(mechanicalEfficiencyFromElastances(-1, 1).value).toBeNull();
  });

  it('model stroke work equals Pes × SV at the end-systolic point solved by mathjs', () => {
    for (const [ea, ees, edv, v0] of [[1.5, 2, 120, 0], [0.9, 1.1, 180, -15], [3, 1, 90, 10]] as const) {
      const { pes, esv } = endSystolicPoint(ea, ees, edv, v0);
      expect(pes).toBeCloseTo(((ees * ea) / (ea + ees)) * (edv - v0), 8);
      expect(strokeWorkInElastanceModel(ea, ees, edv, v0).value).toBeCloseTo(pes * (edv - esv), 6);
    }
  });

  it('worked example: Ees 2, EDV 120, V0 0 → SW 7200 mmHg·mL at Ea 2, 6400 at Ea 1 and at Ea 4', () => {
    expect(strokeWorkInElastanceModel(2, 2, 120, 0).value).toBeCloseTo(7200, 8);
    expect(strokeWorkInElastanceModel(1, 2, 120, 0).value).toBeCloseTo(6400, 8);
    expect(strokeWorkInElastanceModel(4, 2, 120, 0).value).toBeCloseTo(6400, 8);
  });

  it('stroke work is greatest at Ea = Ees (Burkhoff & Sagawa, Am J Physiol 1986;250:R1021), checked numerically over a grid of Ea', () => {
    for (const ees of [0.6, 1.5, 2.5, 5]) {
      for (const [edv, v0] of [[120, 0], [160, -30], [220, 25]] as const) {
        let bestEa = Number.NaN;
        let bestWork = -Infinity;
        const step = ees / 1000;
        for (let ea = step; ea <= 5 * ees; ea += step) {
          const w = strokeWorkInElastanceModel(ea, ees, edv, v0).value as number;
          if (w > bestWork) {
            bestWork = w;
            bestEa = ea;
          }
        }
        expect(Math.abs(bestEa - ees)).toBeLessThanOrEqual(step);
        // At the optimum SW = Ees·(EDV − V0)²/4 (derived).
        expect(bestWork).toBeCloseTo((ees * (edv - v0) ** 2) / 4, 3);
      }
    }
  });

  it('model stroke work is not computable for a non-positive Ees, a negative Ea or EDV ≤ V0', () => {
    expect(strokeWorkInElastanceModel(1, 0, 120, 0).value).toBeNull();
    expect(strokeWorkInElastanceModel(-1, 1, 120, 0).value).toBeNull();
    expect(strokeWorkInElastanceModel(1, 1, 20, 20).reason).toMatch(/not above V0/);
  });
});
