/**
 * The table of the trade's common units (src/units/common-units.ts) against mathjs, which stays the
 * reference: every entry converts a spread of values to the same number mathjs gives (both rounded
 * to twelve significant digits, as every unit conversion is), and none of them loads mathjs.
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { COMMON_UNITS } from '../../src/units/common-units.js';
import { KINDS, mathjsLoaded, toInternalUnit, type QuantityKind } from '../../src/units/quantity.js';

// The reference: mathjs's own bundle, loaded here directly (not through src/units), so the check
// below that the program never loaded it stays meaningful.
const math = createRequire(import.meta.url)('mathjs/lib/browser/math.js') as { unit(text: string): { toNumber(unit: string): number } };

/** mathjs's spelling of a unit and of the kind's internal unit (a count per minute is min^-1 there). */
const mathjsUnit = (unit: string): string => (unit === 'bpm' || unit === '/min' ? 'min^-1' : unit);
const mathjsTarget = (kind: QuantityKind): string => (kind === 'rate' ? 'min^-1' : KINDS[kind].unit);

const VALUES = [0.001, 0.5, 1, 2.1, 16.5, 72, 120.3, 999.99, 1234.5678];
const ENTRIES = Object.entries(COMMON_UNITS).flatMap(([kind, table]) => Object.keys(table).map((unit) => ({ kind: kind as QuantityKind, unit })));

describe('the common-units table', () => {
  it('holds exactly the units the trade commonly types (mmHg, kPa, cmH2O, mL, L, ms, s, bpm, /min, Hz, mm, cm, m, kg, g, lb)', () => {
    expect(ENTRIES.map((e) => e.unit).sort()).toEqual(['/min', 'Hz', 'L', 'bpm', 'cm', 'cmH2O', 'g', 'kPa', 'kg', 'lb', 'm', 'mL', 'mm', 'mmHg', 'ms', 's'].sort());
  });

  it('converts every entry, and %, without loading mathjs, with and without a space before the unit', () => {
    for (const { kind, unit } of ENTRIES) {
      toInternalUnit('x', `12 ${unit}`, kind);
      toInternalUnit('x', `12${unit}`, kind);
    }
    toInternalUnit('hr', '72 BPM', 'rate'); // the trade's rate spellings in any case
    toInternalUnit('hr', '72 / min', 'rate');
    expect(toInternalUnit('ef', '60 %', 'percent')).toBe(60); // % is read as the number itself
    expect(mathjsLoaded()).toBe(false);
  });

  for (const { kind, unit } of ENTRIES) {
    it(`${unit} (${kind}): every value converts to what mathjs gives for "${mathjsUnit(unit)}" → ${mathjsTarget(kind)}`, () => {
      for (const v of VALUES) {
        const reference = Number(math.unit(`${v} ${mathjsUnit(unit)}`).toNumber(mathjsTarget(kind)).toPrecision(12));
        expect(toInternalUnit('x', `${v} ${unit}`, kind), `${v} ${unit}`).toBe(reference);
      }
    });
  }

  it('a unit outside the table, or a table unit of the wrong kind, still goes to mathjs (which is then loaded)', () => {
    expect(toInternalUnit('height', '70 inch', 'length')).toBe(Number(math.unit('70 inch').toNumber('cm').toPrecision(12)));
    expect(mathjsLoaded()).toBe(true);
    expect(() => toInternalUnit('sbp', '120 mL', 'pressure')).toThrow('sbp: got "120 mL"; not a pressure unit; accepted:');
    expect(() => toInternalUnit('sbp', '120 parsec', 'pressure')).toThrow('sbp: got "120 parsec"; unknown number or unit; accepted:');
  });
});
