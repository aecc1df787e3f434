import { describe, expect, it } from 'vitest';
import { bodySurfaceAreaDuBois, bodySurfaceAreaMosteller } from '../../src/physiology/body-surface-area.js';

describe('body surface area', () => {
  it('Mosteller at 180 cm and 80 kg is 2.00 m² (Mosteller RD, N Engl J Med 1987;317:1098: √(180·80/3600) = 2)', () => {
    expect(bodySurfaceAreaMosteller(180, 80)).toBeCloseTo(2.0, 10);
  });
  it('DuBois at 180 cm and 80 kg is 1.996 m² (DuBois & DuBois, Arch Intern Med 1916; 0.007184·W^0.425·H^0.725)', () => {
    expect(bodySurfaceAreaDuBois(180, 80)).toBeCloseTo(1.9964, 3);
  });
});
