/**
 * `elastimate batch` spawned as a user would run it (needs dist/: `npm run build`). Input is written
 * with csv-stringify and output read with csv-parse: general-purpose RFC 4180 tools, independent of
 * the tool's own reader and writer.
 */
import { parse } from 'csv-parse/sync';
import { stringify } from 'csv-stringify/sync';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RESULT_KEYS } from '../../src/assessment/graph/index.js';
import { METHODS_VERSION } from '../../src/assessment/result.js';
import { FORBIDDEN_WORDS, ROOT, STACK_FRAME, requireBuild, runCli, type CliRun, ok } from './fixtures/run-cli.js';

let dir: string;
beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-batch-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));


const HEADER = ['participant', 'visit date', 'sbp', 'dbp', 'hr', 'edv', 'esv', 'ef', 'pep', 'et', 'comment'];
const ROWS = [
  // The hand-worked single-beat example of the method notes (§4, computed there): Ees 1.5258, Ea 1.5429, Ea/Ees 1.0112.
  ['HT-101', '2024-01-10', '120', '80', '60', '120', '50', '60', '90', '290', 'baseline, fasting'],
  ['HT-102', '2024-01-11', '120', '130', '60', '120', '50', '', '90', '290', 'DBP typed wrong'],
  ['HT-103', '2024-01-12', '16kPa', '80', '1.1 Hz', '0.13 L', '55', '', '0.1 s', '300', 'says "units"\nover two lines'],
  ['HT-104', '2024-01-13', '118;122', '78;80', '', '120', '50', '', '90', '290', ''],
];

