import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  KLOTZ_AN_MMHG, KLOTZ_BN, endDiastolicCurveFromOnePoint, pressureOnEndDiastolicCurve, volumeOnEndDiastolicCurve,
} from '../../src/physiology/end-diastolic-pressure-volume.js';

// Klotz S et al., Am J Physiol Heart Circ Physiol 2006;291:H403, and Klotz S, Dickstein ML, Burkhoff D,
// Nat Protoc 2007;2:2152, as quoted by a secondary open implementation citing the protocol (method
// notes §11; the papers' own text was not read): V0 = EDV·(0.6 − 0.006·EDP),
// V30 = V0 + (EDV − V0)/(EDP/An)^(1/Bn), An = 27.78 mmHg, Bn = 2.76, P = α·V^β through (V30, 30 mmHg).
const unstressed = (edv: number, edp: number) => edv * (0.6 - 0.006 * edp);
const v30Of = (edv: number, edp: number) => {
  const v0 = unstressed(edv, edp);
  return v0 + (edv - v0) / (edp / 27.78) ** (1 / 2.76);
};

describe('single-beat EDPVR (Klotz 2006; Nat Protoc 2007; as quoted by a secondary implementation)', () => {
  it('holds An = 27.78 mmHg and Bn = 2.76 against a copy of method notes §11 (as quoted by a secondary implementation)', () => {
    expect(KLOTZ_AN_MMHG).toBe(27.78);
    expect(KLOTZ_BN).toBe(2.76);
  });

  it('worked example computed here: EDV 120 mL, EDP 10 mmHg → V0 64.8 mL, V30 144.73 mL, β 5.863', () => {
    const out = endDiastolicCurveFromOnePoint(120, 10);
    expect(out.curve).not.toBeNull();
    const c = out.curve!;
    expect(c.unstressedVolume).toBeCloseTo(64.8, 10);
    expect(c.anchorPressure).toBe(30);
    expect(c.anchorVolume).toBeCloseTo(144.73, 2);
    expect(c.beta).toBeCloseTo(5.863, 3);
    expect(pressureOnEndDiastolicCurve(c, 120)).toBeCloseTo(10, 9);
    expect(pressureOnEndDiastolicCurve(c, c.anchorVolume)).toBeCloseTo(30, 9);
  });

  it('the measured point sits on the normalised human curve EDP = An·ENDV^Bn, ENDV = (EDV − V0)/(V30 − V0) (Klotz 2006 construction)', () => {
    for (const [edv, edp] of [[120, 10], [200, 18], [90, 5], [150, 22]] as const) {
      const c = endDiastolicCurveFromOnePoint(edv, edp).curve!;
      const endv = (edv - c.unstressedVolume) / (c.anchorVolume - c.unstressedVolume);
      expect(27.78 * endv ** 2.76).toBeCloseTo(edp, 9);
    }
  });

  it('passes through 30 mmHg at V30 for EDP up to 22 mmHg, V30 held against a second typing of the quoted form in this test (not an independent value)', () => {
    fc.assert(
      fc.property(fc.double({ min: 40, max: 500, noNaN: true }), fc.double({ min: 2, max: 22, noNaN: true }), (edv, edp) => {
        const c = endDiastolicCurveFromOnePoint(edv, edp).curve!;
        expect(c.anchorPressure).toBe(30);
        expect(c.anchorVolume).toBeCloseTo(v30Of(edv, edp), 6);
        expect(pressureOnEndDiastolicCurve(c, v30Of(edv, edp)) / 30).toBeCloseTo(1, 8);
      }),
    );
  });

  it('above 22 mmHg anchors at 15 mmHg at V15 = V0 + 0.8·(V30 − V0) (Klotz 2006; Klotz, Dickstein & Burkhoff, Nat Protoc 2007; as quoted by a secondary implementation)', () => {
    const edv = 160;
    const edp = 28;
    const c = endDiastolicCurveFromOnePoint(edv, edp).curve!;
    const v0 = unstressed(edv, edp);
    const v15 = v0 + 0.8 * (v30Of(edv, edp) - v0);
    expect(c.anchorPressure).toBe(15);
    expect(c.anchorVolume).toBeCloseTo(v15, 9);
    expect(pressureOnEndDiastolicCurve(c, v15)).toBeCloseTo(15, 8);
  });

  // Why these pressures (worked out here): with the 30-mmHg anchor, β = ln(EDP/30)/ln(EDV/V30). At
  // EDP = An = 27.78 mmHg, (EDP/An)^(1/Bn) = 1, so V30 = EDV and the denominator is 0 (β unbounded);
  // between 27.78 and 30 mmHg V30 < EDV (denominator > 0) while ln(EDP/30) < 0, so β < 0; at 30 mmHg
  // β = 0. Only the program's curve is asserted on.
  it('around the 30-mmHg anchor\'s singular point (EDP 27–30.1 mmHg) the curve stays finite, rising and through (EDV, EDP)', () => {
    for (const edp of [27, 27.78, 28.5, 29.9, 30, 30.1]) {
      const edv = 140;
      const c = endDiastolicCurveFromOnePoint(edv, edp).curve!;
      expect(c.beta).toBeGreaterThan(1);
      expect(c.beta).toBeLessThan(10);
      expect(pressureOnEndDiastolicCurve(c, edv)).toBeCloseTo(edp, 8);
      expect(pressureOnEndDiastolicCurve(c, edv * 1.05)).toBeGreaterThan(edp);
    }
  });

  it('property: over the accepted ranges (EDV 20–600 mL, EDP 2–52 mmHg) the curve is finite, rises and passes through (EDV, EDP)', () => {
    fc.assert(
      fc.property(fc.double({ min: 20, max: 600, noNaN: true }), fc.double({ min: 2, max: 52, noNaN: true }), (edv, edp) => {
        const out = endDiastolicCurveFromOnePoint(edv, edp);
        expect(out.curve).not.toBeNull();
        const c = out.curve!;
        expect(Number.isFinite(c.alpha) && Number.isFinite(c.beta)).toBe(true);
        expect(pressureOnEndDiastolicCurve(c, edv) / edp).toBeCloseTo(1, 8);
        expect(pressureOnEndDiastolicCurve(c, edv * 0.9)).toBeLessThan(edp);
        expect(volumeOnEndDiastolicCurve(c, edp) / edv).toBeCloseTo(1, 8);
      }),
    );
  });

  it('impossible points get a reason, never a non-finite curve', () => {
    expect(endDiastolicCurveFromOnePoint(120, 0).reason).toMatch(/EDP 0 mmHg/);
    expect(endDiastolicCurveFromOnePoint(0, 10).reason).toMatch(/EDV 0 mL/);
    expect(endDiastolicCurveFromOnePoint(120, 100).reason).toMatch(/beyond the single-beat EDPVR/);
    expect(endDiastolicCurveFromOnePoint(Number.NaN, 10).curve).toBeNull();
    expect(pressureOnEndDiastolicCurve(endDiastolicCurveFromOnePoint(120, 10).curve!, -5)).toBe(0);
  });
});
