/**
 * A worker thread of `elastimate batch` (batch-command.ts): it is started
 * before the input is read, gets the header once it is known, then pieces of
 * CSV text that end on a record boundary, and answers each with the piece's
 * output bytes (handed over, not copied) and its row counts. The rows are
 * computed by the same BatchSheet as on the main thread, so the output does
 * not depend on which thread computed a piece. It imports only what a row
 * needs (no schema library, no command-line parser).
 */
import { parentPort } from 'node:worker_threads';
import { BatchSheet, planBatch } from '../records/batch-row.js';
import type { Dialect } from '../records/csv-records.js';

/** The input's header and dialect, sent once before the first piece. */
export interface HeaderMessage {
  header: string[];
  dialect: Dialect;
}

/** A piece to compute: its place in the file and its text. */
export interface PieceRequest {
  seq: number;
  text: string;
}

/** A computed piece. */
export interface PieceReply {
  seq: number;
  bytes: Uint8Array;
  rows: number;
  failed: number;
}

const port = parentPort;
if (port) {
  let sheet: BatchSheet | undefined;
  port.on('message', (m: HeaderMessage | PieceRequest) => {
    if ('header' in m) {
      sheet = new BatchSheet(planBatch(m.header, m.dialect));
      return;
    }
    if (!sheet) throw new Error('batch worker: a piece came before the header');
    const rows = sheet.rows;
    const failed = sheet.failed;
    const bytes = sheet.piece(m.text);
    const reply: PieceReply = { seq: m.seq, bytes, rows: sheet.rows - rows, failed: sheet.failed - failed };
    port.postMessage(reply, [bytes.buffer as ArrayBuffer]);
  });
}
