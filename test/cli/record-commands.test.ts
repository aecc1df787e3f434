/**
 * `elastimate record …` spawned as a user would run it (needs dist/: `npm run build`).
 */
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { METHODS_VERSION } from '../../src/assessment/result.js';
import { FORBIDDEN_WORDS, ROOT, STACK_FRAME, requireBuild, runCli, type CliRun, ok } from './fixtures/run-cli.js';

const VISIT_1 = ['--sbp', '120', '--dbp', '80', '--hr', '60', '--edv', '120', '--esv', '50', '--ef', '60', '--pep', '90', '--et', '290'];
const VISIT_2 = ['--sbp', '140', '--dbp', '90', '--hr', '75', '--edv', '125', '--esv', '55', '--ef', '56', '--pep', '90', '--et', '290'];

let dir: string;
beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-record-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function refused(run: CliRun, pattern: RegExp): void {
  expect(run.timedOut).toBe(false);
  expect(run.code).toBe(2);
  expect(run.stderr).toMatch(pattern);
  expect(run.stderr).not.toMatch(STACK_FRAME);
}

interface SeriesJson {
  format: string;
  methodsVersion: string;
  subject: { id: string; sex?: string; birthYear?: number };
  visits: { index: number; date: string; note?: string; inputs: Record<string, unknown>; entered: Record<string, unknown>; results: Record<string, { value: number | null; unit: string }> }[];
}

