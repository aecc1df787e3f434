/**
 * `elastimate export` spawned as a user would run it (needs dist/: `npm run build`). The CSV is read
 * back with csv-parse, a general-purpose RFC 4180 parser independent of the writer (d3-dsv).
 */
import { parse } from 'csv-parse/sync';
import { mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RESULT_KEYS } from '../../src/assessment/graph/index.js';
import { decimalsFor } from '../../src/render/format.js';
import { METHODS_VERSION } from '../../src/assessment/result.js';
import { FORBIDDEN_WORDS, ROOT, STACK_FRAME, requireBuild, runCli, type CliRun, ok } from './fixtures/run-cli.js';

const CASE = join(ROOT, 'cases', 'cardio-oncology.subject.json');
const AWKWARD_NOTE = 'dose held, then "resumed"\r\nsecond line, with commas, and a "quote"\nthird line';

let dir: string;
let second: string;
beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-export-'));
  second = join(dir, 'hf-077.subject.json');
  writeFileSync(
    second,
    JSON.stringify({
      format: 'elastimate-subject',
      schemaVersion: 1,
      subject: { id: 'HF-077', sex: 'male' },
      visits: [
        { date: '2024-02-01', inputs: { sbp: 104, dbp: 66, hr: 84, edv: 210, esv: 150, ef: 29, pep: 128, et: 242, rhythm: 'atrial-fibrillation', mitralRegurgitation: true }, note: AWKWARD_NOTE },
        { date: '2024-05-02', inputs: { sbp: 104, dbp: 120, edv: 210, esv: 150, pep: 128, et: 242 } },
      ],
    }),
  );
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));


type Row = Record<string, string>;

describe('export', () => {
  let csv: string;
  let rows: Row[];
  beforeAll(async () => {
    const run = ok(await runCli(['export', CASE, second]));
    csv = run.stdout;
    rows = parse(csv, { columns: true }) as Row[];
  });

  it('writes RFC 4180: a header row, CRLF line ends, quotes only where needed', () => {
    expect(csv.endsWith('\r\n')).toBe(true);
    const header = csv.slice(0, csv.indexOf('\r\n')).split(',');
    expect(header.slice(0, 4)).toEqual(['subject', 'visit', 'date', 'note']);
    expect(header).toContain('ea');
    expect(header).toContain('svUsed'); // the SV used, beside the Doppler SV as entered (`sv`)
    expect(header).toContain('sv');
    expect(header.slice(-4)).toEqual(['flags', 'notComputable', 'methodsVersion', 'error']);
  });

  it('round-trips through csv-parse: one row per visit, notes with quotes, commas and line breaks intact', () => {
    expect(rows.map((r) => `${r.subject}#${r.visit}@${r.date}`)).toEqual([
      'CO-203#1@2023-09-04', 'CO-203#2@2023-12-04', 'CO-203#3@2024-03-04', 'CO-203#4@2024-06-03', 'HF-077#1@2024-02-01', 'HF-077#2@2024-05-02',
    ]);
    expect(rows[4]!.note).toBe(AWKWARD_NOTE);
    expect(rows[4]!.rhythm).toBe('atrial-fibrillation');
    expect(rows[4]!.mitralRegurgitation).toBe('1');
    expect(rows[4]!.aorticStenosis).toBe('0');
    expect((rows[4]!.flags ?? '').split(';')).toEqual(expect.arrayContaining(['rhythm', 'mitral-regurgitation']));
    for (const r of rows) expect(r.methodsVersion).toBe(METHODS_VERSION);
  });

  it('carries the same numbers as record show --json, rounded to two decimals more than the report', async () => {
    const show = JSON.parse(ok(await runCli(['record', 'show', CASE, '--json'])).stdout) as { visits: { results: Record<string, { value: number | null; unit: string }>; inputs: Record<string, unknown> }[] };
    show.visits.forEach((v, i) => {
      const row = rows[i]!;
      for (const key of RESULT_KEYS) {
        const q = v.results[key]!;
        const column = key;
        if (q.value === null) expect(row[column], key).toBe('');
        else expect(Math.abs(Number(row[column]) - q.value), key).toBeLessThanOrEqual(0.5 * 10 ** -(decimalsFor(q.unit) + 2) + 1e-12);
      }
      // Inputs as used, in internal units: SBP is the mean of the two readings; height from the subject's "1.65 m".
      expect(Number(row.sbp)).toBe(v.inputs.sbp);
      expect(Number(row.height)).toBe(165);
      expect(Number(row.age)).toBe(Number((row.date ?? '').slice(0, 4)) - 1978);
    });
  });

  it('keeps a visit whose stored inputs no longer compute, with the reason in the error column', () => {
    const bad = rows[5]!;
    expect(bad.error).toMatch(/hf-077\.subject\.json: visit 2024-05-02: dbp: got 120; not below SBP 104/);
    expect(bad.ea).toBe('');
    expect(bad.sbp).toBe('');
  });

  it('--out writes the same bytes atomically, readable by the owner only, leaving no temporary file', async () => {
    const out = join(dir, 'cohort.csv');
    const run = ok(await runCli(['export', CASE, second, '--out', out]));
    expect(run.stdout).toBe('');
    expect(readFileSync(out, 'utf8')).toBe(csv);
    expect(statSync(out).mode & 0o777).toBe(0o600);
    expect(readdirSync(dir).filter((f) => f.startsWith('cohort.csv'))).toEqual(['cohort.csv']);
  });

  it('--json gives the same rows, typed, with a column dictionary of names, units and meanings', async () => {
    const json = JSON.parse(ok(await runCli(['export', CASE, '--json'])).stdout) as { format: string; methodsVersion: string; columns: { name: string; unit: string; description: string }[]; rows: Record<string, unknown>[] };
    expect(json.format).toBe('elastimate-export');
    expect(json.methodsVersion).toBe(METHODS_VERSION);
    // The standing cautions travel with the numbers (regression: export --json had none).
    expect((json as unknown as { caveats: string[] }).caveats.join(' ')).toMatch(/research use only.*not a diagnosis.*local protocols/i);
    const unit = Object.fromEntries(json.columns.map((c) => [c.name, c.unit]));
    expect(unit).toMatchObject({ ea: 'mmHg/mL', ees: 'mmHg/mL', pes: 'mmHg', co: 'L/min', tNd: '', sbp: 'mmHg', pep: 'ms', date: 'YYYY-MM-DD' });
    expect(json.rows).toHaveLength(4);
    expect(json.rows[0]).toMatchObject({ subject: 'CO-203', visit: 1, date: '2023-09-04', aorticStenosis: false, error: null });
    expect(typeof json.rows[0]!.ea).toBe('number');
    expect(Number(rows[0]!.ea)).toBeCloseTo(json.rows[0]!.ea as number, 4);
  });

  it('refuses an --out that names one of the subject files being exported, leaving it byte for byte (regression: it was overwritten with CSV)', async () => {
    const copy = join(dir, 'copy.subject.json');
    writeFileSync(copy, readFileSync(CASE));
    const before = readFileSync(copy);
    const run = await runCli(['export', CASE, copy, '--out', copy]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/out: got ".*copy\.subject\.json"; this is a file the command reads and would be overwritten/);
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(readFileSync(copy).equals(before)).toBe(true);
  });

  it('refuses an unwritable --out with exit 2', async () => {
    const run = await runCli(['export', CASE, '--out', join(dir, 'no-such-folder', 'x.csv')]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/out: got ".*x\.csv"; folder ".*no-such-folder" does not exist/);
  });
});
