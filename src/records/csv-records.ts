/**
 * Streamed delimited text cut into records for `elastimate batch`
 * (docs/batch.md), so that no record is ever lost in silence.
 *
 * RFC 4180 lets a quoted cell hold line breaks (notes may), and counting
 * quotes tells inside from outside. A single stray double quote would then
 * swallow every later line into one cell. So a quote that opens a cell is
 * trusted to carry its record across lines only when the record comes out
 * well formed (the closing quote followed by a separator or a line end) and
 * with exactly as many cells as the header; otherwise the record is reported
 * at the line where the quote opened, its line kept as plain text, and
 * reading resumes on the next line. Lines without a double quote (nearly all)
 * are passed on untouched; only records that hold a quote are scanned here.
 *
 * The separator is detected from the header: a comma, a semicolon or a tab,
 * whichever occurs most often outside quotes (a comma on a tie).
 */
import { dsvFormat } from 'd3-dsv';

/** A quoted cell longer than this (in characters) is refused: far beyond any note, and it bounds what is held in memory. */
export const MAX_QUOTED_CELL = 1 << 20;

export type Separator = ',' | ';' | '\t';

export interface Dialect {
  separator: Separator;
  /** Numbers may use a decimal comma (semicolon files, as European spreadsheets write them). */
  decimalComma: boolean;
}

/** A record whose quotes do not pair up, reported at the line where the quote opened. */
export interface BadRecord {
  /** File line (1 = the first line) where the blamed quote opened. */
  line: number;
  /** Cell (1 = the first) the blamed quote opened. */
  column: number;
  /** The line's cells: those before the quote as read, the rest split at the separator with quotes as plain characters. */
  cells: string[];
  /** Why the quote could not be trusted, in words. */
  reason: string;
  /** The text from the quote to the end of its line. */
  text: string;
}

/** Complete records as text (to be parsed by d3-dsv with the dialect's separator), or one bad record. */
export type Segment = { text: string; bad?: undefined } | { bad: BadRecord };

const QUOTE = 34;
const LF = 10;
const CR = 13;

type Read = { kind: 'good'; next: number } | { kind: 'incomplete' } | { kind: 'bad'; next: number; blamed: Blame; reason: string };
interface Blame {
  cell: number;
  at: number;
}
const INCOMPLETE: Read = { kind: 'incomplete' };

function hasBreak(s: string, from: number, to: number): boolean {
  const lf = s.indexOf('\n', from);
  if (lf !== -1 && lf < to) return true;
  const cr = s.indexOf('\r', from);
  return cr !== -1 && cr < to;
}

/** The end of the line holding `at` (the position of its line break, or the text's end), and where the next line starts; undefined while it may still change. */
function lineEnd(s: string, at: number, final: boolean): { end: number; next: number } | undefined {
  let end = at;
  const n = s.length;
  while (end < n) {
    const c = s.charCodeAt(end);
    if (c === LF || c === CR) break;
    end++;
  }
  if (end >= n) return final ? { end: n, next: n } : undefined;
  if (s.charCodeAt(end) === CR) {
    if (end + 1 >= n && !final) return undefined;
    return { end, next: s.charCodeAt(end + 1) === LF ? end + 2 : end + 1 };
  }
  return { end, next: end + 1 };
}

/**
 * Read the record that starts at `start` (RFC 4180, with `sep` as the
 * separator): where the next one starts, or that its quotes do not pair up
 * (the quote to blame: the first quoted cell that spans lines, else the cell
 * at fault), or that the text ends before this can be told (`final` false).
 * `width` is the header's cell count (-1 while reading the header itself).
 */
