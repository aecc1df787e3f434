/**
 * `elastimate export <files...> [--out file.csv] [--json]`: every visit of
 * every subject file as one tidy row (docs/csv-export.md). RFC 4180 CSV
 * (render/csv.ts); `--out` is written by io/safe-write.ts (temporary file,
 * fsync, rename) and readable by its owner only.
 */
import { assess } from '../assessment/assess.js';
import { STANDING_CAVEATS } from '../assessment/caveats.js';
import { METHODS_VERSION } from '../assessment/result.js';
import { InputError } from '../errors.js';
import { checkOutputPath, writeFileSafely } from '../io/safe-write.js';
import { visitInputs, visitsInOrder } from '../records/series.js';
import { readSubjectFile } from '../records/store.js';
import { csvCells, csvText, exportDictionary, exportErrorValues, exportValues, jsonRecord, type CellValue } from '../render/csv.js';
import { stringifySafe } from '../render/json.js';
import { toolVersion } from './package-info.js';
import { warn } from './record-common.js';

export const EXPORT_FORMAT = 'elastimate-export';

/** Rows of typed values for the given subject files, in file order then date order. */
export function exportRows(paths: readonly string[]): { rows: CellValue[][]; failed: number } {
  const rows: CellValue[][] = [];
  let failed = 0;
  const seen = new Map<string, string>();
  for (const path of paths) {
    const file = readSubjectFile(path);
    const id = file.subject.id;
    const earlier = seen.get(id);
    if (earlier !== undefined) warn(`subject ${id} appears in both ${earlier} and ${path}; both are exported`);
    seen.set(id, path);
    for (const { index, visit } of visitsInOrder(file)) {
      try {
        rows.push(exportValues(id, index, visit.date, visit.note, assess(visitInputs(file, visit))));
      } catch (err) {
        if (!(err instanceof InputError)) throw err;
        failed++;
        rows.push(exportErrorValues(id, index, visit.date, visit.note, `${path}: ${err.message.split('\n').join('; ')}`, METHODS_VERSION));
      }
    }
  }
  return { rows, failed };
}

export async function runExport(paths: string[], opts: Record<string, unknown>): Promise<void> {
  // --out must never replace one of the subject files being exported (nor follow a link, nor hit a special file).
  if (opts.out !== undefined) checkOutputPath(opts.out, { option: 'out', inputs: paths });
  const columns = exportDictionary();
  const { rows, failed } = exportRows(paths);
  let text: string;
  if (opts.json === true) {
    text = stringifySafe({
      format: EXPORT_FORMAT,
      formatVersion: 2,
      tool: { name: 'elastimate', version: toolVersion() },
      methodsVersion: METHODS_VERSION,
      columns,
      rows: rows.map((r) => jsonRecord(r, columns)),
      caveats: STANDING_CAVEATS,
    }) + '\n';
  } else {
    text = csvText([columns.map((c) => c.name), ...rows.map((r) => csvCells(r, columns))]);
  }
  if (failed > 0) warn(`${failed} visit(s) could not be computed; the reason is in the error column`);
  if (typeof opts.out === 'string') {
    writeFileSafely(opts.out, text, { option: 'out', inputs: paths });
    process.stderr.write(`elastimate: wrote ${rows.length} row(s) to ${opts.out}\n`);
  } else {
    process.stdout.write(text);
  }
}
