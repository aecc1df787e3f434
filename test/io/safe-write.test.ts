/**
 * The one safe write (src/io/safe-write.ts), with its file-system calls
 * recorded (and, where a fault is wanted, failed) through the `fs` it is
 * given: the sequence is temporary file in the target's folder (created
 * exclusively, never through a link), write, fsync, close, rename over the
 * target, folder fsync; any failure removes the temporary file, leaves the
 * target as it was and is a FileFault in plain words. The order "fsync before
 * rename" is the usual rule for a crash-safe replace (common practice, e.g.
 * the rename(2) and fsync(2) manual pages).
 */
import { constants, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FileFault, InputError } from '../../src/errors.js';
import { beginSafeWrite, nodeSafeWriteFs, tempPathFor, writeFileSafely, writeNewFileSafely, type SafeWriteFs } from '../../src/io/safe-write.js';

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'elastimate-safe-write-'));
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

type Call = [string, ...unknown[]];

/** node:fs with every call logged; `fail` makes the named call throw the given error code. */
function recorder(fail: Partial<Record<keyof SafeWriteFs, string>> = {}): { fs: SafeWriteFs; calls: Call[] } {
  const calls: Call[] = [];
  const fs = {} as Record<string, unknown>;
  for (const [name, fn] of Object.entries(nodeSafeWriteFs) as [keyof SafeWriteFs, (...a: unknown[]) => unknown][]) {
    fs[name] = (...args: unknown[]) => {
      calls.push([name, ...args.map((a) => (a instanceof Uint8Array ? `${a.length} bytes` : a))]);
      const code = fail[name];
      if (code) throw Object.assign(new Error(`${name} failed`), { code });
      return fn(...args);
    };
  }
  return { fs: fs as unknown as SafeWriteFs, calls };
}

/** The calls that touch the temporary file or the target, in order (stat and readdir left out). */
function writes(calls: Call[]): string[] {
  return calls.filter(([name]) => !/stat|readdir/.test(name)).map(([name]) => name);
}

describe('writeFileSafely', () => {
  it('writes through a temporary file beside the target: open exclusive, write, fsync, close, rename, then the folder fsync', () => {
    const target = join(dir, 'a.txt');
    writeFileSync(target, 'old');
    const { fs, calls } = recorder();
    writeFileSafely(target, 'new text', { option: '--out', fs });
    expect(readFileSync(target, 'utf8')).toBe('new text');
    const temp = tempPathFor(target);
    expect(temp).toBe(join(dir, `.a.txt.${process.pid}.elastimate-tmp`));
    const open = calls.find(([name]) => name === 'openSync')!;
    expect(open[1]).toBe(temp);
    const flags = open[2] as number;
    for (const bit of [constants.O_CREAT, constants.O_EXCL, constants.O_WRONLY, constants.O_NOFOLLOW]) expect(flags & bit).toBe(bit);
    expect(writes(calls)).toEqual(['openSync', 'fchmodSync', 'writeSync', 'fsyncSync', 'closeSync', 'renameSync', 'openSync', 'fsyncSync', 'closeSync']);
    expect(calls.find(([name]) => name === 'renameSync')).toEqual(['renameSync', temp, target]);
    expect(readdirSync(dir)).not.toContain(`.a.txt.${process.pid}.elastimate-tmp`);
  });

  it('gives the new file the mode asked for (default 0600), whatever the umask', () => {
    const target = join(dir, 'mode.txt');
    const { fs, calls } = recorder();
    writeFileSafely(target, 'x', { option: '--out', fs });
    expect(calls.find(([name]) => name === 'fchmodSync')?.[2]).toBe(0o600);
  });

  for (const [call, code, words] of [
    ['writeSync', 'ENOSPC', 'the disk is full'],
    ['fsyncSync', 'EIO', 'input/output error'],
    ['renameSync', 'EPERM', 'immutable'],
    ['openSync', 'EROFS', 'read-only'],
    ['openSync', 'EACCES', 'permission denied'],
  ] as const) {
    it(`${call} failing with ${code}: a FileFault naming the file and "${words}", the target unchanged, no temporary file`, () => {
      const target = join(dir, `fault-${code}-${call}.txt`);
      writeFileSync(target, 'as it was');
      const { fs, calls } = recorder({ [call]: code });
      let caught: unknown;
      try {
        writeFileSafely(target, 'new', { option: '--out', fs });
      } catch (err) {
        caught = err;
      }
      expect(caught).toBeInstanceOf(FileFault);
      const fault = caught as FileFault;
      expect(fault.code).toBe(code);
      expect(fault.message).toContain(target);
      expect(fault.message).toContain(words);
      expect(fault.message).toContain('the file was left as it was');
      expect(readFileSync(target, 'utf8')).toBe('as it was');
      expect(readdirSync(dir).filter((f) => f.includes('elastimate-tmp'))).toEqual([]);
      if (call !== 'renameSync') expect(writes(calls)).not.toContain('renameSync');
    });
  }

  it('a FileFault names the file whole, with control and bidirectional characters shown as stand-ins (text/sanitize.ts)', () => {
    const target = join(dir, 'odd\u009b2J\u202eam.txt');
    const { fs } = recorder({ openSync: 'EACCES' });
    let caught: unknown;
    try {
      writeFileSafely(target, 'x', { option: '--out', fs });
    } catch (err) {
      caught = err;
    }
    const message = (caught as FileFault).message;
    expect(message).toContain(join(dir, 'odd\ufffd2J\ufffdam.txt'));
    expect(message).not.toMatch(/[\u0080-\u009f\u202a-\u202e\u2066-\u2069]/);
  });

  it('refuses a target that is the same file as an input, before opening anything', () => {
    const input = join(dir, 'input.json');
    writeFileSync(input, '{}');
    const { fs, calls } = recorder();
    expect(() => writeFileSafely(input, 'x', { option: '--out', inputs: [input], fs })).toThrow(InputError);
    expect(writes(calls)).toEqual([]);
    expect(readFileSync(input, 'utf8')).toBe('{}');
  });
});

