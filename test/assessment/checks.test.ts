import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { caveatsFor, STANDING_CAVEATS } from '../../src/assessment/caveats.js';
import { THRESHOLDS, checkVisit } from '../../src/assessment/checks.js';
import { computeResults } from '../../src/assessment/graph/index.js';
import { parseInputs } from '../../src/assessment/inputs.js';

/** An unremarkable invented visit: no flag is raised for it. */
const base = { sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, ef: 60, sv: 70, pep: 90, et: 290 };

function codesFor(overrides: Record<string, unknown>): string[] {
  const inputs = parseInputs({ ...base, ...overrides });
  return checkVisit(inputs, computeResults(inputs)).map((f) => f.code);
}
function flagFor(overrides: Record<string, unknown>, code: string) {
  const inputs = parseInputs({ ...base, ...overrides });
  return checkVisit(inputs, computeResults(inputs)).find((f) => f.code === code);
}

describe('checks: the baseline', () => {
  it('an unremarkable visit raises no flag', () => {
    expect(codesFor({})).toEqual([]);
  });
});

describe('consistency checks', () => {
  it('reported EF vs EF from the volumes: a gap of exactly 5 points is not flagged, above 5 is (threshold of this project, common practice)', () => {
    // EDV 100, ESV 40 → 60 % from volumes.
    expect(codesFor({ edv: 100, esv: 40, ef: 65 })).not.toContain('ef-gap');
    expect(codesFor({ edv: 100, esv: 40, ef: 55 })).not.toContain('ef-gap');
    expect(codesFor({ edv: 100, esv: 40, ef: 65.5 })).toContain('ef-gap');
    expect(codesFor({ edv: 100, esv: 40, ef: 54 })).toContain('ef-gap');
    expect(flagFor({ edv: 100, esv: 40, ef: 70 }, 'ef-gap')?.message).toMatch(/Reported EF 70 % and EF from the volumes 60 % differ by 10 points/);
  });
  it('no EF gap check without a reported EF', () => {
    expect(codesFor({ ef: undefined })).not.toContain('ef-gap');
  });
  it('Doppler vs volumetric SV: 15 % of the volumetric SV is not flagged, more is (common practice)', () => {
    // Volumetric SV 80 mL (EDV 130, ESV 50): 15 % is 12 mL.
    expect(codesFor({ edv: 130, esv: 50, ef: undefined, sv: 92 })).not.toContain('sv-gap');
    expect(codesFor({ edv: 130, esv: 50, ef: undefined, sv: 68 })).not.toContain('sv-gap');
    expect(codesFor({ edv: 130, esv: 50, ef: undefined, sv: 93 })).toContain('sv-gap');
    expect(codesFor({ edv: 130, esv: 50, ef: undefined, sv: 67 })).toContain('sv-gap');
  });
  it('the SV check also applies to Doppler SV from LVOT diameter and VTI (π·1²·20 = 62.8 mL vs 70 mL: 10 %, not flagged; VTI 15 → 47.1 mL: 33 %, flagged)', () => {
    expect(codesFor({ sv: undefined, lvotDiameter: 2, lvotVti: 20 })).not.toContain('sv-gap');
    expect(codesFor({ sv: undefined, lvotDiameter: 2, lvotVti: 15 })).toContain('sv-gap');
  });
});

