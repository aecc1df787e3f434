import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { bodySurfaceAreaDuBois, bodySurfaceAreaMosteller } from '../../src/physiology/body-surface-area.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

describe('body surface area', () => {
  it('Mosteller at 180 cm and 80 kg is 2.00 m² (Mosteller RD, N Engl J Med 1987;317:1098: √(180·80/3600) = 2)', () => {
    expect(bodySurfaceAreaMosteller(180, 80)).toBeCloseTo(2.0, 10);
  });
  it('DuBois at 180 cm and 80 kg is 1.996 m² (DuBois & DuBois, Arch Intern Med 1916; 0.007184·W^0.425·H^0.725)', () => {
    expect(bodySurfaceAreaDuBois(180, 80)).toBeCloseTo(1.9964, 3);
  });
  it("agrees with Mosteller's inch–pound form √(in × lb / 3131) within 0.2 % (same letter, from memory; units converted with mathjs)", () => {
    for (const [cm, kg] of [[180, 80], [160, 55], [195, 110]] as const) {
      const inches = math.unit(`${cm} cm`).toNumber('inch');
      const pounds = math.unit(`${kg} kg`).toNumber('lbm');
      const imperial = Math.sqrt((inches * pounds) / 3131);
      expect(Math.abs(bodySurfaceAreaMosteller(cm, kg) - imperial) / imperial).toBeLessThan(0.002);
    }
  });
  it('Mosteller and DuBois agree within 3 % for adults of ordinary build (both published formulas)', () => {
    for (const [cm, kg] of [[170, 70], [160, 55], [185, 90]] as const) {
      const m = bodySurfaceAreaMosteller(cm, kg);
      expect(Math.abs(bodySurfaceAreaDuBois(cm, kg) - m) / m).toBeLessThan(0.03);
    }
  });
});
