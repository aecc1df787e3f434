/**
 * `assess --sr` at a terminal (a pseudo-terminal driven by test/cli/fixtures/pty-run.py): repeated
 * measurements that disagree by more than 10 % are shown and the user chooses; the choice is used
 * and named in the inputs-as-used view.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { STACK_FRAME, requireBuild } from '../cli/fixtures/run-cli.js';
import { ptyUnavailable, runInPty } from '../cli/fixtures/pty.js';
import { DCM, IDENTITY_NEEDLES, LN, container, num, writeSr } from './fixtures/build-sr.js';

const unavailable = ptyUnavailable();
const ENTER = '\r';
const DOWN = '\x1b[B';

describe.skipIf(unavailable !== null)(`assess --sr at a terminal${unavailable ? ` (skipped: ${unavailable})` : ''}`, () => {
  let dir: string;
  beforeAll(() => {
    requireBuild();
    dir = mkdtempSync(join(tmpdir(), 'elastimate-sr-pty-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('asks which of two disagreeing EDVs is right and uses the answer', async () => {
    const sr = writeSr(join(dir, 'repeats.dcm'), {
      studyDate: '20240105',
      content: [
        container(DCM('125301', 'Pre-coordinated Measurements'), [
          num(LN('79996-5', 'LVEDV biplane'), 100, 'mL'),
          num(LN('79996-5', 'LVEDV biplane'), 130, 'mL'),
          num(LN('80001-1', 'LVESV biplane'), 50, 'mL'),
        ]),
      ],
    });
    const run = await runInPty(['assess', '--sr', sr, '--sbp', '120', '--dbp', '80', '--pep', '90', '--et', '290'], [
      { expect: 'differ by 26 % (more than 10 %)', send: DOWN + ENTER },
      { expect: 'Inputs as used' },
    ]);
    expect(run.reason, run.screen.slice(-2000)).toBe('');
    expect(run.exitCode).toBe(0);
    expect(run.screen.replace(/\r?\n {40,}/g, ' ')).toMatch(/LV end-diastolic volume\s+130 mL\s+from DICOM SR LN 79996-5 .*chosen at the prompt/);
    expect(run.screen).not.toMatch(STACK_FRAME);
    for (const needle of IDENTITY_NEEDLES) expect(run.screen).not.toContain(needle);
  }, 60_000);
});
