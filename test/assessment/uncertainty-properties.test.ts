/**
 * Property tests (fast-check) of the uncertainty report: for any valid visit and
 * any accepted error overrides, every number is finite, shares are
 * non-negative and sum to 1, intervals are ordered, fractions lie in [0, 1],
 * and the main values are those of computeResults.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { RESULT_KEYS, computeResults } from '../../src/assessment/graph/index.js';
import { parseInputs } from '../../src/assessment/inputs.js';
import { SENSITIVITY_KEYS, assessUncertainty } from '../../src/assessment/uncertainty.js';

function nonFinite(value: unknown, path = '$', out: string[] = []): string[] {
  if (typeof value === 'number' && !Number.isFinite(value)) out.push(`${path} = ${String(value)}`);
  else if (value === undefined) out.push(`${path} is undefined`);
  else if (Array.isArray(value)) value.forEach((v, i) => nonFinite(v, `${path}[${i}]`, out));
  else if (value !== null && typeof value === 'object') for (const [k, v] of Object.entries(value)) nonFinite(v, `${path}.${k}`, out);
  return out;
}

const errorValue = fc.oneof(fc.double({ min: 0, max: 40, noNaN: true }), fc.integer({ min: 0, max: 60 }).map((p) => `${p}%`));

const visit = fc
  .record({
    sbp: fc.double({ min: 70, max: 250, noNaN: true }),
    dbpFraction: fc.double({ min: 0.3, max: 0.95, noNaN: true }),
    edv: fc.double({ min: 40, max: 500, noNaN: true }),
    esvFraction: fc.double({ min: 0.15, max: 0.9, noNaN: true }),
    ef: fc.option(fc.double({ min: 10, max: 85, noNaN: true }), { nil: undefined }),
    sv: fc.option(fc.double({ min: 20, max: 200, noNaN: true }), { nil: undefined }),
    hr: fc.option(fc.double({ min: 40, max: 160, noNaN: true }), { nil: undefined }),
    pep: fc.double({ min: 20, max: 250, noNaN: true }),
    et: fc.double({ min: 100, max: 500, noNaN: true }),
    errors: fc.dictionary(fc.constantFrom('sbp', 'dbp', 'edv', 'esv', 'ef', 'sv', 'pep', 'et', 'hr'), errorValue, { maxKeys: 4 }),
  })
  .map(({ dbpFraction, esvFraction, ...v }) => {
    const raw: Record<string, unknown> = { ...v, dbp: Math.min(159, Math.max(30, v.sbp * dbpFraction)), esv: Math.max(5, v.edv * esvFraction) };
    for (const k of Object.keys(raw)) if (raw[k] === undefined) delete raw[k];
    return raw;
  })
  .filter((raw) => (raw.dbp as number) < (raw.sbp as number) && (raw.esv as number) < (raw.edv as number));

describe('uncertainty report properties (fast-check)', () => {
  it('finite numbers, ordered intervals, shares summing to 1, fractions in [0, 1], main values unchanged', () => {
    fc.assert(
      fc.property(visit, fc.integer({ min: 0, max: 1000 }), (raw, seed) => {
        const inputs = parseInputs(raw);
        const report = assessUncertainty(inputs, { draws: 1000, seed });
        expect(nonFinite(report)).toEqual([]);
        const results = computeResults(inputs);
        for (const key of RESULT_KEYS) {
          const spread = report.outputs[key];
          if (!spread) continue;
          expect(spread.value, key).toBe(results[key].value);
          expect(spread.interval95[0], key).toBeLessThanOrEqual(spread.interval95[1]);
          expect(spread.computableFraction).toBeGreaterThan(0);
          expect(spread.computableFraction).toBeLessThanOrEqual(1);
        }
        for (const key of SENSITIVITY_KEYS) {
          const shares = report.sensitivity[key];
          if (shares.length === 0) continue;
          for (const s of shares) expect(s.share).toBeGreaterThanOrEqual(0);
          expect(shares.reduce((a, s) => a + s.share, 0)).toBeCloseTo(1, 9);
        }
        const e = report.ees;
        expect(e.notComputableFraction).toBeGreaterThanOrEqual(0);
        expect(e.notComputableFraction).toBeLessThanOrEqual(1);
        expect(e.inadmissibleInputs + e.tNdOutsideWindow + e.eesNotPositive).toBeCloseTo(e.notComputableFraction, 12);
        if (report.coupling.probabilityAbove !== null) {
          expect(report.coupling.probabilityAbove).toBeGreaterThanOrEqual(0);
          expect(report.coupling.probabilityAbove).toBeLessThanOrEqual(1);
        }
      }),
      { numRuns: 60 },
    );
  });
});
