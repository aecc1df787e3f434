import { describe, expect, it } from 'vitest';
import { COUPLING_CUTOFF, couplingRatio, couplingRatioFromEjectionFraction } from '../../src/physiology/coupling.js';

/**
 * The elastance model with V0 = 0: the ventricle ends systole on P = Ees·V and
 * the arterial load line runs P = Ea·(EDV − V). Solving both gives
 * Pes = EDV·Ees·Ea/(Ea + Ees), ESV = Pes/Ees, SV = Pes/Ea.
 */
function modelBeat(ees: number, ea: number, edv: number) {
  const pes = (edv * ees * ea) / (ea + ees);
  const esv = pes / ees;
  const sv = edv - esv;
  return { pes, esv, sv, ef: sv / edv };
}

describe('coupling ratio Ea/Ees', () => {
  it('worked example of the method notes (invented inputs, computed here): Ea 1.5429, Ees 1.5258 → 1.5429/1.5258 = 1.0112', () => {
    expect(couplingRatio(1.5429, 1.5258)).toBeCloseTo(1.0112, 4);
  });

  it('the published cut-off for abnormal coupling is 1.2 (Cheng HM et al., Eur J Heart Fail 2008;10:1192, PubMed 19004668)', () => {
    expect(COUPLING_CUTOFF).toBe(1.2);
  });

  it('derivation: with V0 = 0, EF = Ees/(Ees + Ea), so Ea/Ees = 1/EF − 1 (checked over a grid of model beats)', () => {
    for (const ees of [0.5, 1.2, 2.5, 6]) {
      for (const ea of [0.4, 1, 1.8, 4]) {
        for (const edv of [80, 140, 260]) {
          const beat = modelBeat(ees, ea, edv);
          expect(beat.ef).toBeCloseTo(ees / (ees + ea), 10);
          expect(couplingRatioFromEjectionFraction(beat.ef)).toBeCloseTo(ea / ees, 10);
          // And Pes/SV over Pes/ESV recovers the same ratio.
          expect(couplingRatio(beat.pes / beat.sv, beat.pes / beat.esv)).toBeCloseTo(ea / ees, 10);
        }
      }
    }
  });

  it('identity values: EF 0.60 → 0.667, EF 0.50 → 1, EF 1/2.2 → 1.2 (algebra)', () => {
    expect(couplingRatioFromEjectionFraction(0.6)).toBeCloseTo(2 / 3, 12);
    expect(couplingRatioFromEjectionFraction(0.5)).toBeCloseTo(1, 12);
    expect(couplingRatioFromEjectionFraction(1 / 2.2)).toBeCloseTo(1.2, 12);
  });
});
