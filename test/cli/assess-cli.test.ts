/**
 * The built CLI spawned as a user would run it: `node bin/elastimate.js assess …`.
 * Needs dist/ (npm install builds it; after changing src/ run `npm run build`).
 */
import { spawnSync } from 'node:child_process';
import { chmodSync, closeSync, existsSync, mkdtempSync, openSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { NUMERIC_FIELDS } from '../../src/assessment/fields.js';
import { FORBIDDEN_WORDS, ROOT, STACK_FRAME, plainEnv, requireBuild, runCli, type CliRun } from './fixtures/run-cli.js';
import { AS_NOBODY, requireMeans } from '../hostile/fixtures/system-means.js';

// The hand-worked single-beat example of ../shared/method-notes.md §4 (computed there, not published):
// SBP 120, DBP 80, EF 0.60, SV 70 mL, PEP 90 ms, ET 290 ms → Pes 108, tNd 0.23684, ENd(avg) 0.33614,
// ENd(est) 0.37243, Ees 1.5258 mmHg/mL, Ea 1.5429 mmHg/mL, Ea/Ees 1.0112.
const WORKED = ['--sbp', '120', '--dbp', '80', '--edv', '120', '--esv', '50', '--ef', '60', '--pep', '90', '--et', '290'];

interface JsonQuantity {
  value: number | null;
  unit: string;
  method?: string;
  reason?: string;
}
interface AssessmentJson {
  format: string;
  inputs: Record<string, unknown>;
  results: Record<string, JsonQuantity>;
  flags: { code: string; level: string; message: string }[];
  caveats: string[];
  referral: string;
}

function parseJson(run: CliRun): AssessmentJson {
  expect(run.stderr).toBe('');
  expect(run.code).toBe(0);
  return JSON.parse(run.stdout) as AssessmentJson;
}

/** The common checks on every refusal: exit 2, a message naming field, value and what is accepted, no stack trace. */
function expectRefusal(run: CliRun, field: string, value: string | null): void {
  expect(run.timedOut).toBe(false);
  expect(run.code).toBe(2);
  expect(run.stderr).toMatch(new RegExp(`^elastimate: ${field.replace(/[-]/g, '\\-')}: `, 'm'));
  if (value !== null) expect(run.stderr).toContain(value);
  expect(run.stderr).toContain('accepted:');
  expect(run.stderr).not.toMatch(STACK_FRAME);
  expect(run.stderr).not.toContain('internal error');
  expect(run.stdout).not.toMatch(FORBIDDEN_WORDS);
}

let scratch: string;
beforeAll(() => {
  requireBuild();
  scratch = mkdtempSync(join(tmpdir(), 'elastimate-cli-'));
});
afterAll(() => {
  rmSync(scratch, { recursive: true, force: true });
});

describe('assess from flags: the terminal report', () => {
  it('prints every section, the caution and the referral note, exit 0', async () => {
    const run = await runCli(['assess', ...WORKED, '--hr', '64']);
    expect(run.code).toBe(0);
    expect(run.stderr).toBe('');
    const sections = ['Inputs as used', 'Pressures', 'Flow and arterial load', 'Ventricular elastance', 'Coupling', 'Checks and caveats', 'Referral note'];
    let at = -1;
    for (const s of sections) {
      const i = run.stdout.indexOf(s);
      expect(i, `section "${s}" present and in order`).toBeGreaterThan(at);
      at = i;
    }
    expect(run.stdout).toMatch(/research use only/i);
    expect(run.stdout).toMatch(/not a diagnosis/i);
    expect(run.stdout).toMatch(/local protocols/i);
    // Numbers with their units (values of the worked example above).
    expect(run.stdout).toMatch(/108 mmHg/);
    expect(run.stdout).toMatch(/1\.53 mmHg\/mL/);
    expect(run.stdout).not.toMatch(FORBIDDEN_WORDS);
  });

  it('is plain text off a terminal and with NO_COLOR, coloured only when forced (control)', async () => {
    const offTerminal = await runCli(['assess', ...WORKED]);
    const noColour = await runCli(['assess', ...WORKED], { env: plainEnv({ NO_COLOR: '1', FORCE_COLOR: '1' }) });
    const forced = await runCli(['assess', ...WORKED], { env: plainEnv({ FORCE_COLOR: '1' }) });
    expect(offTerminal.stdout).not.toContain('\x1b[');
    expect(noColour.stdout).not.toContain('\x1b[');
    // The control shows the check above can fail: forcing colour does produce escapes.
    expect(forced.stdout).toContain('\x1b[');
  });
});

describe('assess --json: the public contract (docs/json-output.md)', () => {
  it('gives results.<key> = { value, unit } with the documented units', async () => {
    const j = parseJson(await runCli(['assess', ...WORKED, '--hr', '64', '--json']));
    expect(j.format).toBe('elastimate-assessment');
    const units: Record<string, string> = {
      pes: 'mmHg', map: 'mmHg', svUsed: 'mL', co: 'L/min', ea: 'mmHg/mL', tNd: '', normalizedElastanceAvg: '', normalizedElastanceEst: '', ees: 'mmHg/mL', eaEes: '', v0: 'mL',
    };
    for (const [key, unit] of Object.entries(units)) {
      const q = j.results[key];
      expect(q, key).toBeDefined();
      expect(q!.unit, key).toBe(unit);
      expect(typeof q!.value, key).toBe('number');
      expect(Number.isFinite(q!.value), key).toBe(true);
    }
    expect(Array.isArray(j.flags)).toBe(true);
    expect(j.inputs.sbp).toBe(120);
    expect(j.caveats.join(' ')).toMatch(/not a diagnosis/i);
  });

  it('reproduces the hand-worked single-beat example (method-notes §4) and the published relations', async () => {
    const r = parseJson(await runCli(['assess', ...WORKED, '--hr', '64', '--json'])).results;
    const v = (k: string): number => r[k]!.value as number;
    expect(v('pes')).toBeCloseTo(108, 6); // 0.9 × SBP, Kelly 1992
    expect(v('map')).toBeCloseTo(80 + 40 / 3, 6); // DBP + PP/3, common practice
    expect(v('svUsed')).toBeCloseTo(70, 6); // EDV − ESV
    expect(v('co')).toBeCloseTo((70 * 64) / 1000, 6); // SV × HR / 1000, common practice
    expect(v('tNd')).toBeCloseTo(0.23684, 5); // PEP / (PEP + ET), Chen 2001
    expect(v('normalizedElastanceAvg')).toBeCloseTo(0.33614, 5);
    expect(v('normalizedElastanceEst')).toBeCloseTo(0.37243, 5);
    expect(v('ees')).toBeCloseTo(1.5258, 4);
    expect(v('ea')).toBeCloseTo(1.5429, 4);
    expect(v('eaEes')).toBeCloseTo(1.0112, 4);
    // V0 = ESV − Pes / Ees (Chen 2001 ESPVR), from the reported numbers themselves.
    expect(v('v0')).toBeCloseTo(50 - v('pes') / v('ees'), 6);
  });

  it('format version 2: no key outside the inputs equals an input key (results report values used as <key>Used)', async () => {
    const run = await runCli(['assess', '--input', join(ROOT, 'cases', 'hypertension-trial.visit.json'), '--sv', '75', '--edp', '14', '--uncertainty', '--draws', '1000', '--json']);
    const j = JSON.parse(run.stdout) as Record<string, unknown>;
    expect(j.formatVersion).toBe(2);
    const inputKeys = new Set(NUMERIC_FIELDS.map((f) => f.key));
    const clashes: string[] = [];
    const walk = (value: unknown, path: string): void => {
      if (Array.isArray(value)) value.forEach((v, i) => walk(v, `${path}[${i}]`));
      else if (value !== null && typeof value === 'object') {
        for (const [k, v] of Object.entries(value)) {
          if (inputKeys.has(k as never)) clashes.push(`${path}.${k}`);
          walk(v, `${path}.${k}`);
        }
      }
    };
    for (const [k, v] of Object.entries(j)) if (k !== 'inputs' && k !== 'inputUnits') walk(v, k);
    expect(clashes).toEqual([]);
    const results = j.results as Record<string, unknown>;
    expect(Object.keys(results)).toEqual(expect.arrayContaining(['svUsed', 'efUsed', 'normalizedElastanceAvg', 'normalizedElastanceEst']));
    expect(JSON.stringify(j)).not.toMatch(/"ci95"|"endAvg"|"endEst"/);
    expect((results.ea as { interval95?: unknown }).interval95).toHaveLength(2);
  });

  it('makes co null with a reason when the heart rate is missing, and keeps everything else', async () => {
    const run = await runCli(['assess', ...WORKED, '--json']);
    const j = parseJson(run);
    expect(j.results.co).toMatchObject({ value: null, unit: 'L/min' });
    expect(j.results.co!.reason).toMatch(/heart rate/);
    expect(j.results.ees!.value).not.toBeNull();
    expect(run.stdout).not.toMatch(FORBIDDEN_WORDS);
  });
});

describe('assess --input: a visit file, flags override it', () => {
  it('reads a case file and lets a flag override one of its values', async () => {
    const file = join('cases', 'hypertension-trial.visit.json');
    const fromFile = JSON.parse(readFileSync(join(ROOT, file), 'utf8')) as { hr: number };
    const plain = parseJson(await runCli(['assess', '--input', file, '--json']));
    const overridden = parseJson(await runCli(['assess', '--input', file, '--hr', '80', '--json']));
    expect(plain.inputs.hr).toBe(fromFile.hr);
    expect(overridden.inputs.hr).toBe(80);
    expect(overridden.inputs.edv).toBe(plain.inputs.edv);
    // CO scales with the overriding heart rate (SV × HR / 1000).
    const sv = overridden.results.svUsed!.value as number;
    expect(overridden.results.co!.value).toBeCloseTo((sv * 80) / 1000, 6);
  });

  it('reads every case file in cases/', async () => {
    for (const name of ['hypertension-trial', 'cardio-oncology', 'heart-failure-reduced-ef']) {
      const run = await runCli(['assess', '--input', `cases/${name}.visit.json`]);
      expect(run.code, name).toBe(0);
      expect(run.stdout, name).toContain('Referral note');
    }
  });
});

describe('off a terminal it never asks', () => {
  it('lists every missing input in one message, exit 2, without waiting on standard input', async () => {
    const run = await runCli(['assess', '--sbp', '120'], { timeoutMs: 10_000 });
    expect(run.timedOut).toBe(false);
    expect(run.code).toBe(2);
    for (const flag of ['dbp', 'edv', 'esv', 'pep', 'et']) expect(run.stderr).toMatch(new RegExp(`^elastimate: ${flag}: missing`, 'm'));
    expect(run.stderr).not.toMatch(/^elastimate: sbp:/m);
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(run.stdout).toBe('');
  });

  it('names refused values in the same message as the missing ones', async () => {
    const run = await runCli(['assess', '--sbp', 'abc', '--edv', '120'], { timeoutMs: 10_000 });
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/^elastimate: esv: missing/m);
    expect(run.stderr).toMatch(/^elastimate: sbp: got "abc"/m);
  });

  it('--no-input refuses to ask, even with nothing given', async () => {
    const run = await runCli(['assess', '--no-input'], { timeoutMs: 10_000 });
    expect(run.timedOut).toBe(false);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/prompts are off/);
    for (const flag of ['sbp', 'dbp', 'edv', 'esv', 'pep', 'et']) expect(run.stderr).toMatch(new RegExp(`^elastimate: ${flag}: missing`, 'm'));
  });

  it('--no-input with a complete set computes as usual', async () => {
    const run = await runCli(['assess', '--no-input', ...WORKED]);
    expect(run.code).toBe(0);
    expect(run.stdout).toContain('Coupling');
  });
});

