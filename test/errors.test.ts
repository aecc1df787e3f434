/**
 * Error messages stay readable: a value is echoed to at most 80 characters
 * with its length, and user text in a message never carries a raw control
 * character (Unicode category Cc, checked with the regex engine's \p{Cc}).
 */
import { describe, expect, it } from 'vitest';
import { InputError, SHOWN_CHARACTERS, describeProblem, showValue } from '../src/errors.js';

describe('showValue', () => {
  it('quotes a short string whole', () => {
    expect(showValue('abc')).toBe('"abc"');
    expect(showValue('x'.repeat(SHOWN_CHARACTERS))).toBe(`"${'x'.repeat(80)}"`);
  });

  it('echoes 80 characters of a longer string and says how long it was', () => {
    expect(showValue('y'.repeat(1_000_000))).toBe(`"${'y'.repeat(80)}"… (1,000,000 characters)`);
    expect(showValue('y'.repeat(81))).toBe(`"${'y'.repeat(80)}"… (81 characters)`);
  });

  it('never cuts a surrogate pair in half', () => {
    const shown = showValue('a'.repeat(79) + '😀'.repeat(10));
    expect(shown.startsWith(`"${'a'.repeat(79)}"…`)).toBe(true);
    expect(shown).not.toMatch(/[\ud800-\udbff](?![\udc00-\udfff])/);
  });

  it('clips long objects and lists as their JSON text', () => {
    const list = Array.from({ length: 1000 }, (_, i) => i);
    const shown = showValue(list);
    expect(shown).toMatch(/^\[0,1,2,.*… \(([\d,]+) characters\)$/);
    expect(shown).toContain(`(${JSON.stringify(list).length.toLocaleString('en-US')} characters)`);
    expect(shown.length).toBeLessThan(120);
  });

  it('leaves no raw control character: C0 JSON-escaped, DEL and C1 made visible', () => {
    for (const c of ['\u001b', '\u0000', '\u007f', '\u009b', '\u0085']) expect(showValue(`a${c}b`)).not.toMatch(/\p{Cc}/u);
  });

  it('keeps numbers and words as before', () => {
    expect(showValue(12.5)).toBe('12.5');
    expect(showValue(Number.POSITIVE_INFINITY)).toBe('a number too large to represent');
    expect(showValue(undefined)).toBe('');
  });
});

describe('describeProblem', () => {
  it('clips a huge field name (an unknown key) and makes its control characters visible', () => {
    const line = describeProblem({ field: 'k\u001b'.repeat(50_000), value: '1', accepted: 'a known key' });
    expect(line.length).toBeLessThan(200);
    expect(line).toMatch(/… \(100,000 characters\): got 1; accepted: a known key$/);
    expect(line).not.toMatch(/\p{Cc}/u);
  });

  it('one problem is one line, whatever its text holds', () => {
    const err = new InputError([{ field: 'a\nb', value: showValue('c\rd'), reason: 'e\nf', accepted: 'g' }, { field: 'h', value: '', accepted: 'i' }]);
    expect(err.message.split('\n')).toHaveLength(2);
  });
});
