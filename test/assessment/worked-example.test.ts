/**
 * A single-beat example worked by hand, every intermediate written out, then
 * compared with the code on parsed inputs.
 *
 * Inputs: SBP 120, DBP 80 mmHg, reported EF 60 %, Doppler SV 70 mL, PEP 90 ms,
 * ET 290 ms (the example in the project's method notes §4; its published
 * method is Chen CH et al., J Am Coll Cardiol 2001;38:2028, with the ENd
 * coefficients FROM MEMORY of that paper). Volumes EDV 130 / ESV 55 mL were
 * chosen so that they disagree a little with both the reported EF (57.7 % vs
 * 60 %) and the Doppler SV (75 vs 70 mL) without tripping a consistency flag:
 * any mix-up of which EF feeds ENd(est), or which SV feeds Ea and Ees, would
 * change the numbers below.
 */
import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { computeResults } from '../../src/assessment/graph/index.js';
import { parseInputs } from '../../src/assessment/inputs.js';

const raw = { sbp: 120, dbp: 80, hr: 60, edv: 130, esv: 55, ef: 60, sv: 70, pep: 90, et: 290 };

// ---- By hand ----------------------------------------------------------------
// Pes = 0.9 × SBP = 0.9 × 120 = 108 mmHg                                (Kelly 1992; Chen 2001)
const pes = 0.9 * 120;
// tNd = PEP / (PEP + ET) = 90 / 380 = 0.2368421                          (Chen 2001, from memory)
const tNd = 90 / (90 + 290);
// ENd(avg) = Σ aᵢ·tNdⁱ, term by term (coefficients from memory of Chen 2001):
//   a0          =  0.35695
//   a1·t        = −7.2266  × 0.2368421          = −1.7115632
//   a2·t²       =  74.249  × 0.0560942          =  4.1649370
//   a3·t³       = −307.39  × 0.0132855          = −4.0838189
//   a4·t⁴       =  684.54  × 0.0031466          =  2.1539444
//   a5·t⁵       = −856.92  × 0.000745237        = −0.6386087
//   a6·t⁶       =  571.95  × 0.000176504        =  0.1009512
//   a7·t⁷       = −159.1   × 0.0000418035       = −0.0066509
//   sum                                          =  0.3361409
const endAvgTerms = [
  0.35695,
  -7.2266 * tNd,
  74.249 * tNd ** 2,
  -307.39 * tNd ** 3,
  684.54 * tNd ** 4,
  -856.92 * tNd ** 5,
  571.95 * tNd ** 6,
  -159.1 * tNd ** 7,
];
const normalizedElastanceAvg = endAvgTerms.reduce((a, b) => a + b, 0);
// ENd(est) = 0.0275 − 0.165·EF + 0.3656·DBP/Pes + 0.515·ENd(avg), EF = 0.60 (the REPORTED EF)
//          = 0.0275 − 0.0990 + 0.3656 × 0.7407407 + 0.515 × 0.3361409
//          = 0.0275 − 0.0990 + 0.2708148 + 0.1731125 = 0.3724274
const normalizedElastanceEst = 0.0275 - 0.165 * 0.6 + 0.3656 * (80 / pes) + 0.515 * normalizedElastanceAvg;
// Ees = [DBP − ENd(est)·Pes] / [ENd(est)·SV], SV = 70 mL (the DOPPLER SV, as in Chen 2001)
//     = (80 − 0.3724274 × 108) / (0.3724274 × 70)
//     = (80 − 40.2221548) / 26.0699151 = 39.7778452 / 26.0699151 = 1.5258141 mmHg/mL
const ees = (80 - normalizedElastanceEst * pes) / (normalizedElastanceEst * 70);
// Ea = Pes / SV = 108 / 70 = 1.5428571 mmHg/mL                          (Kelly 1992)
const ea = pes / 70;
// Ea/Ees = 1.5428571 / 1.5258141 = 1.0111698
const eaEes = ea / ees;
// V0 = ESV − Pes/Ees = 55 − 108 / 1.5258141 = 55 − 70.7819 = −15.7819 mL
const v0 = 55 - pes / ees;
// Cross-check identity: 1/EF − 1 = 1/0.60 − 1 = 0.6667
const eaEesFromEf = 1 / 0.6 - 1;
// CO = SV × HR / 1000 = 70 × 60 / 1000 = 4.2 L/min; MAP = 80 + 40/3 = 93.333 mmHg
const co = (70 * 60) / 1000;
const map = 80 + (120 - 80) / 3;

describe('hand-worked single-beat example (method notes §4; Chen 2001 method, ENd coefficients from memory)', () => {
  it('the hand arithmetic reproduces the method notes to their printed digits', () => {
    expect(pes).toBe(108);
    expect(tNd).toBeCloseTo(0.23684, 5);
    expect(normalizedElastanceAvg).toBeCloseTo(0.33614, 5);
    expect(normalizedElastanceEst).toBeCloseTo(0.37243, 5);
    expect(ees).toBeCloseTo(1.5258, 4);
    expect(ea).toBeCloseTo(1.5429, 4);
    expect(eaEes).toBeCloseTo(1.0112, 4);
  });

  const inputs = parseInputs(raw);
  const results = computeResults(inputs);

  it('computeResults on the parsed inputs gives every intermediate', () => {
    expect(results.pes.value).toBeCloseTo(pes, 10);
    expect(results.tNd.value).toBeCloseTo(tNd, 10);
    expect(results.normalizedElastanceAvg.value).toBeCloseTo(normalizedElastanceAvg, 10);
    expect(results.normalizedElastanceEst.value).toBeCloseTo(normalizedElastanceEst, 10);
    expect(results.ees.value).toBeCloseTo(ees, 10);
    expect(results.ea.value).toBeCloseTo(ea, 10);
    expect(results.eaEes.value).toBeCloseTo(eaEes, 10);
    expect(results.v0.value).toBeCloseTo(v0, 8);
    expect(results.eaEesFromEf.value).toBeCloseTo(eaEesFromEf, 10);
    expect(results.co.value).toBeCloseTo(co, 10);
    expect(results.map.value).toBeCloseTo(map, 10);
  });

  it('the reported EF feeds ENd(est) and the Doppler SV feeds Ea and Ees; the volumes are shown beside them', () => {
    expect(results.efUsed.value).toBe(60);
    expect(results.efVolumes.value).toBeCloseTo((75 / 130) * 100, 10);
    expect(results.svUsed.value).toBe(70);
    expect(results.svUsed.method).toMatch(/Doppler/);
    expect(results.svVolumetric.value).toBe(75);
    expect(results.eesNoIntercept.value).toBeCloseTo(108 / 55, 10);
  });

  it('assess() carries the same numbers, with no flag for this unremarkable subject', () => {
    const a = assess(inputs);
    expect(a.choice).toEqual({ pesMethod: 'sbp90', strokeVolumeSource: 'doppler' });
    expect(a.results.ees.value).toBeCloseTo(ees, 10);
    expect(a.results.eaEes.value).toBeCloseTo(eaEes, 10);
    expect(a.flags.map((f) => f.code)).toEqual([]);
    const main = a.variants.filter((v) => v.isMain);
    expect(main).toHaveLength(1);
    expect(main[0]!.ees).toBeCloseTo(ees, 10);
    // The referral note states the numbers to two decimals.
    expect(a.referral).toContain('(Ees) 1.53 mmHg/mL');
    expect(a.referral).toContain('Ea/Ees 1.01');
  });
});
