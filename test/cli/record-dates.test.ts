/**
 * Visit dates: none after today (today read from an injected clock), and a second visit on a date
 * that already has one only when it is said to be intended (`--same-date`) off a terminal. The
 * terminal question is driven in test/cli/record-prompt.test.ts.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { InputError } from '../../src/errors.js';
import { runRecordAdd } from '../../src/cli/record-add-command.js';
import { runRecordEdit } from '../../src/cli/record-edit-command.js';
import { calendarDate, parseVisitDate, recheckSameDate } from '../../src/cli/record-common.js';
import { STACK_FRAME, requireBuild, runCli, ok } from './fixtures/run-cli.js';

const VISIT = ['--sbp', '120', '--dbp', '80', '--hr', '60', '--edv', '120', '--esv', '50', '--pep', '90', '--et', '290'];
const VISIT_OPTS = { sbp: '120', dbp: '80', hr: '60', edv: '120', esv: '50', pep: '90', et: '290', input: false };

let dir: string;
beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-dates-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));
afterEach(() => {
  vi.restoreAllMocks();
});

/** A clock fixed at noon, local time, on the given calendar day. */
const fixedClock = (y: number, m: number, d: number) => () => new Date(y, m - 1, d, 12, 0, 0);

describe('today comes from a clock passed in', () => {
  it('reads the calendar date in local time, so a visit late in the evening is that day', () => {
    expect(calendarDate(new Date(2025, 2, 3, 23, 59))).toBe('2025-03-03');
    expect(calendarDate(new Date(2025, 0, 1, 0, 0))).toBe('2025-01-01');
  });

  it('accepts today and earlier, refuses tomorrow naming the field, the value and today', () => {
    expect(parseVisitDate('2025-03-03', '2025-03-03')).toBe('2025-03-03');
    expect(parseVisitDate('1999-12-31', '2025-03-03')).toBe('1999-12-31');
    expect(() => parseVisitDate('2025-03-04', '2025-03-03')).toThrow('date: got "2025-03-04"; in the future (today is 2025-03-03); accepted: a visit date up to today, written YYYY-MM-DD');
  });

  it('record add and record edit take "today" from the injected clock, not the system clock', async () => {
    vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    const path = join(dir, 'clock.subject.json');
    // 2030-06-01 is after the system's today when this was written; the clock says it is today.
    await expect(runRecordAdd(path, { subject: 'CK-1', date: '2030-06-02', ...VISIT_OPTS }, undefined, fixedClock(2030, 6, 1))).rejects.toThrow(/date: got "2030-06-02"; in the future \(today is 2030-06-01\)/);
    expect(existsSync(path)).toBe(false);
    await runRecordAdd(path, { subject: 'CK-1', date: '2030-06-01', ...VISIT_OPTS }, undefined, fixedClock(2030, 6, 1));
    await expect(runRecordEdit(path, '1', { date: '2030-06-05', yes: true }, undefined, fixedClock(2030, 6, 4))).rejects.toBeInstanceOf(InputError);
    await runRecordEdit(path, '1', { date: '2030-06-04', yes: true }, undefined, fixedClock(2030, 6, 4));
    const stored = JSON.parse(readFileSync(path, 'utf8')) as { visits: { date: string }[] };
    expect(stored.visits.map((v) => v.date)).toEqual(['2030-06-04']);
  });
});

describe('inside the locked write', () => {
  it('refuses when another process put a visit on the date after the first look, unless --same-date', () => {
    const visit = (date: string) => ({ date, inputs: {} });
    const before = [visit('2024-05-01')];
    const now = [visit('2024-05-01'), visit('2024-06-01')];
    expect(() => recheckSameDate({}, before, now, '2024-06-01')).toThrow('date: got "2024-06-01"; the subject file already has a visit on that date; accepted: another date, or --same-date');
    expect(() => recheckSameDate({ sameDate: true }, before, now, '2024-06-01')).not.toThrow();
    // What was already there when the user was asked (and agreed) is no reason to refuse.
    expect(() => recheckSameDate({}, before, before, '2024-05-01')).not.toThrow();
  });
});

describe('off a terminal (spawned)', () => {
  it('refuses a visit date after today (exit 2, nothing written)', async () => {
    const path = join(dir, 'future.subject.json');
    const run = await runCli(['record', 'add', path, '--subject', 'FT-1', '--date', '2999-01-01', ...VISIT]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/^elastimate: date: got "2999-01-01"; in the future \(today is \d{4}-\d{2}-\d{2}\); accepted: a visit date up to today/);
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(existsSync(path)).toBe(false);
  });

  it('refuses a second visit on a date that has one unless --same-date says it is intended; record edit --date likewise', async () => {
    const path = join(dir, 'same.subject.json');
    ok(await runCli(['record', 'add', path, '--subject', 'SD-1', '--date', '2024-05-01', ...VISIT]));
    ok(await runCli(['record', 'add', path, '--date', '2024-06-01', ...VISIT]));
    const before = readFileSync(path);
    const run = await runCli(['record', 'add', path, '--date', '2024-05-01', ...VISIT]);
    expect(run.code).toBe(2);
    expect(run.stderr).toBe('elastimate: date: got "2024-05-01"; the subject file already has a visit on that date; accepted: another date, or --same-date if a second visit on the same date is intended\n');
    expect(readFileSync(path).equals(before)).toBe(true);

    const moved = await runCli(['record', 'edit', path, '2', '--date', '2024-05-01', '--yes']);
    expect(moved.code).toBe(2);
    expect(moved.stderr).toMatch(/date: got "2024-05-01"; the subject file already has a visit on that date; accepted: .*--same-date/);
    expect(readFileSync(path).equals(before)).toBe(true);

    ok(await runCli(['record', 'add', path, '--date', '2024-05-01', '--same-date', ...VISIT]));
    ok(await runCli(['record', 'edit', path, '3', '--date', '2024-05-01', '--same-date', '--yes']));
    const stored = JSON.parse(readFileSync(path, 'utf8')) as { visits: { date: string }[] };
    expect(stored.visits.map((v) => v.date)).toEqual(['2024-05-01', '2024-05-01', '2024-05-01']);
  }, 40_000);

  it('an edit that keeps the visit on its own date is not a second visit', async () => {
    const path = join(dir, 'own.subject.json');
    ok(await runCli(['record', 'add', path, '--subject', 'SD-2', '--date', '2024-05-01', ...VISIT]));
    ok(await runCli(['record', 'edit', path, '1', '--date', '2024-05-01', '--hr', '62', '--yes']));
  });
});