describe('writeNewFileSafely (backups)', () => {
  it('never replaces a file: the first free name is taken, through a temporary file and a hard link', () => {
    const taken = join(dir, 'b.bak');
    writeFileSync(taken, 'earlier backup');
    const free = join(dir, 'b-2.bak');
    const { fs, calls } = recorder();
    expect(writeNewFileSafely([taken, free], 'backup bytes', { option: 'backup', fs })).toBe(free);
    expect(readFileSync(taken, 'utf8')).toBe('earlier backup');
    expect(readFileSync(free, 'utf8')).toBe('backup bytes');
    const linked = calls.filter(([name]) => name === 'linkSync').map((c) => c[2]);
    expect(linked).toEqual([taken, free]);
    // Flushed before it gets its name.
    expect(writes(calls).indexOf('fsyncSync')).toBeLessThan(writes(calls).indexOf('linkSync'));
    expect(readdirSync(dir).filter((f) => f.includes('elastimate-tmp'))).toEqual([]);
  });
});

describe('SafeWrite', () => {
  it('a background flush (fdatasync) goes before the fsync of commit, and the file is whole', async () => {
    const target = join(dir, 'flushed.txt');
    const { fs, calls } = recorder();
    const w = beginSafeWrite(target, { option: '--out', fs });
    w.write('first half, ');
    w.flushInBackground();
    w.flushInBackground(); // one at a time: this one is ignored
    w.write('second half');
    expect(() => w.commit()).toThrow(/background flush/); // not while the flush is under way
    await w.flushed();
    w.commit();
    expect(readFileSync(target, 'utf8')).toBe('first half, second half');
    expect(writes(calls)).toEqual(['openSync', 'fchmodSync', 'writeSync', 'fdatasync', 'writeSync', 'fsyncSync', 'closeSync', 'renameSync', 'openSync', 'fsyncSync', 'closeSync']);
  });

  it('a background flush that failed fails commit: a FileFault naming the file and the cause, the target unchanged, no temporary file', async () => {
    const target = join(dir, 'flush-failed.txt');
    writeFileSync(target, 'as it was');
    const fs: SafeWriteFs = { ...nodeSafeWriteFs, fdatasync: (_fd, done) => done(Object.assign(new Error('fdatasync failed'), { code: 'EIO' })) };
    const w = beginSafeWrite(target, { option: '--out', fs });
    w.write('new');
    w.flushInBackground();
    await w.flushed();
    let caught: unknown;
    try {
      w.commit();
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(FileFault);
    expect((caught as FileFault).message).toContain(target);
    expect((caught as FileFault).message).toContain('the file was left as it was');
    expect(readFileSync(target, 'utf8')).toBe('as it was');
    expect(readdirSync(dir).filter((f) => f.includes('elastimate-tmp'))).toEqual([]);
  });

  it('abort removes the temporary file and leaves the target as it was', () => {
    const target = join(dir, 'c.txt');
    writeFileSync(target, 'kept');
    const w = beginSafeWrite(target, { option: '--out' });
    w.write('half');
    expect(readdirSync(dir)).toContain(`.c.txt.${process.pid}.elastimate-tmp`);
    w.abort();
    expect(readdirSync(dir)).not.toContain(`.c.txt.${process.pid}.elastimate-tmp`);
    expect(readFileSync(target, 'utf8')).toBe('kept');
  });
});
