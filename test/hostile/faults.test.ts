/**
 * Faults of the system, made for real (needs root, as CI has; see
 * fixtures/system-means.ts): a full disk (a 256 KiB tmpfs filled up), a
 * read-only file system (a tmpfs remounted read-only), an immutable file
 * (`chattr +i` on a loop-mounted ext4 image) and permission denied (the CLI
 * run as `nobody` by setpriv). Each command that writes must answer with one
 * message naming the file and the cause in plain words, exit code 3
 * (docs/files.md), the subject file byte-for-byte as it was, and nothing left
 * behind: no backup, no temporary file.
 */
import { spawnSync } from 'node:child_process';
import { chmodSync, copyFileSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROOT, STACK_FRAME, requireBuild, runCli } from '../cli/fixtures/run-cli.js';
import { AS_NOBODY, inPrivateMounts, requireMeans, value, type ScriptRun } from './fixtures/system-means.js';

const VISIT = '--date 2025-01-01 --sbp 120 --dbp 80 --hr 60 --edv 120 --esv 50 --pep 90 --et 290 --no-input';
const FILE_FAULT = '3';

let scratch: string;
let subject: string;

beforeAll(() => {
  requireBuild();
  scratch = mkdtempSync(join(tmpdir(), 'elastimate-faults-'));
  chmodSync(scratch, 0o755); // so that `nobody` can reach the files and only their own modes count
  subject = join(scratch, 'source.subject.json');
  copyFileSync(join(ROOT, 'cases', 'cardio-oncology.subject.json'), subject);
});

afterAll(() => {
  rmSync(scratch, { recursive: true, force: true });
});

/** Every named command refused with exit 3, its message naming the file and the cause; the folder as before, the subject unchanged. */
function expectFaults(run: ScriptRun, names: string[], file: RegExp, cause: RegExp): void {
  for (const name of names) {
    const err = value(run, `${name}.err`);
    expect(value(run, `${name}.rc`), `${name}: ${err}`).toBe(FILE_FAULT);
    expect(err, name).toMatch(file);
    expect(err, name).toMatch(cause);
    expect(err, name).not.toMatch(/internal error/);
    expect(err, name).not.toMatch(STACK_FRAME);
  }
  expect(value(run, 'subject.same')).toBe('yes');
  expect(value(run, 'after.files')).toBe(value(run, 'before.files'));
}

describe('a full disk', () => {
  it('record edit, remove and add, export, report, batch and assess --svg: exit 3, "the disk is full", nothing changed or left', async () => {
    requireMeans('unshare', 'mount');
    const run = await inPrivateMounts(
      `D="$SCRATCH/full"; mkdir -p "$D"
       mount -t tmpfs -o size=256k,mode=0755 tmpfs "$D" || exit 90
       cp "$SRC" "$D/s.json"
       dd if=/dev/zero of="$D/fill" bs=4k 2>/dev/null
       files before "$D"
       cli edit record edit "$D/s.json" 1 --note changed --yes
       cli remove record remove "$D/s.json" 1 --yes
       cli add record add "$D/s.json" ${VISIT}
       cli export export "$D/s.json" --out "$D/cohort.csv"
       cli report report "$D/s.json" --out "$D/report.html"
       cli batch batch "$CSV" --out "$D/results.csv"
       cli svg assess ${VISIT.replace('--date 2025-01-01 ', '')} --svg "$D/loop.svg"
       same subject "$SRC" "$D/s.json"
       files after "$D"`,
      { SCRATCH: scratch, SRC: subject, CSV: join(ROOT, 'cases', 'hypertension-cohort.csv') },
    );
    expect(run.code, run.stderr).toBe(0);
    expectFaults(run, ['edit', 'remove', 'add'], /"[^"]*s\.json"/, /the disk is full \(ENOSPC\)/);
    expectFaults(run, ['export'], /"[^"]*cohort\.csv"/, /the disk is full \(ENOSPC\)/);
    expectFaults(run, ['report'], /"[^"]*report\.html"/, /the disk is full \(ENOSPC\)/);
    expectFaults(run, ['batch'], /"[^"]*results\.csv"/, /the disk is full \(ENOSPC\)/);
    expectFaults(run, ['svg'], /"[^"]*loop\.svg"/, /the disk is full \(ENOSPC\)/);
    expect(value(run, 'before.files')).toBe('fill s.json');
  });
});

