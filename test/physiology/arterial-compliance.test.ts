import { describe, expect, it } from 'vitest';
import { arterialCompliance } from '../../src/physiology/arterial-compliance.js';

describe('arterial compliance, SV / pulse pressure', () => {
  it('70 mL over 120/80 mmHg is 1.75 mL/mmHg (stroke-volume-to-pulse-pressure ratio, common practice)', () => {
    expect(arterialCompliance(70, 120, 80)).toBeCloseTo(1.75, 12);
  });
  it('halves when the pulse pressure doubles at the same SV (definition, common practice)', () => {
    expect(arterialCompliance(70, 160, 80)).toBeCloseTo(arterialCompliance(70, 120, 80) / 2, 12);
  });
});
