/**
 * The one safe way this tool writes a file: reports, diagrams, exports, batch
 * output, backups and the final replace of a subject file all come here.
 *
 * - The target is checked first (checkOutputPath): its folder must exist; a
 *   symbolic link, a folder, a FIFO, a device or a socket is refused by name;
 *   so is the very file (same device and inode, so hard links too) of any
 *   file the command reads. An InputError (exit 2) names the option.
 * - The bytes go to a temporary file in the target's folder, named
 *   `.<target name>.<pid>.elastimate-tmp` (created exclusively, never through
 *   a link), are fsynced, and the file is renamed over the target, then the
 *   folder is fsynced. A kill at any instant leaves the old file or the whole
 *   new one. The target is checked again just before the rename.
 * - A temporary file of the same target left by a writer that no longer runs
 *   (killed with SIGKILL) is removed after the next successful write.
 *   SIGINT, SIGTERM and SIGHUP remove the temporary files of writes under way
 *   before the process ends.
 * - A failure of the system (disk full, permission denied, read-only file
 *   system, immutable file) is a FileFault naming the file and the cause in
 *   plain words (exit 3); the target is unchanged and the temporary file gone.
 *
 * No library does this: the usual atomic-write packages follow symbolic
 * links to write the file they point at, and name their temporary files in a
 * way a later run cannot recognise. The file-system calls can be passed in
 * (`fs`), so a test can record and fail them.
 */
import * as nodeFs from 'node:fs';
import type { Stats } from 'node:fs';
import { basename, dirname, extname, join, resolve } from 'node:path';
import { FileFault, InputError, plainCause, showValue } from '../errors.js';
import { FILE_MODE } from '../records/file-mode.js';

/** The file-system calls safe writes use: node:fs by default, or a test's recorder. */
export interface SafeWriteFs {
  openSync(path: string, flags: number, mode: number): number;
  writeSync(fd: number, buffer: Uint8Array, offset: number, length: number): number;
  fsyncSync(fd: number): void;
  /** fdatasync in the background (the thread pool): `done` gets its error, or null. */
  fdatasync(fd: number, done: (err: Error | null) => void): void;
  fchmodSync(fd: number, mode: number): void;
  fchownSync(fd: number, uid: number, gid: number): void;
  closeSync(fd: number): void;
  renameSync(from: string, to: string): void;
  linkSync(existing: string, created: string): void;
  unlinkSync(path: string): void;
  lstatSync(path: string): Stats;
  statSync(path: string): Stats;
  readdirSync(path: string): string[];
}

export const nodeSafeWriteFs: SafeWriteFs = {
  openSync: (p, f, m) => nodeFs.openSync(p, f, m),
  writeSync: (fd, b, o, l) => nodeFs.writeSync(fd, b, o, l),
  fsyncSync: (fd) => nodeFs.fsyncSync(fd),
  fdatasync: (fd, done) => nodeFs.fdatasync(fd, done),
  fchmodSync: (fd, m) => nodeFs.fchmodSync(fd, m),
  fchownSync: (fd, u, g) => nodeFs.fchownSync(fd, u, g),
  closeSync: (fd) => nodeFs.closeSync(fd),
  renameSync: (a, b) => nodeFs.renameSync(a, b),
  linkSync: (a, b) => nodeFs.linkSync(a, b),
  unlinkSync: (p) => nodeFs.unlinkSync(p),
  lstatSync: (p) => nodeFs.lstatSync(p),
  statSync: (p) => nodeFs.statSync(p),
  readdirSync: (p) => nodeFs.readdirSync(p),
};

/** The fixed part of every temporary file name: a file that ends so is the tool's own. */
export const TEMP_MARKER = '.elastimate-tmp';

export interface OutputPathRule {
  /** The option or field as the user knows it, e.g. `--svg`, `--out` or `subject file`. */
  option: string;
  /** Accepted file-name endings, lower case with the dot, e.g. ['.svg']; empty accepts any name. */
  extensions?: readonly string[];
  /** Files the command reads: the target must not be any of them (by device and inode, or by path). */
  inputs?: readonly string[];
}

export interface SafeWriteOptions extends OutputPathRule {
  /** Mode of the new file (default 0600, owner only); exact, whatever the umask. */
  mode?: number;
  fs?: SafeWriteFs;
}

/** What a non-regular file is, in words; null for a regular file. */
export function fileKind(stat: Stats): string | null {
  if (stat.isFile()) return null;
  if (stat.isSymbolicLink()) return 'a symbolic link';
  if (stat.isDirectory()) return 'a folder';
  if (stat.isFIFO()) return 'a named pipe (FIFO)';
  if (stat.isCharacterDevice() || stat.isBlockDevice()) return 'a device';
  if (stat.isSocket()) return 'a socket';
  return 'not a regular file';
}