function readRecord(s: string, start: number, sep: number, width: number, final: boolean): Read {
  const n = s.length;
  let i = start;
  let cells = 0;
  let spanning: Blame | undefined;
  const bad = (blamed: Blame, reason: string): Read => {
    const line = lineEnd(s, blamed.at, final);
    return line ? { kind: 'bad', next: line.next, blamed, reason } : INCOMPLETE;
  };
  for (;;) {
    if (i < n && s.charCodeAt(i) === QUOTE) {
      const open = i;
      let j = i + 1;
      let close: number;
      for (;;) {
        const q = s.indexOf('"', j);
        if (q === -1 || q - open > MAX_QUOTED_CELL) {
          if (q === -1 && !final && n - open <= MAX_QUOTED_CELL) return INCOMPLETE;
          const reason = q === -1 ? 'the quoted cell is never closed' : `the quoted cell runs on for more than ${MAX_QUOTED_CELL} characters`;
          return bad(spanning ?? { cell: cells, at: open }, reason);
        }
        if (q + 1 < n && s.charCodeAt(q + 1) === QUOTE) {
          j = q + 2; // a doubled quote inside the cell
          continue;
        }
        if (q + 1 >= n && !final) return INCOMPLETE; // a doubled quote may follow
        close = q;
        break;
      }
      if (spanning === undefined && hasBreak(s, open + 1, close)) spanning = { cell: cells, at: open };
      i = close + 1;
      cells++;
      const c = i < n ? s.charCodeAt(i) : -1;
      if (c === sep) {
        i++;
        continue;
      }
      if (c !== -1 && c !== LF && c !== CR) {
        return bad(spanning ?? { cell: cells - 1, at: open }, 'text follows the closing quote in the same cell');
      }
    } else {
      let c = i < n ? s.charCodeAt(i) : -1;
      while (c !== -1 && c !== sep && c !== LF && c !== CR) c = ++i < n ? s.charCodeAt(i) : -1;
      cells++;
      if (c === sep) {
        i++;
        continue;
      }
    }
    // The record ends at i: a line break or the end of the text.
    let next: number;
    if (i >= n) {
      if (!final) return INCOMPLETE;
      next = n;
    } else if (s.charCodeAt(i) === CR) {
      if (i + 1 >= n && !final) return INCOMPLETE;
      next = s.charCodeAt(i + 1) === LF ? i + 2 : i + 1;
    } else next = i + 1;
    if (spanning !== undefined && width >= 0 && cells !== width) {
      return bad(spanning, `the record it opens would have ${cells} cells where the header has ${width}`);
    }
    return { kind: 'good', next };
  }
}

/** Line breaks in s[from, to): LF, CRLF (once) or a lone CR. */
function countBreaks(s: string, from: number, to: number): number {
  let count = 0;
  for (let i = s.indexOf('\n', from); i !== -1 && i < to; i = s.indexOf('\n', i + 1)) count++;
  for (let i = s.indexOf('\r', from); i !== -1 && i < to; i = s.indexOf('\r', i + 1)) if (s.charCodeAt(i + 1) !== LF) count++;
  return count;
}

/** The start of the line holding position `at`, not before `from`. */
function lineStart(s: string, at: number, from: number): number {
  return Math.max(s.lastIndexOf('\n', at - 1), s.lastIndexOf('\r', at - 1), from - 1) + 1;
}

/** The separator of a header record: the most frequent of comma, semicolon and tab outside quotes (a comma on a tie). */
export function detectDialect(header: string): Dialect {
  const counts = { ',': 0, ';': 0, '\t': 0 };
  let inQuotes = false;
  for (let i = 0; i < header.length; i++) {
    const c = header[i]!;
    if (c === '"') inQuotes = !inQuotes;
    else if (!inQuotes && (c === ',' || c === ';' || c === '\t')) counts[c]++;
  }
  let separator: Separator = ',';
  if (counts[';'] > counts[separator]) separator = ';';
  if (counts['\t'] > counts[separator]) separator = '\t';
  return { separator, decimalComma: separator === ';' };
}

/**
 * Cuts streamed text into segments: runs of complete, well-formed records,
 * and the records whose quotes do not pair up. Memory holds one chunk and the
 * unfinished record (a quoted cell at most MAX_QUOTED_CELL long).
 */
export class RecordSplitter {
  /** Known once the header record has been read. */
  dialect: Dialect | undefined;
  private width = -1;
  private sep = 44;
  private pending = '';
  private started = false;
  /** File line at the start of `pending`. */
  private line = 1;

  /** Feed text; returns the segments complete so far. */
  push(text: string): Segment[] {
    return this.cut(text, false);
  }

  /** The rest, at the end of the input. */
  end(): Segment[] {
    return this.cut('', true);
  }