describe('a read-only file system', () => {
  it('record add and edit, report: exit 3, "read-only", nothing changed', async () => {
    requireMeans('unshare', 'mount');
    const run = await inPrivateMounts(
      `D="$SCRATCH/readonly"; mkdir -p "$D"
       mount -t tmpfs -o size=1m,mode=0755 tmpfs "$D" || exit 90
       cp "$SRC" "$D/s.json"
       mount -o remount,ro "$D" || exit 91
       files before "$D"
       cli add record add "$D/s.json" ${VISIT}
       cli edit record edit "$D/s.json" 1 --note changed --yes
       cli report report "$D/s.json" --out "$D/report.html"
       same subject "$SRC" "$D/s.json"
       files after "$D"`,
      { SCRATCH: scratch, SRC: subject },
    );
    expect(run.code, run.stderr).toBe(0);
    expectFaults(run, ['add', 'edit'], /"[^"]*s\.json"/, /the file system is read-only \(EROFS\)/);
    expectFaults(run, ['report'], /"[^"]*report\.html"/, /the file system is read-only \(EROFS\)/);
  });
});

describe('an immutable file (chattr +i on ext4)', () => {
  it('record edit and add on an immutable subject file, report over an immutable report: exit 3, no backup or temporary file left', async () => {
    requireMeans('unshare', 'mount', 'mkfs.ext4', 'chattr');
    const image = join(scratch, 'ext4.img');
    writeFileSync(image, '');
    spawnSync('truncate', ['-s', '8M', image]);
    const made = spawnSync('mkfs.ext4', ['-q', '-F', image], { encoding: 'utf8' });
    expect(made.status, made.stderr).toBe(0);
    const run = await inPrivateMounts(
      `D="$SCRATCH/ext4"; mkdir -p "$D"
       mount -o loop "$IMG" "$D" || exit 90
       cp "$SRC" "$D/s.json"; printf 'an earlier report\\n' > "$D/report.html"
       chattr +i "$D/s.json" "$D/report.html" || exit 91
       files before "$D"
       cli edit record edit "$D/s.json" 1 --note changed --yes
       cli add record add "$D/s.json" ${VISIT}
       cli report report "$D/s.json" --out "$D/report.html"
       printf 'report.same=%s\\n' "$(cat "$D/report.html")"
       same subject "$SRC" "$D/s.json"
       files after "$D"
       chattr -i "$D/s.json" "$D/report.html"; umount "$D"`,
      { SCRATCH: scratch, SRC: subject, IMG: image },
    );
    expect(run.code, run.stderr).toBe(0);
    expectFaults(run, ['edit', 'add'], /"[^"]*s\.json"/, /immutable \(EPERM\)/);
    expectFaults(run, ['report'], /"[^"]*report\.html"/, /immutable \(EPERM\)/);
    expect(value(run, 'report.same')).toBe('an earlier report');
  });
});

describe('permission denied (run as nobody)', () => {
  it('record add, report and export in a folder nobody may write: exit 3, "permission denied", nothing changed', async () => {
    requireMeans('setpriv');
    const folder = join(scratch, 'root-only');
    rmSync(folder, { recursive: true, force: true });
    const { mkdirSync } = await import('node:fs');
    mkdirSync(folder, { mode: 0o755 });
    chmodSync(folder, 0o755);
    const file = join(folder, 's.json');
    copyFileSync(subject, file);
    chmodSync(file, 0o644);
    const before = readdirSync(folder).sort();
    const runs = {
      add: await runCli(['record', 'add', file, ...VISIT.split(' ')], { wrap: AS_NOBODY }),
      report: await runCli(['report', file, '--out', join(folder, 'report.html')], { wrap: AS_NOBODY }),
      export: await runCli(['export', file, '--out', join(folder, 'cohort.csv')], { wrap: AS_NOBODY }),
    };
    for (const [name, run] of Object.entries(runs)) {
      expect(run.code, `${name}: ${run.stderr}`).toBe(3);
      expect(run.stderr, name).toMatch(/permission denied \(EACCES\)/);
      expect(run.stderr, name).not.toMatch(STACK_FRAME);
      expect(run.stderr.trim().split('\n'), name).toHaveLength(1);
    }
    expect(runs.add.stderr).toMatch(/"[^"]*s\.json"/);
    expect(runs.report.stderr).toMatch(/"[^"]*report\.html"/);
    expect(runs.export.stderr).toMatch(/"[^"]*cohort\.csv"/);
    expect(readFileSync(file)).toEqual(readFileSync(subject));
    expect(readdirSync(folder).sort()).toEqual(before);
  });
});