describe('batch', () => {
  let input: string;
  let rows: Record<string, string>[];
  let run: CliRun;
  beforeAll(async () => {
    input = join(dir, 'cohort.csv');
    writeFileSync(input, stringify([HEADER, ...ROWS]));
    run = ok(await runCli(['batch', input]));
    rows = parse(run.stdout, { columns: true }) as Record<string, string>[];
  });

  it('keeps the input columns and adds one column per result key named as the JSON keys, then flags, reasons, methods version and error', () => {
    const header = parse(run.stdout, { to_line: 1 })[0] as string[];
    // The input has an `ef` column (EF as reported); the EF used is the result `efUsed`, so no name is shared.
    // Then the numeric inputs as used (suffix Used, in the order of docs/batch.md's table).
    const used = ['sbpUsed', 'dbpUsed', 'hrUsed', 'edvUsed', 'esvUsed', 'efUsed', 'pepUsed', 'etUsed'].filter((u) => !RESULT_KEYS.includes(u as never));
    expect(header).toEqual([...HEADER, ...used, ...RESULT_KEYS, 'flags', 'notComputable', 'methodsVersion', 'error']);
    expect(rows.map((r) => r.participant)).toEqual(['HT-101', 'HT-102', 'HT-103', 'HT-104']);
    expect(rows[0]!.comment).toBe('baseline, fasting');
    expect(rows[2]!.comment).toBe('says "units"\nover two lines');
    for (const r of rows) expect(r.methodsVersion).toBe(METHODS_VERSION);
  });

  it('computes each row as assess does (worked example of the method notes)', () => {
    const r = rows[0]!;
    expect(Number(r.pes)).toBe(108);
    expect(Number(r.ea)).toBeCloseTo(1.5429, 4);
    expect(Number(r.ees)).toBeCloseTo(1.5258, 4);
    expect(Number(r.eaEes)).toBeCloseTo(1.0112, 4);
    expect(Number(r.tNd)).toBeCloseTo(0.23684, 5);
    expect(r.error).toBe('');
  });

  it('gives a bad row its reason in the error column and goes on with the next rows', () => {
    expect(rows[1]!.error).toBe('dbp: got 130; not below SBP 120 mmHg; accepted: DBP lower than SBP');
    expect(rows[1]!.ea).toBe('');
    expect(rows[2]!.error).toBe('');
    expect(run.stderr).toMatch(/4 record\(s\) read, 4 written, 1 with an error/);
  });

  it('converts values with units and averages several readings', () => {
    // 16 kPa = 16 / 0.133322 = 120.01 mmHg (mathjs constants); 1.1 Hz = 66 bpm; 0.13 L = 130 mL; 0.1 s = 100 ms.
    expect(Number(rows[2]!.pes)).toBeCloseTo(0.9 * (16 / 0.1333224), 1);
    expect(Number(rows[2]!.co)).toBeCloseTo(((130 - 55) * 66) / 1000, 3);
    expect(Number(rows[2]!.tNd)).toBeCloseTo(100 / 400, 5);
    // Readings 118 and 122 → SBP 120; 78 and 80 → DBP 79.
    expect(Number(rows[3]!.pes)).toBe(108);
    expect(Number(rows[3]!.map)).toBeCloseTo(79 + 41 / 3, 2);
    expect(rows[3]!.co).toBe(''); // no heart rate
  });

  it('--out replaces the target only when the run is complete, owner-readable, with no temporary file left', async () => {
    const out = join(dir, 'results.csv');
    writeFileSync(out, 'old contents\n');
    const r = ok(await runCli(['batch', input, '--out', out]));
    expect(r.stdout).toBe('');
    expect(readFileSync(out, 'utf8')).toBe(run.stdout);
    expect(statSync(out).mode & 0o777).toBe(0o600);
    expect(readdirSync(dir).filter((f) => f.includes('results.csv'))).toEqual(['results.csv']);
    expect(r.stderr).not.toMatch(/rows…/); // progress only on a terminal
  });

  it('keeps the Doppler SV as entered (`sv`) apart from the SV used (`svUsed`): no result column shares an input name', async () => {
    const withSv = join(dir, 'with-sv.csv');
    writeFileSync(withSv, 'sbp,dbp,edv,esv,pep,et,sv,ef\r\n120,80,120,50,90,290,72,60\r\n');
    const r = ok(await runCli(['batch', withSv]));
    const [row] = parse(r.stdout, { columns: true }) as Record<string, string>[];
    expect(row!.sv).toBe('72');
    expect(row!.svUsed).toBe('72'); // Doppler SV feeds Ea and Ees when given (Chen 2001)
    expect(row!.efUsed).toBe('60');
    expect(Number(row!.ea)).toBeCloseTo(108 / 72, 4);
  });

  it('refuses, with exit 2, a missing file, an empty one, a header without measurement columns, and the input as output', async () => {
    const refusals: [string[], RegExp][] = [
      [['batch', join(dir, 'nope.csv')], /batch file: got ".*nope\.csv"; file not found/],
      [['batch', input, '--out', input], /out: got .*; this is a file the command reads and would be overwritten/],
    ];
    const empty = join(dir, 'empty.csv');
    writeFileSync(empty, '');
    refusals.push([['batch', empty], /batch file: got .*; empty/]);
    const noCols = join(dir, 'no-cols.csv');
    writeFileSync(noCols, 'name,value\nx,1\n');
    refusals.push([['batch', noCols], /header: got "name,value"; no measurement columns recognised/]);
    for (const [args, pattern] of refusals) {
      const r = await runCli(args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr).toMatch(pattern);
      expect(r.stderr).not.toMatch(STACK_FRAME);
    }
    const out = join(dir, 'never.csv');
    expect((await runCli(['batch', noCols, '--out', out])).code).toBe(2);
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(dir).filter((f) => f.includes('never.csv'))).toEqual([]);
  });

  it('runs the cohort example in cases/', async () => {
    const r = ok(await runCli(['batch', join(ROOT, 'cases', 'hypertension-cohort.csv')]));
    const out = parse(r.stdout, { columns: true }) as Record<string, string>[];
    expect(out.length).toBeGreaterThanOrEqual(5);
    expect(out.filter((x) => x.error !== '')).toHaveLength(1);
  });
});

describe('batch: folders and empty paths are input errors, not crashes', () => {
  it('a folder as the input, a folder or an empty path as --out: exit 2 naming the field', async () => {
    const { spawnSync } = await import('node:child_process');
    const { mkdtempSync, readdirSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const folder = mkdtempSync(join(tmpdir(), 'elastimate-batch-folder-'));
    const run = (...args: string[]) => spawnSync(process.execPath, ['bin/elastimate.js', 'batch', ...args], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
    const asInput = run(folder);
    expect(asInput.status).toBe(2);
    expect(asInput.stderr).toMatch(/batch file: got ".*"; is a folder; accepted: a readable CSV file/);
    const asOut = run('cases/hypertension-cohort.csv', '--out', folder);
    expect(asOut.status).toBe(2);
    expect(asOut.stderr).toMatch(/out: got ".*"; is a folder; it is never written through or replaced/);
    const empty = run('cases/hypertension-cohort.csv', '--out', '');
    expect(empty.status).toBe(2);
    expect(empty.stderr).toMatch(/out: got ""; accepted: a file path in an existing folder/);
    for (const r of [asInput, asOut, empty]) expect(r.stderr).not.toMatch(/internal error|\n\s+at /);
    expect(readdirSync(folder)).toEqual([]);
  });
});
