import { describe, expect, it } from 'vitest';
import { pulsePressure } from '../../src/physiology/pulse-pressure.js';

describe('pulse pressure', () => {
  it('SBP − DBP (common practice): 120/80 → 40 mmHg; 150/95 → 55 mmHg', () => {
    expect(pulsePressure(120, 80)).toBe(40);
    expect(pulsePressure(150, 95)).toBe(55);
  });
});
