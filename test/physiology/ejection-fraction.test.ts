import { describe, expect, it } from 'vitest';
import { ejectionFractionFromVolumes } from '../../src/physiology/ejection-fraction.js';

describe('ejection fraction from volumes', () => {
  it('EF = (EDV − ESV)/EDV: 120 and 50 mL give 58.33 % (definition, Lang RM et al., J Am Soc Echocardiogr 2015;28:1–39)', () => {
    expect(ejectionFractionFromVolumes(120, 50)).toBeCloseTo((70 / 120) * 100, 10);
    expect(ejectionFractionFromVolumes(120, 50)).toBeCloseTo(58.33, 2);
  });
  it('175 and 105 mL give 40 %; 100 and 40 mL give 60 % (definition, Lang 2015)', () => {
    expect(ejectionFractionFromVolumes(175, 105)).toBeCloseTo(40, 10);
    expect(ejectionFractionFromVolumes(100, 40)).toBeCloseTo(60, 10);
  });
});