function lstatOrNull(fs: SafeWriteFs, path: string): Stats | null {
  try {
    return fs.lstatSync(path);
  } catch {
    return null;
  }
}

/** The refusal of an output path: an InputError naming the option, the path and why. */
function refusal(rule: OutputPathRule, raw: unknown, reason?: string): InputError {
  const ext = rule.extensions ?? [];
  const accepted = ext.length ? `a file path ending in ${ext.join(' or ')}, in an existing folder` : 'a file path in an existing folder';
  return new InputError({ field: rule.option, value: showValue(raw), ...(reason ? { reason } : {}), accepted });
}

/** Why `target` must not be written (an InputError), or nothing when it may be. */
function targetProblem(fs: SafeWriteFs, path: string, raw: unknown, rule: OutputPathRule): InputError | null {
  const existing = lstatOrNull(fs, path);
  if (existing) {
    const kind = fileKind(existing);
    if (kind) return refusal(rule, raw, `is ${kind}; it is never written through or replaced`);
  }
  for (const input of rule.inputs ?? []) {
    if (input === '' || input === '-') continue;
    if (resolve(input) === path) return refusal(rule, raw, 'this is a file the command reads and would be overwritten');
    if (!existing) continue;
    let read: Stats;
    try {
      read = fs.statSync(input);
    } catch {
      continue;
    }
    if (read.dev === existing.dev && read.ino === existing.ino) {
      return refusal(rule, raw, `is the same file as ${showValue(input)} (a hard link), which the command reads, and would be overwritten`);
    }
  }
  return null;
}

/**
 * Check an output path before any work is done; returns it resolved. Throws
 * an InputError (exit 2) naming the option when the path is empty, has the
 * wrong ending, lies in a missing folder, is a link, a folder or a special
 * file, or is one of the command's inputs.
 */
export function checkOutputPath(raw: unknown, rule: OutputPathRule, fs: SafeWriteFs = nodeSafeWriteFs): string {
  if (typeof raw !== 'string' || raw.trim() === '') throw refusal(rule, raw);
  const path = resolve(raw);
  const ext = rule.extensions ?? [];
  if (ext.length && !ext.includes(extname(path).toLowerCase())) throw refusal(rule, raw, 'wrong file type');
  let folder: Stats | null = null;
  try {
    folder = fs.statSync(dirname(path));
  } catch {
    folder = null;
  }
  if (!folder || !folder.isDirectory()) throw refusal(rule, raw, `folder ${showValue(dirname(raw) || '.')} does not exist`);
  const problem = targetProblem(fs, path, raw, rule);
  if (problem) throw problem;
  return path;
}

/** A system error while writing `shown`, in plain words. */
export function writeFault(shown: string, err: unknown, existed = true): FileFault | InputError {
  if (err instanceof FileFault || err instanceof InputError) return err;
  const code = (err as NodeJS.ErrnoException).code;
  const cause = code ? plainCause(code) : err instanceof Error ? err.message : String(err);
  return new FileFault(shown, 'cannot be written', cause, code ?? '', existed ? 'the file was left as it was' : 'nothing was written');
}

// ---- temporary files: names, the signal clean-up, stale ones ----

/** Keep temporary names within the common 255-byte limit: a long target name is shortened with a hash of it. */
function tempStem(name: string): string {
  if (Buffer.byteLength(name) <= 180) return name;
  let h = 0x811c9dc5;
  for (const b of Buffer.from(name)) h = Math.imul(h ^ b, 0x01000193) >>> 0;
  return `${Buffer.from(name).subarray(0, 120).toString('utf8').replace(/\uFFFD+$/, '')}~${h.toString(16)}`;
}

/** `.<name>.<pid>.elastimate-tmp` beside the target. */
export function tempPathFor(target: string, pid = process.pid): string {
  return join(dirname(target), `.${tempStem(basename(target))}.${pid}${TEMP_MARKER}`);
}

