import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { parseInputs } from '../../src/assessment/inputs.js';
import { METHODS_VERSION } from '../../src/assessment/result.js';
import { LSC_FACTOR, REPEATABILITY, changesAlongSeries, compareVisits, leastSignificantChange, type ChangeRow } from '../../src/records/compare.js';
import { changeSentence, comparisonSummary, renderComparison } from '../../src/render/series.js';
import type { SubjectFile } from '../../src/records/subject-schema.js';

// Hand-worked visits. A is the worked single-beat example of the method notes (§4, computed there,
// not published): SBP 120, DBP 80, EF 60 %, SV 70 mL, PEP 90, ET 290 → Ees 1.5258, Ea 1.5429.
const A = assess(parseInputs({ sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, ef: 60, pep: 90, et: 290 }));
const B = assess(parseInputs({ sbp: 140, dbp: 90, hr: 75, edv: 125, esv: 55, ef: 56, pep: 90, et: 290 }));
// C: as A but the stroke volume halved (ESV 85 mL → SV 35 mL), EF as the volumes give it.
const C = assess(parseInputs({ sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 85, pep: 90, et: 290 }));

function row(c: ReturnType<typeof compareVisits>, key: ChangeRow['key']): ChangeRow {
  return c.rows.find((r) => r.key === key)!;
}
function part(r: ChangeRow, key: string): number | null {
  return r.parts!.find((p) => p.key === key)!.logChange;
}

