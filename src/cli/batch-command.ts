/**
 * `elastimate batch <in.csv> [--out out.csv]`: a cohort spreadsheet in, the
 * same rows with results out (docs/batch.md). Streams: the input is read in
 * 1 MiB chunks, cut at record boundaries (records/batch-row.ts RecordPieces),
 * each piece parsed by d3-dsv, computed row by row and written before the
 * next chunk is read (waiting for the output to drain), so memory stays flat
 * however long the file. A bad row gets its reason in the error column and
 * the run goes on. `--out` goes to a temporary file beside the target (mode
 * 0600), fsynced and renamed over the target only when the whole run
 * succeeded. Progress goes to stderr, on a terminal only.
 */
import { closeSync, createReadStream, createWriteStream, fsyncSync, openSync, renameSync, rmSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import type { Writable } from 'node:stream';
import { csvParseRows } from 'd3-dsv';
import { METHODS_VERSION } from '../assessment/result.js';
import { InputError, showValue } from '../errors.js';
import { RecordPieces, batchRow, planBatch, type BatchLayout } from '../records/batch-row.js';
import { FILE_MODE } from '../records/store.js';
import { csvText } from '../render/csv.js';
import { info } from './record-common.js';

/** Read in 64 KiB chunks: a piece of about a thousand rows, whose short-lived objects stay in the young generation. */
const CHUNK_BYTES = 1 << 16;

function openProblem(path: string, err: unknown, field: string): InputError {
  const code = (err as NodeJS.ErrnoException).code;
  const reason = code === 'ENOENT' ? 'file or folder not found' : code === 'EISDIR' ? 'is a folder' : code === 'EACCES' ? 'permission denied' : `cannot be opened (${code ?? 'error'})`;
  return new InputError({ field, value: showValue(path), reason, accepted: field === 'out' ? 'a file path in an existing folder you can write to' : 'a readable CSV file with a header row (docs/batch.md)' });
}

function write(stream: Writable, text: string): Promise<void> {
  if (text === '') return Promise.resolve();
  return new Promise<void>((ok, fail) => {
    const onError = (err: Error) => fail(err);
    stream.once('error', onError);
    const flushed = stream.write(text, () => undefined);
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
    stream.end(() => ok());
  });
}

function fsyncFile(path: string): void {
  const fd = openSync(path, 'r');
  try {
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

export interface BatchCounts {
  rows: number;
  failed: number;
}

/** The whole run against an opened input and output; returns the counts. */
async function streamRows(input: AsyncIterable<string>, output: Writable, onProgress: (rows: number) => void): Promise<BatchCounts & { layout: BatchLayout | undefined }> {
  const pieces = new RecordPieces();
  let layout: BatchLayout | undefined;
  let rows = 0;
  let failed = 0;

  const handle = async (text: string) => {
    if (text === '') return;
    const records = csvParseRows(text);
    const out: string[][] = [];
    for (const cells of records) {
      if (cells.length === 1 && cells[0] === '') continue; // empty line
      if (!layout) {
        layout = planBatch(cells);
        if (layout.renamed.length) info(`input columns share names with results; those results are in ${layout.renamed.join(', ')}`);
        out.push(layout.outputHeader);
        continue;
      }
      const row = batchRow(layout, cells);
      rows++;
      if (row[row.length - 1] !== '') failed++;
      out.push(row);
    }
    await write(output, csvText(out));
    onProgress(rows);
  };

  for await (const chunk of input) await handle(pieces.push(chunk));
  await handle(pieces.end());
  return { rows, failed, layout };
}

export async function runBatch(inPath: string, opts: Record<string, unknown>): Promise<void> {
  const outPath = typeof opts.out === 'string' ? resolve(opts.out) : undefined;
  if (outPath && outPath === resolve(inPath)) {
    throw new InputError({ field: 'out', value: showValue(opts.out), reason: 'same file as the input', accepted: 'a different file' });
  }
  const showProgress = Boolean(process.stderr.isTTY);
  const tempPath = outPath ? join(dirname(outPath), `.${basename(outPath)}.${process.pid}.tmp`) : undefined;

  const input = createReadStream(inPath, { highWaterMark: CHUNK_BYTES, encoding: 'utf8' });
  await new Promise<void>((ok, fail) => {
    input.once('open', () => ok());
    input.once('error', (err) => fail(openProblem(inPath, err, 'batch file')));
  });

  let output: Writable = process.stdout;
  if (tempPath) {
    const file = createWriteStream(tempPath, { mode: FILE_MODE, flags: 'wx', highWaterMark: CHUNK_BYTES });
    await new Promise<void>((ok, fail) => {
      file.once('open', () => ok());
      file.once('error', (err) => fail(openProblem(String(opts.out), err, 'out')));
    });
    output = file;
  }

  let counts: BatchCounts & { layout: BatchLayout | undefined };
  try {
    counts = await streamRows(input as AsyncIterable<string>, output, (rows) => {
      if (showProgress) process.stderr.write(`\relastimate: ${rows} rows…`);
    });
    if (!counts.layout) {
      throw new InputError({ field: 'batch file', value: showValue(inPath), reason: 'empty', accepted: 'a CSV file with a header row and one row per visit (docs/batch.md)' });
    }
    if (tempPath && outPath) {
      await finish(output);
      fsyncFile(tempPath);
      renameSync(tempPath, outPath);
      fsyncDirectory(dirname(outPath));
    }
  } catch (err) {
    input.destroy();
    // The reader of standard output went away (e.g. `| head`): stop quietly, as Unix tools do.
    if (!tempPath && (err as NodeJS.ErrnoException).code === 'EPIPE') return;
    if (tempPath) {
      output.destroy();
      rmSync(tempPath, { force: true });
    }
    throw err;
  }
  if (showProgress) process.stderr.write('\r');
  if (showProgress || counts.failed > 0 || outPath) {
    info(`${counts.rows} row(s), ${counts.failed} with an error (see the error column); methods ${METHODS_VERSION}${outPath ? `; wrote ${opts.out}` : ''}`);
  }
}

function fsyncDirectory(path: string): void {
  try {
    fsyncFile(path);
  } catch {
    // Some file systems refuse fsync on a folder; the rename itself is atomic.
  }
}
