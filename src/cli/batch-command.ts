/**
 * `elastimate batch <in.csv> [--out out.csv]`: a cohort spreadsheet in, the
 * same rows with results out (docs/batch.md). Streams: the input is read in
 * 64 KiB chunks, cut at record boundaries (records/batch-row.ts RecordPieces),
 * and each piece (about a thousand rows) is parsed by d3-dsv and computed
 * row by row into output bytes (BatchSheet), which are written in input order,
 * waiting for the output to drain; reading waits while too many pieces are
 * under way, so memory stays flat however long the file. A file of a
 * megabyte or more is shared with worker threads (batch-worker.ts; one fewer
 * than the cores, at most three): a piece goes to a worker that has room, or
 * is computed on the main thread meanwhile. A bad row gets its reason in the
 * error column and the run goes on. `--out` goes through io/safe-write.ts:
 * a temporary file beside the target (mode 0600), fsynced and renamed over
 * the target only when the whole run succeeded. Progress goes to stderr, on a terminal only.
 */
import { availableParallelism } from 'node:os';
import { createWriteStream } from 'node:fs';
import type { Writable } from 'node:stream';
import { Worker } from 'node:worker_threads';
import { METHODS_VERSION } from '../assessment/result.js';
import { InputError, showValue } from '../errors.js';
import { BATCH_FILE, openInputStream } from '../io/read-input.js';
import { info } from './messages.js';
import { beginSafeWrite, checkOutputPath, writeFault, type SafeWrite } from '../io/safe-write.js';
import { BatchSheet } from '../records/batch-row.js';
import { HeaderQuoteError, MAX_RECORD, RecordSplitter, RecordTooLongError, SeparatorLineError, type Segment } from '../records/csv-records.js';
import type { HeaderMessage, PieceReply, PieceRequest } from './batch-worker.js';


/** Read in 64 KiB chunks: a piece of about a thousand rows, whose short-lived objects stay in the young generation. */
const CHUNK_BYTES = 1 << 16;
/** Files smaller than this are computed on the main thread alone: starting a worker would cost more than it saves. */
const PARALLEL_FROM_BYTES = 1 << 20;
/** At most this many worker threads (and one fewer than the cores). */
const MAX_WORKERS = 3;
/** Pieces a worker holds at once: enough that it never waits while the main thread computes a piece. */
const WORKER_DEPTH = 3;
/** Output written between background flushes to the disk (SafeWrite.flushInBackground). */
const FLUSH_EVERY_BYTES = 8 << 20;
/** Pieces computed or under way but not yet written: the bound on memory. */
const MAX_PENDING = 16;

function write(stream: Writable, bytes: Uint8Array): Promise<void> {
  if (bytes.length === 0) return Promise.resolve();
  return new Promise<void>((ok, fail) => {
    const onError = (err: Error) => fail(err);
    stream.once('error', onError);
    const flushed = stream.write(bytes, () => undefined);
    const done = () => {
      stream.off('error', onError);
      ok();
    };
    if (flushed) done();
    else stream.once('drain', done);
  });
}

function finish(stream: Writable): Promise<void> {
  return new Promise<void>((ok, fail) => {
    stream.once('error', fail);
    // A write that failed after it was buffered (a full disk) surfaces here, not at write().
    stream.end((err?: Error | null) => (err ? fail(err) : ok()));
  });
}

export interface BatchCounts {
  /** Records read after the header. */
  read: number;
  /** Rows the output accepted. */
  written: number;
  /** Rows written with an error. */
  failed: number;
}

/** A piece's output and counts, once computed. */
interface Computed {
  bytes: Uint8Array;
  rows: number;
  failed: number;
}

/** A piece in input order: computed on this thread or under way in a worker. */
interface Slot {
  result: Computed | undefined;
  settled: Promise<Computed>;
}

/** One worker thread and the pieces it holds. */
class PieceWorker {
  private readonly worker: Worker;
  private readonly waiting = new Map<number, { ok: (c: Computed) => void; fail: (e: Error) => void }>();
  private hasHeader = false;
  /** Why the worker stopped, if it did: the run fails with it. */
  failure: Error | undefined;

