/**
 * `elastimate report` and `assess --svg/--sketch` spawned as a user would run
 * them (needs dist/: `npm run build`). Files are written whole or not at all;
 * bad paths and options are refused with exit code 2 and one clear message.
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FORBIDDEN_WORDS, STACK_FRAME, requireBuild, runCli, type CliRun } from '../cli/fixtures/run-cli.js';
import { allText, parseSvg } from '../render/svg-helpers.js';

const FIXTURE = join(import.meta.dirname, 'fixtures', 'HT-014.subject.json');
const VISIT = ['--sbp', '150', '--dbp', '92', '--hr', '68', '--edv', '118', '--esv', '46', '--pep', '95', '--et', '285', '--edp', '14', '--no-input'];
let dir: string;

beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-report-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function expectRefusal(run: CliRun, field: string): void {
  expect(run.timedOut).toBe(false);
  expect(run.code).toBe(2);
  expect(run.stdout).toBe('');
  expect(run.stderr).toContain(`elastimate: ${field}: `);
  expect(run.stderr).toMatch(/accepted: /);
  expect(run.stderr).not.toMatch(STACK_FRAME);
  expect(run.stderr).not.toMatch(FORBIDDEN_WORDS);
}

describe('elastimate report', () => {
  it('writes one self-contained HTML page and nothing else (no temporary file left behind)', async () => {
    const out = join(dir, 'html');
    mkdirSync(out);
    const run = await runCli(['report', FIXTURE, '--out', join(out, 'HT-014.html'), '--draws', '1000'], { timeoutMs: 30_000 });
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    expect(readdirSync(out)).toEqual(['HT-014.html']);
    const html = readFileSync(join(out, 'HT-014.html'), 'utf8');
    expect(html).toMatch(/^<!DOCTYPE html>/);
    expect(html).toContain('Visit reported: <strong>Visit 3 · 2024-07-15</strong>');
    expect(html).not.toMatch(FORBIDDEN_WORDS);
  });

  it('replaces an existing report whole: the old content is gone, the new one complete, no temporary file left', async () => {
    const out = join(dir, 'replace');
    mkdirSync(out);
    const path = join(out, 'r.html');
    writeFileSync(path, 'old report');
    const run = await runCli(['report', FIXTURE, '--out', path, '--draws', '1000']);
    expect(run.code).toBe(0);
    const html = readFileSync(path, 'utf8');
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html.endsWith('</html>\n')).toBe(true);
    expect(readdirSync(out)).toEqual(['r.html']);
  });

  it('--visit 2 reports the second visit compared with the first', async () => {
    const path = join(dir, 'visit2.html');
    const run = await runCli(['report', FIXTURE, '--visit', '2', '--out', path, '--draws', '1000']);
    expect(run.code).toBe(0);
    expect(readFileSync(path, 'utf8')).toContain('Visit reported: <strong>Visit 2 · 2024-04-15</strong>; compared with Visit 1 · 2024-01-15');
  });

  it('--format md writes Markdown with the four SVG files beside it, each well-formed', async () => {
    const out = join(dir, 'md');
    mkdirSync(out);
    const run = await runCli(['report', FIXTURE, '--format', 'md', '--out', join(out, 'case.md'), '--draws', '1000']);
    expect(run.code).toBe(0);
    expect(readdirSync(out).sort()).toEqual(['case-pv.svg', 'case-trend-ea.svg', 'case-trend-eaEes.svg', 'case-trend-ees.svg', 'case.md']);
    const md = readFileSync(join(out, 'case.md'), 'utf8');
    expect(md).toContain('](case-pv.svg)');
    for (const f of readdirSync(out).filter((n) => n.endsWith('.svg'))) parseSvg(readFileSync(join(out, f), 'utf8'));
  });

  it('refuses bad paths and options with exit 2, naming the option, and never touches the subject file', async () => {
    const before = readFileSync(FIXTURE);
    expectRefusal(await runCli(['report', FIXTURE, '--out', join(dir, 'no-such-folder', 'r.html')]), '--out');
    expectRefusal(await runCli(['report', FIXTURE, '--out', join(dir, 'r.pdf')]), '--out');
    expectRefusal(await runCli(['report', FIXTURE, '--out', dir + '/']), '--out');
    expectRefusal(await runCli(['report', FIXTURE]), '--out');
    expectRefusal(await runCli(['report', FIXTURE, '--out', join(dir, 'r.html'), '--format', 'pdf']), '--format');
    expectRefusal(await runCli(['report', FIXTURE, '--out', join(dir, 'r.html'), '--visit', '9']), 'visit');
    expectRefusal(await runCli(['report', FIXTURE, '--out', join(dir, 'r.html'), '--draws', 'many']), 'draws');
    // Writing the report over the subject file it reads is refused.
    const copy = join(dir, 'copy.json');
    writeFileSync(copy, before);
    expectRefusal(await runCli(['report', copy, '--out', copy, '--format', 'html']), '--out');
    expect(readFileSync(copy)).toEqual(before);
    expect(readFileSync(FIXTURE)).toEqual(before);
    expect(existsSync(join(dir, 'r.html'))).toBe(false);
  });

  it('a missing subject file is an input error, not a crash', async () => {
    const run = await runCli(['report', join(dir, 'absent.subject.json'), '--out', join(dir, 'x.html')]);
    expect(run.code).toBe(2);
    expect(run.stderr).not.toMatch(STACK_FRAME);
  });
});

describe('elastimate assess --svg and --sketch', () => {
  it('--svg writes the diagram of the visit as well-formed SVG', async () => {
    const path = join(dir, 'visit.svg');
    const run = await runCli(['assess', ...VISIT, '--svg', path]);
    expect(run.code).toBe(0);
    const doc = parseSvg(readFileSync(path, 'utf8'));
    expect(allText(doc)).toMatch(/Estimated pressure–volume diagram/);
    expect(run.stdout).toMatch(/Afterload beside Ea/);
  });

  it('--svg to a folder, a missing folder or a non-.svg name is refused before anything is computed', async () => {
    expectRefusal(await runCli(['assess', ...VISIT, '--svg', dir]), '--svg');
    expectRefusal(await runCli(['assess', ...VISIT, '--svg', join(dir, 'nope', 'v.svg')]), '--svg');
    expectRefusal(await runCli(['assess', ...VISIT, '--svg', join(dir, 'v.png')]), '--svg');
  });

  it('--sketch prints the text drawing after the report; with --json it goes to stderr and stdout stays one JSON object', async () => {
    const text = await runCli(['assess', ...VISIT, '--sketch']);
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(/Pressure–volume sketch[\s\S]*└[\s\S]*mL/);
    const json = await runCli(['assess', ...VISIT, '--sketch', '--json']);
    expect(json.code).toBe(0);
    const parsed = JSON.parse(json.stdout) as { mechanics: { diastolic: { edpSource: string; edpUsed: { value: number } }; loop: Record<string, unknown>; energetics: { strokeWork: { value: number } } } };
    expect(parsed.mechanics.diastolic.edpSource).toBe('entered');
    // Values used for inputs carry the suffix Used: no result key equals an input key (edp, edv, esv).
    expect(parsed.mechanics.diastolic.edpUsed.value).toBeGreaterThan(0);
    expect(Object.keys(parsed.mechanics.loop)).toEqual(expect.arrayContaining(['edvUsed', 'esvUsed', 'edpUsed']));
    expect(Object.keys(parsed.mechanics.loop)).not.toContain('edv');
    expect(parsed.mechanics.energetics.strokeWork.value).toBeGreaterThan(0);
    expect(json.stderr).toMatch(/Pressure–volume sketch/);
  });
});
