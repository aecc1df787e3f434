/**
 * The one JSON reader for files a user gives the tool (visit files, subject
 * files, the error blocks inside them). JSON.parse alone silently keeps the
 * last of two equal keys (`"sbp":300,"sbp":130` reads as 130; a second, empty
 * `"visits"` hides every visit) and a file nested thousands of levels deep
 * later overflows the stack of whatever walks it. So the text is first
 * scanned once, without recursion, for
 * - nesting deeper than MAX_JSON_DEPTH (the deepest real file, a subject
 *   file, is 5 levels), and
 * - a key that appears twice in one object, anywhere in the file, and
 * - the key "__proto__", which names nothing in these files and which
 *   JavaScript objects (and so the schema checks) would drop in silence,
 * each reported with its line and column; then JSON.parse reads it (and
 * reports any syntax error). RFC 8259 §4 says names within an object
 * SHOULD be unique and that a parser may report duplicates as an error;
 * this reader does.
 *
 * The scan is linear and allocation-light (strings are skipped with
 * indexOf; only keys are sliced), so it adds little to start-up.
 */
import { InputError, showValue } from '../errors.js';

/** Deepest nesting of objects and arrays accepted. */
export const MAX_JSON_DEPTH = 64;

export interface JsonSource {
  /** The field named in messages, e.g. `input` or `subject file`. */
  field: string;
  /** The file as shown in messages (already quoted), e.g. `"visit.json"`. */
  value: string;
  /** What is accepted, for messages. */
  accepted: string;
  /** Appended to every reason, e.g. `the file was left untouched`. */
  note?: string;
}

/** 1-based line and column (in UTF-16 code units) of an offset. */
export function lineAndColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = text.indexOf('\n'); i !== -1 && i < offset; i = text.indexOf('\n', i + 1)) {
    line++;
    lineStart = i + 1;
  }
  return { line, column: offset - lineStart + 1 };
}

function at(text: string, offset: number): string {
  const { line, column } = lineAndColumn(text, offset);
  return `line ${line}, column ${column}`;
}

export type JsonShapeProblem =
  | { kind: 'depth'; offset: number }
  | { kind: 'duplicate'; key: string; offset: number; firstOffset: number }
  | { kind: 'proto'; offset: number };

/** The end (index of the closing quote) of the string whose opening quote is at `start`; -1 if unterminated. */
function stringEnd(text: string, start: number): number {
  let i = text.indexOf('"', start + 1);
  while (i !== -1) {
    let backslashes = 0;
    for (let j = i - 1; text.charCodeAt(j) === 92; j--) backslashes++;
    if (backslashes % 2 === 0) return i;
    i = text.indexOf('"', i + 1);
  }
  return -1;
}

interface Frame {
  /** Keys of this object and where each first appeared; null for an array. */
  keys: Map<string, number> | null;
  /** In an object: the next string is a key. */
  expectKey: boolean;
}

/**
 * Scan JSON text for nesting beyond `maxDepth` and duplicate keys; the first
 * problem found, or null. Text that is not valid JSON is scanned as far as it
 * makes sense; JSON.parse reports its syntax error afterwards.
 */
export function findJsonShapeProblem(text: string, maxDepth = MAX_JSON_DEPTH): JsonShapeProblem | null {
  const stack: Frame[] = [];
  const n = text.length;
  for (let i = 0; i < n; i++) {
    const c = text.charCodeAt(i);
    if (c === 34 /* " */) {
      const end = stringEnd(text, i);
      if (end === -1) return null;
      const top = stack[stack.length - 1];
      if (top && top.keys && top.expectKey) {
        const raw = text.slice(i + 1, end);
        let key = raw;
        if (raw.includes('\\')) {
          try {
            key = JSON.parse(`"${raw}"`) as string;
          } catch {
            return null; // a bad escape: JSON.parse of the whole text says where
          }
        }
        if (key === '__proto__') return { kind: 'proto', offset: i };
        const first = top.keys.get(key);
        if (first !== undefined) return { kind: 'duplicate', key, offset: i, firstOffset: first };
        top.keys.set(key, i);
        top.expectKey = false;
      }
      i = end;
    } else if (c === 123 /* { */ || c === 91 /* [ */) {
      if (stack.length >= maxDepth) return { kind: 'depth', offset: i };
      stack.push({ keys: c === 123 ? new Map() : null, expectKey: c === 123 });
    } else if (c === 125 /* } */ || c === 93 /* ] */) {
      stack.pop();
    } else if (c === 44 /* , */) {
      const top = stack[stack.length - 1];
      if (top && top.keys) top.expectKey = true;
    }
  }
  return null;
}

/**
 * Parse JSON text from a user's file: duplicate keys and excessive nesting
 * are refused like syntax errors, with an InputError naming the file, the key
 * and its position.
 */
export function parseJsonText(text: string, source: JsonSource): unknown {
  const refuse = (reason: string) =>
    new InputError({ field: source.field, value: source.value, reason: source.note ? `${reason}; ${source.note}` : reason, accepted: source.accepted });
  const shape = findJsonShapeProblem(text);
  if (shape?.kind === 'depth') throw refuse(`nested more than ${MAX_JSON_DEPTH} levels deep (at ${at(text, shape.offset)})`);
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (err) {
    throw refuse(`not valid JSON (${(err as Error).message})`);
  }
  if (shape?.kind === 'proto') {
    throw refuse(`the key "__proto__" (at ${at(text, shape.offset)}) names nothing in any elastimate file and would be dropped in silence`);
  }
  if (shape?.kind === 'duplicate') {
    throw refuse(`the key ${showValue(shape.key)} appears twice in one object (at ${at(text, shape.offset)}; first at ${at(text, shape.firstOffset)}), so which one counts is not clear`);
  }
  return data;
}
