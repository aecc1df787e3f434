import { describe, expect, it } from 'vitest';
import { volumeIntercept } from '../../src/physiology/volume-intercept.js';

describe('V0, the volume intercept of the end-systolic pressure–volume line', () => {
  it('the line through (ESV, Pes) with slope Ees meets P = 0 at V0: Ees·(ESV − V0) = Pes (linear ESPVR)', () => {
    for (const [esv, pes, ees] of [[50, 108, 1.5258], [140, 95, 0.6], [30, 150, 4]] as const) {
      const v0 = volumeIntercept(esv, pes, ees);
      expect(ees * (esv - v0)).toBeCloseTo(pes, 10);
    }
  });
  it('worked example: ESV 50 mL, Pes 108 mmHg, Ees 1.5258 mmHg/mL → −20.78 mL, negative as single-beat V0 often is in normal hearts (Mihaileanu S et al., ESC Heart Fail 2020;7:2214)', () => {
    expect(volumeIntercept(50, 108, 1.5258)).toBeCloseTo(-20.78, 2);
  });
});
