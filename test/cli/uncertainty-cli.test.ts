/**
 * `assess --uncertainty` spawned as a user runs it (needs `npm run build`).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FORBIDDEN_WORDS, ROOT, STACK_FRAME, requireBuild, runCli, type CliRun, expectRefusal } from './fixtures/run-cli.js';

const VISIT = join(ROOT, 'cases', 'hypertension-trial.visit.json');
const FLAGS = ['--sbp', '120', '--dbp', '80', '--edv', '130', '--esv', '55', '--ef', '60', '--sv', '70', '--pep', '90', '--et', '290'];

interface Quantity {
  value: number | null;
  unit: string;
  interval95?: [number, number];
}
interface Share {
  input: string;
  share: number;
}
interface UncertainJson {
  results: Record<string, Quantity>;
  sensitivity: Record<string, Share[]>;
  uncertainty: {
    draws: number;
    seed: number;
    errorModel: { input: string; sd: number; provenance: string; source: string; given: string }[];
    notComputableFraction: number;
    probabilityEaEesAboveCutoff: { cutoff: number; measurementError: number; withMethodError: number; over: string };
    methodError: { source: string; ees: { methodOnly: [number, number]; combined: [number, number]; measurementOnly: [number, number] } };
    driver: { input: string; share: number; advice: string };
  };
}

function ok(run: CliRun): string {
  expect(run.timedOut).toBe(false);
  expect(run.stderr).toBe('');
  expect(run.code).toBe(0);
  expect(run.stdout).not.toMatch(FORBIDDEN_WORDS);
  return run.stdout;
}

let scratch: string;
beforeAll(() => {
  requireBuild();
  scratch = mkdtempSync(join(tmpdir(), 'elastimate-uncertainty-'));
});
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe('assess --uncertainty --json', () => {
  it('adds interval95 to the results, sensitivity shares and the uncertainty object; the values stay those of plain assess', async () => {
    const [withDraws, plain] = await Promise.all([
      runCli(['assess', '--input', VISIT, '--uncertainty', '--draws', '5000', '--json']),
      runCli(['assess', '--input', VISIT, '--json']),
    ]);
    const u = JSON.parse(ok(withDraws)) as UncertainJson;
    const p = JSON.parse(ok(plain)) as UncertainJson;
    for (const key of ['pes', 'ea', 'ees', 'eaEes', 'v0', 'svUsed', 'tNd', 'normalizedElastanceEst', 'co', 'tpr']) {
      const q = u.results[key]!;
      expect(q.value, key).toBe(p.results[key]!.value);
      expect(q.interval95, key).toHaveLength(2);
      expect(q.interval95![0], key).toBeLessThanOrEqual(q.value!);
      expect(q.interval95![1], key).toBeGreaterThanOrEqual(q.value!);
    }
    expect(p.results.ea!.interval95).toBeUndefined();
    for (const key of ['ees', 'eaEes']) {
      const shares = u.sensitivity[key]!;
      expect(shares.length).toBeGreaterThan(1);
      expect(shares.reduce((a, s) => a + s.share, 0)).toBeCloseTo(1, 10);
      for (const s of shares) expect(s.share).toBeGreaterThanOrEqual(0);
      expect([...shares].sort((a, b) => b.share - a.share)).toEqual(shares);
    }
    expect(u.uncertainty.draws).toBe(5000);
    expect(u.uncertainty.seed).toBe(1);
    expect(u.uncertainty.notComputableFraction).toBe(0);
    expect(u.uncertainty.errorModel.map((e) => e.input)).toEqual(expect.arrayContaining(['sbp', 'dbp', 'edv', 'esv', 'ef', 'lvotDiameter', 'lvotVti', 'pep', 'et']));
    for (const e of u.uncertainty.errorModel) {
      expect(e.sd).toBeGreaterThan(0);
      expect(e.source).not.toBe('');
      expect(e.given).toBe('default');
    }
    expect(u.uncertainty.probabilityEaEesAboveCutoff.cutoff).toBe(1.2);
    expect(u.uncertainty.probabilityEaEesAboveCutoff.measurementError).toBeGreaterThanOrEqual(0);
    expect(u.uncertainty.methodError.source).toMatch(/Chen/);
    expect(u.uncertainty.methodError.ees.measurementOnly).toEqual(u.results.ees!.interval95);
    expect(u.uncertainty.driver.advice).toMatch(/^Repeat the /);
  });

  it('the same seed gives the same output byte for byte; another seed changes the intervals', async () => {
    const args = ['assess', ...FLAGS, '--draws', '3000', '--seed', '77', '--json'];
    const [a, b, c] = await Promise.all([runCli(args), runCli(args), runCli(['assess', ...FLAGS, '--draws', '3000', '--seed', '78', '--json'])]);
    expect(ok(a)).toBe(ok(b));
    const ra = JSON.parse(a.stdout) as UncertainJson;
    const rc = JSON.parse(ok(c)) as UncertainJson;
    expect(rc.results.ees!.value).toBe(ra.results.ees!.value);
    expect(rc.results.ees!.interval95).not.toEqual(ra.results.ees!.interval95);
  });

  it('error overrides from flags and from the visit file', async () => {
    const visit = join(scratch, 'visit-errors.json');
    writeFileSync(visit, JSON.stringify({ sbp: 120, dbp: 80, edv: 130, esv: 55, ef: 60, sv: 70, pep: 90, et: 290, errors: { pep: 2, edv: '12%' } }));
    const run = await runCli(['assess', '--input', visit, '--error', 'sbp=3', '--error', 'lvot-diameter=0.2', '--uncertainty', '--draws', '2000', '--json']);
    const u = JSON.parse(ok(run)) as UncertainJson;
    const sd = (k: string) => u.uncertainty.errorModel.find((e) => e.input === k)!;
    expect(sd('sbp').sd).toBe(3);
    expect(sd('pep').sd).toBe(2);
    expect(sd('edv').sd).toBeCloseTo(15.6, 10);
    expect(sd('pep').given).toBe('override');
  });
});

describe('assess --uncertainty on the terminal', () => {
  it('shows each interval, the method error apart from the measurement error, and the measurement to repeat', async () => {
    const out = ok(await runCli(['assess', '--input', VISIT, '--uncertainty', '--draws', '4000']));
    expect(out).toMatch(/Arterial elastance Ea\s+[\d.]+ mmHg\/mL\s+\(95 % interval [\d.]+ to [\d.]+\)/);
    expect(out).toMatch(/Ea\/Ees\s+[\d.]+\s+\(95 % interval/);
    expect(out).toContain('Uncertainty: how sure are these numbers');
    expect(out).toContain('Measurement error (inputs only):');
    expect(out).toMatch(/Ees, method error only\s+[\d.]+ to [\d.]+ mmHg\/mL/);
    expect(out).toMatch(/Ees, measurement \+ method error\s+[\d.]+ to [\d.]+ mmHg\/mL/);
    expect(out).toMatch(/Probability that Ea\/Ees exceeds 1\.2: [\d.<]+ ?[\d.]* %/);
    expect(out.replace(/\s+/g, ' ')).toMatch(/ Repeat the .+? to tighten Ees most: it drives [\d.]+ % of the variance of Ees\./);
    expect(out).toMatch(/SBP\s+7\.0 mmHg\s+mean of 3 readings/);
    expect(out).toContain('For research use only');
  });
  it('reports the fraction of draws in which Ees is not computable', async () => {
    const out = ok(await runCli(['assess', '--sbp', '140', '--dbp', '60', '--edv', '200', '--esv', '160', '--pep', '150', '--et', '150', '--uncertainty', '--draws', '4000']));
    expect(out.replace(/\n +/g, ' ')).toMatch(/Ees not computable in [\d.]+ % of draws: .*DBP not above ENd\(est\)·Pes in [\d.]+ %; the intervals use the other draws\./);
  });
});

describe('record views use the same intervals', () => {
  const SUBJECT = join(ROOT, 'cases', 'cardio-oncology.subject.json');
  interface Row {
    key: string;
    difference: number | null;
    noise?: { interval95: [number, number]; exceeds: boolean; source: string };
  }
  it('record compare --json: each change carries its 95 % interval and whether it exceeds the combined noise', async () => {
    const run = await runCli(['record', 'compare', SUBJECT, '1', '3', '--json']);
    const rows = (JSON.parse(ok(run)) as { rows: Row[] }).rows;
    for (const key of ['pes', 'ea', 'ees', 'eaEes']) {
      const row = rows.find((r) => r.key === key)!;
      expect(row.noise, key).toBeDefined();
      const [low, high] = row.noise!.interval95;
      expect(low).toBeLessThanOrEqual(row.difference!);
      expect(high).toBeGreaterThanOrEqual(row.difference!);
      expect(row.noise!.exceeds).toBe(low > 0 || high < 0);
      expect(row.noise!.source).toMatch(/Monte Carlo/);
    }
  });
  it('record compare on the terminal says whether the change is within the uncertainty of the inputs', async () => {
    const out = ok(await runCli(['record', 'compare', SUBJECT, '1', '2']));
    expect(out).toMatch(/input uncertainty: the 95 % interval of the change/);
  });
  it('record show --uncertainty: ranges per visit, in JSON on each result and on the terminal under the table', async () => {
    const [json, text] = await Promise.all([
      runCli(['record', 'show', SUBJECT, '--uncertainty', '--json']),
      runCli(['record', 'show', SUBJECT, '--uncertainty']),
    ]);
    const visits = (JSON.parse(ok(json)) as { visits: { results: Record<string, Quantity>; changeFromPrevious: { rows: Row[] } | null }[] }).visits;
    expect(visits.length).toBeGreaterThan(1);
    for (const v of visits) {
      for (const key of ['pes', 'ea', 'ees', 'eaEes']) expect(v.results[key]!.interval95, key).toHaveLength(2);
    }
    expect(visits[1]!.changeFromPrevious!.rows.find((r) => r.key === 'ees')!.noise).toBeDefined();
    expect(ok(text)).toMatch(/95 % intervals from measurement error\n(?:.*\n)+? {2}1 +\d{4}-\d\d-\d\d +Pes \d+ \(\d+ to \d+\) +Ea [\d.]+ \(/);
  });
});

describe('bad options exit with code 2 and name the field', () => {
  const cases: [string, string[], string, string][] = [
    ['too few draws', ['--draws', '10'], 'draws', '"10"'],
    ['draws not a number', ['--draws', 'many'], 'draws', '"many"'],
    ['too many draws', ['--draws', '5000000'], 'draws', '"5000000"'],
    ['negative seed', ['--seed', '-1'], 'seed', '"-1"'],
    ['fractional seed', ['--seed', '1.5'], 'seed', '"1.5"'],
    ['error not a number', ['--uncertainty', '--error', 'sbp=abc'], 'error.sbp', '"abc"'],
    ['error percentage too large', ['--uncertainty', '--error', 'edv=150%'], 'error.edv', '"150%"'],
    ['error for an input that reaches no result', ['--uncertainty', '--error', 'age=3'], 'error', '"age"'],
    ['bad error without --uncertainty is still refused', ['--error', 'pep=-4'], 'error.pep', '"-4"'],
  ];
  for (const [name, extra, field, value] of cases) {
    it(name, async () => {
      expectRefusal(await runCli(['assess', ...FLAGS, ...extra, '--json']), field, value);
    });
  }
  it('a bad error in a visit file', async () => {
    const visit = join(scratch, 'visit-bad-error.json');
    writeFileSync(visit, JSON.stringify({ sbp: 120, dbp: 80, edv: 130, esv: 55, pep: 90, et: 290, errors: { esv: 'lots' } }));
    expectRefusal(await runCli(['assess', '--input', visit, '--uncertainty']), 'error.esv', '"lots"');
  });
});