  constructor() {
    // Beside this module: dist/cli/batch-worker.js, or dist/bundle/batch-worker.js in the bundle.
    // No inherited Node options: `--input-type`, `--eval` and the like would stop a worker from a file.
    this.worker = new Worker(new URL('./batch-worker.js', import.meta.url), { execArgv: [] });
    this.worker.on('message', (m: PieceReply) => {
      const w = this.waiting.get(m.seq);
      this.waiting.delete(m.seq);
      w?.ok({ bytes: m.bytes, rows: m.rows, failed: m.failed });
    });
    this.worker.on('error', (err) => this.stop(err));
    this.worker.on('exit', (code) => this.stop(new Error(`batch worker stopped (exit code ${code})`)));
  }

  private stop(err: Error): void {
    this.failure ??= err;
    for (const w of this.waiting.values()) w.fail(this.failure);
    this.waiting.clear();
  }

  /** The input's header, before the first piece. */
  header(message: HeaderMessage): void {
    this.worker.postMessage(message);
    this.hasHeader = true;
  }

  /**
   * Told the header, healthy and holding fewer pieces than WORKER_DEPTH. A worker still starting up
   * has room: its messages wait for it, so it begins on its first piece as soon as it is up.
   */
  hasRoom(): boolean {
    return this.hasHeader && this.failure === undefined && this.waiting.size < WORKER_DEPTH;
  }

  run(seq: number, text: string): Promise<Computed> {
    return new Promise<Computed>((ok, fail) => {
      this.waiting.set(seq, { ok, fail });
      const request: PieceRequest = { seq, text };
      this.worker.postMessage(request);
    });
  }

  async close(): Promise<void> {
    this.worker.removeAllListeners('exit');
    await this.worker.terminate();
  }
}

function workerCount(sizeBytes: number): number {
  if (sizeBytes < PARALLEL_FROM_BYTES) return 0;
  return Math.max(0, Math.min(MAX_WORKERS, availableParallelism() - 1));
}

/**
 * The whole run against an opened input and output; returns the counts.
 * Pieces are written in input order whichever thread computed them.
 */
async function streamRows(inPath: string, input: AsyncIterable<string>, output: Writable, workers: number, onProgress: (rows: number, bytes: number) => void): Promise<BatchCounts & { header: boolean }> {
  const splitter = new RecordSplitter();
  let sheet: BatchSheet | undefined; // this thread's: reads the header, and computes pieces no worker has room for
  // Started before the first read, so they load while this thread reads the header and the first rows.
  const pool: PieceWorker[] = Array.from({ length: workers }, () => new PieceWorker());
  const slots: Slot[] = [];
  let seq = 0;
  let read = 0;
  let written = 0;
  let failed = 0;
  let started = false;

  const writeFirst = async () => {
    const slot = slots.shift()!;
    const done = slot.result ?? (await slot.settled);
    read += done.rows;
    failed += done.failed;
    await write(output, done.bytes);
    written += done.rows;
    onProgress(written, done.bytes.length);
  };

  const here = (compute: (s: BatchSheet) => Uint8Array) => {
    const s = (sheet ??= new BatchSheet(undefined, splitter.dialect));
    const before = { rows: s.rows, failed: s.failed };
    const bytes = compute(s);
    const result = { bytes, rows: s.rows - before.rows, failed: s.failed - before.failed };
    slots.push({ result, settled: Promise.resolve(result) });
    seq++;
    if (s.layout && !started) {
      // The header has been read: tell the workers.
      started = true;
      for (const w of pool) w.header({ header: s.layout.header, dialect: s.layout.dialect });
    }
  };

  const submit = async (segment: Segment) => {
    if (segment.bad) {
      here((s) => s.bad(segment.bad));
    } else {
      const text = segment.text;
      const broken = pool.find((w) => w.failure !== undefined);
      if (broken) throw broken.failure;
      const worker = sheet?.layout ? pool.find((w) => w.hasRoom()) : undefined;
      if (worker) {
        const slot: Slot = { result: undefined, settled: worker.run(seq++, text) };
        slot.settled.then((c) => (slot.result = c), () => undefined);
        slots.push(slot);
      } else here((s) => s.piece(text));
    }
    while (slots.length > 0 && (slots[0]!.result !== undefined || slots.length >= MAX_PENDING)) await writeFirst();
  };

  try {
    for await (const chunk of input) for (const segment of splitter.push(chunk)) await submit(segment);
    for (const segment of splitter.end()) await submit(segment);
    while (slots.length > 0) await writeFirst();
    const broken = pool.find((w) => w.failure !== undefined);
    if (broken) throw broken.failure;
  } catch (err) {
    if (err instanceof HeaderQuoteError) {
      throw new InputError({ field: `header, line ${err.bad.line}, column ${err.bad.column}`, value: showValue(err.bad.text), reason: `a double quote opens this column name and ${err.bad.reason}`, accepted: 'a header row whose quoted names are closed (docs/batch.md)' });
    }
    if (err instanceof SeparatorLineError) {
      throw new InputError({ field: 'batch file, line 1 (separator line)', value: showValue(err.text), accepted: 'sep=, or sep=; or sep= and a tab, or no separator line (the separator is then read from the header)' });
    }
    if (err instanceof RecordTooLongError) {
      throw new InputError({ field: `batch file, line ${err.line}`, value: showValue(inPath), reason: `a record runs on for more than ${MAX_RECORD} characters without a line break`, accepted: 'a CSV file with a header row and one visit per record (docs/batch.md)' });
    }
    throw err;
  } finally {
    await Promise.all(pool.map((w) => w.close()));
  }
  return { read, written, failed, header: sheet?.layout !== undefined };
}

