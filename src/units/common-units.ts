/**
 * The trade's common units as plain factors to each kind's internal unit, so a
 * visit typed as "16.5 kPa", "0.14 L" or "1.1 Hz" converts without loading
 * mathjs (about 0.05–0.1 s of start-up). mathjs stays the reference: every
 * factor below is the one mathjs's own definitions give (mmHg = 133.322 Pa,
 * cmH2O = 98.0665 Pa, lb = 0.45359237 kg), and test/units/common-units.test.ts
 * holds every entry against mathjs's conversion. Any other unit, and every unit
 * given for the wrong kind of quantity, goes to mathjs as before.
 */
import type { QuantityKind } from './quantity.js';

/** mathjs's definition of one millimetre of mercury, in pascal. */
const PASCAL_PER_MMHG = 133.322;

/** Unit as typed (exact case, as mathjs reads it) → factor to the kind's internal unit. */
export const COMMON_UNITS: Partial<Record<QuantityKind, Readonly<Record<string, number>>>> = {
  pressure: { mmHg: 1, kPa: 1000 / PASCAL_PER_MMHG, cmH2O: 98.0665 / PASCAL_PER_MMHG },
  volume: { mL: 1, L: 1000 },
  time: { ms: 1, s: 1000 },
  // Heart rate: bpm and /min are the trade's spellings of a count per minute (read in any case).
  rate: { bpm: 1, '/min': 1, Hz: 60 },
  length: { mm: 0.1, cm: 1, m: 100 },
  mass: { kg: 1, g: 0.001, lb: 0.45359237 },
};

/** The factor of `unit` for `kind`, or undefined when the table does not hold it. */
export function commonUnitFactor(unit: string, kind: QuantityKind): number | undefined {
  const table = COMMON_UNITS[kind];
  if (!table) return undefined;
  if (kind === 'rate') {
    const spelled = unit.replace(/\s+/g, '').toLowerCase();
    if (spelled === 'bpm' || spelled === '/min') return 1;
  }
  return Object.hasOwn(table, unit) ? table[unit] : undefined;
}
