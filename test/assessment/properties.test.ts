/**
 * Property tests (fast-check): no input combination yields a non-finite
 * number, an undefined value or the words NaN/Infinity/undefined anywhere in
 * an assessment, and parseInputs either returns or throws InputError.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { assess, type Assessment } from '../../src/assessment/assess.js';
import { MAP_METHODS, BSA_METHODS, RHYTHMS, SEXES, NUMERIC_FIELDS } from '../../src/assessment/fields.js';
import { parseInputs } from '../../src/assessment/inputs.js';
import { InputError } from '../../src/errors.js';
import { stringifySafe } from '../../src/render/json.js';

const RUNS = 300;

/** Every path in a value where a number is not finite, a value is undefined, or text says NaN/Infinity/undefined. */
function badSpots(value: unknown, path = '$', out: string[] = []): string[] {
  if (value === undefined) out.push(`${path} is undefined`);
  else if (typeof value === 'number') {
    if (!Number.isFinite(value)) out.push(`${path} = ${String(value)}`);
  } else if (typeof value === 'string') {
    if (/NaN|Infinity|undefined/.test(value)) out.push(`${path} says ${JSON.stringify(value)}`);
  } else if (Array.isArray(value)) {
    value.forEach((v, i) => badSpots(v, `${path}[${i}]`, out));
  } else if (value !== null && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) badSpots(v, `${path}.${k}`, out);
  }
  return out;
}

function expectClean(a: Assessment): void {
  expect(badSpots(a)).toEqual([]);
  const json = stringifySafe(a);
  expect(json).not.toMatch(/NaN|Infinity|undefined/);
  // stringifySafe turns non-finite numbers into null; nothing should have needed it.
  expect(JSON.parse(json)).toEqual(JSON.parse(JSON.stringify(a)));
}

const field = (key: string) => NUMERIC_FIELDS.find((f) => f.key === key)!;

/** A number anywhere in a field's accepted range, as a bare number or as text in the default unit. */
function inRange(key: string) {
  const f = field(key);
  return fc
    .tuple(fc.double({ min: f.min, max: f.max, noNaN: true }), fc.boolean())
    .map(([v, asText]) => (asText && f.unit && f.unit !== 'years' && f.unit !== '' ? `${v} ${f.unit === '%' ? '%' : f.unit}` : v));
}
const optional = <T,>(arb: fc.Arbitrary<T>) => fc.option(arb, { nil: undefined });
/** A fraction in [0, 0.999]: keeps DBP below SBP and ESV below EDV after rounding. */
const fraction = fc.double({ min: 0, max: 0.999, noNaN: true });

/** Raw visits whose every value lies in its accepted range and whose relations hold (DBP < SBP, ESV < EDV). */
const validVisit = fc
  .record({
    sbp: fc.double({ min: 60, max: 260, noNaN: true }),
    dbpFraction: fraction,
    edv: fc.double({ min: 20, max: 600, noNaN: true }),
    esvFraction: fraction,
    hr: optional(inRange('hr')),
    ef: optional(inRange('ef')),
    doppler: fc.oneof(
      fc.constant(undefined),
      inRange('sv').map((sv) => ({ sv })),
      fc.tuple(inRange('lvotDiameter'), inRange('lvotVti')).map(([lvotDiameter, lvotVti]) => ({ lvotDiameter, lvotVti })),
    ),
    pep: inRange('pep'),
    et: inRange('et'),
    height: optional(inRange('height')),
    weight: optional(inRange('weight')),
    age: optional(inRange('age')),
    pes: fc.oneof(
      fc.constant({}),
      fc.constant({ pesMethod: 'weighted' as const }),
      inRange('pesMeasured').map((pesMeasured) => ({ pesMeasured })),
      inRange('pesMeasured').map((pesMeasured) => ({ pesMeasured, pesMethod: 'sbp90' as const })),
    ),
    edp: optional(inRange('edp')),
    eOverEPrime: optional(inRange('eOverEPrime')),
    lvids: optional(inRange('lvids')),
    pwts: optional(inRange('pwts')),
    rhythm: optional(fc.constantFrom(...RHYTHMS)),
    aorticStenosis: optional(fc.boolean()),
    aorticRegurgitation: optional(fc.boolean()),
    mitralRegurgitation: optional(fc.boolean()),
    outflowObstruction: optional(fc.boolean()),
    mapMethod: optional(fc.constantFrom(...MAP_METHODS)),
    bsaMethod: optional(fc.constantFrom(...BSA_METHODS)),
    sex: optional(fc.constantFrom(...SEXES)),
  })
  .map(({ sbp, dbpFraction, edv, esvFraction, doppler, pes, ...rest }) => {
    const dbpHigh = Math.min(160, sbp);
    const esvHigh = Math.min(500, edv);
    const raw: Record<string, unknown> = {
      ...rest,
      ...(doppler ?? {}),
      ...pes,
      sbp,
      dbp: 30 + dbpFraction * (dbpHigh - 30),
      edv,
      esv: 5 + esvFraction * (esvHigh - 5),
    };
    for (const k of Object.keys(raw)) if (raw[k] === undefined) delete raw[k];
    return raw;
  });

