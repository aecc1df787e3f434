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
/** A record that runs on for more than this without a line break refuses the file: no spreadsheet row is that long. */
export const MAX_RECORD = 4 * MAX_QUOTED_CELL;

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

interface Blame {
  cell: number;
  at: number;
}
/** readRecord's answer when the text ends before the record can be told; a bad record is the position after its line, negated, less one. */
const INCOMPLETE = -1;
/** Why readRecord last answered "bad": the quote to blame and the reason (one record at a time, so no object per record). */
let lastBad: { blamed: Blame; reason: string } = { blamed: { cell: 0, at: 0 }, reason: '' };

function hasBreak(s: string, from: number, to: number): boolean {
  for (let i = from; i < to; i++) {
    const c = s.charCodeAt(i);
    if (c === LF || c === CR) return true;
  }
  return false;
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

/** readRecord's answer for a bad record, noting why in lastBad; INCOMPLETE while the end of the quote's line is unknown. */
function badAnswer(s: string, blamed: Blame, reason: string, final: boolean): number {
  const line = lineEnd(s, blamed.at, final);
  if (!line) return INCOMPLETE;
  lastBad = { blamed, reason };
  return -2 - line.next;
}

/**
 * Read the record that starts at `start` (RFC 4180, with `sep` as the
 * separator). Answers where the next record starts (≥ 0); or, for a record
 * whose quotes do not pair up, -2 - where reading resumes (the line after the
 * blamed quote: the first quoted cell that spans lines, else the cell at
 * fault), the reason in lastBad; or INCOMPLETE when the text ends before
 * this can be told (`final` false). `width` is the header's cell count (-1
 * while reading the header itself). Numbers, not objects: this runs for every
 * record that holds a quote.
 */
function readRecord(s: string, start: number, sep: number, width: number, final: boolean): number {
  const n = s.length;
  let i = start;
  let cells = 0;
  let spanning: Blame | undefined;
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
          return badAnswer(s, spanning ?? { cell: cells, at: open }, reason, final);
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
        return badAnswer(s, spanning ?? { cell: cells - 1, at: open }, 'text follows the closing quote in the same cell', final);
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
      return badAnswer(s, spanning, `the record it opens would have ${cells} cells where the header has ${width}`, final);
    }
    return next;
  }
}

/**
 * readRecord for the usual record with a quote: on one line, every quote that
 * opens a cell closed on that line and followed by the separator or the line
 * end. Jumps from quote to quote instead of reading every character, and
 * answers -3 ("ask readRecord") for anything else. `lineEnd` is where the
 * line starting at `start` ends (its first LF or CR, or the text's length).
 */
function quickRecord(s: string, start: number, sep: number, final: boolean, end: number): number {
  const n = s.length;
  if (end >= n) return -3; // the line may go on, or ends the input: readRecord decides
  let q = s.indexOf('"', start);
  while (q !== -1 && q < end) {
    if (q === start || s.charCodeAt(q - 1) === sep) {
      // A quote opens this cell: it must close before the line end and be followed by the separator or the line end.
      let j = q + 1;
      let close = -1;
      for (;;) {
        const c = s.indexOf('"', j);
        if (c === -1 || c >= end) break;
        if (s.charCodeAt(c + 1) === QUOTE) {
          j = c + 2;
          continue;
        }
        close = c;
        break;
      }
      if (close === -1) return -3;
      const after = close + 1;
      if (after !== end && s.charCodeAt(after) !== sep) return -3;
      q = s.indexOf('"', after);
    } else q = s.indexOf('"', q + 1); // a quote inside an unquoted cell is a plain character
  }
  if (s.charCodeAt(end) === CR) {
    if (end + 1 >= n && !final) return -3;
    return s.charCodeAt(end + 1) === LF ? end + 2 : end + 1;
  }
  return end + 1;
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
  let i = at;
  while (i > from) {
    const c = s.charCodeAt(i - 1);
    if (c === LF || c === CR) break;
    i--;
  }
  return i;
}

/** Where the text from `at` on no longer starts with line breaks (empty lines skipped). */
function afterLineBreaks(s: string, at: number): number {
  let i = at;
  while (i < s.length && (s.charCodeAt(i) === LF || s.charCodeAt(i) === CR)) i++;
  return i;
}

/** A separator line is shorter than this (`sep=;` with a few spaces). */
const SEPARATOR_LINE_MAX = 32;

/**
 * The dialect a separator line names: `sep=,`, `sep=;` or `sep=` and a tab,
 * alone on the first line (any case, spaces around allowed), as some
 * spreadsheet exports begin so that a spreadsheet opens the file with the
 * right separator. Undefined for any other line.
 */
