/**
 * `elastimate sr-cohort <folder> [--ids map.csv] [--out cohort.csv]`: a folder
 * of DICOM SR files → a cohort CSV that `batch` reads, one row per study (the
 * files of one study grouped together), in study-date order. The `subject`
 * column is the user's pseudonymous id: left empty to fill in, or taken from
 * their own map file (`file,subject`: SR file name → pseudonymous id). No
 * identifier from the files is ever written (docs/sr-import.md).
 */
import { readdirSync, statSync } from 'node:fs';
import { basename, join } from 'node:path';
import { csvParseRows } from 'd3-dsv';
import { NUMERIC_FIELDS } from '../assessment/fields.js';
import { InputError, showValue } from '../errors.js';
import { SubjectIdSchema } from '../records/subject-schema.js';
import { csvText } from '../render/csv.js';
import { SR_TARGETS } from '../sr/codes.js';
import { importStudy } from '../sr/import.js';
import { readInputFile } from '../io/read-input.js';
import { readSrFile, type SrDocument } from '../sr/read-dicom.js';
import { checkOutputPath, writeFileSafely } from '../io/safe-write.js';
import { info } from './messages.js';
import { inputKeys, inputUnits, readingKeys } from './sr-input.js';

/** More files than any study folder holds; a larger folder is refused before anything is read. */
const MAX_FILES = 20_000;
const MAX_ID_MAP_BYTES = 8 * 1024 * 1024;

function listFolder(folder: string): string[] {
  let names: string[];
  try {
    if (!statSync(folder).isDirectory()) throw new Error('not a folder');
    names = readdirSync(folder);
  } catch {
    throw new InputError({ field: 'folder', value: showValue(folder), reason: 'not a readable folder', accepted: 'a folder of DICOM SR files' });
  }
  // Hidden files and the media directory file (DICOMDIR) are not reports.
  const files = names.filter((n) => !n.startsWith('.') && n.toUpperCase() !== 'DICOMDIR').sort();
  if (files.length === 0) throw new InputError({ field: 'folder', value: showValue(folder), reason: 'holds no files', accepted: 'a folder of DICOM SR files' });
  if (files.length > MAX_FILES) throw new InputError({ field: 'folder', value: showValue(folder), reason: `holds more than ${MAX_FILES} files`, accepted: 'a folder of one cohort\'s SR files' });
  return files;
}

/** The user's map of SR file names to pseudonymous ids. */
function readIdMap(path: string): Map<string, string> {
  const accepted = 'a CSV file with the columns file and subject (SR file name → pseudonymous id)';
  const text = readInputFile(path, { field: 'ids', noun: 'an id map', limit: MAX_ID_MAP_BYTES, accepted, stdin: false }).toString('utf8');
  const rows = csvParseRows(text.replace(/^\uFEFF/, ''));
  const header = (rows[0] ?? []).map((h) => h.trim().toLowerCase());
  const fileAt = header.indexOf('file');
  const idAt = header.indexOf('subject');
  if (fileAt < 0 || idAt < 0) throw new InputError({ field: 'ids', value: showValue(path), reason: 'no file and subject columns in the header', accepted });
  const map = new Map<string, string>();
  rows.slice(1).forEach((row, i) => {
    const file = (row[fileAt] ?? '').trim();
    const id = (row[idAt] ?? '').trim();
    if (file === '' && id === '') return;
    const parsed = SubjectIdSchema.safeParse(id);
    // A spreadsheet would run a cell starting with = + - @ as a formula: such an id is refused.
    if (!parsed.success || /^[=+\-@\t\r]/.test(id)) {
      throw new InputError({ field: `ids row ${i + 2}`, value: showValue(id.slice(0, 80)), accepted: 'a pseudonymous id of 1–64 printable characters not starting with = + - @, e.g. CO-203' });
    }
    if (map.has(file) && map.get(file) !== id) throw new InputError({ field: `ids row ${i + 2}`, value: showValue(file.slice(0, 80)), reason: 'this file is mapped twice', accepted: 'one id per file' });
    map.set(file, id);
  });
  return map;
}

