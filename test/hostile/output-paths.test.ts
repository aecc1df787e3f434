/**
 * Output paths never follow a link and never hit an input (issue 8, item 1).
 * Every option that writes a file (`report --out`, the SVG files a Markdown
 * report writes beside it, `assess --svg`, `export --out`, `batch --out`) is
 * given a symbolic link, a hard link to an input, a folder and a FIFO: each is
 * refused with exit 2 and a message naming the path and what it is, and no
 * byte of any file changes. An ordinary file that is not an input is replaced
 * by rename (a new file; other hard links to the old one keep the old bytes),
 * and a temporary file of the same target left by a writer that no longer
 * runs is removed by the next successful write.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, linkSync, lstatSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, writeFileSync, chmodSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { caseFolders } from './fixtures/case-folders.js';
import { ROOT, STACK_FRAME, ok, requireBuild, runCli, type CliRun } from '../cli/fixtures/run-cli.js';

const VISIT = ['--sbp', '120', '--dbp', '80', '--hr', '60', '--edv', '120', '--esv', '50', '--pep', '90', '--et', '290', '--no-input'];

const here = caseFolders('outpaths');
let dir: string;
let subject: string;
let original: Buffer;
beforeEach(() => ({ dir, subject, original } = here));

/** Exit 2, one message naming the option's path and why; no stack trace. */
function expectRefused(run: CliRun, name: string, why: RegExp): void {
  expect(run.timedOut).toBe(false);
  expect(run.code, run.stderr).toBe(2);
  expect(run.stderr).not.toMatch(STACK_FRAME);
  expect(run.stderr).toContain(name);
  expect(run.stderr).toMatch(why);
}

const LINK = /is a symbolic link/;
const SAME = /is the same file as .*s\.json.*which the command reads/;

describe('a symbolic link as the output', () => {
  it('report --out link.html → the subject file: refused, the subject file unchanged', async () => {
    symlinkSync('s.json', join(dir, 'link.html'));
    expectRefused(await runCli(['report', subject, '--out', join(dir, 'link.html')]), 'link.html', LINK);
    expect(readFileSync(subject)).toEqual(original);
  });

  it('export --out link.csv → the subject file, and → another file: refused, neither file nor its mode changed', async () => {
    symlinkSync('s.json', join(dir, 'link.csv'));
    expectRefused(await runCli(['export', subject, '--out', join(dir, 'link.csv')]), 'link.csv', LINK);
    expect(readFileSync(subject)).toEqual(original);
    const other = join(dir, 'notes.txt');
    writeFileSync(other, 'my notes\n');
    chmodSync(other, 0o644);
    symlinkSync('notes.txt', join(dir, 'other.csv'));
    expectRefused(await runCli(['export', subject, '--out', join(dir, 'other.csv')]), 'other.csv', LINK);
    expect(readFileSync(other, 'utf8')).toBe('my notes\n');
    expect(statSync(other).mode & 0o777).toBe(0o644);
  });

  it('assess --svg link.svg → the visit file read by --input: refused, the visit file unchanged', async () => {
    const visit = join(dir, 'v.json');
    copyFileSync(join(ROOT, 'cases', 'cardio-oncology.visit.json'), visit);
    const before = readFileSync(visit);
    symlinkSync('v.json', join(dir, 'link.svg'));
    expectRefused(await runCli(['assess', '--input', visit, '--no-input', '--svg', join(dir, 'link.svg')]), 'link.svg', LINK);
    expect(readFileSync(visit)).toEqual(before);
  });

  it('batch --out link.csv → the subject file: refused, unchanged', async () => {
    symlinkSync('s.json', join(dir, 'link.csv'));
    expectRefused(await runCli(['batch', join(ROOT, 'cases', 'hypertension-cohort.csv'), '--out', join(dir, 'link.csv')]), 'link.csv', LINK);
    expect(readFileSync(subject)).toEqual(original);
  });

  it('a Markdown report whose SVG file beside it is a link to the subject file: refused before anything is written', async () => {
    symlinkSync('s.json', join(dir, 'r-pv.svg'));
    const run = await runCli(['report', subject, '--out', join(dir, 'r.md')]);
    expectRefused(run, 'r-pv.svg', LINK);
    expect(readFileSync(subject)).toEqual(original);
    expect(readdirSync(dir).sort()).toEqual(['r-pv.svg', 's.json']);
  });
});