describe('bad values: exit 2, one message naming field, value and what is accepted', () => {
  /** Flags of the worked example with one replaced. */
  function withFlag(flag: string, value: string): string[] {
    const args = [...WORKED];
    const i = args.indexOf(`--${flag}`);
    if (i >= 0) args[i + 1] = value;
    else args.push(`--${flag}`, value);
    return ['assess', ...args];
  }
  const cases: [string, string, string, string | RegExp][] = [
    // flag, value, field named, value shown
    ['sbp', 'abc', 'sbp', '"abc"'],
    ['sbp', 'NaN', 'sbp', '"NaN"'],
    ['hr', 'Infinity', 'hr', '"Infinity"'],
    ['edv', '-5', 'edv', '"-5"'],
    ['sbp', '999', 'sbp', '"999"'],
    ['dbp', '130', 'dbp', '130'],
    ['esv', '130', 'esv', '130'],
    ['sbp', '7 furlongs', 'sbp', '"7 furlongs"'],
    ['sbp', '5 kg', 'sbp', '"5 kg"'],
  ];
  for (const [flag, value, field, shown] of cases) {
    it(`--${flag} ${JSON.stringify(value)}`, async () => {
      const run = await runCli(withFlag(flag, value));
      expectRefusal(run, field, typeof shown === 'string' ? shown : null);
      expect(run.stdout).toBe('');
    });
  }

  it('says what a pressure accepts: its units and range', async () => {
    const run = await runCli(withFlag('sbp', '5 kg'));
    expect(run.stderr).toMatch(/sbp: got "5 kg"; .*pressure/);
    expect(run.stderr).toMatch(/mmHg/);
    expect(run.stderr).toMatch(/60–260 mmHg/);
  });

  it('DBP ≥ SBP names both numbers', async () => {
    const run = await runCli(withFlag('dbp', '120'));
    expectRefusal(run, 'dbp', '120');
    expect(run.stderr).toMatch(/SBP/);
  });

  it('a missing visit file', async () => {
    expectRefusal(await runCli(['assess', '--input', join(scratch, 'absent.json')]), 'input', 'absent.json');
  });

  it('an unreadable visit file (a folder, and a file without read permission)', async () => {
    expectRefusal(await runCli(['assess', '--input', scratch]), 'input', scratch);
    const locked = join(scratch, 'locked.visit.json');
    writeFileSync(locked, '{}');
    chmodSync(locked, 0o000);
    // Root reads anything, so as root (CI) the CLI runs as `nobody` (setpriv); the folder is open to all (0755),
    // so only the file's own mode stops it. Without the means the test fails; it is never skipped.
    chmodSync(scratch, 0o755);
    const asRoot = process.getuid?.() === 0;
    if (asRoot) requireMeans('setpriv');
    const run = await runCli(['assess', '--input', locked], asRoot ? { wrap: AS_NOBODY } : {});
    expect(run.code).toBe(2);
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(run.stderr).toMatch(/^elastimate: input: .*cannot be read/m);
  });

  it('a malformed JSON visit file', async () => {
    const bad = join(scratch, 'bad.visit.json');
    writeFileSync(bad, '{ "sbp": 120, ');
    const run = await runCli(['assess', '--input', bad]);
    expectRefusal(run, 'input', 'bad.visit.json');
    expect(run.stderr).toMatch(/not valid JSON/);
  });

  it('an unknown key in a visit file', async () => {
    const odd = join(scratch, 'odd.visit.json');
    writeFileSync(odd, JSON.stringify({ sbp: 120, dbp: 80, edv: 120, esv: 50, pep: 90, et: 290, systolic: 120 }));
    const run = await runCli(['assess', '--input', odd]);
    expectRefusal(run, 'systolic', '120');
    expect(run.stderr).toMatch(/unknown key/);
  });

  it('a wrongly typed value in a visit file', async () => {
    const typed = join(scratch, 'typed.visit.json');
    writeFileSync(typed, JSON.stringify({ sbp: 120, dbp: 80, edv: true, esv: 50, pep: 90, et: 290 }));
    expectRefusal(await runCli(['assess', '--input', typed]), 'edv', 'true');
  });
});

