import { describe, expect, it } from 'vitest';
import { computed, notComputable } from '../../src/physiology/outcome.js';

describe('Outcome: a finite number or null with a reason', () => {
  it('keeps finite numbers', () => {
    expect(computed(1.5)).toEqual({ value: 1.5 });
    expect(computed(0)).toEqual({ value: 0 });
  });
  it('turns NaN and ±Infinity into null with a reason (IEEE 754 non-finite values)', () => {
    for (const v of [Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY, 1 / 0]) {
      const r = computed(v, 'guard reason');
      expect(r.value).toBeNull();
      expect(r.reason).toBe('guard reason');
    }
  });
  it('notComputable carries its reason', () => {
    expect(notComputable('why')).toEqual({ value: null, reason: 'why' });
  });
});