describe('compareVisits: change attribution against hand-worked arithmetic', () => {
  const c = compareVisits(A, B);

  it('splits Δln Ea into heart rate, resistance and the pulsatile remainder (Ea ≈ TPR × HR/60, Sunagawa 1983, Kelly 1992)', () => {
    // Ea = 0.9·SBP / SV: A 108/70 = 1.542857, B 126/70 = 1.8 → Δln Ea = ln(1.8/1.542857) = ln(7/6) = 0.1541507.
    const ea = row(c, 'ea');
    expect(ea.from).toBeCloseTo(108 / 70, 10);
    expect(ea.to).toBeCloseTo(1.8, 10);
    expect(ea.logChange).toBeCloseTo(Math.log(7 / 6), 10);
    expect(ea.logChange).toBeCloseTo(0.1541507, 6);
    // Heart-rate part: ln(75/60) = ln 1.25 = 0.2231436.
    expect(part(ea, 'heartRate')).toBeCloseTo(0.2231436, 6);
    // TPR = MAP / CO. A: MAP 80 + 40/3 = 93.333, CO 70·60/1000 = 4.2 L/min → 22.2222 WU.
    // B: MAP 90 + 50/3 = 106.667, CO 70·75/1000 = 5.25 L/min → 20.3175 WU.
    // Resistance part: ln(20.3175/22.2222) = ln(448/490) = −0.0896122.
    expect(part(ea, 'resistance')).toBeCloseTo(Math.log(448 / 490), 10);
    expect(part(ea, 'resistance')).toBeCloseTo(-0.0896122, 6);
    // Pulsatile remainder: TPR·HR/60 = MAP/SV, so Ea/(TPR·HR/60) = Pes/MAP.
    // A: 108/93.333 = 1.157143; B: 126/106.667 = 1.18125 → ln(1.18125/1.157143) = 0.0206193.
    expect(part(ea, 'pulsatile')).toBeCloseTo(0.0206193, 6);
    // The parts add up exactly: 0.2231436 − 0.0896122 + 0.0206193 = 0.1541507.
    const sum = (part(ea, 'heartRate') ?? NaN) + (part(ea, 'resistance') ?? NaN) + (part(ea, 'pulsatile') ?? NaN);
    expect(sum).toBeCloseTo(ea.logChange!, 12);
  });

  it('splits Δln Pes into its Ea and stroke-volume parts (Pes = Ea·SV)', () => {
    // Pes 108 → 126: ln(126/108) = ln(7/6); SV 70 → 70 so all of it is Ea.
    const pes = row(c, 'pes');
    expect(pes.logChange).toBeCloseTo(Math.log(126 / 108), 10);
    expect(part(pes, 'ea')).toBeCloseTo(Math.log(7 / 6), 10);
    expect(part(pes, 'strokeVolume')).toBeCloseTo(0, 12);
  });

  it('gives ΔEes and Δ(Ea/Ees) from the single-beat values (Chen 2001 formula, worked here)', () => {
    // A: ENd(est) 0.372427, Ees = (80 − 0.372427·108)/(0.372427·70) = 1.525814.
    // B: ENd(est) = 0.0275 − 0.165·0.56 + 0.3656·90/126 + 0.515·0.336141 = 0.369355;
    //    Ees = (90 − 0.369355·126)/(0.369355·70) = 1.680968.
    const ees = row(c, 'ees');
    expect(ees.from).toBeCloseTo(1.525814, 5);
    expect(ees.to).toBeCloseTo(1.680968, 5);
    expect(ees.difference).toBeCloseTo(0.155154, 5);
    expect(ees.logChange).toBeCloseTo(0.0968416, 5);
    // Ea/Ees: A 1.542857/1.525814 = 1.011170; B 1.8/1.680968 = 1.070812; ln ratio 0.0573091.
    const ratio = row(c, 'eaEes');
    expect(ratio.from).toBeCloseTo(1.01117, 5);
    expect(ratio.to).toBeCloseTo(1.070812, 5);
    expect(ratio.logChange).toBeCloseTo(0.0573091, 5);
    expect(ratio.percentChange).toBeCloseTo(100 * (1.070812 / 1.01117 - 1), 3);
  });

  it('judges each change against 2.77 × CV on the log scale (Bland–Altman repeatability coefficient, 1.96·√2)', () => {
    expect(LSC_FACTOR).toBeCloseTo(1.96 * Math.SQRT2, 2);
    // Ees: CV 20.3 % (Chen 2001 abstract) → 2.77 × 0.203 = 0.56231; e^0.56231 = 1.7548 → +75.5 % / −43.0 %.
    const ees = row(c, 'ees');
    expect(ees.lsc.cv).toBe(0.203);
    expect(ees.lsc.logLimit).toBeCloseTo(0.56231, 5);
    expect(ees.lsc.percentUp).toBeCloseTo(75.48, 1);
    expect(ees.lsc.percentDown).toBeCloseTo(43.01, 1);
    expect(ees.verdict).toBe('within-noise');
    // Ea: CV = √((8/mean SBP)² + 0.10²) with mean SBP 130 → √(0.0615385² + 0.01) = 0.117417; limit 0.325245.
    const ea = row(c, 'ea');
    expect(ea.lsc.cv).toBeCloseTo(Math.hypot(8 / 130, 0.1), 10);
    expect(ea.lsc.logLimit).toBeCloseTo(0.325245, 5);
    expect(ea.verdict).toBe('within-noise'); // 0.154 < 0.325
    // Pes: CV 8/130 = 0.0615385, limit 0.170462; Δln Pes 0.154 is within.
    expect(row(c, 'pes').lsc.logLimit).toBeCloseTo(2.77 * 8 / 130, 10);
    expect(row(c, 'pes').verdict).toBe('within-noise');
  });

  it('calls a halving of stroke volume a change beyond noise and puts it in resistance, not heart rate', () => {
    // A → C: SV 70 → 35 at the same pressures and heart rate: Ea 1.542857 → 3.085714, Δln Ea = ln 2 = 0.693147.
    const cc = compareVisits(A, C);
    const ea = row(cc, 'ea');
    expect(ea.logChange).toBeCloseTo(Math.LN2, 10);
    // CV(Ea) = √((8/120)² + 0.1²) = 0.120185 → limit 0.332912 < 0.693147.
    expect(ea.lsc.logLimit).toBeCloseTo(0.332912, 5);
    expect(ea.verdict).toBe('beyond-noise');
    // Same HR: heart-rate part 0. CO halves at the same MAP: TPR doubles, resistance part ln 2. Pes/MAP unchanged: remainder 0.
    expect(part(ea, 'heartRate')).toBeCloseTo(0, 12);
    expect(part(ea, 'resistance')).toBeCloseTo(Math.LN2, 10);
    expect(part(ea, 'pulsatile')).toBeCloseTo(0, 12);
    // Pes unchanged: Δln Pes 0 = Δln Ea (+ln 2) + Δln SV (−ln 2).
    const pes = row(cc, 'pes');
    expect(part(pes, 'ea')).toBeCloseTo(Math.LN2, 10);
    expect(part(pes, 'strokeVolume')).toBeCloseTo(-Math.LN2, 10);
    expect(changeSentence(ea)).toMatch(/^Ea rose by 100 %: beyond the least significant change/);
    expect(comparisonSummary(cc)[0]).toMatch(/^Yardstick 1, the method's least significant change .*: beyond it: Ea/);
  });

  it('says plainly when every change is within measurement noise', () => {
    const lines = comparisonSummary(c);
    expect(lines[0]).toMatch(/every change \(.*\) is within it, so none is shown to be real/);
    expect(changeSentence(row(c, 'ees'))).toMatch(/^Ees rose by 10 %: within the least significant change/);
  });

  it('leaves the heart-rate split not computable, with a reason, when a visit has no heart rate', () => {
    const noHr = assess(parseInputs({ sbp: 120, dbp: 80, edv: 120, esv: 50, pep: 90, et: 290 }));
    const ea = row(compareVisits(noHr, B), 'ea');
    expect(ea.logChange).not.toBeNull();
    for (const p of ea.parts!) {
      expect(p.logChange).toBeNull();
      expect(p.reason).toMatch(/heart rate/);
    }
  });

  it('marks a change not computable when Ees is not computable at one visit', () => {
    // PEP 30 ms, ET 480 ms: tNd = 30/510 = 0.059, outside the window where the ENd curve is defined.
    const bad = assess(parseInputs({ sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, pep: 30, et: 480 }));
    expect(bad.results.ees.value).toBeNull();
    const ees = row(compareVisits(A, bad), 'ees');
    expect(ees.verdict).toBe('not-computable');
    expect(ees.reason).toBeTruthy();
    expect(changeSentence(ees)).toMatch(/not computable/);
  });

  it('notes a change of stroke-volume source between visits as a possible method effect', () => {
    const doppler = assess(parseInputs({ sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, sv: 72, pep: 90, et: 290 }));
    expect(compareVisits(A, doppler).cautions.join(' ')).toMatch(/different sources/);
  });

  it('states the methods version, and compares each visit with the one before along a series', () => {
    expect(compareVisits(A, B).methodsVersion).toBe(METHODS_VERSION);
    const along = changesAlongSeries([A, B, C]);
    expect(along[0]).toBeNull();
    expect(row(along[2]!, 'ea').from).toBeCloseTo(1.8, 10);
  });

  it('renders an uncertainty interval when one is attached to a row', () => {
    const c2 = compareVisits(A, B);
    row(c2, 'ees').noise = { interval95: [-0.2, 0.5], exceeds: false, source: 'Monte Carlo, 20000 draws' };
    const file: SubjectFile = { format: 'elastimate-subject', schemaVersion: 1, subject: { id: 'HT-900' }, visits: [] };
    const text = renderComparison(file, { index: 1, date: '2024-01-01' }, { index: 2, date: '2024-04-01' }, c2);
    expect(text).toMatch(/input uncertainty: the 95 % interval of the change, -0.200 to \+0.500 mmHg\/mL, includes zero: within the uncertainty of the inputs\. Source: Monte Carlo, 20000 draws/);
    expect(comparisonSummary(c2).join(' ')).toMatch(/the 95 % interval of the change includes zero for every change \(Ees\)/);
    expect(text).toContain(METHODS_VERSION);
    expect(text).not.toMatch(/NaN|Infinity|undefined/);
  });

  it('keeps the published repeatability in one place (Chen 2001 abstract: CV 20.3 %; 1.96·√2 × 0.1 = 0.2772 for a CV of 10 %)', () => {
    expect(REPEATABILITY.eesCv).toBe(0.203);
    expect(leastSignificantChange(0.1, 'x').logLimit).toBeCloseTo(0.277, 10);
  });
});

// Right heart: an invented subject (demo data) with TAPSE, TR velocity and a measured RAP at each visit.
// PASP = 4·v² + RAP (simplified Bernoulli; Rudski 2010) and TAPSE/PASP (Guazzi 2013), worked by hand below.
const LEFT = { sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, ef: 60, pep: 90, et: 290 };
const R1 = assess(parseInputs({ ...LEFT, tapse: 20, trVelocity: 3.0, rap: 5 }));
const R2 = assess(parseInputs({ ...LEFT, tapse: 16, trVelocity: 3.5, rap: 10 }));
const R3 = assess(parseInputs({ ...LEFT, tapse: 17, trVelocity: 3.4, rap: 10 }));

describe('compareVisits: PASP and TAPSE/PASP judged against 2.77 × CV (CVs derived from Ferrara 2021, RIGHT-NET)', () => {
  it('derives the CVs from the RIGHT-NET reading variabilities: PASP 2 × 3.8 % = 7.6 %, TAPSE/PASP √(5.3² + 7.6²) = 9.27 %', () => {
    const c = compareVisits(R1, R2);
    expect(row(c, 'pasp').lsc.cv).toBeCloseTo(0.076, 12);
    // √(0.053² + 0.076²) = √(0.002809 + 0.005776) = √0.008585 = 0.0926553.
    expect(row(c, 'tapsePasp').lsc.cv).toBeCloseTo(0.0926553, 6);
    expect(row(c, 'pasp').lsc.source).toMatch(/Ferrara 2021.*lower bound/);
  });

  it('a rise in PASP and a fall in TAPSE/PASP beyond noise', () => {
    const c = compareVisits(R1, R2);
    // Visit 1: PASP 4·3.0² + 5 = 41 mmHg, TAPSE/PASP 20/41 = 0.487805.
    // Visit 2: PASP 4·3.5² + 10 = 59 mmHg, TAPSE/PASP 16/59 = 0.271186.
    const pasp = row(c, 'pasp');
    expect(pasp.from).toBeCloseTo(41, 10);
    expect(pasp.to).toBeCloseTo(59, 10);
    // |Δln PASP| = ln(59/41) = 0.363965 > 2.77 × 0.076 = 0.210520 → beyond noise.
    expect(pasp.logChange).toBeCloseTo(0.363965, 6);
    expect(pasp.lsc.logLimit).toBeCloseTo(0.21052, 6);
    expect(pasp.verdict).toBe('beyond-noise');
    const ratio = row(c, 'tapsePasp');
    expect(ratio.from).toBeCloseTo(0.487805, 6);
    expect(ratio.to).toBeCloseTo(0.271186, 6);
    // |Δln TAPSE/PASP| = |ln(656/1180)| = 0.587109 > 2.77 × 0.0926553 = 0.256655 → beyond noise.
    expect(ratio.logChange).toBeCloseTo(-0.587109, 6);
    expect(ratio.lsc.logLimit).toBeCloseTo(0.256655, 6);
    expect(ratio.verdict).toBe('beyond-noise');
    expect(comparisonSummary(c)[0]).toMatch(/beyond it: .*PASP.*TAPSE\/PASP/);
  });

  it('small changes within noise', () => {
    const c = compareVisits(R2, R3);
    // Visit 3: PASP 4·3.4² + 10 = 56.24 mmHg; |ln(56.24/59)| = 0.047909 < 0.210520 → within noise.
    expect(row(c, 'pasp').logChange).toBeCloseTo(-0.047909, 6);
    expect(row(c, 'pasp').verdict).toBe('within-noise');
    // TAPSE/PASP 17/56.24 = 0.302276; ln(0.302276/0.271186) = 0.108534 < 0.256655 → within noise.
    expect(row(c, 'tapsePasp').logChange).toBeCloseTo(0.108534, 6);
    expect(row(c, 'tapsePasp').verdict).toBe('within-noise');
  });

  it('leaves the rows out unless both visits have the value', () => {
    const noJet = assess(parseInputs({ ...LEFT, tapse: 18 }));
    const noTapse = assess(parseInputs({ ...LEFT, trVelocity: 3.2, rap: 5 }));
    const keys = (c: ReturnType<typeof compareVisits>) => c.rows.map((r) => r.key);
    expect(keys(compareVisits(R1, noJet))).toEqual(['ea', 'pes', 'ees', 'eaEes']);
    expect(keys(compareVisits(noJet, R1))).toEqual(['ea', 'pes', 'ees', 'eaEes']);
    expect(keys(compareVisits(A, B))).toEqual(['ea', 'pes', 'ees', 'eaEes']);
    // A TR jet at both visits but TAPSE at one only: PASP compared, TAPSE/PASP not.
    expect(keys(compareVisits(noTapse, R1))).toEqual(['ea', 'pes', 'ees', 'eaEes', 'pasp']);
  });
});
