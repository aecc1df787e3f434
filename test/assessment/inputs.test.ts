import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { parseInputs } from '../../src/assessment/inputs.js';
import { InputError } from '../../src/errors.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

const base = { sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, ef: 60, sv: 70, pep: 90, et: 290 };

/** Parse, expecting an InputError; return it for inspection. */
function rejection(overrides: Record<string, unknown>): InputError {
  try {
    parseInputs({ ...base, ...overrides });
  } catch (err) {
    expect(err).toBeInstanceOf(InputError);
    return err as InputError;
  }
  throw new Error(`expected ${JSON.stringify(overrides)} to be rejected`);
}

describe('parseInputs: accepted input', () => {
  it('bare numbers take the default units', () => {
    const v = parseInputs(base);
    expect(v).toMatchObject({ sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, ef: 60, sv: 70, pep: 90, et: 290 });
    expect(v.rhythm).toBe('sinus');
    expect(v.pesMethod).toBe('sbp90');
  });
  it('several readings are averaged and kept: SBP 118, 122, 126 → 122; DBP 78, 82 → 80', () => {
    const v = parseInputs({ ...base, sbp: [118, 122, 126], dbp: [78, '82 mmHg'] });
    expect(v.sbp).toBe(122);
    expect(v.sbpReadings).toEqual([118, 122, 126]);
    expect(v.dbp).toBe(80);
    expect(v.dbpReadings).toEqual([78, 82]);
  });
  it('"16.5kPa" → 123.76 mmHg, the same as mathjs converts it', () => {
    const expected = math.unit('16.5 kPa').toNumber('mmHg');
    expect(expected).toBeCloseTo(123.76, 2);
    expect(parseInputs({ ...base, sbp: '16.5kPa' }).sbp).toBeCloseTo(expected, 8);
  });
  it('units of every kind convert as mathjs does: "0.14 L", "0.3s", "1.72m", "176 lb", "1.2 Hz", "72 bpm", "60%"', () => {
    const v = parseInputs({ ...base, edv: '0.14 L', et: '0.3s', height: '1.72m', weight: '176 lb', hr: '1.2 Hz', ef: '60%' });
    expect(v.edv).toBeCloseTo(math.unit('0.14 L').toNumber('mL'), 10);
    expect(v.et).toBeCloseTo(math.unit('0.3 s').toNumber('ms'), 10);
    expect(v.height).toBeCloseTo(math.unit('1.72 m').toNumber('cm'), 10);
    expect(v.weight).toBeCloseTo(math.unit('176 lbm').toNumber('kg'), 10);
    expect(v.hr).toBeCloseTo(math.unit('1.2 Hz').toNumber('minute^-1'), 10);
    expect(v.ef).toBe(60);
    expect(parseInputs({ ...base, hr: '72 bpm' }).hr).toBeCloseTo(72, 10);
  });
  it('a value typed at the edge of its range with its unit is accepted ("230 cm", "3.5 cm": mathjs returns 230.00000000000003)', () => {
    const v = parseInputs({ ...base, height: '230 cm', weight: 80, sv: undefined, lvotDiameter: '3.5 cm', lvotVti: '5 cm' });
    expect(v.height).toBe(230);
    expect(v.lvotDiameter).toBe(3.5);
  });
  it('numeric strings without a unit are taken in the default unit', () => {
    expect(parseInputs({ ...base, sbp: ' 135 ' }).sbp).toBe(135);
  });
});

