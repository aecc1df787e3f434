/**
 * `elastimate scenario` spawned as a user runs it (needs `npm run build`).
 */
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { FORBIDDEN_WORDS, ROOT, STACK_FRAME, ok, requireBuild, runCli, type CliRun, expectRefusal } from './fixtures/run-cli.js';

const VISIT = join(ROOT, 'cases', 'hypertension-trial.visit.json');
const SUBJECT = join(ROOT, 'cases', 'cardio-oncology.subject.json');
const CONTRACT_KEYS = ['sv', 'ef', 'edv', 'esv', 'sbp', 'dbp', 'pes', 'ea', 'ees', 'eaEes', 'co', 'sw'];

interface Entry {
  value: number | null;
  unit: string;
  interval95?: [number, number] | null;
}
interface ScenarioJson {
  measured: Record<string, Entry>;
  baseline: Record<string, Entry> | null;
  projected: Record<string, Entry> | null;
  fit: { ok: boolean; residuals: Record<string, number> | null; tolerance: number; reason?: string; shape: string };
  changes: Record<string, number>;
  intervals?: { draws: number; seed: number; succeeded: number; failed: Record<string, number> };
  cautions: string[];
}

function json(run: CliRun): ScenarioJson {
  ok(run);
  expect(run.stdout).not.toMatch(FORBIDDEN_WORDS);
  return JSON.parse(run.stdout) as ScenarioJson;
}

beforeAll(() => requireBuild());

describe('elastimate scenario (the JSON contract of issue 12; directions from the elastance–Windkessel model, Sunagawa 1983)', () => {
  it('the contract keys in measured, baseline and projected; the fit reproduces EDV, SV, SBP, DBP within its tolerance', async () => {
    const j = json(await runCli(['scenario', '--input', VISIT, '--resistance', '-20', '--json']));
    for (const k of CONTRACT_KEYS) {
      expect(j.measured[k]).toHaveProperty('unit');
      expect(j.baseline![k]).toHaveProperty('value');
      expect(j.projected![k]).toHaveProperty('value');
    }
    expect(j.fit.ok).toBe(true);
    for (const k of ['edv', 'sv', 'sbp', 'dbp']) expect(Math.abs(j.fit.residuals![k]!)).toBeLessThanOrEqual(j.fit.tolerance);
    expect(j.changes).toEqual({ resistance: -20 });
    expect(j.projected!.sv!.value!).toBeGreaterThan(j.baseline!.sv!.value!);
    expect(j.projected!.pes!.value!).toBeLessThan(j.baseline!.pes!.value!);
    expect(j.cautions.join(' ')).toMatch(/not a prediction/);
  });

  it('units on the changes: --to-hr 1.5Hz is 90 bpm, --to-edv 0.13L is 130 mL; a faster heart raises Ea', async () => {
    const j = json(await runCli(['scenario', '--input', VISIT, '--to-hr', '1.5Hz', '--to-edv', '0.13L', '--json']));
    expect(j.changes.toHr).toBeCloseTo(90, 9);
    expect(j.changes.toEdv).toBeCloseTo(130, 9);
    expect(Math.abs(j.projected!.edv!.value! / 130 - 1)).toBeLessThan(0.005);
    expect(j.projected!.ea!.value!).toBeGreaterThan(j.baseline!.ea!.value!);
  });

  it('the visit from a subject file and visit number; the terminal table shows measured, model and projected side by side with the cautions', async () => {
    const run = ok(await runCli(['scenario', '--subject', SUBJECT, '--visit', '1', '--contractility', '+15%']));
    expect(run.stdout).toMatch(/measured\s+model\s+projected/);
    expect(run.stdout).toMatch(/Stroke volume \(SV\)/);
    expect(run.stdout).toMatch(/reflexes|Reflexes/);
    expect(run.stdout).toMatch(/clinical judgement/);
  });

  it('intervals: 200 draws, failures counted, the same seed gives the same numbers', async () => {
    const args = ['scenario', '--input', VISIT, '--resistance', '-10', '--intervals', '--seed', '7', '--json'];
    const a = json(await runCli(args, { timeoutMs: 120_000 }));
    const b = json(await runCli(args, { timeoutMs: 120_000 }));
    expect(a.intervals!.draws).toBe(200);
    const failed = Object.values(a.intervals!.failed).reduce((s, v) => s + v, 0);
    expect(a.intervals!.succeeded + failed).toBe(200);
    const ci = a.projected!.sv!.interval95!;
    expect(ci[0]).toBeLessThan(a.projected!.sv!.value!);
    expect(ci[1]).toBeGreaterThan(a.projected!.sv!.value!);
    expect(b.projected!.sv!.interval95).toEqual(ci);
  }, 300_000);

  it('a visit whose Ees is not computable: the fit fails with the reason and nothing is projected', async () => {
    const j = json(await runCli(['scenario', '--sbp', '120', '--dbp', '80', '--hr', '70', '--edv', '120', '--esv', '50', '--pep', '20', '--et', '400', '--resistance', '-10', '--json', '--no-input']));
    expect(j.fit.ok).toBe(false);
    expect(j.fit.reason).toMatch(/Ees is not computable/);
    expect(j.projected).toBeNull();
  });
});

describe('elastimate scenario: the simulated loops overlaid', () => {
  it('--svg writes both loops with their end-systolic lines; --sketch draws them in text', async () => {
    const { mkdtempSync, readFileSync, rmSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const dir = mkdtempSync(join(tmpdir(), 'elastimate-loops-'));
    try {
      const svg = join(dir, 'loops.svg');
      const run = ok(await runCli(['scenario', '--input', VISIT, '--contractility', '25', '--svg', svg, '--sketch']));
      const text = readFileSync(svg, 'utf8');
      expect(text.match(/data-series="loop"/g)).toHaveLength(2);
      expect(text.match(/data-series="espvr"/g)).toHaveLength(2);
      expect(run.stdout).toMatch(/o model baseline\s+\* projection/);
      const report = join(dir, 'what-if.html');
      ok(await runCli(['scenario', '--input', VISIT, '--to-hr', '80', '--report', report, '--json']));
      const html = readFileSync(report, 'utf8');
      expect(html.match(/<tr><th scope="row">/g)).toHaveLength(14);
      expect(html.match(/data-series="loop"/g)).toHaveLength(2);
      expect(html).toMatch(/not a prediction/);
      expect(html).toMatch(/heart rate to 80 bpm/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('elastimate scenario: bad input to every new flag, one message and exit 2', () => {
  it.each([
    ['--to-hr', 'fast', '--to-hr'],
    ['--to-hr', '400', '--to-hr'],
    ['--to-edv', '5', '--to-edv'],
    ['--resistance', 'lower', '--resistance'],
    ['--compliance', '-95', '--compliance'],
    ['--contractility', '+1000%', '--contractility'],
    ['--shape', 'hill-c', '--shape'],
    ['--draws', '10', '--draws'],
    ['--seed', '-1', '--seed'],
    ['--svg', 'loops.png', '--svg'],
    ['--report', 'what-if.pdf', '--report'],
  ])('%s %s', async (flag, value, field) => {
    expectRefusal(await runCli(['scenario', '--input', VISIT, flag, value]), field, value);
  });
  it('--visit without --subject', async () => {
    expectRefusal(await runCli(['scenario', '--input', VISIT, '--visit', '1']), '--visit', '1');
  });
});