describe('a hard link to an input as the output (same device and inode)', () => {
  it('report --out: refused, unchanged', async () => {
    linkSync(subject, join(dir, 'hard.html'));
    expectRefused(await runCli(['report', subject, '--out', join(dir, 'hard.html')]), 'hard.html', SAME);
    expect(readFileSync(subject)).toEqual(original);
  });

  it('export --out (a link to the second of two subject files): refused, unchanged', async () => {
    const second = join(dir, 't.json');
    writeFileSync(second, original);
    linkSync(second, join(dir, 'hard.csv'));
    expectRefused(await runCli(['export', subject, second, '--out', join(dir, 'hard.csv')]), 'hard.csv', /is the same file as .*t\.json/);
    expect(readFileSync(second)).toEqual(original);
  });

  it('batch --out (a link to the input CSV): refused, unchanged', async () => {
    const csv = join(dir, 'cohort.csv');
    copyFileSync(join(ROOT, 'cases', 'hypertension-cohort.csv'), csv);
    const before = readFileSync(csv);
    linkSync(csv, join(dir, 'results.csv'));
    expectRefused(await runCli(['batch', csv, '--out', join(dir, 'results.csv')]), 'results.csv', /is the same file as .*cohort\.csv/);
    expect(readFileSync(csv)).toEqual(before);
  });

  it('assess --svg (a link to the visit file): refused, unchanged', async () => {
    const visit = join(dir, 'v.json');
    copyFileSync(join(ROOT, 'cases', 'cardio-oncology.visit.json'), visit);
    const before = readFileSync(visit);
    linkSync(visit, join(dir, 'hard.svg'));
    expectRefused(await runCli(['assess', '--input', visit, '--no-input', '--svg', join(dir, 'hard.svg')]), 'hard.svg', /is the same file as .*v\.json/);
    expect(readFileSync(visit)).toEqual(before);
  });
});

describe('a folder or a special file as the output', () => {
  it('a folder is named as a folder (report, export)', async () => {
    mkdirSync(join(dir, 'out.html'));
    expectRefused(await runCli(['report', subject, '--out', join(dir, 'out.html')]), 'out.html', /is a folder/);
    expectRefused(await runCli(['export', subject, '--out', dir]), dir, /is a folder/);
  });

  it('a FIFO is named as a named pipe at once, never opened (batch, assess --svg)', async () => {
    const fifo = join(dir, 'pipe.svg');
    expect(spawnSync('mkfifo', [fifo]).status).toBe(0);
    expectRefused(await runCli(['assess', ...VISIT, '--svg', fifo], { timeoutMs: 10_000 }), 'pipe.svg', /is a named pipe \(FIFO\)/);
    expectRefused(await runCli(['batch', join(ROOT, 'cases', 'hypertension-cohort.csv'), '--out', fifo], { timeoutMs: 10_000 }), 'pipe.svg', /is a named pipe \(FIFO\)/);
    expect(lstatSync(fifo).isFIFO()).toBe(true);
  });

  it('a device is named as a device (export --out /dev/null)', async () => {
    expectRefused(await runCli(['export', subject, '--out', '/dev/null']), '/dev/null', /is a device/);
  });
});

describe('an ordinary file that is not an input', () => {
  it('is replaced by rename: a new file of mode 0600, while another hard link keeps the old bytes (held on main too)', async () => {
    const out = join(dir, 'cohort.csv');
    writeFileSync(out, 'old export\n');
    linkSync(out, join(dir, 'kept.csv'));
    ok(await runCli(['export', subject, '--out', out]));
    expect(readFileSync(out, 'utf8')).toMatch(/^subject,visit,/);
    expect(statSync(out).mode & 0o777).toBe(0o600);
    expect(readFileSync(join(dir, 'kept.csv'), 'utf8')).toBe('old export\n');
  });

  it('a temporary file of the same target left by a stopped writer is removed by the next write; one of a running writer is kept', async () => {
    const stopped = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
    const deadPid = Number(stopped.stdout);
    const stale = join(dir, `.report.html.${deadPid}.elastimate-tmp`);
    const live = join(dir, `.report.html.${process.pid}.elastimate-tmp`);
    const unrelated = join(dir, `.other.html.${deadPid}.elastimate-tmp`);
    for (const f of [stale, live, unrelated]) writeFileSync(f, 'half a report');
    ok(await runCli(['report', subject, '--out', join(dir, 'report.html')]));
    expect(readdirSync(dir).sort()).toEqual(['.other.html.' + deadPid + '.elastimate-tmp', `.report.html.${process.pid}.elastimate-tmp`, 'report.html', 's.json']);
  });
});