export function separatorLine(line: string): Dialect | undefined {
  if (line.length > SEPARATOR_LINE_MAX) return undefined;
  const m = /^\s*sep=(.)[ ]*$/i.exec(line);
  if (!m) return undefined;
  const separator = m[1]!;
  if (separator !== ',' && separator !== ';' && separator !== '\t') throw new SeparatorLineError(line.trim());
  return { separator, decimalComma: separator === ';' };
}

/** A separator line naming a separator other than a comma, a semicolon or a tab: the file is refused. */
export class SeparatorLineError extends Error {
  constructor(readonly text: string) {
    super(`line 1: the separator line ${JSON.stringify(text)} names a separator that is not a comma, a semicolon or a tab`);
  }
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
    const out = this.segments(text, final);
    if (this.pending.length > MAX_RECORD) throw new RecordTooLongError(this.line);
    return out;
  }

  private segments(text: string, final: boolean): Segment[] {
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
      // The header is a piece of its own, so that it is known (and can be passed on) before any row is
      // computed; a separator line before it is no record.
      from = header.start;
      pos = header.next;
      give(pos);
      this.line += countBreaks(s, 0, pos);
      counted = from = pos;
    }
    let crAt = -2; // the first CR at or after pos (-1: none), found when needed
    for (;;) {
      const q = s.indexOf('"', pos);
      if (q === -1) break;
      if (crAt !== -1 && crAt < pos) crAt = s.indexOf('\r', pos);
      // The record holding the quote starts on the quote's line (the lines before it hold no quote).
      const plain = (crAt === -1 || crAt > q) && (pos === 0 || s.charCodeAt(pos - 1) === LF);
      const start = plain ? Math.max(pos, s.lastIndexOf('\n', q - 1) + 1) : lineStart(s, q, pos);
      let end = s.indexOf('\n', q);
      if (end === -1) end = s.length;
      if (crAt !== -1) {
        const cr = crAt >= q ? crAt : s.indexOf('\r', q);
        if (cr !== -1 && cr < end) end = cr;
      }
      let next = quickRecord(s, start, this.sep, final, end);
      if (next === -3) next = readRecord(s, start, this.sep, this.width, final);
      if (next === INCOMPLETE) {
        give(start);
        this.line += countBreaks(s, counted, start);
        this.pending = s.slice(start);
        return out;
      }
      if (next < 0) {
        next = -2 - next;
        give(start);
        this.line += countBreaks(s, counted, start);
        counted = start;
        out.push({ bad: this.badRecord(s, start, lastBad.blamed, lastBad.reason, final, this.line) });
        from = next;
      }
      pos = next;
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

  /**
   * Read the header record (skipping empty lines, and a separator line before
   * it) and the dialect; where the header starts and where the data start, or
   * undefined until it is complete.
   */
  private header(s: string, final: boolean): { start: number; next: number } | undefined {
    let start = afterLineBreaks(s, 0);
    if (start >= s.length && !final) return undefined;
    // `sep=;` on a line of its own, as some spreadsheet exports begin, names the separator.
    let given: Dialect | undefined;
    const line = lineEnd(s, start, final);
    if (line === undefined && s.length - start < SEPARATOR_LINE_MAX) return undefined; // it may yet be one
    const named = line ? separatorLine(s.slice(start, line.end)) : undefined;
    if (named) {
      given = named;
      start = afterLineBreaks(s, line!.next);
      if (start >= s.length && !final) return undefined;
    }
    // The dialect from the header record: read up to its first line break outside quotes.
    let end = start;
    let inQuotes = false;
    for (; end < s.length; end++) {
      const c = s.charCodeAt(end);
      if (c === QUOTE) inQuotes = !inQuotes;
      else if (!inQuotes && (c === LF || c === CR)) break;
    }
    if (end >= s.length && !final && s.length - start <= MAX_QUOTED_CELL) return undefined;
    this.dialect = given ?? detectDialect(s.slice(start, end));
    this.sep = this.dialect.separator.charCodeAt(0);
    const next = readRecord(s, start, this.sep, -1, final);
    if (next === INCOMPLETE) return undefined;
    if (next < 0) throw new HeaderQuoteError(this.badRecord(s, start, lastBad.blamed, lastBad.reason, final, this.line + countBreaks(s, 0, start)));
    this.width = dsvFormat(this.dialect.separator).parseRows(s.slice(start, next))[0]?.length ?? 0;
    return { start, next };
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

/** A record longer than MAX_RECORD without a line break, from file line `line`: the file is refused. */
export class RecordTooLongError extends Error {
  constructor(readonly line: number) {
    super(`line ${line}: a record longer than ${MAX_RECORD} characters`);
  }
}

/** A header whose quotes do not pair up: the file is refused. */
export class HeaderQuoteError extends Error {
  constructor(readonly bad: BadRecord) {
    super(`line ${bad.line}: ${bad.reason}`);
  }
}