  private cut(text: string, final: boolean): Segment[] {
    let s = this.pending + text;
    if (!this.started && s.length > 0) {
      this.started = true;
      if (s.charCodeAt(0) === 0xfeff) s = s.slice(1); // byte-order mark
    }
    const out: Segment[] = [];
    let pos = 0; // where unread text starts
    let from = 0; // start of the good text not yet given out
    let counted = 0; // line breaks are counted up to here
    const give = (to: number) => {
      if (to > from) out.push({ text: s.slice(from, to) });
    };
    if (this.width < 0) {
      const header = this.header(s, final);
      if (header === undefined) {
        this.pending = s;
        return out;
      }
      pos = header;
    }
    for (;;) {
      const q = s.indexOf('"', pos);
      if (q === -1) break;
      const start = lineStart(s, q, pos);
      const read = readRecord(s, start, this.sep, this.width, final);
      if (read.kind === 'incomplete') {
        give(start);
        this.line += countBreaks(s, counted, start);
        this.pending = s.slice(start);
        return out;
      }
      if (read.kind === 'bad') {
        give(start);
        this.line += countBreaks(s, counted, start);
        counted = start;
        out.push({ bad: this.badRecord(s, start, read.blamed, read.reason, final, this.line) });
        from = read.next;
      }
      pos = read.next;
    }
    // No quote from pos on: cut after the last line break (all of it at the end of the input).
    let cutAt = s.length;
    if (!final) {
      cutAt = Math.max(s.lastIndexOf('\n'), s.lastIndexOf('\r')) + 1;
      if (cutAt === s.length && s.charCodeAt(cutAt - 1) === CR) cutAt = lineStart(s, cutAt - 1, 0); // a CR that may be half of CRLF
      if (cutAt < pos) cutAt = pos;
    }
    give(cutAt);
    this.line += countBreaks(s, counted, cutAt);
    this.pending = s.slice(cutAt);
    return out;
  }

  /** Read the header record (skipping empty lines) and the dialect; where the data start, or undefined until it is complete. */
  private header(s: string, final: boolean): number | undefined {
    let start = 0;
    while (start < s.length && (s.charCodeAt(start) === LF || s.charCodeAt(start) === CR)) start++;
    if (start >= s.length && !final) return undefined;
    // The dialect from the header record: read up to its first line break outside quotes.
    let end = start;
    let inQuotes = false;
    for (; end < s.length; end++) {
      const c = s.charCodeAt(end);
      if (c === QUOTE) inQuotes = !inQuotes;
      else if (!inQuotes && (c === LF || c === CR)) break;
    }
    if (end >= s.length && !final && s.length - start <= MAX_QUOTED_CELL) return undefined;
    this.dialect = detectDialect(s.slice(start, end));
    this.sep = this.dialect.separator.charCodeAt(0);
    const read = readRecord(s, start, this.sep, -1, final);
    if (read.kind === 'incomplete') return undefined;
    if (read.kind === 'bad') {
      const bad = this.badRecord(s, start, read.blamed, read.reason, final, this.line + countBreaks(s, 0, start));
      throw new HeaderQuoteError(bad);
    }
    this.width = dsvFormat(this.dialect.separator).parseRows(s.slice(start, read.next))[0]?.length ?? 0;
    return read.next;
  }

  /** The bad record that starts at `start`, on file line `line`. */
  private badRecord(s: string, start: number, blamed: Blame, reason: string, final: boolean, line: number): BadRecord {
    const end = lineEnd(s, blamed.at, final)!.end;
    const sepChar = this.dialect?.separator ?? ',';
    // The cells before the blamed one are on its line and well formed; the separator after the last of them leaves one empty cell, dropped.
    const before = blamed.at > start ? (dsvFormat(sepChar).parseRows(s.slice(start, blamed.at))[0] ?? []).slice(0, -1) : [];
    const rest = s.slice(blamed.at, end);
    return { line, column: blamed.cell + 1, cells: [...before, ...rest.split(sepChar)], reason, text: rest };
  }
}

/** A header whose quotes do not pair up: the file is refused. */
export class HeaderQuoteError extends Error {
  constructor(readonly bad: BadRecord) {
    super(`line ${bad.line}: ${bad.reason}`);
  }
}
