/**
 * The one way the tool reads a file it was given: visit files, subject files
 * and batch inputs. Each must be a regular file (a symlink to one is fine)
 * no larger than its kind's limit; `-` reads standard input (a pipe or a
 * redirected file) with the same limit, where the kind allows it. Anything
 * else is refused at once with an InputError (exit 2) naming the file and
 * what it is:
 * - a folder, a device (`/dev/zero`, a terminal), a socket: refused after
 *   fstat, before a byte is read;
 * - a named pipe (FIFO): opened with O_NONBLOCK, so a FIFO with no writer
 *   never blocks the open, then refused by fstat;
 * - a file over the limit: refused by its size before reading, and again if
 *   it grows past the limit while being read; standard input is counted as
 *   it arrives and refused as soon as it passes the limit.
 * The limits (documented in docs/visit-file.md, docs/subject-file.md and
 * docs/batch.md) are far above any real file of the kind and far below what
 * would exhaust memory or time.
 */
import { closeSync, constants, fstatSync, openSync, readSync, type Stats } from 'node:fs';
import { createReadStream } from 'node:fs';
import type { Readable } from 'node:stream';
import { StringDecoder } from 'node:string_decoder';
import { InputError, showValue } from '../errors.js';
import { fileKind } from './safe-write.js';

export interface InputKind {
  /** The field named in messages, e.g. `input` or `subject file`. */
  field: string;
  /** What the kind is, in words, e.g. `a visit file`. */
  noun: string;
  /** The largest accepted size in bytes. */
  limit: number;
  /** What is accepted, for messages. */
  accepted: string;
  /** Whether `-` means standard input. */
  stdin: boolean;
}

const MiB = 1024 * 1024;

/** A visit file: one visit's measurements, a few hundred bytes; 1 MiB is thousands of times that. */
export const VISIT_FILE: InputKind = {
  field: 'input',
  noun: 'a visit file',
  limit: 1 * MiB,
  accepted: 'a readable visit file in JSON (see docs/visit-file.md): a regular file of at most 1 MiB, or - for standard input',
  stdin: true,
};

/** A subject file: about 1 KiB per visit, so 64 MiB holds tens of thousands of visits. */
export const SUBJECT_FILE: InputKind = {
  field: 'subject file',
  noun: 'a subject file',
  limit: 64 * MiB,
  accepted: 'a readable subject file (see docs/subject-file.md): a regular file of at most 64 MiB',
  stdin: false,
};

/** A batch input: a few hundred bytes per row, so 1 GiB holds millions of rows; it is streamed, never held whole. */
export const BATCH_FILE: InputKind = {
  field: 'batch file',
  noun: 'a batch file',
  limit: 1024 * MiB,
  accepted: 'a readable CSV file with a header row (docs/batch.md): a regular file of at most 1 GiB, or - for standard input',
  stdin: true,
};

/** `1 MiB`, `2.5 GiB`, `640 bytes`. */
export function formatSize(bytes: number): string {
  if (bytes < 1024) return `${bytes} bytes`;
  const units = ['KiB', 'MiB', 'GiB', 'TiB'];
  let v = bytes / 1024;
  let i = 0;
  while (v >= 1024 && i < units.length - 1) {
    v /= 1024;
    i++;
  }
  return `${Number(v.toFixed(v < 10 ? 1 : 0))} ${units[i]}`;
}

/** An input path as shown in messages: quoted, or `standard input (-)`. */
export function shownPath(path: string): string {
  return path === '-' ? 'standard input (-)' : showValue(path);
}

function problem(kind: InputKind, path: string, reason: string): InputError {
  return new InputError({ field: kind.field, value: kind.stdin ? shownPath(path) : showValue(path), reason, accepted: kind.accepted });
}

function tooLarge(kind: InputKind, path: string, size: number | null): InputError {
  const seen = size === null ? `more than ${formatSize(kind.limit)}` : formatSize(size);
  return problem(kind, path, `too large (${seen}; the limit for ${kind.noun} is ${formatSize(kind.limit)})`);
}

/** Why a non-regular file is refused, in words (its kind from safe-write's fileKind); null for a regular file. */
function notRegular(stat: Stats): string | null {
  const kind = fileKind(stat);
  if (kind === null) return null;
  if (kind === 'a folder') return 'is a folder';
  if (kind === 'not a regular file') return 'is not a regular file';
  return `is ${kind}, not a regular file`;
}

function openProblem(kind: InputKind, path: string, err: unknown): InputError {
  const code = (err as NodeJS.ErrnoException).code;
  const reason =
    code === 'ENOENT' ? 'file not found'
    : code === 'EACCES' || code === 'EPERM' ? 'cannot be read: permission denied'
    : code === 'EISDIR' ? 'is a folder'
    : code === 'ENXIO' ? 'is a socket or a device with nothing behind it, not a regular file'
    : code === 'ELOOP' ? 'a loop of symbolic links'
    : code === 'ENOTDIR' ? 'a part of the path is not a folder'
    : code === 'ENAMETOOLONG' ? 'the path is too long'
    : `cannot be read (${code ?? (err as Error).message})`;
  return problem(kind, path, reason);
}

function emptyPath(kind: InputKind): InputError {
  return new InputError({ field: kind.field, value: '""', reason: 'an empty path', accepted: kind.accepted });
}

