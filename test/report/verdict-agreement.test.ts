/**
 * One verdict for one change, everywhere (issue 9, item 1): for every visit of
 * every subject in cases/ (and the report fixture), the word each trend-chart
 * marker carries (`data-verdict`), the export CSV's verdict columns and the
 * `*` marks of `record show` are the words `record compare … --json` gives.
 * The rule itself (|Δln x| > 2.77 × CV, the Bland–Altman repeatability
 * coefficient) is checked against hand-worked values in test/records/compare.test.ts;
 * this file checks that every view asks that one rule.
 */
import { mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { DOMParser, type Element } from '@xmldom/xmldom';
import { ROOT, requireBuild, runCli } from '../cli/fixtures/run-cli.js';
import { elements } from '../render/svg-helpers.js';

requireBuild();
const SUBJECTS = [
  ...readdirSync(join(ROOT, 'cases')).filter((f) => f.endsWith('.subject.json')).map((f) => join(ROOT, 'cases', f)),
  join(ROOT, 'test', 'report', 'fixtures', 'HT-014.subject.json'),
];
const work = mkdtempSync(join(tmpdir(), 'elastimate-verdict-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

interface Row {
  key: string;
  verdict: string;
}

async function json<T>(args: string[]): Promise<T> {
  const run = await runCli(args, { timeoutMs: 60_000 });
  expect(run.stderr, args.join(' ')).toBe('');
  expect(run.code, args.join(' ')).toBe(0);
  return JSON.parse(run.stdout) as T;
}

async function compareRows(file: string, from: number, to: number): Promise<Map<string, string>> {
  const c = await json<{ rows: Row[] }>(['record', 'compare', file, String(from), String(to), '--json']);
  return new Map(c.rows.map((r) => [r.key, r.verdict]));
}

describe.each(SUBJECTS.map((s) => [s.slice(ROOT.length + 1), s]))('%s: every view gives the verdict record compare gives', (_name, file) => {
  it('trend-chart markers, the export CSV verdict columns and record show marks agree with record compare --json', async () => {
    const out = join(work, `${_name.replace(/\W+/g, '-')}.html`);
    const [report, exported, shown, series] = await Promise.all([
      runCli(['report', file, '--out', out, '--draws', '1000'], { timeoutMs: 60_000 }),
      json<{ rows: Record<string, unknown>[] }>(['export', file, '--json']),
      runCli(['record', 'show', file]),
      json<{ visits: { index: number }[] }>(['record', 'show', file, '--json']),
    ]);
    expect(report.code, report.stderr).toBe(0);
    expect(shown.code, shown.stderr).toBe(0);
    const visits = series.visits.map((v) => v.index);
    expect(visits.length).toBeGreaterThan(1);
    const fromFirst = await Promise.all(visits.map((v) => compareRows(file, 1, v)));
    const fromPrevious = await Promise.all(visits.slice(1).map((v) => compareRows(file, v - 1, v)));

    const doc = new DOMParser().parseFromString(readFileSync(out, 'utf8'), 'text/html');
    const charts = elements(doc, 'svg').filter((s) => s.getAttribute('class') === 'trend-chart');
    expect(charts.map((c) => c.getAttribute('data-key'))).toEqual(['ea', 'ees', 'eaEes']);
    let checked = 0;
    for (const chart of charts) {
      const key = chart.getAttribute('data-key')!;
      const marks = elements(chart, '*').filter((e: Element) => e.hasAttribute('data-verdict'));
      expect(marks.map((m) => Number(m.getAttribute('data-visit')))).toEqual(visits);
      for (const m of marks) {
        const visit = Number(m.getAttribute('data-visit'));
        expect(m.getAttribute('data-verdict'), `${key}, visit ${visit}`).toBe(fromFirst[visits.indexOf(visit)]!.get(key));
        checked++;
      }
    }
    expect(checked).toBe(3 * visits.length);

    // export: one row per visit, the verdict of the change from the first visit in four columns.
    exported.rows.forEach((row, i) => {
      for (const key of ['pes', 'ea', 'ees', 'eaEes']) expect(row[`${key}ChangeFromFirst`], `${key}, visit ${i + 1}`).toBe(fromFirst[i]!.get(key));
    });

    // record show: a change from the previous visit is starred exactly when record compare calls it beyond noise.
    const tableRows = shown.stdout.split('\n').filter((l) => /^ {2}\d+ +\d{4}-\d\d-\d\d /.test(l));
    expect(tableRows).toHaveLength(visits.length);
    tableRows.slice(1).forEach((line, i) => {
      const changes = [...line.matchAll(/([+-]?\d+)%(\*?)/g)].map((m) => m[2] === '*');
      // Columns in order: Pes, Ea, Ees, Ea/Ees.
      const words = ['pes', 'ea', 'ees', 'eaEes'].map((k) => fromPrevious[i]!.get(k));
      const computable = words.filter((w) => w !== 'not-computable');
      expect(changes, line).toEqual(computable.map((w) => w === 'beyond-noise'));
    });
  }, 180_000);
});