describe('version, help, unknown options', () => {
  it('--version prints the package version, exit 0', async () => {
    const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { version: string };
    const run = await runCli(['--version']);
    expect(run.code).toBe(0);
    expect(run.stdout.trim()).toBe(pkg.version);
  });

  it('--help and assess --help, exit 0', async () => {
    const top = await runCli(['--help']);
    expect(top.code).toBe(0);
    expect(top.stdout).toMatch(/Usage: elastimate/);
    expect(top.stdout).toMatch(/assess/);
    const sub = await runCli(['assess', '--help']);
    expect(sub.code).toBe(0);
    // Every option names its unit and accepted range (from the field registry).
    expect(sub.stdout).toMatch(/--sbp <values>\s+Brachial systolic pressure \(mmHg, 60–260 mmHg\)/);
    expect(sub.stdout).toMatch(/--no-input/);
  });

  it('an unknown option exits 2 and names it', async () => {
    const run = await runCli(['assess', ...WORKED, '--systolic', '120']);
    expect(run.code).toBe(2);
    expect(run.stderr).toContain('--systolic');
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(run.stdout).toBe('');
  });

  it('an unknown command exits 2', async () => {
    const run = await runCli(['asses']);
    expect(run.code).toBe(2);
    expect(run.stderr).not.toMatch(STACK_FRAME);
  });

  // Regression: a failing standard output (here a full device) used to end in an uncaught exception and a stack dump.
  it.runIf(existsSync('/dev/full'))('an output that cannot be written (stdout on /dev/full): one line in plain words, exit 3 (docs/files.md), no stack trace', () => {
    const full = openSync('/dev/full', 'w');
    try {
      const run = spawnSync(process.execPath, [join(ROOT, 'bin', 'elastimate.js'), 'assess', '--no-input', ...WORKED], { cwd: ROOT, env: plainEnv(), stdio: ['ignore', full, 'pipe'], encoding: 'utf8', timeout: 15_000 });
      expect(run.status).toBe(3);
      expect(run.stderr).toBe('elastimate: standard output: cannot be written: the disk is full (ENOSPC)\n');
    } finally {
      closeSync(full);
    }
  });
});