/**
 * Open `path` for reading and check it: a regular file within the limit.
 * Returns the descriptor and its size; throws InputError otherwise (the
 * descriptor is closed). A missing file throws with code ENOENT kept on
 * `missing` so a caller may treat it as "not created yet".
 */
function openChecked(path: string, kind: InputKind): { fd: number; size: number } {
  if (path === '') throw emptyPath(kind);
  let fd: number;
  try {
    // O_NONBLOCK: opening a FIFO that has no writer returns at once instead of waiting for one.
    fd = openSync(path, constants.O_RDONLY | constants.O_NONBLOCK | constants.O_NOCTTY);
  } catch (err) {
    const error = openProblem(kind, path, err);
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') (error as InputError & { missing?: boolean }).missing = true;
    throw error;
  }
  try {
    const stat = fstatSync(fd);
    const what = notRegular(stat);
    if (what) throw problem(kind, path, what);
    if (stat.size > kind.limit) throw tooLarge(kind, path, stat.size);
    return { fd, size: stat.size };
  } catch (err) {
    closeSync(fd);
    throw err;
  }
}

/** Standard input, checked: a pipe, a socket or a redirected regular file; never a terminal or a device. */
function checkedStdin(kind: InputKind): Stats {
  let stat: Stats;
  try {
    stat = fstatSync(0);
  } catch (err) {
    throw openProblem(kind, '-', err);
  }
  if (stat.isCharacterDevice() || stat.isBlockDevice()) {
    throw problem(kind, '-', process.stdin.isTTY ? 'standard input is a terminal, not a file or a pipe' : 'standard input is a device, not a file or a pipe');
  }
  if (stat.isDirectory()) throw problem(kind, '-', 'standard input is a folder');
  if (stat.isFile() && stat.size > kind.limit) throw tooLarge(kind, '-', stat.size);
  return stat;
}

/** Sleep without spinning (for a non-blocking standard input that has no data yet). */
function pause(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

/**
 * Read an open descriptor to its end into one buffer (sized from the file's
 * size when known, doubled as needed), refusing more than the limit.
 */
function readAll(fd: number, kind: InputKind, path: string, sizeHint: number): Buffer {
  let buf = Buffer.allocUnsafe(Math.min(Math.max(sizeHint + 1, 64 * 1024), kind.limit + 1));
  let length = 0;
  for (;;) {
    if (length === buf.length) {
      const next = Buffer.allocUnsafe(Math.min(buf.length * 2, kind.limit + 1));
      buf.copy(next, 0, 0, length);
      buf = next;
    }
    let n: number;
    try {
      n = readSync(fd, buf, length, buf.length - length, null);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'EAGAIN') {
        pause(5);
        continue;
      }
      throw openProblem(kind, path, err);
    }
    if (n === 0) break;
    length += n;
    if (length > kind.limit) throw tooLarge(kind, path, null);
  }
  return buf.subarray(0, length);
}

/**
 * The whole content of an input file (or of standard input for `-`), checked
 * as the module doc says. Throws InputError naming the kind's field.
 */
export function readInputFile(path: string, kind: InputKind): Buffer {
  if (path === '-' && kind.stdin) {
    const stat = checkedStdin(kind);
    return readAll(0, kind, path, stat.isFile() ? stat.size : 0);
  }
  const { fd, size } = openChecked(path, kind);
  try {
    return readAll(fd, kind, path, size);
  } finally {
    closeSync(fd);
  }
}

/** Like readInputFile, but null when the file does not exist (a subject file not created yet). */
export function readInputFileIfExists(path: string, kind: InputKind): Buffer | null {
  try {
    return readInputFile(path, kind);
  } catch (err) {
    if ((err as { missing?: boolean }).missing) return null;
    throw err;
  }
}

export interface InputStream {
  /** The text in chunks, decoded as UTF-8; iterating throws InputError once the limit is passed. */
  chunks: AsyncIterable<string>;
  /** The size in bytes when known in advance (a regular file), else null. */
  size: number | null;
  /** Stop reading and release the file. */
  close(): void;
}

/**
 * An input file (or standard input for `-`) as a stream of text chunks, for
 * inputs too large to hold whole (batch). Checked as readInputFile does
 * before the first byte; the byte count is checked as chunks arrive.
 */
export function openInputStream(path: string, kind: InputKind, chunkBytes: number): InputStream {
  let stream: Readable;
  let size: number | null;
  if (path === '-' && kind.stdin) {
    const stat = checkedStdin(kind);
    size = stat.isFile() ? stat.size : null;
    stream = process.stdin;
  } else {
    const opened = openChecked(path, kind);
    size = opened.size;
    stream = createReadStream('', { fd: opened.fd, highWaterMark: chunkBytes, autoClose: true });
  }
  async function* counted(): AsyncGenerator<string> {
    // StringDecoder, as a stream's own `encoding: 'utf8'` uses: a byte-order mark is kept as text.
    const decoder = new StringDecoder('utf8');
    let total = 0;
    for await (const chunk of stream as AsyncIterable<Buffer>) {
      total += chunk.length;
      if (total > kind.limit) {
        stream.destroy();
        throw tooLarge(kind, path, null);
      }
      const text = decoder.write(chunk);
      if (text !== '') yield text;
    }
    const rest = decoder.end();
    if (rest !== '') yield rest;
  }
  return { chunks: counted(), size, close: () => stream.destroy() };
}
