/**
 * Reading and changing subject files without ever losing a visit.
 *
 * - Reading never writes: a file that does not parse, fails the schema or was
 *   written by a newer version is refused with an InputError naming the file
 *   and the problem, and its bytes stay exactly as they were.
 * - Every change runs under a lock (proper-lockfile: a `<file>.lock` folder
 *   whose age is refreshed while held; a lock left by a killed process counts
 *   as stale after `staleMs`, 5 s by default, and is then taken over), re-reads
 *   the file inside the lock, and writes atomically (write-file-atomic: a
 *   temporary file in the same folder, fsync, rename), then fsyncs the folder.
 *   A kill at any instant leaves the old file or the new one, never a mix.
 * - New files are created with mode 0600 (owner only); an existing file keeps
 *   its mode. Backups (before an edit or removal, and before a migration) are
 *   0600 copies of the exact old bytes named `<file>.<stamp>[.<tag>].bak`.
 *
 * Nothing here reads the clock on its own: the caller passes `now`.
 */
import { closeSync, fsyncSync, openSync, statSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { basename, dirname, resolve } from 'node:path';
import { InputError, showValue, type InputProblem } from '../errors.js';
import { SUBJECT_FILE, readInputFileIfExists } from '../io/read-input.js';
import { parseJsonText } from '../io/read-json.js';
import { stringifySafe } from '../render/json.js';
import { SUBJECT_VERSIONS, migrateDocument, type Migration, type SchemaVersions } from './migrations.js';
import { SUBJECT_FORMAT, SubjectFileSchema, type SubjectFile } from './subject-schema.js';

/**
 * proper-lockfile and write-file-atomic, loaded on first write. Through
 * createRequire, not import(): both are CommonJS that read `__filename`,
 * which a single-file ES module bundle does not provide, so they are left
 * out of the bundle and resolved from node_modules at run time.
 */
interface FileLibraries {
  lockfile: typeof import('proper-lockfile');
  writeFileAtomic: typeof import('write-file-atomic');
}
let libraries: FileLibraries | undefined;
export function fileLibraries(): FileLibraries {
  if (!libraries) {
    const nodeRequire = createRequire(import.meta.url);
    libraries = {
      lockfile: nodeRequire('proper-lockfile') as FileLibraries['lockfile'],
      writeFileAtomic: nodeRequire('write-file-atomic') as FileLibraries['writeFileAtomic'],
    };
  }
  return libraries;
}

import { FILE_MODE } from './file-mode.js';

export { FILE_MODE };
/** Default age after which a lock is taken over (proper-lockfile's floor is 2000 ms). */
export const DEFAULT_STALE_MS = 5000;
const DOC_HINT = 'see docs/subject-file.md';

export interface ReadOptions {
  versions?: SchemaVersions;
}

export interface UpdateOptions extends ReadOptions {
  /** The time used to name backups. */
  now: Date;
  /** Keep a backup of the file as it was before this change (edit, remove). */
  backup?: boolean;
  /** Age in ms after which another process's lock counts as stale (min 2000). */
  staleMs?: number;
}

export interface UpdateResult {
  file: SubjectFile;
  created: boolean;
  /** Paths of backups written by this change. */
  backups: string[];
  /** Migrations applied on this write (older file upgraded). */
  migrated: Migration[];
}

/**
 * The change to make: receives the current file (null when it does not exist
 * yet) and returns the new content. It runs inside the lock; it may throw an
 * InputError to abandon the change, leaving the file untouched.
 */
export type SubjectUpdate = (current: SubjectFile | null) => SubjectFile | Promise<SubjectFile>;

interface Loaded {
  file: SubjectFile;
  /** The schema version found on disk, before any migration. */
  diskVersion: number;
  applied: Migration[];
}

function fileProblem(path: string, reason: string, accepted = `a subject file (${DOC_HINT})`, value = showValue(path)): InputError {
  return new InputError({ field: 'subject file', value, reason, accepted });
}

/**
 * The bytes of a subject file, or null when it does not exist yet: the one
 * input reader (a regular file within the subject-file limit, src/io/read-input.ts).
 */
function readBytes(path: string): Buffer | null {
  return readInputFileIfExists(path, SUBJECT_FILE);
}

/** Parse and check the bytes of a subject file; never writes. */
function parseSubjectBytes(path: string, bytes: Buffer, versions: SchemaVersions): Loaded {
  // The one JSON reader: a duplicate key anywhere (a second, empty "visits") is refused, not resolved.
  const data = parseJsonText(bytes.toString('utf8'), { field: 'subject file', value: showValue(path), accepted: `a subject file (${DOC_HINT})`, note: 'the file was left untouched' });
  if (typeof data !== 'object' || data === null || Array.isArray(data)) {
    throw fileProblem(path, 'not a JSON object; the file was left untouched');
  }
  const doc = data as Record<string, unknown>;
  if (doc.format !== SUBJECT_FORMAT) {
    throw new InputError({ field: `${path}: format`, value: showValue(doc.format), reason: 'not a subject file; left untouched', accepted: `"${SUBJECT_FORMAT}" (${DOC_HINT})` });
  }
  const version = doc.schemaVersion;
  if (typeof version !== 'number' || !Number.isInteger(version) || version < 1) {
    throw new InputError({ field: `${path}: schemaVersion`, value: showValue(version), reason: 'left untouched', accepted: `a whole number from 1 to ${versions.current}` });
  }
  if (version > versions.current) {
    throw new InputError({
      field: `${path}: schemaVersion`,
      value: showValue(version),
      reason: `written by a newer elastimate (this one reads up to version ${versions.current}); left untouched`,
      accepted: `a file of schema version ${versions.current} or older; update elastimate to read this one`,
    });
  }
  const { doc: migrated, applied } = migrateDocument(doc, version, versions);
  const checked = SubjectFileSchema.safeParse(migrated);
  if (!checked.success) {
    const problems: InputProblem[] = checked.error.issues.slice(0, 12).map((issue) => {
      const where = issue.path.length ? formatPath(issue.path) : 'file';
      const keys = issue.code === 'unrecognized_keys' ? ` (unknown key${issue.keys.length > 1 ? 's' : ''} ${issue.keys.join(', ')})` : '';
      return {
        field: `${path}: ${where}`,
        value: issue.code === 'unrecognized_keys' ? showValue(issue.keys.join(', ')) : shownAt(migrated, issue.path),
        reason: `fails the subject-file schema${keys}; left untouched`,
        accepted: `${issue.message} (${DOC_HINT})`,
      };
    });
    throw new InputError(problems);
  }
  return { file: checked.data, diskVersion: version, applied };
}

function formatPath(path: readonly PropertyKey[]): string {
  return path.map((p, i) => (typeof p === 'number' ? `[${p}]` : i === 0 ? String(p) : `.${String(p)}`)).join('');
}

/** The value at `path` for an error message: '' (shown as "missing") only when nothing is there. */
function shownAt(doc: unknown, path: readonly PropertyKey[]): string {
  let v: unknown = doc;
  for (const p of path) {
    if (typeof v !== 'object' || v === null) return '';
    v = (v as Record<PropertyKey, unknown>)[p];
  }
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object' && v !== null) return 'an object';
  return showValue(v);
}

/**
 * Read and check a subject file. Throws an InputError naming the file and
 * what is wrong (missing, unreadable, not JSON, wrong format, newer schema
 * version, schema failure); the file is never modified. An older schema
 * version is migrated in memory only.
 */
export function readSubjectFile(path: string, options: ReadOptions = {}): SubjectFile {
  const bytes = readBytes(path);
  if (bytes === null) throw fileProblem(path, 'file not found', 'an existing subject file (`elastimate record add` creates one)');
  return parseSubjectBytes(path, bytes, options.versions ?? SUBJECT_VERSIONS).file;
}

/** Like readSubjectFile, but null when the file does not exist. */
export function readSubjectFileIfExists(path: string, options: ReadOptions = {}): SubjectFile | null {
  const bytes = readBytes(path);
  return bytes === null ? null : parseSubjectBytes(path, bytes, options.versions ?? SUBJECT_VERSIONS).file;
}

/** `20240501T101010Z`: sortable, no characters that trouble file systems. */
export function backupStamp(now: Date): string {
  return now.toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z');
}

/** Write the exact old bytes to a new 0600 backup file beside the original; never overwrites. */
function writeBackup(path: string, bytes: Buffer, now: Date, tag: string): string {
  const base = `${path}.${backupStamp(now)}${tag ? '.' + tag : ''}`;
  for (let n = 1; n < 1000; n++) {
    const candidate = n === 1 ? `${base}.bak` : `${base}-${n}.bak`;
    try {
      writeFileSync(candidate, bytes, { mode: FILE_MODE, flag: 'wx' });
      fsyncPath(candidate);
      return candidate;
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
    }
  }
  throw new Error(`could not find a free backup name for ${path}`);
}

function fsyncPath(path: string): void {
  let fd: number | undefined;
  try {
    fd = openSync(path, 'r');
    fsyncSync(fd);
  } catch {
    // Some file systems refuse fsync on a folder; the rename itself is still atomic.
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

function lockProblem(path: string, err: unknown): InputError {
  const code = (err as NodeJS.ErrnoException).code;
  if (code === 'ELOCKED') {
    return fileProblem(path, `locked by another elastimate process (lock folder ${basename(path)}.lock)`, 'try again in a moment; a lock left by a stopped process expires by itself after a few seconds');
  }
  if (code === 'ENOENT') return fileProblem(path, `the folder ${dirname(path)} does not exist`, 'a subject file in an existing folder');
  if (code === 'EACCES' || code === 'EPERM' || code === 'EROFS') return fileProblem(path, `cannot create a lock in ${dirname(path)} (${code})`, 'a subject file in a folder you can write to');
  return fileProblem(path, `cannot be locked (${(err as Error).message})`, 'a subject file in a folder you can write to');
}

/**
 * Change a subject file atomically under a lock. The current content is read
 * inside the lock (refusals as in readSubjectFile, file untouched), `update`
 * computes the new content, which is checked against the schema and written
 * through a temporary file, fsync and rename. An older schema version is
 * written as the current one after a backup of the old bytes.
 */
export async function updateSubjectFile(path: string, update: SubjectUpdate, options: UpdateOptions): Promise<UpdateResult> {
  const target = resolve(path);
  const versions = options.versions ?? SUBJECT_VERSIONS;
  const { lockfile, writeFileAtomic } = fileLibraries();
  const staleMs = Math.max(options.staleMs ?? DEFAULT_STALE_MS, 2000);

  // Without its folder the lock would be retried in vain until the retries run out.
  let folderOk = false;
  try {
    folderOk = statSync(dirname(target)).isDirectory();
  } catch {
    folderOk = false;
  }
  if (!folderOk) throw lockProblem(path, Object.assign(new Error('no folder'), { code: 'ENOENT' }));

  let compromised: Error | undefined;
  let release: () => Promise<void>;
  try {
    release = await lockfile.lock(target, {
      realpath: false,
      lockfilePath: `${target}.lock`,
      stale: staleMs,
      // Wait long enough for a stale lock to expire, polling briskly.
      retries: { retries: Math.ceil((staleMs * 3) / 150), factor: 1.2, minTimeout: 15, maxTimeout: 150, randomize: true },
      onCompromised: (err: Error) => {
        compromised = err;
      },
    });
  } catch (err) {
    throw lockProblem(path, err);
  }

  try {
    const bytes = readBytes(target);
    const loaded = bytes === null ? null : parseSubjectBytes(path, bytes, versions);
    const next = await update(loaded ? loaded.file : null);
    const checked = SubjectFileSchema.safeParse({ ...next, schemaVersion: versions.current });
    if (!checked.success) throw new Error(`refusing to write an invalid subject file: ${checked.error.message}`);
    if (compromised) throw fileProblem(path, `lost its lock while changing (${compromised.message}); nothing was written`, 'try again');

    const backups: string[] = [];
    if (bytes !== null && loaded !== null) {
      if (loaded.applied.length > 0) backups.push(writeBackup(target, bytes, options.now, `v${loaded.diskVersion}`));
      else if (options.backup) backups.push(writeBackup(target, bytes, options.now, ''));
    }
    const mode = bytes === null ? FILE_MODE : statSync(target).mode & 0o777;
    await writeFileAtomic(target, stringifySafe(checked.data) + '\n', { mode, fsync: true });
    fsyncPath(dirname(target));
    return { file: checked.data, created: bytes === null, backups, migrated: loaded?.applied ?? [] };
  } finally {
    await release().catch(() => undefined);
  }
}
