/**
 * Hostile inputs on the read side, run as a user (or an attacker) would run
 * the built CLI: special and huge files, standard input, duplicate JSON keys,
 * deep nesting, a "__proto__" error entry, control characters in notes and
 * huge values in error messages. Each case failed (hung, crashed, chose a
 * value silently or passed bytes through raw) before the one input reader
 * (src/io/read-input.ts), the one JSON reader (src/io/read-json.ts) and the
 * one text sanitiser (src/text/sanitize.ts). Needs dist/ (`npm run build`).
 *
 * What counts as a control character is Unicode's category Cc: C0 U+0000–
 * U+001F, DEL U+007F and C1 U+0080–U+009F (The Unicode Standard, ch. 23.1);
 * ESC [ 2 J is ECMA-48's "erase in page" (CSI 2 J), U+009B its one-byte CSI.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BIN, FORBIDDEN_WORDS, ROOT, STACK_FRAME, ok, plainEnv, requireBuild, runCli, type CliRun } from '../cli/fixtures/run-cli.js';

const SUBJECT = join(ROOT, 'cases', 'cardio-oncology.subject.json');
const VISIT = join(ROOT, 'cases', 'hypertension-trial.visit.json');
const COHORT = join(ROOT, 'cases', 'hypertension-cohort.csv');
const FLAGS = ['--sbp', '130', '--dbp', '80', '--hr', '70', '--edv', '120', '--esv', '50', '--pep', '90', '--et', '290', '--no-input'];
const MEASURES = { sbp: 130, dbp: 80, hr: 70, edv: 120, esv: 50, pep: 90, et: 290 };
/** Any C0 control but tab, LF and CR, DEL, or any C1 control. */
// eslint-disable-next-line no-control-regex
/** A raw control byte (C0 but tab and line breaks, DEL, C1) or a bidirectional embedding, override or isolate control (UAX #9). */
const RAW_CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/;

let dir: string;
beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-hostile-read-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function file(name: string, content: string | Buffer): string {
  const path = join(dir, name);
  writeFileSync(path, content);
  return path;
}

/** Refused as bad input: exit 2 at once, one message naming the field, no stack, nothing on standard output. */
function refused(run: CliRun, field: string, reason: RegExp): void {
  expect(run.timedOut, 'the command hung and was killed').toBe(false);
  expect(run.code, run.stderr).toBe(2);
  expect(run.stdout).toBe('');
  expect(run.stderr).toContain(`elastimate: ${field}: `);
  expect(run.stderr).toMatch(reason);
  expect(run.stderr).toMatch(/accepted: /);
  expect(run.stderr).not.toMatch(STACK_FRAME);
  expect(run.stderr).not.toMatch(/internal error|Maximum call stack/);
  expect(run.stderr).not.toMatch(FORBIDDEN_WORDS);
}

/** Run the CLI with `input` on a pipe as standard input (closed after it). */
function withStdin(args: string[], input: string | Buffer): CliRun {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: ROOT, env: plainEnv(), input, encoding: 'utf8', timeout: 15_000, maxBuffer: 1 << 26 });
  // EPIPE is the child closing its end after refusing the input, not a hang.
  return { code: r.status, stdout: r.stdout, stderr: r.stderr, timedOut: (r.error as NodeJS.ErrnoException | undefined)?.code === 'ETIMEDOUT' };
}

function fifo(name: string): string {
  const path = join(dir, name);
  execFileSync('mkfifo', [path]);
  return path;
}