function processRuns(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Remove temporary files of `target` whose writer no longer runs. Best effort: a failure here never fails the write. */
export function removeStaleTemps(target: string, fs: SafeWriteFs = nodeSafeWriteFs): string[] {
  const prefix = `.${tempStem(basename(target))}.`;
  const removed: string[] = [];
  let names: string[];
  try {
    names = fs.readdirSync(dirname(target));
  } catch {
    return removed;
  }
  for (const name of names) {
    if (!name.startsWith(prefix) || !name.endsWith(TEMP_MARKER)) continue;
    const pidText = name.slice(prefix.length, name.length - TEMP_MARKER.length);
    if (!/^\d{1,10}$/.test(pidText)) continue;
    const pid = Number(pidText);
    if (pid === process.pid || processRuns(pid)) continue;
    const path = join(dirname(target), name);
    try {
      if (fs.lstatSync(path).isFile()) {
        fs.unlinkSync(path);
        removed.push(path);
      }
    } catch {
      // Gone already, or not ours to remove.
    }
  }
  return removed;
}

/** Temporary files of writes under way, removed if the process is stopped by a signal or exits early. */
const pending = new Map<string, SafeWriteFs>();
const SIGNALS: NodeJS.Signals[] = ['SIGINT', 'SIGTERM', 'SIGHUP'];

function removePending(): void {
  for (const [path, fs] of pending) {
    try {
      fs.unlinkSync(path);
    } catch {
      // Already renamed or removed.
    }
  }
  pending.clear();
}

function onSignal(signal: NodeJS.Signals): void {
  removePending();
  stopWatching();
  // Die of the same signal, as the process would have without this handler (exit status 128 + n).
  if (process.listenerCount(signal) === 0) process.kill(process.pid, signal);
}

function startWatching(): void {
  for (const s of SIGNALS) process.on(s, onSignal);
  process.on('exit', removePending);
}

function stopWatching(): void {
  for (const s of SIGNALS) process.off(s, onSignal);
  process.off('exit', removePending);
}

function track(path: string, fs: SafeWriteFs): void {
  if (pending.size === 0) startWatching();
  pending.set(path, fs);
}

function untrack(path: string): void {
  pending.delete(path);
  if (pending.size === 0) stopWatching();
}

// ---- the write ----

const CREATE_FLAGS = nodeFs.constants.O_WRONLY | nodeFs.constants.O_CREAT | nodeFs.constants.O_EXCL | (nodeFs.constants.O_NOFOLLOW ?? 0);

function fsyncFolder(fs: SafeWriteFs, folder: string): void {
  let fd: number | undefined;
  try {
    fd = fs.openSync(folder, nodeFs.constants.O_RDONLY, 0);
    fs.fsyncSync(fd);
  } catch {
    // Some file systems refuse fsync on a folder; the rename itself is still atomic.
  } finally {
    if (fd !== undefined) fs.closeSync(fd);
  }
}

/**
 * A write under way: a temporary file beside the target, open for writing.
 * `commit` fsyncs it and renames it over the target; `abort` removes it.
 * Exactly one of the two ends it.
 */
export class SafeWrite {
  readonly target: string;
  readonly tempPath: string;
  /** Open descriptor of the temporary file, until commit or abort. */
  fd: number;
  private readonly fs: SafeWriteFs;
  private readonly rule: OutputPathRule;
  private readonly shown: string;
  /** Whether the target existed when the write began (for the wording of a failure). */
  readonly existed: boolean;
  private open = true;
  /** A background flush under way (flushInBackground), and the first that failed. */
  private flushing: Promise<void> | undefined;
  private flushFailure: Error | undefined;

  /** Use beginSafeWrite. */
  constructor(target: string, shown: string, options: SafeWriteOptions) {
    const fs = options.fs ?? nodeSafeWriteFs;
    this.fs = fs;
    this.rule = options;
    this.shown = shown;
    this.target = target;
    this.tempPath = tempPathFor(target);
    const problem = targetProblem(fs, target, shown, options);
    if (problem) throw problem;
    const existing = lstatOrNull(fs, target);
    this.existed = existing !== null;
    const mode = options.mode ?? FILE_MODE;
    let fd: number;
    try {
      track(this.tempPath, fs);
      try {
        fd = fs.openSync(this.tempPath, CREATE_FLAGS, mode);
      } catch (err) {
        // A name of this process's own left by an earlier one with the same pid: ours to replace.
        if ((err as NodeJS.ErrnoException).code !== 'EEXIST' || !lstatOrNull(fs, this.tempPath)?.isFile()) throw err;
        fs.unlinkSync(this.tempPath);
        fd = fs.openSync(this.tempPath, CREATE_FLAGS, mode);
      }
    } catch (err) {
      untrack(this.tempPath);
      throw writeFault(shown, err, existing !== null);
    }
    this.fd = fd;
    try {
      fs.fchmodSync(fd, mode); // exact, whatever the umask
      // Root replacing another user's file keeps that user as its owner.
      if (existing && process.getuid?.() === 0 && (existing.uid !== 0 || existing.gid !== 0)) fs.fchownSync(fd, existing.uid, existing.gid);
    } catch (err) {
      this.abort();
      throw writeFault(shown, err, existing !== null);
    }
  }

  /** Append bytes (synchronously); on failure the write is aborted. */
  write(data: string | Uint8Array): void {
    const bytes = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
    try {
      let done = 0;
      while (done < bytes.length) done += this.fs.writeSync(this.fd, bytes, done, bytes.length - done);
    } catch (err) {
      this.abort();
      throw writeFault(this.shown, err, this.existed);
    }
  }

  /**
   * Start writing what has been written so far out to the disk in the
   * background (fdatasync on the thread pool), so that commit's fsync has
   * only the rest to do: for a long write, such as a batch's output, made
   * while the tool computes. Nothing happens while one is under way. A
   * failure is kept: commit reports it and leaves the target as it was.
   * Wait for `flushed` before commit.
   */
  flushInBackground(): void {
    if (!this.open || this.flushing) return;
    let done!: () => void;
    const flushing = new Promise<void>((settle) => (done = settle));
    this.flushing = flushing;
    this.fs.fdatasync(this.fd, (err) => {
      if (err) this.flushFailure ??= err;
      if (this.flushing === flushing) this.flushing = undefined;
      done();
    });
  }

  /** Settles when no background flush is under way. */
  flushed(): Promise<void> {
    return this.flushing ?? Promise.resolve();
  }

  /** Flush, close and rename over the target; then fsync the folder and clear stale temporary files. */
  commit(): void {
    this.finish(() => {
      const problem = targetProblem(this.fs, this.target, this.shown, this.rule);
      if (problem) throw problem;
      this.fs.renameSync(this.tempPath, this.target);
      return true;
    });
    removeStaleTemps(this.target, this.fs);
  }

  /**
   * Like commit, but only when the target does not exist yet (never replaces a
   * file): for backups. Returns false, removing the temporary file, when it does.
   */
  commitNew(): boolean {
    return this.finish(() => {
      try {
        this.fs.linkSync(this.tempPath, this.target);
        this.fs.unlinkSync(this.tempPath);
      } catch (err) {
        const code = (err as NodeJS.ErrnoException).code;
        if (code === 'EEXIST') return false;
        // A file system without hard links: rename, having made sure the name is free.
        if (!(code === 'EPERM' || code === 'ENOTSUP' || code === 'EOPNOTSUPP' || code === 'ENOSYS') || lstatOrNull(this.fs, this.target)) throw err;
        this.fs.renameSync(this.tempPath, this.target);
      }
      return true;
    });
  }

  /** fsync and close the temporary file, then `place` it; on failure or refusal (false) it is removed. */
  private finish(place: () => boolean): boolean {
    // The descriptor must not close under a flush on the thread pool.
    if (this.flushing) throw new Error('safe write: finished while a background flush is under way (await flushed() first)');
    let placed: boolean;
    try {
      if (this.flushFailure) throw this.flushFailure;
      this.fs.fsyncSync(this.fd);
      this.closeFd();
      placed = place();
    } catch (err) {
      this.abort();
      throw writeFault(this.shown, err, this.existed);
    }
    if (!placed) {
      this.abort();
      return false;
    }
    untrack(this.tempPath);
    fsyncFolder(this.fs, dirname(this.target));
    return true;
  }

  /** Remove the temporary file; the target stays as it was. Safe to call more than once. */
  abort(): void {
    this.closeFd();
    try {
      this.fs.unlinkSync(this.tempPath);
    } catch {
      // Never created, or already gone.
    }
    untrack(this.tempPath);
  }

  private closeFd(): void {
    if (!this.open) return;
    this.open = false;
    try {
      this.fs.closeSync(this.fd);
    } catch {
      // Closing twice or after a failed write: nothing more to do.
    }
  }
}

/** Start a write to `target` (see SafeWrite); the target is checked as checkOutputPath does. */
export function beginSafeWrite(target: string, options: SafeWriteOptions): SafeWrite {
  return new SafeWrite(resolve(target), target, options);
}

/**
 * The one function that writes a whole file: checked target, temporary file,
 * fsync, rename. Throws InputError (a refused target, exit 2) or FileFault
 * (the system refused, exit 3); either way the target is as it was.
 */
export function writeFileSafely(target: string, data: string | Uint8Array, options: SafeWriteOptions): void {
  const w = beginSafeWrite(target, options);
  w.write(data);
  w.commit();
}

/**
 * A new file that never replaces one (backups): written whole and flushed
 * under a temporary name, then linked to the first free name from `names`.
 * Returns the name used. Throws FileFault when the system refuses.
 */
export function writeNewFileSafely(names: Iterable<string>, data: string | Uint8Array, options: SafeWriteOptions): string {
  for (const name of names) {
    const w = beginSafeWrite(name, options);
    w.write(data);
    if (w.commitNew()) return resolve(name);
  }
  throw new FileFault(options.option, 'cannot be written', 'no free file name was found');
}