export async function runBatch(inPath: string, opts: Record<string, unknown>): Promise<void> {
  const outRule = { option: 'out', inputs: [inPath] };
  const outPath = opts.out !== undefined ? checkOutputPath(opts.out, outRule) : undefined;
  const showProgress = Boolean(process.stderr.isTTY);

  // The one input reader: a regular file (or `-`, standard input) within the batch limit, checked before
  // a byte is read, so a folder, a FIFO or /dev/zero is refused at once.
  const input = openInputStream(inPath, BATCH_FILE, CHUNK_BYTES);
  const workers = workerCount(input.size ?? 0);

  let output: Writable = process.stdout;
  let safe: SafeWrite | undefined;
  let outputFailure: Error | undefined;
  if (outPath) {
    try {
      safe = beginSafeWrite(String(opts.out), outRule);
    } catch (err) {
      input.close();
      throw err;
    }
    const file = createWriteStream('', { fd: safe.fd, autoClose: false, highWaterMark: CHUNK_BYTES });
    file.on('error', (err) => (outputFailure = err));
    output = file;
  }

  let counts: BatchCounts & { header: boolean };
  try {
    let unflushed = 0;
    counts = await streamRows(inPath, input.chunks, output, workers, (rows, bytes) => {
      if (showProgress) process.stderr.write(`\relastimate: ${rows} rows…`);
      // Long outputs go to the disk while rows are computed, so the fsync before the rename has less to do.
      unflushed += bytes;
      if (safe && unflushed >= FLUSH_EVERY_BYTES) {
        unflushed = 0;
        safe.flushInBackground();
      }
    });
    if (!counts.header) {
      throw new InputError({ field: 'batch file', value: showValue(inPath), reason: 'empty', accepted: 'a CSV file with a header row and one row per visit (docs/batch.md)' });
    }
    if (safe) {
      await finish(output);
      await safe.flushed();
      if (outputFailure) throw outputFailure;
      safe.commit();
    }
  } catch (err) {
    input.close();
    // The reader of standard output went away (e.g. `| head`): stop quietly, as Unix tools do.
    if (!safe && (err as NodeJS.ErrnoException).code === 'EPIPE') return;
    if (safe) {
      output.destroy();
      safe.abort();
      if (err === outputFailure) throw writeFault(String(opts.out), err, safe.existed);
    }
    throw err;
  }
  if (showProgress) process.stderr.write('\r');
  if (showProgress || counts.failed > 0 || outPath) {
    info(`${counts.read} record(s) read, ${counts.written} written, ${counts.failed} with an error (see the error column); methods ${METHODS_VERSION}${outPath ? `; wrote ${opts.out}` : ''}`);
  }
}