describe('parseInputs: bad input gets one message naming the field, the value and what is accepted', () => {
  it('a non-number', () => {
    const e = rejection({ sbp: 'abc' });
    expect(e.field).toBe('sbp');
    expect(e.message).toMatch(/^sbp: got "abc"; .*accepted: .*60–260 mmHg/);
  });
  it('NaN', () => {
    const e = rejection({ sbp: Number.NaN });
    expect(e.field).toBe('sbp');
    expect(e.message).toMatch(/sbp: got not a number/);
    expect(e.message).not.toMatch(/NaN/);
    expect(e.message).toMatch(/accepted/);
  });
  it('"Infinity" and ±Infinity', () => {
    expect(rejection({ sbp: 'Infinity' }).message).toMatch(/sbp: got "Infinity"/);
    // A non-finite number (e.g. 1e400 in a JSON file) is described in words, never printed as Infinity.
    expect(rejection({ sbp: Number.POSITIVE_INFINITY }).message).toMatch(/sbp: got a number too large to represent/);
    expect(rejection({ dbp: Number.NEGATIVE_INFINITY }).message).toMatch(/dbp: got a number too large to represent/);
    expect(rejection({ dbp: Number.NEGATIVE_INFINITY }).message).not.toMatch(/Infinity/);
    expect(rejection({ sbp: '1e400 mmHg' }).field).toBe('sbp');
    expect(rejection({ sbp: '1e999' }).field).toBe('sbp');
  });
  it('a negative value', () => {
    const e = rejection({ edv: -120 });
    expect(e.message).toMatch(/^edv: got -120; outside the accepted range; accepted: .*20–600 mL/);
  });
  it('values outside the physiological ranges', () => {
    expect(rejection({ sbp: 300 }).message).toMatch(/sbp: got 300; outside the accepted range/);
    expect(rejection({ hr: 400 }).message).toMatch(/hr: got 400; outside the accepted range; accepted: .*25–220 bpm/);
    expect(rejection({ ef: 99 }).message).toMatch(/ef: got 99/);
    expect(rejection({ pep: '0.5 s' }).message).toMatch(/pep: got "0.5 s"; outside the accepted range; accepted: .*20–250 ms/);
  });
  it('DBP ≥ SBP', () => {
    expect(rejection({ dbp: 130 }).message).toMatch(/^dbp: got 130; not below SBP 120 mmHg; accepted: DBP lower than SBP/);
    expect(rejection({ dbp: 120 }).field).toBe('dbp');
  });
  it('ESV ≥ EDV', () => {
    expect(rejection({ esv: 130 }).message).toMatch(/^esv: got 130; not below EDV 120 mL; accepted: ESV lower than EDV/);
    expect(rejection({ esv: 120 }).field).toBe('esv');
  });
  it('an unknown unit: "7 furlongs"', () => {
    const e = rejection({ edv: '7 furlongs' });
    expect(e.field).toBe('edv');
    expect(e.message).toMatch(/edv: got "7 furlongs"; unknown number or unit; accepted: .*mL/);
  });
  it('a unit of the wrong kind: "5 kg" for sbp', () => {
    const e = rejection({ sbp: '5 kg' });
    expect(e.message).toMatch(/^sbp: got "5 kg"; not a pressure unit; accepted: .*mmHg/);
  });
  it('a percent sign on a non-percent field, and a unit on a percent field', () => {
    expect(rejection({ sbp: '120%' }).field).toBe('sbp');
    expect(rejection({ ef: '60 mL' }).field).toBe('ef');
  });
  it('one bad reading among several names the reading', () => {
    expect(rejection({ sbp: [120, 'x', 124] }).message).toMatch(/sbp: got "x"/);
  });
  it('every missing required field is listed at once', () => {
    let err: unknown;
    try {
      parseInputs({});
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).problems.map((p) => p.field)).toEqual(['sbp', 'dbp', 'edv', 'esv', 'pep', 'et']);
    expect((err as InputError).message).toMatch(/sbp: missing; required/);
  });
  it('LVOT diameter without VTI', () => {
    expect(rejection({ sv: undefined, lvotDiameter: 2 }).message).toMatch(/lvot-vti: missing; Doppler stroke volume needs both/);
  });
  it('unknown keys, wrong types and bad choices', () => {
    expect(rejection({ sbpp: 120 }).message).toMatch(/sbpp: got 120; unknown key/);
    expect(rejection({ rhythm: 'wobbly' }).message).toMatch(/rhythm: got "wobbly"; accepted: sinus, atrial-fibrillation, other/);
    expect(rejection({ aorticStenosis: 'yes' }).message).toMatch(/aortic-stenosis: got "yes"; accepted: true or false/);
    expect(rejection({ hr: { value: 60 } }).field).toBe('hr');
  });
  it('not an object at all', () => {
    for (const bad of [null, 42, 'sbp=120', [base]]) {
      expect(() => parseInputs(bad)).toThrow(InputError);
    }
  });
  it('never prints "undefined" in a message', () => {
    for (const over of [{ sbp: undefined }, { sbp: null }, { hr: [] }, { rhythm: null }]) {
      expect(() => parseInputs({ ...base, ...over })).toThrow(InputError);
      expect(() => parseInputs({ ...base, ...over })).not.toThrow(/undefined/);
    }
  });
});