describe('special and huge files are refused at once (exit 2)', () => {
  it('a device as the visit file (/dev/zero) and as the batch file', async () => {
    refused(await runCli(['assess', '--input', '/dev/zero', ...FLAGS], { timeoutMs: 8000 }), 'input', /is a device, not a regular file/);
    refused(await runCli(['batch', '/dev/zero'], { timeoutMs: 8000 }), 'batch file', /is a device, not a regular file/);
  });

  it('a named pipe with no writer, as the visit file, the subject file and the batch file, never blocks', async () => {
    const pipe = fifo('no-writer.fifo');
    refused(await runCli(['assess', '--input', pipe, ...FLAGS], { timeoutMs: 8000 }), 'input', /named pipe \(FIFO\)/);
    refused(await runCli(['record', 'show', pipe], { timeoutMs: 8000 }), 'subject file', /named pipe \(FIFO\)/);
    refused(await runCli(['batch', pipe], { timeoutMs: 8000 }), 'batch file', /named pipe \(FIFO\)/);
  });

  it('a valid visit file over the 1 MiB limit, and standard input over it', async () => {
    const padded = JSON.stringify(MEASURES) + ' '.repeat(1_200_000);
    refused(await runCli(['assess', '--input', file('huge.visit.json', padded), '--no-input']), 'input', /too large \(1\.1 MiB; the limit for a visit file is 1 MiB\)/);
    refused(withStdin(['assess', '--input', '-', '--no-input'], padded), 'input', /too large \(more than 1 MiB/);
  });

  it('--input "" is a bad path, not an absent option', async () => {
    refused(await runCli(['assess', '--input', '', ...FLAGS]), 'input', /an empty path/);
  });
});

describe('- reads standard input', () => {
  it('a visit file piped to assess --input -', () => {
    const run = ok(withStdin(['assess', '--input', '-', '--no-input', '--json'], readFileSync(VISIT)));
    expect(JSON.parse(run.stdout).inputs.sbp).toBe(150);
  });

  it('a cohort piped to batch -, the same output as from the file', async () => {
    const fromFile = ok(await runCli(['batch', COHORT]));
    const fromPipe = ok(withStdin(['batch', '-'], readFileSync(COHORT)));
    expect(fromPipe.stdout).toBe(fromFile.stdout);
  });

  it('standard input from a device is refused', () => {
    const r = spawnSync(process.execPath, [BIN, 'assess', '--input', '-', '--no-input'], { cwd: ROOT, env: plainEnv(), stdio: ['ignore', 'pipe', 'pipe'], encoding: 'utf8', timeout: 15_000 });
    refused({ code: r.status, stdout: r.stdout, stderr: r.stderr, timedOut: r.error !== undefined }, 'input', /standard input is a device/);
  });
});

describe('duplicate keys, deep nesting and "__proto__" are errors, never a silent choice', () => {
  it('"sbp" twice in a visit file: exit 2 naming the key and both positions', async () => {
    const path = file('dup.visit.json', '{\n  "sbp": 300,\n  "dbp": 80, "hr": 70, "edv": 120, "esv": 50, "pep": 90, "et": 290,\n  "sbp": 130\n}\n');
    refused(await runCli(['assess', '--input', path, '--no-input']), 'input', /the key "sbp" appears twice in one object \(at line 4, column 3; first at line 2, column 3\)/);
  });

  it('a duplicate inside the error block of a visit file', async () => {
    const path = file('dup-errors.visit.json', `{"sbp":130,"dbp":80,"hr":70,"edv":120,"esv":50,"pep":90,"et":290,"errors":{"edv":"10%","edv":"20%"}}`);
    refused(await runCli(['assess', '--input', path, '--no-input', '--uncertainty']), 'input', /the key "edv" appears twice/);
  });

  it('an error-model entry "__proto__" is refused, not dropped', async () => {
    const path = file('proto.visit.json', JSON.stringify(MEASURES).replace(/}$/, ',"errors":{"__proto__":5}}'));
    refused(await runCli(['assess', '--input', path, '--no-input', '--uncertainty']), 'input', /"__proto__"/);
  });

  it('a subject file with "visits" twice (the second empty): show and add refuse it, the file byte-for-byte unchanged, no backup', async () => {
    const text = readFileSync(SUBJECT, 'utf8').trimEnd().replace(/\}$/, ',\n  "visits": []\n}\n');
    const path = file('dup.subject.json', text);
    const before = readFileSync(path);
    refused(await runCli(['record', 'show', path]), 'subject file', /the key "visits" appears twice in one object \(at line \d+, column 3; first at line 10, column 3\).*left untouched/);
    refused(await runCli(['record', 'add', path, '--input', VISIT, '--date', '2024-06-01', '--no-input']), 'subject file', /"visits" appears twice/);
    refused(await runCli(['record', 'remove', path, '1', '--yes']), 'subject file', /"visits" appears twice/);
    expect(readFileSync(path).equals(before)).toBe(true);
    expect(readdirSync(dir).filter((f) => f.startsWith('dup.subject.json') && f !== 'dup.subject.json')).toEqual([]);
  });

  it('a visit file nested 10,000 levels deep: exit 2 with a clear message, not a stack overflow', async () => {
    const path = file('deep.visit.json', `{"sbp":${'['.repeat(10_000)}${']'.repeat(10_000)}}`);
    refused(await runCli(['assess', '--input', path, ...FLAGS]), 'input', /nested more than 64 levels deep \(at line 1, column \d+\)/);
  });
});