/** A cell as batch reads it: several readings separated by semicolons (docs/batch.md). */
function cell(v: number | string | number[] | undefined): string {
  if (v === undefined) return '';
  if (Array.isArray(v)) return v.map((x) => cell(x)).join(';');
  return typeof v === 'number' ? String(Number(v.toPrecision(6))) : v;
}

export async function runSrCohort(folder: string, opts: Record<string, unknown>): Promise<void> {
  const names = listFolder(folder);
  // Never written over a file this run reads: the reports and the id map.
  const out = { option: 'out', extensions: ['.csv'], inputs: [...names.map((n) => join(folder, n)), ...(opts.ids !== undefined ? [String(opts.ids)] : [])] };
  const outPath = opts.out !== undefined ? checkOutputPath(opts.out, out) : null;
  const ids = opts.ids !== undefined ? readIdMap(String(opts.ids)) : new Map<string, string>();
  const docs: SrDocument[] = [];
  for (const name of names) docs.push(await readSrFile(join(folder, name)));

  // Group by study: the (hashed) study identity, else the file alone.
  const studies = new Map<string, SrDocument[]>();
  docs.forEach((d, i) => {
    const key = d.studyKey ?? `file ${i}`;
    studies.set(key, [...(studies.get(key) ?? []), d]);
  });

  const keys = inputKeys();
  const units = inputUnits();
  const columns = SR_TARGETS.map((t) => ({ key: t.key, name: NUMERIC_FIELDS.find((f) => f.key === t.key)?.flag ?? t.key }));
  const header = ['subject', 'visit_date', ...columns.map((c) => c.name), 'sex', 'sr_files', 'sr_notes'];
  const rows: { date: string; first: string; cells: string[] }[] = [];
  let withoutId = 0;
  let identifying = 0;
  for (const group of studies.values()) {
    identifying += group.reduce((n, d) => n + d.identifying, 0);
    const imported = await importStudy(group, { inputKeys: keys, inputUnits: units, readingKeys: readingKeys() });
    const mapped = [...new Set(group.map((d) => ids.get(basename(d.path))).filter((x): x is string => x !== undefined))];
    if (mapped.length > 1) {
      throw new InputError({ field: 'ids', value: showValue(mapped.join(', ').slice(0, 80)), reason: `the files of one study (${group.map((d) => basename(d.path)).join(', ').slice(0, 120)}) map to different ids`, accepted: 'one pseudonymous id per study' });
    }
    if (mapped.length === 0) withoutId++;
    const notes = [
      imported.notFound.length ? `not in the report: ${imported.notFound.join(', ')}` : '',
      imported.notUsed.length ? `not used: ${imported.notUsed.join(', ')}` : '',
    ].filter((s) => s !== '').join('; ');
    rows.push({
      date: imported.studyDate ?? '',
      first: basename(group[0]!.path),
      cells: [mapped[0] ?? '', imported.studyDate ?? '', ...columns.map((c) => cell(imported.raw[c.key])), cell(imported.raw.sex), String(group.length), notes],
    });
  }
  rows.sort((a, b) => (a.date === b.date ? (a.first < b.first ? -1 : 1) : a.date < b.date ? -1 : 1));
  const text = csvText([header, ...rows.map((r) => r.cells)]);
  if (outPath) writeFileSafely(outPath, text, out);
  else process.stdout.write(text);
  info(`${rows.length} ${rows.length === 1 ? 'study' : 'studies'} from ${docs.length} SR file${docs.length === 1 ? '' : 's'}${outPath ? ` written to ${outPath}` : ''}.`);
  if (identifying > 0) info('identifying attributes in the files (names, IDs, birth dates, UIDs and the like) were ignored: none is written.');
  if (withoutId > 0) info(`${withoutId} ${withoutId === 1 ? 'row has' : 'rows have'} an empty subject column: fill in the pseudonymous ids${opts.ids === undefined ? ', or give --ids map.csv (columns file, subject)' : ''}.`);
  info('cuff pressures, PEP and ET are often not in the report: add them as columns before running batch (docs/sr-import.md).');
}