describe('validity flags: assumptions of the single-beat method (Chen 2001; common practice)', () => {
  it.each([
    [{ rhythm: 'atrial-fibrillation' }, 'rhythm'],
    [{ rhythm: 'other' }, 'rhythm'],
    [{ aorticStenosis: true }, 'aortic-stenosis'],
    [{ aorticRegurgitation: true }, 'aortic-regurgitation'],
    [{ mitralRegurgitation: true }, 'mitral-regurgitation'],
    [{ outflowObstruction: true }, 'outflow-obstruction'],
  ])('%j raises the caution %s, and it reaches the caveats and the referral note', (over, code) => {
    const a = assess(parseInputs({ ...base, ...over }));
    const flag = a.flags.find((f) => f.code === code);
    expect(flag?.level).toBe('caution');
    expect(a.caveats.join(' ')).toContain(flag!.message);
    expect(a.referral).toContain(code);
  });
  it('sinus rhythm and absent valve flags raise none of them', () => {
    expect(codesFor({ rhythm: 'sinus', aorticStenosis: false, aorticRegurgitation: false, mitralRegurgitation: false, outflowObstruction: false })).toEqual([]);
  });
  it('tNd outside the usual adult window 0.15–0.45 is flagged but Ees is still computed (typical adults 0.2–0.35, from memory)', () => {
    // PEP 40, ET 300 → tNd 0.118; PEP 180, ET 200 → tNd 0.474; PEP 90, ET 290 → 0.237 (inside).
    expect(codesFor({ pep: 40, et: 300 })).toContain('tnd-window');
    expect(codesFor({ pep: 180, et: 200 })).toContain('tnd-window');
    expect(codesFor({ pep: 90, et: 290 })).not.toContain('tnd-window');
  });
  it('tNd outside the polynomial domain 0.08–0.85 makes ENd(avg) and Ees not computable, with the reason', () => {
    // PEP 20, ET 400 → tNd 0.048.
    const inputs = parseInputs({ ...base, pep: 20, et: 400 });
    const r = computeResults(inputs);
    expect(r.normalizedElastanceAvg.value).toBeNull();
    expect(r.ees.value).toBeNull();
    expect(r.ees.reason).toMatch(/tNd 0\.048 is outside/);
    expect(checkVisit(inputs, r).map((f) => f.code)).toContain('ees-not-computable');
  });
  it('DBP ≤ ENd(est)·Pes makes Ees not computable and says why (Chen 2001 formula)', () => {
    // tNd 0.4 (PEP 120, ET 180), EF 15 %, 180/60 mmHg: ENd(est)·Pes ≈ 69 mmHg > DBP 60 mmHg.
    const over = { sbp: 180, dbp: 60, edv: 200, esv: 170, ef: 15, sv: 30, pep: 120, et: 180 };
    const inputs = parseInputs({ ...base, ...over });
    const r = computeResults(inputs);
    expect(r.ees.value).toBeNull();
    expect(r.ees.reason).toMatch(/DBP 60 mmHg ≤ ENd\(est\) × Pes/);
    expect(r.eaEes.value).toBeNull();
    expect(r.v0.value).toBeNull();
    const flag = checkVisit(inputs, r).find((f) => f.code === 'ees-not-computable');
    expect(flag?.message).toContain(r.ees.reason!);
  });
});

describe('attention flags: findings that may warrant clinical attention', () => {
  it('EF below the lower normal limit of ASE/EACVI 2015 (Lang RM et al.; ≥52 % men, ≥54 % women): 53 % is low for a woman, not for a man', () => {
    expect(THRESHOLDS.efLowerNormal).toMatchObject({ male: 52, female: 54 });
    expect(codesFor({ ef: 53, edv: 100, esv: 47, sex: 'female' })).toContain('ef-low');
    expect(codesFor({ ef: 53, edv: 100, esv: 47, sex: 'male' })).not.toContain('ef-low');
    expect(codesFor({ ef: 51, edv: 100, esv: 49, sex: 'male' })).toContain('ef-low');
    expect(codesFor({ ef: 52, edv: 100, esv: 48 })).not.toContain('ef-low');
  });
  it('EF from the volumes is used when none is reported (35 % from EDV 200, ESV 130)', () => {
    expect(codesFor({ ef: undefined, edv: 200, esv: 130, sv: 70 })).toContain('ef-low');
  });
  it('blood pressure above 180 systolic or above 120 diastolic is severe (ACC/AHA 2017, from secondary sources; ">" chosen)', () => {
    expect(codesFor({ sbp: 180, dbp: 100 })).not.toContain('bp-severe');
    expect(codesFor({ sbp: 181, dbp: 100 })).toContain('bp-severe');
    expect(codesFor({ sbp: 170, dbp: 120 })).not.toContain('bp-severe');
    expect(codesFor({ sbp: 170, dbp: 121 })).toContain('bp-severe');
  });
  it('heart rate below 50 or above 100 bpm (common practice)', () => {
    expect(codesFor({ hr: 49 })).toContain('bradycardia');
    expect(codesFor({ hr: 50 })).not.toContain('bradycardia');
    expect(codesFor({ hr: 100 })).not.toContain('tachycardia');
    expect(codesFor({ hr: 101 })).toContain('tachycardia');
    expect(codesFor({ hr: undefined })).toEqual([]);
  });
  it('attention findings are named in the referral note, with the caution', () => {
    const a = assess(parseInputs({ ...base, sbp: 200, dbp: 125, hr: 110 }));
    expect(a.flags.filter((f) => f.level === 'attention').map((f) => f.code)).toEqual(['bp-severe', 'tachycardia']);
    expect(a.referral).toMatch(/may warrant clinical attention/);
    expect(a.referral).toMatch(/200\/125 mmHg is severely elevated/);
    expect(a.referral).toMatch(/not a diagnosis/);
  });
});

describe('caveats', () => {
  it('the standing cautions are always present (research use, not a diagnosis, defer to local protocols)', () => {
    const plain = caveatsFor([]);
    expect(plain).toEqual([...STANDING_CAVEATS]);
    expect(plain.join(' ')).toMatch(/research use/i);
    expect(plain.join(' ')).toMatch(/not a diagnosis/);
    expect(plain.join(' ')).toMatch(/local protocols/);
  });
});
