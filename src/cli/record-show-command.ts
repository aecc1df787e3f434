/**
 * `elastimate record show <file> [--json]` and
 * `elastimate record compare <file> <visit> <visit> [--json]`: read-only views.
 */
import { readSubjectFile } from '../records/store.js';
import { printComparison, printSeries } from './record-common.js';

export async function runRecordShow(path: string, opts: Record<string, unknown>): Promise<void> {
  await printSeries(readSubjectFile(path), { json: opts.json === true, uncertainty: opts.uncertainty === true });
}

export async function runRecordCompare(path: string, from: string, to: string, opts: Record<string, unknown>): Promise<void> {
  await printComparison(readSubjectFile(path), from, to, { json: opts.json === true });
}
