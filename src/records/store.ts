/**
 * Reading and changing subject files without ever losing a visit.
 *
 * - Reading never writes: a file that does not parse, fails the schema or was
 *   written by a newer version is refused with an InputError naming the file
 *   and the problem, and its bytes stay exactly as they were.
 * - Every change runs under a lock (proper-lockfile: a `<file>.lock` folder,
 *   owner-only, whose age is refreshed while held; a lock left by a killed
 *   process counts as stale after `staleMs`, 5 s by default, and is then taken
 *   over; a wait of more than a second is said on stderr), re-reads the file
 *   inside the lock, and writes it through io/safe-write.ts (temporary file in
 *   the same folder, fsync, rename, folder fsync). A kill at any instant
 *   leaves the old file or the new one, never a mix.
 * - A subject file that is a symbolic link or a special file is refused (exit
 *   2), and so is one without write permission for its owner (mode 0444: a
 *   FileFault, exit 3), checked from the mode itself, since root ignores it.
 * - New files are created with mode 0600 (owner only); an existing file keeps
 *   its mode. Backups (before an edit or removal, and before a migration) are
 *   0600 copies of the exact old bytes named `<file>.<stamp>[.<tag>].bak`,
 *   complete and flushed before the subject file is replaced, and removed
 *   again when the change then fails.
 *
 * Nothing here reads the clock on its own: the caller passes `now`.
 */
import * as fs from 'node:fs';
import { accessSync, constants as fsConstants, lstatSync, rmSync, statSync } from 'node:fs';
import { createRequire } from 'node:module';
import { basename, dirname, resolve } from 'node:path';
import { FileFault, InputError, plainCause, showValue, type InputProblem } from '../errors.js';
import { fileKind, writeFileSafely, writeNewFileSafely } from '../io/safe-write.js';
import { SUBJECT_FILE, readInputFileIfExists } from '../io/read-input.js';
import { parseJsonText } from '../io/read-json.js';
import { stringifySafe } from '../render/json.js';
import { SUBJECT_VERSIONS, migrateDocument, type Migration, type SchemaVersions } from './migrations.js';
import { SUBJECT_FORMAT, SubjectFileSchema, type SubjectFile } from './subject-schema.js';

/**
 * proper-lockfile, loaded on first write. Through createRequire, not
 * import(): it is CommonJS reading `__filename`, which a single-file ES
 * module bundle does not provide, so it is left out of the bundle and
 * resolved from node_modules at run time.
 */
type Lockfile = typeof import('proper-lockfile');
let lockfileLibrary: Lockfile | undefined;
function lockfileLib(): Lockfile {
  lockfileLibrary ??= createRequire(import.meta.url)('proper-lockfile') as Lockfile;
  return lockfileLibrary;
}

/** Folders this tool creates are its owner's alone (0700), whatever the umask: the lock folder is made through this. */
export const FOLDER_MODE = 0o700;
const lockFs = {
  ...fs,
  mkdir: (path: fs.PathLike, callback: (err: NodeJS.ErrnoException | null) => void) => fs.mkdir(path, { mode: FOLDER_MODE }, (err) => callback(err)),
};

/** Said on stderr once a writer has waited this long for another's lock. */
export const LOCK_WAIT_NOTICE_MS = 1000;

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
  /** Told once the lock has been waited for LOCK_WAIT_NOTICE_MS; by default a line on stderr. */
  onLockWait?: (path: string) => void;
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

/** Write the exact old bytes to a new 0600 backup file beside the original, complete and flushed; never overwrites. */
function writeBackup(path: string, bytes: Buffer, now: Date, tag: string): string {
  const base = `${path}.${backupStamp(now)}${tag ? '.' + tag : ''}`;
  function* names(): Generator<string> {
    for (let n = 1; n < 1000; n++) yield n === 1 ? `${base}.bak` : `${base}-${n}.bak`;
  }
  try {
    return writeNewFileSafely(names(), bytes, { option: 'backup', mode: FILE_MODE });
  } catch (err) {
    if (!(err instanceof FileFault)) throw err;
    throw new FileFault(path, 'cannot be changed', `its backup ${basename(err.path)} cannot be written: ${plainCause(err.code)}`, err.code);
  }
}

