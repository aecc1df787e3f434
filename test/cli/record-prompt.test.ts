/**
 * `record add` at a terminal: missing inputs are asked for, and what rarely changes (height,
 * weight, rhythm, valve findings) is offered from the previous visit. Driven in a pseudo-terminal
 * by test/cli/fixtures/pty-run.py, as a person would answer; needs dist/ (`npm run build`).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { suggestionsFrom } from '../../src/cli/record-add-command.js';
import type { SubjectFile } from '../../src/records/subject-schema.js';
import { FORBIDDEN_WORDS, STACK_FRAME, requireBuild } from './fixtures/run-cli.js';
import { ptyUnavailable, runInPty } from './fixtures/pty.js';

const ENTER = '\r';
const UP = '\x1b[A';
const unavailable = ptyUnavailable();

const previous: SubjectFile = {
  format: 'elastimate-subject',
  schemaVersion: 1,
  subject: { id: 'HF-077', sex: 'male' },
  visits: [
    { date: '2024-01-15', inputs: { sbp: 104, dbp: 66, hr: 84, edv: 210, esv: 150, pep: 128, et: 242, height: 181, weight: 92, rhythm: 'atrial-fibrillation', mitralRegurgitation: true } },
  ],
};

describe('suggestions for the next visit', () => {
  it('offers the last visit\'s height, weight, rhythm, valve findings and the subject\'s sex, nothing that changes with each visit', () => {
    expect(suggestionsFrom(previous)).toEqual({ height: 181, weight: 92, rhythm: 'atrial-fibrillation', mitralRegurgitation: true, sex: 'male' });
    expect(suggestionsFrom(null)).toEqual({});
  });
  it('takes height and weight from the latest visit that recorded them when the last one skipped them', () => {
    const later: SubjectFile = {
      ...previous,
      visits: [...previous.visits, { date: '2024-04-15', inputs: { sbp: 110, dbp: 70, edv: 200, esv: 140, pep: 120, et: 250, rhythm: 'sinus' } }],
    };
    expect(suggestionsFrom(later)).toEqual({ height: 181, weight: 92, rhythm: 'sinus', sex: 'male' });
  });
});

describe.skipIf(unavailable !== null)(`record add at a terminal${unavailable ? ` (skipped: ${unavailable})` : ''}`, () => {
  let dir: string;
  beforeAll(() => {
    requireBuild();
    dir = mkdtempSync(join(tmpdir(), 'elastimate-record-pty-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('asks only for what is missing and takes the previous visit\'s height, weight, rhythm and valves on Enter', async () => {
    const path = join(dir, 'hf-077.subject.json');
    writeFileSync(path, JSON.stringify(previous), { mode: 0o600 });
    const run = await runInPty(['record', 'add', path, '--date', '2024-04-15', '--sbp', '108', '--dbp', '68', '--hr', '80', '--edv', '205', '--esv', '145', '--sv', '58', '--pep', '124'], [
      { expect: 'Rhythm during the echo', send: ENTER },
      { expect: 'Reported ejection fraction (in %', send: ENTER },
      { expect: 'Ejection time (in ms', send: '250' + ENTER },
      { expect: 'Valve and outflow findings', send: ENTER },
      { expect: 'Right heart (optional)', send: ENTER }, // skip
      { expect: 'Height (in cm', send: ENTER },
      { expect: 'Weight (in kg', send: ENTER },
      { expect: 'Review: pick a value to correct', send: ENTER },
      { expect: 'visit 2 of 2 on 2024-04-15' },
    ]);
    expect(run.reason, run.screen.slice(-3000)).toBe('');
    expect(run.failedStep).toBeNull();
    expect(run.exitCode).toBe(0);
    expect(run.screen).not.toMatch(FORBIDDEN_WORDS);
    expect(run.screen).not.toMatch(STACK_FRAME);
    const stored = JSON.parse(readFileSync(path, 'utf8')) as SubjectFile;
    expect(stored.visits[1]!.inputs).toMatchObject({ et: 250, height: 181, weight: 92, rhythm: 'atrial-fibrillation', mitralRegurgitation: true, sv: 58 });
    expect(stored.visits[1]!.inputs.sex).toBeUndefined(); // sex stays with the subject
  }, 90_000);

  it('asks for the subject\'s sex when none is recorded and stores the answer with the subject', async () => {
    const path = join(dir, 'hf-078.subject.json');
    writeFileSync(path, JSON.stringify({ ...previous, subject: { id: 'HF-078' } }), { mode: 0o600 });
    const run = await runInPty(['record', 'add', path, '--date', '2024-04-15', '--sbp', '108', '--dbp', '68', '--hr', '80', '--edv', '205', '--esv', '145', '--sv', '58', '--pep', '124', '--height', '181', '--weight', '92', '--rhythm', 'sinus'], [
      { expect: 'Reported ejection fraction (in %', send: ENTER },
      { expect: 'Ejection time (in ms', send: '250' + ENTER },
      { expect: 'Valve and outflow findings', send: ENTER },
      { expect: 'Right heart (optional)', send: ENTER }, // skip
      { expect: 'Sex (optional; the reference ranges use it)', send: UP + ENTER }, // from "not given" up to "male"
      { expect: 'Review: pick a value to correct', send: ENTER },
      { expect: 'visit 2 of 2 on 2024-04-15' },
    ]);
    expect(run.reason, run.screen.slice(-3000)).toBe('');
    expect(run.failedStep).toBeNull();
    expect(run.exitCode).toBe(0);
    const stored = JSON.parse(readFileSync(path, 'utf8')) as SubjectFile;
    expect(stored.subject.sex).toBe('male');
    expect(stored.visits[1]!.inputs.sex).toBeUndefined();
  }, 90_000);

  it('asks before a second visit on a date that already has one; "no" leaves the file as it was', async () => {
    const path = join(dir, 'hf-079.subject.json');
    const before = JSON.stringify({ ...previous, subject: { id: 'HF-079', sex: 'male' } });
    writeFileSync(path, before, { mode: 0o600 });
    const run = await runInPty(['record', 'add', path, '--date', '2024-01-15', '--sbp', '108', '--dbp', '68', '--hr', '80', '--edv', '205', '--esv', '145', '--pep', '124', '--et', '250'], [
      { expect: 'already has a visit on 2024-01-15. Add another visit on that date?', send: 'n' + ENTER },
      { expect: 'Nothing changed.' },
    ]);
    expect(run.reason, run.screen.slice(-3000)).toBe('');
    expect(run.failedStep).toBeNull();
    expect(run.exitCode).toBe(0);
    expect(readFileSync(path, 'utf8')).toBe(before);
  }, 90_000);
});
