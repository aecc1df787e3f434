import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { strokeVolumeDoppler, strokeVolumeFromVolumes } from '../../src/physiology/stroke-volume.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

describe('stroke volume', () => {
  it('volumetric: EDV − ESV, 120 − 50 = 70 mL (biplane method of disks, Lang 2015)', () => {
    expect(strokeVolumeFromVolumes(120, 50)).toBe(70);
  });
  it('Doppler: LVOT VTI × π·(D/2)², D 2.0 cm and VTI 20 cm → 62.83 mL (continuity principle, common practice)', () => {
    expect(strokeVolumeDoppler(2.0, 20)).toBeCloseTo(20 * Math.PI, 10);
    expect(strokeVolumeDoppler(2.0, 20)).toBeCloseTo(62.83, 2);
  });
  it('Doppler: the area in cm² times the VTI in cm is a volume in mL (units checked with mathjs)', () => {
    const diameter = math.unit('2.1 cm');
    const vti = math.unit('22 cm');
    const radius = math.divide(diameter, 2) as unknown as import('mathjs').Unit;
    const area = math.multiply(math.pi, math.multiply(radius, radius)) as unknown as import('mathjs').Unit;
    const volume = (math.multiply(area, vti) as unknown as import('mathjs').Unit).toNumber('mL');
    expect(strokeVolumeDoppler(2.1, 22)).toBeCloseTo(volume, 8);
  });
  it('Doppler: a 2.2 cm outflow tract has an area of 3.80 cm² (π·1.1², common practice)', () => {
    expect(strokeVolumeDoppler(2.2, 1)).toBeCloseTo(3.801, 3);
  });
});
