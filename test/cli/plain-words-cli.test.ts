/**
 * Issue 9 at the command line: a value a flag overrode is marked as such, and
 * prose off a terminal wraps to 80 columns (the width of a classic terminal,
 * common practice for text meant to be pasted or piped).
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT, requireBuild, runCli } from './fixtures/run-cli.js';

requireBuild();
const VISIT = join(ROOT, 'cases', 'hypertension-trial.visit.json'); // heart rate 68 bpm in the file
const SUBJECT = join(ROOT, 'cases', 'cardio-oncology.subject.json');

function ok(run: { code: number | null; stdout: string; stderr: string }): string {
  expect(run.stderr).toBe('');
  expect(run.code).toBe(0);
  return run.stdout;
}

/** Lines of prose: bullets, flags and paragraphs, not the aligned label–value rows or the drawings. */
function proseLines(text: string, headings: string[]): string[] {
  const lines = text.split('\n');
  const out: string[] = [];
  for (const h of headings) {
    const at = lines.findIndex((l) => l.startsWith(h));
    expect(at, h).toBeGreaterThanOrEqual(0);
    for (let i = at + 1; i < lines.length && lines[i] !== ''; i++) out.push(lines[i]!);
  }
  return out;
}

describe('flags that override a visit file are marked', () => {
  it('"72 bpm, from --hr; the visit file had 68", not "as entered"', async () => {
    const out = ok(await runCli(['assess', '--input', VISIT, '--hr', '72']));
    expect(out).toMatch(/^ {2}Heart rate +72 bpm {2}from --hr; the visit file had 68$/m);
    expect(out).toMatch(/^ {2}LV end-diastolic volume +118 mL {2}as entered$/m);
  });
  it('a flag repeating the file\'s own value is not an override', async () => {
    const out = ok(await runCli(['assess', '--input', VISIT, '--hr', '68']));
    expect(out).toMatch(/^ {2}Heart rate +68 bpm {2}as entered$/m);
  });
});

describe('prose off a terminal wraps to 80 columns', () => {
  it('assess: checks, caveats and the referral note', async () => {
    const out = ok(await runCli(['assess', '--input', VISIT, '--rhythm', 'atrial-fibrillation', '--mitral-regurgitation']));
    const lines = proseLines(out, ['Checks and caveats', 'Referral note (paste-ready)']);
    expect(lines.length).toBeGreaterThan(8);
    for (const l of lines) expect([...l].length, l).toBeLessThanOrEqual(80);
  });
  it('assess --sketch: the diagram\'s notes and the energetics note', async () => {
    const out = ok(await runCli(['assess', '--input', VISIT, '--sketch']));
    const lines = out.split('\n');
    const notes = lines.slice(lines.findIndex((l) => l.includes('end-systolic line   '))! + 1).filter((l) => l !== '');
    expect(notes.join(' ')).toContain('Estimated from cuff pressure and echo volumes');
    for (const l of notes) expect([...l].length, l).toBeLessThanOrEqual(80);
    const model = lines.findIndex((l) => l.startsWith('  Model values'));
    expect([...lines[model]!].length).toBeLessThanOrEqual(80);
    expect(lines[model + 1]).toMatch(/^ {2}\S/);
  });
  it('record compare and record show', async () => {
    const [compare, show] = await Promise.all([runCli(['record', 'compare', SUBJECT, '1', '3']), runCli(['record', 'show', SUBJECT])]);
    for (const l of proseLines(ok(compare), ['In plain words'])) expect([...l].length, l).toBeLessThanOrEqual(80);
    for (const l of proseLines(ok(show), ['Checks and caveats', 'Referral note'])) expect([...l].length, l).toBeLessThanOrEqual(80);
  });
});
