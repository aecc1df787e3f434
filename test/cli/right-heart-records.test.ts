/**
 * PASP and TAPSE/PASP through a subject's records, spawned as a user would run them (needs dist/:
 * `npm run build`). The subject is invented (demo data). PASP = 4·v² + RAP (simplified Bernoulli;
 * Rudski 2010), TAPSE/PASP (Guazzi 2013); the CVs behind the least significant change are derived
 * from the RIGHT-NET reading variabilities (Ferrara 2021): PASP 7.6 %, TAPSE/PASP 9.27 %.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { requireBuild, runCli, ok } from './fixtures/run-cli.js';

const LEFT = ['--sbp', '120', '--dbp', '80', '--hr', '60', '--edv', '120', '--esv', '50', '--ef', '60', '--pep', '90', '--et', '290'];

let dir: string;
let file: string;
beforeAll(async () => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-rv-'));
  file = join(dir, 'rv-007.subject.json');
  // Visit 1: PASP 4·3.0² + 5 = 41 mmHg, TAPSE/PASP 20/41 = 0.4878.
  ok(await runCli(['record', 'add', file, '--subject', 'RV-007', '--date', '2024-01-10', ...LEFT, '--tapse', '20', '--tr-velocity', '3.0', '--rap', '5']));
  // Visit 2: PASP 4·3.5² + 10 = 59 mmHg, TAPSE/PASP 16/59 = 0.2712.
  ok(await runCli(['record', 'add', file, '--date', '2024-04-10', ...LEFT, '--tapse', '16', '--tr-velocity', '3.5', '--rap', '10']));
  // Visit 3: no TR jet, so no PASP.
  ok(await runCli(['record', 'add', file, '--date', '2024-07-10', ...LEFT, '--tapse', '17']));
}, 60_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Row { key: string; logChange: number | null; verdict: string; lsc: { cv: number; logLimit: number }; noise?: { interval95: [number, number]; exceeds: boolean } }

describe('record compare, show and export carry PASP and TAPSE/PASP', () => {
  it('compare --json: rows judged by |Δln x| against 2.77 × CV, with the input-uncertainty check beside them', async () => {
    const json = JSON.parse(ok(await runCli(['record', 'compare', file, '1', '2', '--json'])).stdout) as { rows: Row[] };
    const row = (k: string) => json.rows.find((r) => r.key === k)!;
    // |ln(59/41)| = 0.363965 > 2.77 × 0.076 = 0.210520 → beyond noise.
    expect(row('pasp').logChange).toBeCloseTo(0.363965, 5);
    expect(row('pasp').lsc.logLimit).toBeCloseTo(0.21052, 5);
    expect(row('pasp').verdict).toBe('beyond-noise');
    // |ln((16/59)/(20/41))| = 0.587109 > 2.77 × 0.0926553 = 0.256655 → beyond noise.
    expect(row('tapsePasp').logChange).toBeCloseTo(-0.587109, 5);
    expect(row('tapsePasp').lsc.logLimit).toBeCloseTo(0.256655, 5);
    expect(row('tapsePasp').verdict).toBe('beyond-noise');
    // Yardstick 2: the change (+18 mmHg) is far outside the noise of TR velocity 3.8 % and RAP ±2 mmHg.
    expect(row('pasp').noise?.exceeds).toBe(true);
    expect(row('pasp').noise!.interval95[0]).toBeGreaterThan(0);
    expect(row('tapsePasp').noise?.exceeds).toBe(true);
  }, 60_000);

  it('compare: no PASP or TAPSE/PASP row when a visit has no TR jet', async () => {
    const json = JSON.parse(ok(await runCli(['record', 'compare', file, '2', '3', '--json'])).stdout) as { rows: Row[] };
    expect(json.rows.map((r) => r.key)).toEqual(['ea', 'pes', 'ees', 'eaEes']);
    const text = ok(await runCli(['record', 'compare', file, '1', '2'])).stdout;
    expect(text).toContain('Pulmonary artery systolic pressure PASP');
    expect(text).toMatch(/PASP rose by 44 %: beyond the least significant change/);
  });

  it('show: the right heart under the table, with the change marked beyond noise (*)', async () => {
    const text = ok(await runCli(['record', 'show', file])).stdout;
    expect(text).toMatch(/Right heart/);
    expect(text).toMatch(/ 1 +PASP 41 mmHg +TAPSE\/PASP 0\.49 mm\/mmHg/);
    expect(text).toMatch(/ 2 +PASP 59 \+44%\* mmHg +TAPSE\/PASP 0\.27 -44%\* mm\/mmHg/);
    expect(text).not.toMatch(/ 3 +PASP/);
  });

  it('export: the PASP columns and their change-from-first verdicts, empty where a visit lacks them', async () => {
    const rows = parse(ok(await runCli(['export', file])).stdout, { columns: true }) as Record<string, string>[];
    expect(rows.map((r) => r.pasp)).toEqual(['41', '59', '']);
    expect(rows.map((r) => r.paspChangeFromFirst)).toEqual(['within-noise', 'beyond-noise', '']);
    expect(rows.map((r) => r.tapsePaspChangeFromFirst)).toEqual(['within-noise', 'beyond-noise', '']);
  });

  it('report (Markdown): the change table has the PASP and TAPSE/PASP rows with both yardsticks', async () => {
    const out = join(dir, 'rv.md');
    ok(await runCli(['report', file, '--visit', '2', '--out', out, '--draws', '1000']));
    const md = readFileSync(out, 'utf8');
    expect(md).toMatch(/\| Pulmonary artery systolic pressure PASP \| 41 \| 59 \| \+44 % \| \+23 % \/ −19 % \| beyond the least significant change; 95 % interval from the inputs excludes zero \|/);
    expect(md).toMatch(/\| Right ventricle–pulmonary artery coupling TAPSE\/PASP \| 0\.49 \| 0\.27 \|/);
  }, 60_000);
});