describe('control characters never reach a screen or a file raw; notes are stored as entered', () => {
  // Ends with RIGHT-TO-LEFT OVERRIDE, which would show the rest reversed ("Trojan Source").
  const NOTE = 'before\u001b[2J\u001b]0;owned\u0007 csi\u009b31m bell\u0007 del\u007f end \u202ereversed';
  let subject: string;
  beforeAll(() => {
    const doc = JSON.parse(readFileSync(SUBJECT, 'utf8'));
    doc.visits[0].note = NOTE;
    doc.visits[1].note = 'line one\r# not a heading\r    not code\r- not a list\rlast';
    doc.subject.id = 'CO-\u009b2J';
    subject = file('controls.subject.json', JSON.stringify(doc, null, 2));
  });

  it('record show prints the note with visible stand-ins (␛, ␇, ␡, �), no raw control byte', async () => {
    const run = ok(await runCli(['record', 'show', subject]));
    expect(run.stdout).not.toMatch(RAW_CONTROL);
    expect(run.stdout).toContain('before␛[2J␛]0;owned␇ csi\ufffd31m bell␇ del␡ end \ufffdreversed');
    expect(run.stdout).toContain('subject CO-\ufffd2J');
  });

  it('record add and record remove: the id and note in their lines and warnings are shown with stand-ins', async () => {
    const path = join(dir, 'added.subject.json');
    // A C1 control passes the id check (which refuses C0 and DEL); a date in the id draws a warning that quotes it.
    const add = ok(await runCli(['record', 'add', path, '--subject', 'CO-\u009b2J-1980-05-04', '--input', VISIT, '--date', '2024-06-01', '--note', 'a\u001b[2Jb', '--no-input']));
    expect(add.stdout + add.stderr).not.toMatch(RAW_CONTROL);
    expect(add.stdout).toContain('subject CO-\ufffd2J-1980-05-04');
    expect(add.stderr).toContain('warning: subject id "CO-\ufffd2J-1980-05-04" contains what looks like a full date');
    expect(JSON.parse(readFileSync(path, 'utf8')).visits[0].note).toBe('a\u001b[2Jb');
    // record edit lists the change of note, before and after, with stand-ins; a visit chosen by a text
    // that is no visit is refused with the text shown the same way.
    const edit = ok(await runCli(['record', 'edit', path, '1', '--note', 'c\u001b]0;x\u0007d\u202ee', '--yes']));
    expect(edit.stdout + edit.stderr).not.toMatch(RAW_CONTROL);
    expect(edit.stdout).toContain('note: a␛[2Jb → c␛]0;x␇d\ufffde');
    const missing = await runCli(['record', 'compare', path, '1', '2024-\u009b1\u202e']);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toContain('visit: got "2024-\ufffd1\ufffd"');
    expect(missing.stdout + missing.stderr).not.toMatch(RAW_CONTROL);
    const remove = ok(await runCli(['record', 'remove', path, '1', '--yes']));
    expect(remove.stdout + remove.stderr).not.toMatch(RAW_CONTROL);
    expect(remove.stdout).toContain('(note: c␛]0;x␇d\ufffde)');
  });

  it('record show --json keeps the note exactly (C1 and DEL as \\u escapes)', async () => {
    const run = ok(await runCli(['record', 'show', subject, '--json']));
    expect(run.stdout).not.toMatch(RAW_CONTROL);
    expect(run.stdout).toContain('\\u009b');
    expect(JSON.stringify(JSON.parse(run.stdout))).toContain(JSON.stringify(NOTE).slice(1, -1));
  });

  it('export CSV: no raw control byte; the note otherwise as entered', async () => {
    const run = ok(await runCli(['export', subject]));
    expect(run.stdout.replace(/\r\n|\r|\n|\t/g, '')).not.toMatch(RAW_CONTROL);
    expect(run.stdout).toContain('before␛[2J␛]0;owned␇ csi\ufffd31m bell␇ del␡ end \ufffdreversed');
  });

  it('HTML and Markdown reports: no raw control byte; a lone CR in a note is a space in Markdown, not a heading, code or list', async () => {
    const html = join(dir, 'controls.html');
    ok(await runCli(['report', subject, '--visit', '1', '--out', html, '--draws', '1000'], { timeoutMs: 30_000 }));
    const page = readFileSync(html, 'utf8');
    expect(page.replace(/[\t\n\r]/g, '')).not.toMatch(RAW_CONTROL);
    expect(page).toContain('before␛[2J␛]0;owned␇ csi\ufffd31m bell␇ del␡ end');

    const md = join(dir, 'controls.md');
    ok(await runCli(['report', subject, '--visit', '2', '--out', md, '--draws', '1000'], { timeoutMs: 30_000 }));
    const text = readFileSync(md, 'utf8');
    expect(text).not.toContain('\r');
    expect(text.replace(/[\t\n]/g, '')).not.toMatch(RAW_CONTROL);
    expect(text).toContain('Visit note: line one \\# not a heading     not code - not a list last');
    expect(text.split('\n').filter((l) => /^(# not a heading|- not a list| {4}not code)/.test(l))).toEqual([]);
    for (const svg of readdirSync(dir).filter((f) => f.startsWith('controls') && f.endsWith('.svg'))) {
      expect(readFileSync(join(dir, svg), 'utf8').replace(/[\t\n\r]/g, '')).not.toMatch(RAW_CONTROL);
    }
  });
});

describe('error messages stay readable', () => {
  it('a 500,000-character value is echoed as 80 characters and its length', async () => {
    const long = 'x'.repeat(500_000);
    const path = file('long.visit.json', JSON.stringify({ ...MEASURES, sbp: long }));
    const run = await runCli(['assess', '--input', path, '--no-input']);
    refused(run, 'sbp', /got "x{80}"… \(500,000 characters\)/);
    expect(run.stderr.length).toBeLessThan(1000);
  });

  it('in a batch error cell too', async () => {
    const csv = file('long.csv', `sbp,dbp,hr,edv,esv,pep,et\n${'9'.repeat(300_000)}x,80,70,120,50,90,290\n`);
    const run = await runCli(['batch', csv]);
    expect(run.code).toBe(0);
    // The row keeps its input cells as given; the error cell (last) echoes 80 characters of the value.
    const errorCell = run.stdout.trimEnd().slice(run.stdout.lastIndexOf(',"sbp: got'));
    expect(errorCell.length).toBeLessThan(400);
    expect(errorCell).toMatch(/got ""9{80}""… \(300,001 characters\)/);
  });

  it('an unknown option of 100,000 characters is echoed as 80 characters and its length', async () => {
    const run = await runCli(['assess', `--${'x'.repeat(99_998)}`]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/^elastimate: option: got "--x{78}"… \(100,000 characters\); unknown/);
    expect(run.stderr.length).toBeLessThan(300);
  });

  it('an unknown key holding control characters is shown with visible stand-ins', async () => {
    const path = file('key.visit.json', JSON.stringify({ ...MEASURES, 'bad\u001b[2Jkey': 1 }));
    const run = await runCli(['assess', '--input', path, '--no-input']);
    expect(run.code).toBe(2);
    expect(run.stderr).not.toMatch(RAW_CONTROL);
    expect(run.stderr).toContain('bad␛[2Jkey');
  });
});

