/**
 * The one input reader, on the kinds of path POSIX defines (regular file,
 * directory, FIFO, character device, symbolic link: IEEE Std 1003.1, <sys/stat.h>
 * file types). Spawned-CLI cases are in test/hostile/reading.test.ts.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { requireBuild } from '../cli/fixtures/run-cli.js';
import { inputErrorMessage } from '../fixtures/input-error.js';
import { BATCH_FILE, SUBJECT_FILE, VISIT_FILE, formatSize, openInputStream, readInputFile, readInputFileIfExists, type InputKind } from '../../src/io/read-input.js';

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'elastimate-read-input-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const SMALL: InputKind = { ...VISIT_FILE, limit: 10 };

const refusal = inputErrorMessage;

describe('readInputFile', () => {
  it('reads a regular file, also through a symbolic link', () => {
    const path = join(dir, 'a.json');
    writeFileSync(path, '{"a":1}');
    symlinkSync(path, join(dir, 'link.json'));
    expect(readInputFile(path, VISIT_FILE).toString()).toBe('{"a":1}');
    expect(readInputFile(join(dir, 'link.json'), VISIT_FILE).toString()).toBe('{"a":1}');
  });

  it('accepts a file of exactly the limit and refuses one byte more, naming both sizes', () => {
    writeFileSync(join(dir, 'ten'), '0123456789');
    writeFileSync(join(dir, 'eleven'), '0123456789A');
    expect(readInputFile(join(dir, 'ten'), SMALL).length).toBe(10);
    expect(refusal(() => readInputFile(join(dir, 'eleven'), SMALL))).toMatch(/input: got ".*eleven"; too large \(11 bytes; the limit for a visit file is 10 bytes\)/);
  });

  it('refuses a folder, a FIFO without a writer (at once), a device, an empty path and a missing file, each in words', () => {
    const fifo = join(dir, 'pipe');
    execFileSync('mkfifo', [fifo]);
    expect(refusal(() => readInputFile(dir, VISIT_FILE))).toMatch(/; is a folder;/);
    expect(refusal(() => readInputFile(fifo, VISIT_FILE))).toMatch(/is a named pipe \(FIFO\), not a regular file/);
    expect(refusal(() => readInputFile('/dev/zero', VISIT_FILE))).toMatch(/is a device, not a regular file/);
    expect(refusal(() => readInputFile('/dev/null', SUBJECT_FILE))).toMatch(/^subject file: .*is a device/);
    expect(refusal(() => readInputFile('', BATCH_FILE))).toMatch(/^batch file: got ""; an empty path/);
    expect(refusal(() => readInputFile(join(dir, 'nope'), VISIT_FILE))).toMatch(/file not found/);
    symlinkSync(join(dir, 'loop'), join(dir, 'loop'));
    expect(refusal(() => readInputFile(join(dir, 'loop'), VISIT_FILE))).toMatch(/a loop of symbolic links/);
  });

  it('readInputFileIfExists: null for a missing file only', () => {
    expect(readInputFileIfExists(join(dir, 'missing.json'), SUBJECT_FILE)).toBeNull();
    expect(() => readInputFileIfExists(dir, SUBJECT_FILE)).toThrow(InputError);
  });

  it('a subject file is never standard input: "-" is a file name there', () => {
    expect(refusal(() => readInputFile('-', SUBJECT_FILE))).toMatch(/subject file: got "-"; file not found/);
  });
});

describe('openInputStream', () => {
  it('streams a file whole, and refuses a device before the first chunk', async () => {
    const path = join(dir, 'rows.csv');
    writeFileSync(path, 'a,b\n1,2\n'.repeat(1000));
    const input = openInputStream(path, BATCH_FILE, 64);
    let text = '';
    for await (const chunk of input.chunks) text += chunk;
    expect(text).toBe('a,b\n1,2\n'.repeat(1000));
    expect(input.size).toBe(8000);
    expect(() => openInputStream('/dev/zero', BATCH_FILE, 64)).toThrow(/is a device/);
  });

  it('keeps a multi-byte character split across chunks whole', async () => {
    const path = join(dir, 'utf8.csv');
    writeFileSync(path, 'é'.repeat(100));
    let text = '';
    for await (const chunk of openInputStream(path, BATCH_FILE, 3).chunks) text += chunk;
    expect(text).toBe('é'.repeat(100));
  });
});

describe('standard input, counted as it arrives', () => {
  // A child process whose standard input is a pipe, running the built reader (dist/, `npm run build`) with a 1,000-byte limit.
  const script = (kind: string) => `
    import { ${kind}, openInputStream, readInputFile } from ${JSON.stringify(new URL('../../dist/io/read-input.js', import.meta.url).href)};
    const kind = { ...${kind}, limit: 1000 };
    try {
      if (process.argv[1] === 'stream') { let n = 0; for await (const c of openInputStream('-', kind, 64).chunks) n += c.length; console.log('read', n); }
      else console.log('read', readInputFile('-', kind).length);
    } catch (err) { console.log(err.message); }`;
  const run = (mode: 'stream' | 'whole', bytes: number) =>
    spawnSync(process.execPath, ['--input-type=module', '-e', script(mode === 'stream' ? 'BATCH_FILE' : 'VISIT_FILE'), mode], {
      input: 'x'.repeat(bytes),
      encoding: 'utf8',
      timeout: 20_000,
    });

  it('reads up to the limit and refuses more, streamed (batch) or whole (visit file)', () => {
    requireBuild();
    for (const mode of ['stream', 'whole'] as const) {
      expect(run(mode, 1000).stdout.trim()).toBe('read 1000');
      expect(run(mode, 5000).stdout).toMatch(/got standard input \(-\); too large \(more than 1000 bytes; the limit for a (batch|visit) file is 1000 bytes\)/);
    }
  });
});

it('formatSize: bytes, then binary units (IEC 80000-13 prefixes)', () => {
  expect(formatSize(640)).toBe('640 bytes');
  expect(formatSize(1024 * 1024)).toBe('1 MiB');
  expect(formatSize(1.5 * 1024 * 1024)).toBe('1.5 MiB');
  expect(formatSize(1024 ** 3)).toBe('1 GiB');
});
