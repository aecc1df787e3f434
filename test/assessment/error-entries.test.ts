/**
 * An error-model entry that names no input is refused, never dropped. A
 * "__proto__" key is an own property after JSON.parse (ECMA-262 §25.5.1,
 * JSON.parse's internalization uses CreateDataProperty) but no schema check
 * keeps it; the shape check notices the loss and names the entry.
 */
import { describe, expect, it } from 'vitest';
import { checkRawShape } from '../../src/assessment/inputs.js';
import { inputErrorMessage } from '../fixtures/input-error.js';

describe('checkRawShape: error entries', () => {
  it('refuses an entry "__proto__" (an own key after JSON.parse) naming it, with the accepted input names', () => {
    const raw = JSON.parse('{"sbp":130,"errors":{"__proto__":5,"sbp":6}}');
    expect(Object.keys(raw.errors)).toContain('__proto__');
    expect(inputErrorMessage(() => checkRawShape(raw))).toBe('error: got "__proto__"; not an input whose error reaches a result; accepted: one of sbp, dbp, hr, edv, esv, ef, sv, lvot-diameter, lvot-vti, pep, et, pes-measured, height, weight');
  });

  it('keeps entries that name inputs', () => {
    expect(checkRawShape({ errors: { sbp: 6, edv: '12%' } }).errors).toEqual({ sbp: 6, edv: '12%' });
  });
});
