/**
 * The default error model and the `--error` / visit-file overrides.
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { CUFF_ERROR, DEFAULT_ERRORS, ERROR_INPUT_KEYS, cuffMeanSd, errorModelFor, parseErrorOverride, validateErrorOverrides } from '../../src/assessment/error-model.js';
import { parseInputs } from '../../src/assessment/inputs.js';
import { InputError } from '../../src/errors.js';

const require = createRequire(import.meta.url);
const math = require('mathjs/lib/browser/math.js') as { unit(text: string): { toNumber(unit: string): number } };

const BASE = { sbp: [150, 146, 148], dbp: 90, edv: 120, esv: 50, pep: 90, et: 290 };

describe('cuff pressure: ISO 81060-2 limits split into a systematic and a random part', () => {
  it('one reading has the criterion-1 limit, SD 8 mmHg (ISO 81060-2; Biomed Eng Lett 2019;9:37, Table 3)', () => {
    expect(cuffMeanSd(1)).toBeCloseTo(8, 10);
  });
  it('the mean of three has the criterion-2 limit, SD 6.95 mmHg (ISO 81060-2, from memory)', () => {
    expect(cuffMeanSd(3)).toBeCloseTo(6.95, 10);
  });
  it('only the random part shrinks: more readings approach the systematic part, never below it', () => {
    // Worked by hand from the two ISO limits: a device at both has s² + r² = 8² and s² + r²/3 = 6.95².
    // Subtracting: r²·(1 − 1/3) = 64 − 48.3025 = 15.6975, so r² = 15.6975 × 3/2 = 23.54625,
    // r = 4.8524 mmHg (random, per reading); s² = 64 − 23.54625 = 40.45375, s = 6.3603 mmHg (systematic).
    expect(CUFF_ERROR.systematic).toBeCloseTo(6.3603, 4);
    expect(CUFF_ERROR.random).toBeCloseTo(4.8524, 4);
    // Mean of 5 readings: √(40.45375 + 23.54625/5) = √45.16300 = 6.7203 mmHg.
    expect(cuffMeanSd(5)).toBeCloseTo(6.7203, 4);
    expect(cuffMeanSd(1000)).toBeGreaterThan(CUFF_ERROR.systematic);
    expect(cuffMeanSd(1000)).toBeLessThan(CUFF_ERROR.systematic + 0.01);
  });
  it('the model uses the number of readings given', () => {
    const model = errorModelFor(parseInputs(BASE));
    expect(model.inputs.find((e) => e.input === 'sbp')!.sd).toBeCloseTo(6.95, 10);
    expect(model.inputs.find((e) => e.input === 'dbp')!.sd).toBeCloseTo(8, 10);
  });
});

describe('defaults', () => {
  it('every input has a default with its provenance and a source sentence', () => {
    for (const key of ERROR_INPUT_KEYS) {
      const d = DEFAULT_ERRORS[key];
      expect(d.value).toBeGreaterThan(0);
      expect(['ISO 81060-2', 'literature', 'common practice', 'from memory']).toContain(d.provenance);
      expect(d.source.length).toBeGreaterThan(10);
    }
  });
  it('echo volumes: relative errors within the published test–retest range, CV 7–19 % (PubMed 9076390)', () => {
    for (const key of ['edv', 'esv'] as const) {
      expect(DEFAULT_ERRORS[key].kind).toBe('relative');
      expect(DEFAULT_ERRORS[key].value).toBeGreaterThanOrEqual(0.07);
      expect(DEFAULT_ERRORS[key].value).toBeLessThanOrEqual(0.19);
    }
    // ESV is the less reproducible (individual limits ±25 % vs ±15 % for EDV, PubMed 6875114).
    expect(DEFAULT_ERRORS.esv.value).toBeGreaterThan(DEFAULT_ERRORS.edv.value);
  });
  it('only the inputs this visit has, with their values as used', () => {
    const model = errorModelFor(parseInputs(BASE));
    expect(model.inputs.map((e) => e.input)).toEqual(['sbp', 'dbp', 'edv', 'esv', 'pep', 'et']);
    expect(model.inputs.find((e) => e.input === 'sbp')!.value).toBeCloseTo(148, 10);
    expect(model.inputs.find((e) => e.input === 'edv')!.sd).toBeCloseTo(12, 10);
    const doppler = errorModelFor(parseInputs({ ...BASE, sv: 70, lvotDiameter: 2, lvotVti: 20 }));
    // A Doppler SV entered directly wins over diameter and VTI (as in compute.ts): their errors do not apply.
    expect(doppler.inputs.map((e) => e.input)).toContain('sv');
    expect(doppler.inputs.map((e) => e.input)).not.toContain('lvotDiameter');
  });
});

describe('overrides: absolute in the input unit, with a unit, or a percentage', () => {
  it('absolute, percentage, and a unit converted like the inputs (mathjs for the kPa constant)', () => {
    const model = errorModelFor(parseInputs({ ...BASE, ef: 60, errors: { sbp: 6, edv: '12%', dbp: '0.8kPa', ef: '5%', pep: '8 ms' } }));
    const sd = (k: string) => model.inputs.find((e) => e.input === k)!;
    expect(sd('sbp').sd).toBe(6);
    expect(sd('sbp').given).toBe('override');
    expect(sd('edv').sd).toBeCloseTo(0.12 * 120, 10);
    expect(sd('dbp').sd).toBeCloseTo(math.unit('0.8 kPa').toNumber('mmHg'), 6);
    // For EF, "5%" is 5 % of the EF (3 points at 60 %); a bare number is in points.
    expect(sd('ef').sd).toBeCloseTo(3, 10);
    expect(sd('pep').sd).toBe(8);
    expect(errorModelFor(parseInputs({ ...BASE, ef: 60, errors: { ef: 4 } })).inputs.find((e) => e.input === 'ef')!.sd).toBe(4);
  });
  it('flag spellings (lvot-diameter) and visit-file keys (lvotDiameter) both work', () => {
    expect(parseErrorOverride('lvot-diameter', '0.2').input).toBe('lvotDiameter');
    expect(parseErrorOverride('lvotDiameter', 0.2).value).toBe(0.2);
  });
  it('bad values are refused naming the field, the value and what is accepted', () => {
    const cases: [string, unknown, RegExp][] = [
      ['sbp', 'abc', /^error\.sbp: got "abc"; .*accepted: /],
      ['sbp', -3, /^error\.sbp: got -3; negative; accepted: /],
      ['edv', '150%', /^error\.edv: got "150%"; percentage outside 0–100 %/],
      ['pep', '2 kg', /^error\.pep: got "2 kg"/],
      ['sbp', 500, /^error\.sbp: got 500; larger than/],
      ['age', 2, /^error: got "age"; not an input whose error reaches a result; accepted: one of sbp, dbp/],
      ['sbp', true, /^error\.sbp: got true/],
    ];
    for (const [key, value, message] of cases) {
      expect(() => parseErrorOverride(key, value), `${key}=${String(value)}`).toThrow(message);
    }
  });
  it('every problem of a visit is reported together', () => {
    try {
      validateErrorOverrides({ sbp: 'x', edv: '-1%' });
      expect.unreachable();
    } catch (err) {
      expect(err).toBeInstanceOf(InputError);
      expect((err as InputError).problems.map((p) => p.field)).toEqual(['error.sbp', 'error.edv']);
    }
  });
});
