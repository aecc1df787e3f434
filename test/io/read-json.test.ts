/**
 * The one JSON reader. RFC 8259 §4: "The names within an object SHOULD be
 * unique", and implementations differ on duplicates (some report an error);
 * this one reports them. Values are checked against Node's own JSON.parse, a
 * general-purpose reference parser: whatever this reader accepts parses to
 * exactly what JSON.parse gives.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { inputErrorMessage } from '../fixtures/input-error.js';
import { MAX_JSON_DEPTH, findJsonShapeProblem, lineAndColumn, parseJsonText } from '../../src/io/read-json.js';

const SOURCE = { field: 'input', value: '"v.json"', accepted: 'a visit file' };

const message = (text: string) => inputErrorMessage(() => parseJsonText(text, SOURCE));

describe('duplicate keys', () => {
  it('at the top, nested in an object, in an object inside an array: refused with the key and both positions', () => {
    expect(message('{"a":1,"a":2}')).toMatch(/the key "a" appears twice in one object \(at line 1, column 8; first at line 1, column 2\)/);
    expect(message('{\n "x": {"b": 1,\n  "b": 2}}')).toMatch(/"b" appears twice .*at line 3, column 3; first at line 2, column 8/);
    expect(message('[{"k":1},{"k":1,"k":1}]')).toMatch(/"k" appears twice/);
  });

  it('keys equal after unescaping are duplicates ("a" and "\\u0061")', () => {
    expect(message('{"a":1,"\\u0061":2}')).toMatch(/"a" appears twice/);
  });

  it('the same key in sibling objects, keys inside string values, and escaped quotes are not duplicates', () => {
    for (const ok of ['{"a":{"k":1},"b":{"k":1}}', '{"a":"\\"a\\":1","b":"{\\"a\\"}"}', '{"a\\\\":1,"a":2}', '[{"k":1},{"k":2}]', '{"a":["a","a"]}']) {
      expect(parseJsonText(ok, SOURCE)).toEqual(JSON.parse(ok));
    }
  });

  it('"__proto__" is refused wherever it is a key', () => {
    expect(message('{"errors":{"__proto__":5}}')).toMatch(/"__proto__" \(at line 1, column 12\)/);
    expect(parseJsonText('{"note":"__proto__"}', SOURCE)).toEqual({ note: '__proto__' });
  });
});

describe('nesting', () => {
  it(`accepts ${MAX_JSON_DEPTH} levels and refuses one more, and 100,000 levels without a stack overflow`, () => {
    const nested = (n: number) => '['.repeat(n) + ']'.repeat(n);
    expect(parseJsonText(nested(MAX_JSON_DEPTH), SOURCE)).toBeInstanceOf(Array);
    expect(message(nested(MAX_JSON_DEPTH + 1))).toMatch(new RegExp(`nested more than ${MAX_JSON_DEPTH} levels deep \\(at line 1, column ${MAX_JSON_DEPTH + 1}\\)`));
    expect(message(nested(100_000))).toMatch(/nested more than/);
    expect(message('{"a":' + nested(100_000) + '}')).toMatch(/nested more than/);
  });
});

describe('against JSON.parse (the reference)', () => {
  it('syntax errors are reported as not valid JSON', () => {
    expect(message('{"a":')).toMatch(/not valid JSON/);
    expect(message('{"a":1,}')).toMatch(/not valid JSON/);
    expect(message('{"a')).toMatch(/not valid JSON/);
  });

  it('any JSON without duplicate keys, "__proto__" or deep nesting parses to what JSON.parse gives', () => {
    fc.assert(
      fc.property(fc.jsonValue({ maxDepth: 6 }), (value) => {
        const text = JSON.stringify(value, null, 1);
        const problem = findJsonShapeProblem(text);
        if (problem?.kind === 'proto') return; // fc may generate a "__proto__" key
        expect(problem).toBeNull();
        expect(parseJsonText(text, SOURCE)).toEqual(JSON.parse(text));
      }),
      { numRuns: 300, seed: 8 },
    );
  });
});

it('lineAndColumn counts lines and columns from 1', () => {
  expect(lineAndColumn('ab\ncd\nef', 0)).toEqual({ line: 1, column: 1 });
  expect(lineAndColumn('ab\ncd\nef', 4)).toEqual({ line: 2, column: 2 });
  expect(lineAndColumn('ab\ncd\nef', 6)).toEqual({ line: 3, column: 1 });
});