describe('record add / show / compare', () => {
  const file = () => join(dir, 'ht-014.subject.json');

  it('creates the file with the first visit, owner-readable only, and warns about a name-like id', async () => {
    const named = join(dir, 'named.json');
    const run = ok(await runCli(['record', 'add', named, '--subject', 'Maria Keller', '--date', '2024-01-10', ...VISIT_1]));
    expect(run.stderr).toMatch(/warning: subject id "Maria Keller" looks like a personal name/);
    expect(statSync(named).mode & 0o777).toBe(0o600);

    const first = ok(await runCli(['record', 'add', file(), '--subject', 'HT-014', '--date', '2024-01-10', '--sex', 'female', '--birth-year', '1968', '--note', 'baseline, "before" the drug', ...VISIT_1]));
    expect(first.stderr).toBe('');
    expect(first.stdout).toMatch(/^Created .*ht-014\.subject\.json: subject HT-014, visit 1 of 1 on 2024-01-10\./);
    expect(first.stdout).toContain(METHODS_VERSION);
    expect(statSync(file()).mode & 0o777).toBe(0o600);
    const stored = JSON.parse(readFileSync(file(), 'utf8')) as { subject: Record<string, unknown>; visits: { inputs: Record<string, unknown>; note: string }[] };
    // Sex and birth year belong to the subject; the visit keeps its inputs as entered, bare numbers as numbers.
    expect(stored.subject).toEqual({ id: 'HT-014', sex: 'female', birthYear: 1968 });
    expect(stored.visits[0]!.inputs).toEqual({ sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, ef: 60, pep: 90, et: 290 });
    expect(stored.visits[0]!.note).toBe('baseline, "before" the drug');
  });

  it('appends later visits (a value with its unit is kept as typed) and refuses another subject id', async () => {
    ok(await runCli(['record', 'add', file(), '--date', '2024-04-10', ...VISIT_2.map((a) => (a === '140' ? '18.665kPa' : a))]));
    const before = readFileSync(file());
    refused(await runCli(['record', 'add', file(), '--subject', 'HT-015', '--date', '2024-05-10', ...VISIT_2]), /subject: got "HT-015"; .* holds subject "HT-014"/);
    expect(readFileSync(file()).equals(before)).toBe(true);
    const stored = JSON.parse(readFileSync(file(), 'utf8')) as { visits: { inputs: Record<string, unknown> }[] };
    expect(stored.visits[1]!.inputs.sbp).toBe('18.665kPa');
  });

  it('off a terminal, lists every missing input in one error (exit 2) and writes nothing', async () => {
    const fresh = join(dir, 'missing.json');
    const run = await runCli(['record', 'add', fresh, '--subject', 'HT-016', '--date', '2024-01-10', '--sbp', '120']);
    refused(run, /dbp: missing/);
    for (const flag of ['edv', 'esv', 'pep', 'et']) expect(run.stderr).toMatch(new RegExp(`${flag}: missing; required`));
    expect(existsSync(fresh)).toBe(false);
    refused(await runCli(['record', 'add', fresh, '--subject', 'HT-016', '--date', '2024-02-30', ...VISIT_1]), /date: got "2024-02-30"; accepted: a calendar date/);
    refused(await runCli(['record', 'add', fresh, '--date', '2024-01-10', ...VISIT_1]), /subject: missing; .* does not exist yet/);
    expect(existsSync(fresh)).toBe(false);
  });

  it('refuses a note longer than the subject file allows as bad input, not an internal error (regression), on add and edit', async () => {
    const fresh = join(dir, 'long-note.json');
    const long = 'x'.repeat(10_001);
    refused(await runCli(['record', 'add', fresh, '--subject', 'HT-017', '--date', '2024-01-10', '--note', long, ...VISIT_1]), /^elastimate: note: got "x+"… \(10,001 characters\); accepted: a note of at most 10,000 characters\n$/);
    expect(existsSync(fresh)).toBe(false);
    ok(await runCli(['record', 'add', fresh, '--subject', 'HT-017', '--date', '2024-01-10', '--note', 'x'.repeat(10_000), ...VISIT_1]));
    const before = readFileSync(fresh);
    refused(await runCli(['record', 'edit', fresh, '1', '--note', long, '--yes']), /note: got "x+"… \(10,001 characters\); accepted: a note of at most 10,000 characters/);
    expect(readFileSync(fresh).equals(before)).toBe(true);
  });

  it('show --json gives { subject, visits: [ { date, inputs, results } ] } with results as assess --json gives them', async () => {
    const run = ok(await runCli(['record', 'show', file(), '--json']));
    const json = JSON.parse(run.stdout) as SeriesJson;
    expect(json.format).toBe('elastimate-series');
    expect(json.methodsVersion).toBe(METHODS_VERSION);
    expect(json.subject).toEqual({ id: 'HT-014', sex: 'female', birthYear: 1968 });
    expect(json.visits.map((v) => v.date)).toEqual(['2024-01-10', '2024-04-10']);
    expect(json.visits[0]!.note).toBe('baseline, "before" the drug');
    // The same visit through `assess`: sex and age (2024 − 1968) come from the subject.
    const assessed = ok(await runCli(['assess', '--json', '--no-input', ...VISIT_1, '--sex', 'female', '--age', '56']));
    const single = JSON.parse(assessed.stdout) as { results: unknown; inputs: unknown };
    expect(json.visits[0]!.results).toEqual(single.results);
    expect(json.visits[0]!.inputs).toEqual(single.inputs);
    // The hand-worked example (method notes §4): Ea 1.5429, Ees 1.5258 mmHg/mL.
    expect(json.visits[0]!.results.ea!.value).toBeCloseTo(1.5429, 4);
    expect(json.visits[0]!.results.ees!.value).toBeCloseTo(1.5258, 4);
    expect(json.visits[0]!.entered).toEqual({ sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, ef: 60, pep: 90, et: 290 });
  });

  it('show prints the table with the change from the previous visit, the methods version and the cautions', async () => {
    const run = ok(await runCli(['record', 'show', file()]));
    expect(run.stdout).toContain('subject HT-014 · female · born 1968 · 2 visits');
    expect(run.stdout).toContain(`methods ${METHODS_VERSION}`);
    expect(run.stdout).toMatch(/#\s+date\s+HR\s+SBP\/DBP\s+EF\s+SV\s+Pes\s+Ea\s+Ees\s+Ea\/Ees/);
    // Visit 2 worked by hand (invented inputs VISIT_2, SBP typed as 18.665 kPa = 140.0 mmHg):
    //   SV = EDV − ESV = 125 − 55 = 70 mL (no Doppler SV given); Pes = 0.9 × 140 = 126 mmHg, visit 1
    //   0.9 × 120 = 108, so 126/108 = 1.1667 → +17 %; Ea = 126/70 = 1.80, visit 1 108/70 = 1.5429,
    //   1.80/1.5429 = 1.1667 → +17 %; Ees (Chen 2001 formula, both visits tNd = 90/380 = 0.236842,
    //   ENd(avg) 0.336141): ENd(est) = 0.0275 − 0.165·0.56 + 0.3656·90/126 + 0.515·0.336141 = 0.369355,
    //   Ees = (90 − 0.369355·126)/(0.369355·70) = 1.680968 (shown 1.68), visit 1 1.525814 (method notes
    //   §4), 1.680968/1.525814 = 1.1017 → +10 %.
    expect(run.stdout).toMatch(/2\s+2024-04-10\s+75\s+140\/90\s+56\s+70\s+126 \+17%\s+1\.80 \+17%\s+1\.68 \+10%/);
    expect(run.stdout).toMatch(/research use only/i);
    expect(run.stdout).toMatch(/licensed clinical practice/);
  });

  it('show and compare carry the referral note of the latest (later) visit, as text and JSON (regression: they had none)', async () => {
    const latest = JSON.parse(ok(await runCli(['assess', '--json', '--no-input', ...VISIT_2.map((a) => (a === '140' ? '18.665kPa' : a)), '--sex', 'female', '--age', '56'])).stdout) as { referral: string };
    expect(latest.referral).toMatch(/^Research echocardiography .* not a diagnosis/);
    const show = ok(await runCli(['record', 'show', file()]));
    expect(show.stdout).toMatch(/Referral note for visit 2 \(2024-04-10\), the latest \(paste-ready\)\n  Research echocardiography and cuff blood pressure \(140\/90 mmHg/);
    const series = JSON.parse(ok(await runCli(['record', 'show', file(), '--json'])).stdout) as { visits: { referral: string }[] };
    expect(series.visits[1]!.referral).toBe(latest.referral);
    const compare = ok(await runCli(['record', 'compare', file(), '1', '2']));
    expect(compare.stdout).toMatch(/Referral note for visit 2 \(2024-04-10\) \(paste-ready\)\n  Research echocardiography/);
    const json = JSON.parse(ok(await runCli(['record', 'compare', file(), '1', '2', '--json'])).stdout) as { referral: string };
    expect(json.referral).toBe(latest.referral);
  });

  it('compare explains the change by number or by date, as text and JSON', async () => {
    const text = ok(await runCli(['record', 'compare', file(), '1', '2024-04-10']));
    expect(text.stdout).toContain('visit 1 (2024-01-10) → visit 2 (2024-04-10)');
    expect(text.stdout).toMatch(/heart rate \(Δln HR\)\s+\+0\.223/);
    expect(text.stdout).toMatch(/resistance \(Δln TPR\)\s+-0\.090/);
    expect(text.stdout).toMatch(/within the least significant change/);
    const json = JSON.parse(ok(await runCli(['record', 'compare', file(), '1', '2', '--json'])).stdout) as { format: string; methodsVersion: string; from: unknown; to: unknown; rows: { key: string; logChange: number; verdict: string; lsc: { logLimit: number } }[]; summary: string[] };
    expect(json.format).toBe('elastimate-comparison');
    expect(json.methodsVersion).toBe(METHODS_VERSION);
    expect(json.from).toEqual({ index: 1, date: '2024-01-10' });
    expect(json.rows.map((r) => r.key)).toEqual(['ea', 'pes', 'ees', 'eaEes']);
    // Δln Ea = ln(1.8/1.542857) = ln(7/6), hand-worked in test/records/compare.test.ts.
    expect(json.rows[0]!.logChange).toBeCloseTo(Math.log(7 / 6), 3);
    expect(json.rows[2]!.lsc.logLimit).toBeCloseTo(2.77 * 0.203, 10);
    refused(await runCli(['record', 'compare', file(), '1', '7']), /visit: got "7"; no such visit; accepted: a visit number 1–2/);
  });
});

describe('record edit / remove', () => {
  const file = () => join(dir, 'co-9.subject.json');

  it('asks first: off a terminal without --yes it refuses (exit 2) and leaves the file as it was', async () => {
    ok(await runCli(['record', 'add', file(), '--subject', 'CO-9', '--date', '2024-01-10', ...VISIT_1]));
    ok(await runCli(['record', 'add', file(), '--date', '2024-04-10', ...VISIT_2]));
    const before = readFileSync(file());
    refused(await runCli(['record', 'edit', file(), '2', '--hr', '70']), /confirmation: missing; changing visit 2 .* needs confirmation .*accepted: --yes/);
    refused(await runCli(['record', 'remove', file(), '1']), /confirmation: missing; removing visit 1/);
    expect(readFileSync(file()).equals(before)).toBe(true);
    expect(readdirSync(dir).filter((f) => f.startsWith('co-9') && f.endsWith('.bak'))).toEqual([]);
  });

  it('edits a visit with --yes, keeping a 0600 backup of the file as it was', async () => {
    const before = readFileSync(file());
    const run = ok(await runCli(['record', 'edit', file(), '2024-04-10', '--hr', '70', '--unset', 'ef', '--note', 'rechecked', '--yes']));
    expect(run.stdout).toContain('hr: 75 → 70');
    expect(run.stdout).toContain('ef: 56 → (none)');
    const backups = readdirSync(dir).filter((f) => f.startsWith('co-9.subject.json.') && f.endsWith('.bak'));
    expect(backups).toHaveLength(1);
    expect(readFileSync(join(dir, backups[0]!)).equals(before)).toBe(true);
    expect(statSync(join(dir, backups[0]!)).mode & 0o777).toBe(0o600);
    const stored = JSON.parse(readFileSync(file(), 'utf8')) as { visits: { inputs: Record<string, unknown>; note?: string }[] };
    expect(stored.visits[1]!.inputs.hr).toBe(70);
    expect(stored.visits[1]!.inputs.ef).toBeUndefined();
    expect(stored.visits[1]!.note).toBe('rechecked');
    refused(await runCli(['record', 'edit', file(), '2', '--dbp', '150', '--yes']), /dbp: got 150; not below SBP 140/);
    refused(await runCli(['record', 'edit', file(), '2', '--yes']), /nothing to change/);
  });

  it('removes a visit with --yes, keeping a backup', async () => {
    const before = readFileSync(file());
    const run = ok(await runCli(['record', 'remove', file(), '1', '--yes']));
    expect(run.stdout).toMatch(/Removed visit 1 .*1 visit\(s\) remain/);
    const stored = JSON.parse(readFileSync(file(), 'utf8')) as { visits: { date: string }[] };
    expect(stored.visits.map((v) => v.date)).toEqual(['2024-04-10']);
    const backups = readdirSync(dir).filter((f) => f.startsWith('co-9.subject.json.') && f.endsWith('.bak'));
    expect(backups.some((b) => readFileSync(join(dir, b)).equals(before))).toBe(true);
  });
});

describe('refusals leave files byte for byte untouched', () => {
  it('a newer schema version and a corrupt file are refused by every command, exit 2, bytes unchanged', async () => {
    const newer = join(dir, 'newer.json');
    writeFileSync(newer, JSON.stringify({ format: 'elastimate-subject', schemaVersion: 99, subject: { id: 'NW-1' }, visits: [] }));
    const corrupt = join(dir, 'corrupt.json');
    writeFileSync(corrupt, '{"format":"elastimate-subject","schemaVersion":1,"subject":{"id":"CR-1"},"visits":[{"date":"2024-01-');
    for (const [path, pattern] of [[newer, /schemaVersion: got 99; written by a newer elastimate/], [corrupt, /not valid JSON/]] as const) {
      const before = readFileSync(path);
      refused(await runCli(['record', 'show', path]), pattern);
      refused(await runCli(['record', 'add', path, '--date', '2024-05-01', ...VISIT_1]), pattern);
      refused(await runCli(['record', 'remove', path, '1', '--yes']), pattern);
      refused(await runCli(['export', path]), pattern);
      expect(readFileSync(path).equals(before)).toBe(true);
      expect(existsSync(`${path}.lock`)).toBe(false);
    }
  });
});

describe('concurrent record add from separate processes', () => {
  it('four processes adding visits to one new file at the same moment: all four land', async () => {
    const path = join(dir, 'busy.subject.json');
    const dates = ['2024-01-01', '2024-02-01', '2024-03-01', '2024-04-01'];
    const runs = await Promise.all(dates.map((d) => runCli(['record', 'add', path, '--subject', 'BZ-1', '--date', d, ...VISIT_1], { timeoutMs: 30_000 })));
    for (const r of runs) ok(r);
    const stored = JSON.parse(readFileSync(path, 'utf8')) as { visits: { date: string }[] };
    expect(stored.visits.map((v) => v.date)).toEqual(dates); // kept in date order
  }, 60_000);
});

describe('the demo', () => {
  it('npm start shows the invented subject CO-203: the series and one comparison', async () => {
    const run = ok(await runCli(['demo'], { timeoutMs: 30_000, cwd: ROOT }));
    expect(run.stdout).toContain('subject CO-203 · female · born 1978');
    expect(run.stdout).toMatch(/elastimate comparison: subject CO-203, visit 1 \(2023-09-04\) → visit 3 \(2024-03-04\)/);
    expect(run.stdout).toMatch(/In plain words/);
  }, 40_000);
});