/**
 * Refuse to change a subject file that is a link or a special file (InputError)
 * or that its owner may not write (FileFault): from the mode bits, since root
 * would write a 0444 file regardless.
 */
function checkChangeable(path: string, target: string): void {
  let stat: fs.Stats;
  try {
    stat = lstatSync(target);
  } catch {
    return; // not there yet: it will be created
  }
  const kind = fileKind(stat);
  if (kind) throw fileProblem(path, `is ${kind}; a subject file is changed only in place, never through a link`, 'a regular subject file (docs/subject-file.md)');
  if ((stat.mode & 0o200) === 0) {
    throw new FileFault(path, 'cannot be changed', `the file is read-only (mode ${(stat.mode & 0o777).toString(8).padStart(4, '0')}); make it writable (chmod u+w) to change it`);
  }
  // Replacing by rename needs only the folder's permission: the file's own is asked for here.
  try {
    accessSync(target, fsConstants.W_OK);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code ?? '';
    throw new FileFault(path, 'cannot be changed', plainCause(code), code);
  }
}

function lockProblem(path: string, err: unknown): InputError | FileFault {
  const code = (err as NodeJS.ErrnoException).code;
  if (code === 'ELOCKED') {
    return fileProblem(path, `locked by another elastimate process (lock folder ${basename(path)}.lock)`, 'try again in a moment; a lock left by a stopped process expires by itself after a few seconds');
  }
  if (code === 'ENOENT') return fileProblem(path, `the folder ${dirname(path)} does not exist`, 'a subject file in an existing folder');
  if (code) return new FileFault(path, `cannot be locked (the lock is a folder ${basename(path)}.lock beside it)`, plainCause(code), code);
  return fileProblem(path, `cannot be locked (${(err as Error).message})`, 'a subject file in a folder you can write to');
}

function sayLockWait(path: string): void {
  process.stderr.write(`elastimate: waiting for another elastimate process to finish changing ${path}…\n`);
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
  const lockfile = lockfileLib();
  const staleMs = Math.max(options.staleMs ?? DEFAULT_STALE_MS, 2000);

  // Without its folder the lock would be retried in vain until the retries run out.
  let folderOk = false;
  try {
    folderOk = statSync(dirname(target)).isDirectory();
  } catch {
    folderOk = false;
  }
  if (!folderOk) throw lockProblem(path, Object.assign(new Error('no folder'), { code: 'ENOENT' }));
  checkChangeable(path, target);
  // proper-lockfile retries every failure until its retries run out: a folder that cannot be written is said at once.
  try {
    accessSync(dirname(target), fsConstants.W_OK);
  } catch (err) {
    throw lockProblem(path, err);
  }

  let compromised: Error | undefined;
  let release: () => Promise<void>;
  const waitNotice = setTimeout(() => (options.onLockWait ?? sayLockWait)(path), LOCK_WAIT_NOTICE_MS);
  try {
    release = await lockfile.lock(target, {
      fs: lockFs,
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
  } finally {
    clearTimeout(waitNotice);
  }

  const backups: string[] = [];
  try {
    checkChangeable(path, target);
    const bytes = readBytes(target);
    const loaded = bytes === null ? null : parseSubjectBytes(path, bytes, versions);
    const next = await update(loaded ? loaded.file : null);
    const checked = SubjectFileSchema.safeParse({ ...next, schemaVersion: versions.current });
    if (!checked.success) throw new Error(`refusing to write an invalid subject file: ${checked.error.message}`);
    if (compromised) throw fileProblem(path, `lost its lock while changing (${compromised.message}); nothing was written`, 'try again');

    if (bytes !== null && loaded !== null) {
      if (loaded.applied.length > 0) backups.push(writeBackup(target, bytes, options.now, `v${loaded.diskVersion}`));
      else if (options.backup) backups.push(writeBackup(target, bytes, options.now, ''));
    }
    const mode = bytes === null ? FILE_MODE : statSync(target).mode & 0o777;
    writeFileSafely(path, stringifySafe(checked.data) + '\n', { option: 'subject file', mode });
    return { file: checked.data, created: bytes === null, backups, migrated: loaded?.applied ?? [] };
  } catch (err) {
    // The subject file is as it was: a backup of it made for this change would only mislead.
    for (const b of backups) rmSync(b, { force: true });
    throw err;
  } finally {
    await release().catch(() => undefined);
  }
}
