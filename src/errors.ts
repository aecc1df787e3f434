/**
 * The one error type for bad input. Every message names the field, the value
 * as given and what is accepted; the CLI prints it without a stack trace and
 * exits with code 2.
 */
import { sanitizeText } from './text/sanitize.js';

export class InputError extends Error {
  readonly field: string;
  readonly value: string;
  readonly accepted: string;
  readonly problems: readonly InputProblem[];

  constructor(problems: InputProblem | readonly InputProblem[]) {
    const list = Array.isArray(problems) ? problems : [problems as InputProblem];
    super(list.map(describeProblem).join('\n'));
    this.name = 'InputError';
    this.problems = list;
    const first = list[0] ?? { field: 'input', value: '', accepted: '' };
    this.field = first.field;
    this.value = first.value;
    this.accepted = first.accepted;
  }
}

export interface InputProblem {
  /** The field as the user knows it, e.g. `sbp` or `visit file`. */
  field: string;
  /** The value as given, quoted for display; '' when the value is missing. */
  value: string;
  /** What would have been accepted. */
  accepted: string;
  /** Optional short reason placed before the accepted part. */
  reason?: string;
}

export function describeProblem(p: InputProblem): string {
  const value = p.value.length > MAX_VALUE_TEXT ? clipText(p.value) : p.value;
  const shown = value === '' ? 'missing' : `got ${value}`;
  const why = p.reason ? `${p.reason}; ` : '';
  // One line on a screen or in an error cell: user text in it (a key, a file name) is clipped and
  // its control characters made visible (the one sanitiser, src/text/sanitize.ts).
  return sanitizeText(`${clipText(p.field)}: ${shown}; ${why}accepted: ${p.accepted}`);
}

/** At most this many characters of a value are echoed in a message; the rest is counted. */
export const SHOWN_CHARACTERS = 80;
/** A value already quoted by showValue is at most this long (80 characters, each escaped as \uXXXX, and the count). */
const MAX_VALUE_TEXT = SHOWN_CHARACTERS * 6 + 40;

/** The first SHOWN_CHARACTERS characters (never half a surrogate pair); the whole text when shorter. */
function head(text: string): string {
  let end = SHOWN_CHARACTERS;
  const last = text.charCodeAt(end - 1);
  if (last >= 0xd800 && last <= 0xdbff) end -= 1;
  return text.slice(0, end);
}

/** Text for a message: whole when short, else its head, an ellipsis and how long it was. */
export function clipText(text: string, quote: (t: string) => string = (t) => t): string {
  if (text.length <= SHOWN_CHARACTERS) return quote(text);
  return `${quote(head(text))}… (${text.length.toLocaleString('en-US')} characters)`;
}

/**
 * Render any value for an error message without ever printing "undefined":
 * strings quoted, at most SHOWN_CHARACTERS characters of a long value with its
 * length (a 1 MB value never becomes a 1 MB message), control characters
 * escaped or made visible.
 */
export function showValue(v: unknown): string {
  if (v === undefined || v === null) return '';
  if (typeof v === 'string') return sanitizeText(clipText(v, (t) => JSON.stringify(t)));
  // A non-finite number never reaches the user as NaN or Infinity, not even in an error message
  // (a JSON file may hold 1e400, which parses as Infinity): it is described in words.
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : Number.isNaN(v) ? 'not a number' : 'a number too large to represent';
  let text: string;
  try {
    text = JSON.stringify(v) ?? String(v);
  } catch {
    text = String(v);
  }
  return sanitizeText(clipText(text, closeOpenString));
}

/**
 * JSON text cut short, with a string it was cut inside closed again (a dangling escape dropped),
 * so the quotes of a clipped value still pair and the rest of the message reads as written.
 */
export function closeOpenString(json: string): string {
  let inString = false;
  let escaped = false;
  for (let i = 0; i < json.length; i++) {
    const c = json.charCodeAt(i);
    if (escaped) escaped = false;
    else if (c === 92 /* \ */) escaped = inString;
    else if (c === 34 /* " */) inString = !inString;
  }
  if (!inString) return json;
  return `${escaped ? json.slice(0, -1) : json}"`;
}

/**
 * A file the command needs could not be read or written for a reason of the
 * system, not of the input: a full disk, permission denied, a read-only file
 * system, an immutable file. The CLI prints its one-line message and exits
 * with EXIT_FILE_FAULT (docs/files.md); the file it names is unchanged and no
 * temporary file is left behind.
 */
export const EXIT_FILE_FAULT = 3;

export class FileFault extends Error {
  /** The file as the user named it (or as the tool derived it, e.g. a backup). */
  readonly path: string;
  /** The system's error code, e.g. ENOSPC; '' when the refusal is the tool's own (a read-only mode). */
  readonly code: string;

  constructor(path: string, doing: string, cause: string, code = '', outcome = 'nothing was changed') {
    // The path whole (a user needs all of it), quoted, with control and bidirectional characters made visible.
    super(`${sanitizeText(JSON.stringify(path))}: ${doing}: ${cause}${code ? ` (${code})` : ''}; ${outcome}`);
    this.name = 'FileFault';
    this.path = path;
    this.code = code;
  }
}

/** The cause of a file-system error in plain words. */
export function plainCause(code: string | undefined): string {
  switch (code) {
    case 'ENOSPC':
      return 'the disk is full';
    case 'EDQUOT':
      return 'the disk quota is used up';
    case 'EACCES':
      return 'permission denied';
    case 'EPERM':
      return 'the system does not allow the change; the file or its folder may be marked immutable';
    case 'EROFS':
      return 'the file system is read-only';
    case 'EIO':
      return 'the disk reported an input/output error';
    case 'ENOENT':
      return 'the file or its folder does not exist';
    case 'ENOTDIR':
      return 'a part of the path is not a folder';
    case 'EISDIR':
      return 'it is a folder';
    case 'ENAMETOOLONG':
      return 'the file name is too long';
    case 'EMFILE':
    case 'ENFILE':
      return 'too many files are open';
    case 'EBUSY':
      return 'the file is busy';
    default:
      return 'the system refused';
  }
}
