/**
 * The built CLI in a pseudo-terminal, answered key by key as a person would:
 * the prompts appear in order, a bad answer is asked again with the reason,
 * the report follows, exit code 0; Ctrl-C leaves quietly with code 130.
 * The terminal is driven by test/cli/fixtures/pty-run.py (Python's pty module).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { FORBIDDEN_WORDS, STACK_FRAME, requireBuild } from './fixtures/run-cli.js';
import { ptyUnavailable, runInPty } from './fixtures/pty.js';

const unavailable = ptyUnavailable();

const ENTER = '\r';
const DOWN = '\x1b[B';
const BACKSPACE = '\x7f';
const CTRL_C = '\x03';

describe.skipIf(unavailable !== null)(`assess at a terminal${unavailable ? ` (skipped: ${unavailable})` : ''}`, () => {
  beforeAll(() => {
    requireBuild();
  });

  it('asks every question, re-asks a bad answer with the reason, reviews, then prints the report (exit 0)', async () => {
    const run = await runInPty(['assess'], [
      { expect: 'Rhythm during the echo', send: ENTER },
      { expect: 'Heart rate (in bpm, accepted 25–220 bpm', send: '68' + ENTER },
      { expect: 'LV end-diastolic volume (in mL, accepted 20–600 mL)', send: '120' + ENTER },
      { expect: 'LV end-systolic volume (in mL, accepted 5–500 mL)', send: '130' + ENTER },
      // Refused with the reason; the typed text stays, so clear it and answer again.
      { expect: 'esv: got 130 mL; not below EDV 120 mL; accepted: ESV lower than EDV', send: BACKSPACE.repeat(3) + '50' + ENTER },
      { expect: 'The volumes imply EF 58 %' },
      { expect: 'Reported ejection fraction (in %, accepted 5–95 %', send: ENTER },
      { expect: 'Doppler stroke volume (feeds', send: DOWN + ENTER },
      { expect: 'LVOT diameter (in cm', send: '2.1' + ENTER },
      { expect: 'LVOT velocity–time integral (in cm', send: '21' + ENTER },
      { expect: 'Doppler stroke volume from the LVOT: 73 mL' },
      { expect: 'Pre-ejection period (in ms', send: '95' + ENTER },
      { expect: 'Ejection time (in ms', send: '0.285s' + ENTER },
      { expect: 'tNd = PEP/(PEP + ET) = 0.250' },
      { expect: 'Valve and outflow findings (', send: ENTER },
      { expect: 'Right heart (optional)', send: ENTER }, // skip
      { expect: 'Brachial systolic pressure (in mmHg, accepted 60–260 mmHg', send: '152, 148' + ENTER },
      { expect: 'SBP: mean of 2 readings 150 mmHg' },
      { expect: 'Brachial diastolic pressure (in mmHg', send: '94, 92' + ENTER },
      { expect: 'Height (in cm', send: '174' + ENTER },
      { expect: 'Weight (in kg', send: '88' + ENTER },
      { expect: 'Sex (optional; the reference ranges use it)', send: ENTER }, // not given
      // Review: "Compute now" first; move two down to the heart rate and correct it.
      { expect: 'Review: pick a value to correct', send: DOWN + DOWN + ENTER },
      { expect: 'Heart rate (in bpm', send: BACKSPACE.repeat(2) + '70' + ENTER },
      { expect: 'Review: pick a value to correct' },
      { expect: 'Heart rate: 70 bpm', send: ENTER },
      { expect: 'Referral note' },
    ]);
    expect(run.reason, run.screen.slice(-3000)).toBe('');
    expect(run.failedStep).toBeNull();
    expect(run.exitCode).toBe(0);
    const report = run.screen.slice(run.screen.lastIndexOf('Inputs as used'));
    for (const section of ['Pressures', 'Flow and arterial load', 'Ventricular elastance', 'Coupling', 'Checks and caveats', 'Referral note']) {
      expect(report).toContain(section);
    }
    expect(report).toMatch(/Heart rate\s+70 bpm/);
    expect(report).toMatch(/Brachial systolic pressure\s+150 mmHg\s+mean of 2 readings/);
    expect(report).toMatch(/Ejection time\s+285 ms/);
    expect(report).toMatch(/Stroke volume used\s+73 mL\s+Doppler/);
    expect(report).toMatch(/not a diagnosis/i);
    expect(run.screen).not.toMatch(FORBIDDEN_WORDS);
    expect(run.screen).not.toMatch(STACK_FRAME);
  }, 90_000);

  it('Ctrl-C at a typed answer leaves quietly: code 130, no stack trace', async () => {
    const run = await runInPty(['assess', '--hr', '64'], [
      { expect: 'Rhythm during the echo', send: ENTER },
      { expect: 'LV end-diastolic volume (in mL', send: '12' },
      { expect: '12', send: CTRL_C },
    ]);
    expect(run.reason, run.screen.slice(-2000)).toBe('');
    expect(run.failedStep).toBeNull();
    expect(run.exitCode).toBe(130);
    expect(run.screen).not.toMatch(STACK_FRAME);
    expect(run.screen).not.toMatch(/ExitPromptError|internal error|Error:/);
    expect(run.screen).not.toContain('Inputs as used');
  }, 60_000);

  it('Ctrl-C on a list (the first question) leaves quietly too', async () => {
    const run = await runInPty(['assess'], [{ expect: 'Rhythm during the echo', send: CTRL_C }]);
    expect(run.reason, run.screen.slice(-2000)).toBe('');
    expect(run.failedStep).toBeNull();
    expect(run.exitCode).toBe(130);
    expect(run.screen).not.toMatch(STACK_FRAME);
    expect(run.screen).not.toMatch(/ExitPromptError|internal error|Error:/);
  }, 60_000);

  it('--no-input never asks, even at a terminal: exit 2 listing what is missing', async () => {
    const run = await runInPty(['assess', '--no-input', '--sbp', '120'], [{ expect: 'prompts are off' }]);
    expect(run.failedStep).toBeNull();
    expect(run.exitCode).toBe(2);
    expect(run.screen).not.toContain('Rhythm during the echo');
    for (const flag of ['dbp', 'edv', 'esv', 'pep', 'et']) expect(run.screen).toMatch(new RegExp(`elastimate: ${flag}: missing`));
  }, 60_000);

  it('with every input given, computes at once without asking', async () => {
    const run = await runInPty(['assess', '--sbp', '120', '--dbp', '80', '--edv', '120', '--esv', '50', '--pep', '90', '--et', '290'], [{ expect: 'Referral note' }]);
    expect(run.exitCode).toBe(0);
    expect(run.screen).not.toContain('Review: pick a value');
  }, 60_000);
});
