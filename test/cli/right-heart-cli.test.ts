/**
 * Right ventricle–pulmonary artery coupling through the built CLI: the numbers (simplified
 * Bernoulli; Rudski 2010 IVC bands), the wording of the cut-offs with their populations, and bad
 * input answered with one message and exit 2.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { FORBIDDEN_WORDS, STACK_FRAME, ok, requireBuild, runCli } from './fixtures/run-cli.js';

beforeAll(requireBuild);

// An invented visit (demo values, not a published case).
const LEFT = ['--sbp', '128', '--dbp', '78', '--hr', '70', '--edv', '130', '--esv', '60', '--pep', '95', '--et', '280', '--no-input'];

function json(stdout: string): { results: Record<string, { value: number | null; method?: string; reason?: string }>; flags: { code: string; message: string }[]; referral: string } {
  return JSON.parse(stdout);
}

describe('right-heart results', () => {
  it('TR 2.8 m/s with a measured RAP of 8 mmHg gives PASP 39.36 mmHg (4·v² + RAP; worked value in the issue), and TAPSE 20 mm gives TAPSE/PASP 20/39.36', async () => {
    const j = json(ok(await runCli(['assess', ...LEFT, '--tapse', '20', '--tr-velocity', '2.8', '--rap', '8', '--json'])).stdout);
    expect(j.results.rapUsed!.value).toBe(8);
    expect(j.results.pasp!.value).toBeCloseTo(39.36, 10);
    expect(j.results.tapsePasp!.value).toBeCloseTo(20 / 39.36, 10);
    expect(j.results.pasp!.method).toMatch(/Bernoulli/);
  });

  it('RAP estimated from the IVC follows the guideline bands (Rudski 2010), values with units converted (mm → cm, cm/s → m/s)', async () => {
    const high = json(ok(await runCli(['assess', ...LEFT, '--tapse', '2cm', '--tr-velocity', '310cm/s', '--ivc', '24mm', '--ivc-collapse', '30', '--json'])).stdout);
    expect(high.results.rapUsed!.value).toBe(15);
    expect(high.results.pasp!.value).toBeCloseTo(4 * 3.1 * 3.1 + 15, 10);
    expect(high.results.tapsePasp!.value).toBeCloseTo(20 / (4 * 3.1 * 3.1 + 15), 10);
    const edge = json(ok(await runCli(['assess', ...LEFT, '--tr-velocity', '2.5', '--ivc', '2.1', '--ivc-collapse', '50', '--json'])).stdout);
    expect(edge.results.rapUsed!.value).toBe(8); // exactly 50 % collapse is the intermediate band
    const terminal = ok(await runCli(['assess', ...LEFT, '--tr-velocity', '2.5', '--ivc', '2.1', '--ivc-collapse', '50'])).stdout;
    expect(terminal.replace(/\s+/g, ' ')).toMatch(/estimated from the IVC \(2\.1 cm, 50 % sniff collapse\): intermediate band/);
  });

  it('a measured RAP wins over the IVC estimate', async () => {
    const j = json(ok(await runCli(['assess', ...LEFT, '--tr-velocity', '3', '--rap', '4', '--ivc', '2.5', '--ivc-collapse', '20', '--json'])).stdout);
    expect(j.results.rapUsed!.value).toBe(4);
  });

  it('no measurable TR jet: no PASP, no index, and the reason says why', async () => {
    const j = json(ok(await runCli(['assess', ...LEFT, '--tapse', '18', '--rap', '5', '--json'])).stdout);
    expect(j.results.pasp!.value).toBeNull();
    expect(j.results.tapsePasp!.value).toBeNull();
    expect(j.results.pasp!.reason).toMatch(/tricuspid regurgitant velocity/);
    expect(j.flags.map((f) => f.code)).toContain('no-tr-jet');
  });

  it('the referral note names TR velocity above 2.8 m/s (ESC/ERS 2022) and TAPSE/PASP below 0.31 with its population (Tello 2019)', async () => {
    const j = json(ok(await runCli(['assess', ...LEFT, '--tapse', '14', '--tr-velocity', '3.4', '--rap', '10', '--json'])).stdout);
    expect(j.referral).toMatch(/3\.4 m\/s is above 2\.8 m\/s/);
    expect(j.referral).toMatch(/ESC\/ERS 2022/);
    expect(j.referral).toMatch(/below 0\.31 mm\/mmHg.*pulmonary arterial hypertension.*Tello/);
    const calm = json(ok(await runCli(['assess', ...LEFT, '--tapse', '24', '--tr-velocity', '2.4', '--rap', '3', '--json'])).stdout);
    expect(calm.referral).not.toMatch(/2\.8 m\/s/);
    expect(calm.referral).not.toMatch(/0\.31/);
  });

  it('the terminal report shows each published cut-off with its own population', async () => {
    const run = ok(await runCli(['assess', ...LEFT, '--tapse', '16', '--tr-velocity', '3.1', '--rap', '5']));
    // Off a terminal the section wraps at 80 columns: every line of it fits, and the words are read across the wraps.
    const section = run.stdout.slice(run.stdout.indexOf('Right heart'), run.stdout.indexOf('\n\n', run.stdout.indexOf('Right heart')));
    expect(section.split('\n').length).toBeGreaterThan(8);
    for (const l of section.split('\n')) expect([...l].length, l).toBeLessThanOrEqual(80);
    const out = run.stdout.replace(/\s+/g, ' ');
    expect(out).toMatch(/Right heart/);
    expect(out).toMatch(/cut-off 0\.31 mm\/mmHg not below it in pulmonary arterial hypertension/);
    expect(out).toMatch(/0\.36.*heart failure/);
    expect(out).toMatch(/Guazzi/);
    expect(out).toMatch(/severe tricuspid regurgitation/);
  });
});

describe('right-heart bad input: one message naming the field, exit 2', () => {
  const cases: Array<[string, string[], RegExp]> = [
    ['negative TR velocity', ['--tr-velocity', '-2'], /tr-velocity/],
    ['IVC collapse over 100 %', ['--ivc', '2', '--ivc-collapse', '120'], /ivc-collapse/],
    ['TAPSE 0', ['--tapse', '0'], /tapse/],
    ['IVC diameter without its collapse', ['--ivc', '2'], /ivc-collapse/],
    ['a velocity in a pressure unit', ['--tr-velocity', '3 mmHg'], /tr-velocity/],
  ];
  for (const [name, args, field] of cases) {
    it(name, async () => {
      const run = await runCli(['assess', ...LEFT, ...args]);
      expect(run.code).toBe(2);
      expect(run.stderr).toMatch(field);
      expect(run.stderr).toMatch(/accepted/);
      expect(run.stderr).not.toMatch(STACK_FRAME);
      expect(run.stderr).not.toMatch(FORBIDDEN_WORDS);
      expect(run.stdout).toBe('');
    });
  }
});