describe('assess() on any visit within the accepted ranges', () => {
  it('parses, and yields only finite numbers, no undefined and no NaN/Infinity text anywhere', () => {
    fc.assert(
      fc.property(validVisit, (raw) => {
        const inputs = parseInputs(raw);
        expectClean(assess(inputs));
      }),
      { numRuns: RUNS },
    );
  });

  it('also at the corners of the ranges (extreme but accepted values)', () => {
    const corner = (key: string) => fc.constantFrom(field(key).min, field(key).max);
    const cornerVisit = fc
      .record({
        sbp: corner('sbp'), dbpLow: fc.boolean(), edv: corner('edv'), esvLow: fc.boolean(), ef: corner('ef'),
        sv: optional(corner('sv')), hr: corner('hr'), pep: corner('pep'), et: corner('et'), height: corner('height'), weight: corner('weight'),
      })
      .map(({ dbpLow, esvLow, sv, ...r }) => ({
        ...r,
        ...(sv !== undefined ? { sv } : {}),
        dbp: dbpLow ? 30 : Math.min(160, r.sbp - 1e-9),
        esv: esvLow ? 5 : Math.min(500, r.edv - 1e-9),
      }));
    fc.assert(
      fc.property(cornerVisit, (raw) => {
        expectClean(assess(parseInputs(raw)));
      }),
      { numRuns: 200 },
    );
  });
});

const UNIT_SUFFIXES = [
  '', ' ', 'kPa', ' kPa', ' mmHg', 'mmHg', ' Pa', ' kg', ' g', ' lb', ' L', 'mL', ' cm^3', 's', ' ms', '%', ' %', ' furlongs', ' Hz', ' bpm',
  '/min', ' /min', ' m', 'mm', ' inch', 'e5', 'e-400', 'e400', ' mmHg^2', ' kPa/s', ' 5', '..', ' degC',
];
const weirdNumber = fc.oneof(
  fc.double(),
  fc.integer(),
  fc.constantFrom(0, -0, 1e-320, 1e308, -1e308, Number.MAX_VALUE, Number.MIN_VALUE, Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY),
);
const unitText = fc.tuple(weirdNumber, fc.constantFrom(...UNIT_SUFFIXES)).map(([n, u]) => `${n}${u}`);
const oddText = fc.constantFrom('Infinity', '-Infinity', 'NaN', '1e999', '-1e999', 'mmHg', 'Hz', '', ' ', '%', '0x10', '1_000', '1,5', '½', '120/80', 'null', 'undefined', '__proto__');
const anyValue = fc.oneof(
  { weight: 4, arbitrary: weirdNumber },
  { weight: 4, arbitrary: unitText },
  { weight: 2, arbitrary: oddText },
  { weight: 1, arbitrary: fc.string() },
  { weight: 1, arbitrary: fc.array(fc.oneof(weirdNumber, unitText), { maxLength: 4 }) },
  { weight: 1, arbitrary: fc.anything() },
);

/** parseInputs either returns or throws InputError; when it returns, assess is clean. */
function returnsOrInputError(raw: unknown): void {
  let inputs;
  try {
    inputs = parseInputs(raw);
  } catch (err) {
    if (!(err instanceof InputError)) throw new Error(`parseInputs threw ${String(err)} (not an InputError) for ${stringifySafe(raw, 0)}`);
    // The value as typed is echoed in quotes; outside them no message says "undefined".
    expect(err.message.replace(/"(?:[^"\\]|\\.)*"/g, '""')).not.toMatch(/undefined/);
    expect(err.message.length).toBeGreaterThan(0);
    return;
  }
  expectClean(assess(inputs));
}

describe('parseInputs on arbitrary values', () => {
  const sound = { sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, ef: 60, sv: 70, pep: 90, et: 290 };
  const keys = [...NUMERIC_FIELDS.map((f) => f.key as string), 'rhythm', 'aorticStenosis', 'pesMethod', 'sex', 'mapMethod'];

  it('one field replaced by a unit-bearing string, an extreme number or junk: returns or throws InputError', () => {
    fc.assert(
      fc.property(fc.constantFrom(...keys), anyValue, (key, value) => {
        returnsOrInputError({ ...sound, [key]: value });
      }),
      { numRuns: RUNS },
    );
  });

  it('several fields replaced at once', () => {
    fc.assert(
      fc.property(fc.dictionary(fc.constantFrom(...keys), anyValue, { maxKeys: 6 }), (over) => {
        returnsOrInputError({ ...sound, ...over });
      }),
      { numRuns: RUNS },
    );
  });

  it('any value at all in place of the whole visit', () => {
    fc.assert(
      fc.property(fc.anything(), (raw) => {
        returnsOrInputError(raw);
      }),
      { numRuns: RUNS },
    );
  });
});
