/**
 * Hostile and careless CSV, spawned as a user would run the tool (needs dist/: `npm run build`).
 * Issue 8, item 3: a cohort never loses a record silently (a stray double quote is an error row at the
 * line where it opened, and reading resumes on the next line). Item 8: spreadsheet formulas in text
 * cells are neutralised by a leading single quote (OWASP, "CSV Injection"), numbers stay numbers.
 * Inputs are written by hand or by csv-stringify; outputs are read back by csv-parse, a general-purpose
 * RFC 4180 parser independent of the tool's own reader (d3-dsv) and writer.
 */
import { parse } from 'csv-parse/sync';
import { stringify } from 'csv-stringify/sync';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { STACK_FRAME, ok, requireBuild, runCli } from '../cli/fixtures/run-cli.js';

type Row = Record<string, string>;

let dir: string;
beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-hostile-csv-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const HEADER = 'id,sbp,dbp,hr,edv,esv,pep,et,note';
/** A plausible invented row (the method notes' worked example, §4: Ea 1.5429 mmHg/mL) with an id and a note. */
const line = (id: string, note = 'ok') => `${id},120,80,60,120,50,90,290,${note}`;

async function batch(name: string, text: string, extra: string[] = []) {
  const path = join(dir, name);
  writeFileSync(path, text);
  const run = await runCli(['batch', path, ...extra], { timeoutMs: 60_000 });
  return { run, rows: run.code === 0 ? (parse(run.stdout, { columns: true }) as Row[]) : [] };
}

describe('a stray double quote never swallows later records (issue 8, item 3)', () => {
  it('one stray quote in row 11 of 300: an error row at its line, every other row computed, all 300 in the output', async () => {
    const lines = [HEADER];
    for (let i = 1; i <= 300; i++) lines.push(line(`S${i}`, i === 11 ? '"forgot to close' : `note ${i}`));
    const { run, rows } = await batch('stray.csv', lines.join('\n') + '\n');
    ok(run);
    expect(rows.map((r) => r.id)).toEqual(Array.from({ length: 300 }, (_, i) => `S${i + 1}`));
    const bad = rows.filter((r) => r.error !== '');
    expect(bad.map((r) => r.id)).toEqual(['S11']);
    // Row 11 is on line 12 (the header is line 1); its note is column 9.
    expect(bad[0]!.error).toMatch(/^line 12, column 9 \("note"\): got "\\"forgot to close"; a double quote opens this cell and the quoted cell is never closed/);
    expect(bad[0]!.note).toBe('"forgot to close');
    expect(rows.filter((r) => r.ea !== '')).toHaveLength(299);
    expect(run.stderr).toMatch(/300 record\(s\) read, 300 written, 1 with an error/);
  });

  it('a stray quote that a later quoted note would close: the record is refused, the lines after it are read', async () => {
    const text = [HEADER, line('A1'), '"A2,120,80,60,120,50,90,290,x', line('A3'), line('A4', '"a note, with a comma"'), line('A5'), ''].join('\r\n');
    const { run, rows } = await batch('closing.csv', text);
    ok(run);
    expect(rows.map((r) => r.id)).toEqual(['A1', '"A2', 'A3', 'A4', 'A5']);
    expect(rows[1]!.error).toMatch(/^line 3, column 1 \("id"\): .*text follows the closing quote/);
    expect(rows[3]!.note).toBe('a note, with a comma');
    expect(rows.filter((r) => r.error === '').map((r) => r.id)).toEqual(['A1', 'A3', 'A4', 'A5']);
  });

  it('a quoted cell that spans lines but leaves its record with the wrong number of cells is an error at the line where the quote opened', async () => {
    // B2's quote closes on the next line, after which its record has 10 cells (the header has 9).
    const text = [HEADER, line('B1'), 'B2,120,"80', '",60,120,50,90,290,x,extra', line('B3'), ''].join('\n');
    const { run, rows } = await batch('width.csv', text);
    ok(run);
    expect(rows.map((r) => r.id)).toEqual(['B1', 'B2', '"', 'B3']);
    expect(rows[1]!.error).toMatch(/^line 3, column 3 \("dbp"\): .*the record it opens would have 10 cells where the header has 9/);
    // Reading resumed on line 4, whose own opening quote is never closed.
    expect(rows[2]!.error).toMatch(/^line 4, column 1 \("id"\): .*never closed/);
    expect(rows[3]!.error).toBe('');
  });

  it('keeps legal quoted notes that span lines, pads short rows, and reads a last line without a line break', async () => {
    const text = [HEADER, line('C1', '"first line\r\nsecond, with ""quotes"""'), 'C2,120,80,60,120,50,90,290', line('C3')].join('\r\n');
    const { run, rows } = await batch('legal.csv', text);
    ok(run);
    expect(rows.map((r) => [r.id, r.note, r.error])).toEqual([
      ['C1', 'first line\r\nsecond, with "quotes"', ''],
      ['C2', '', ''],
      ['C3', 'ok', ''],
    ]);
    expect(run.stderr).toBe('');
  });

  it('an unclosed quote in a file large enough for worker threads (over 1 MiB): nothing lost, line numbers right', async () => {
    const lines = [HEADER];
    const n = 16_000;
    for (let i = 1; i <= n; i++) lines.push(line(`L${i}`, i === 9_000 ? '"never closed, and long enough to matter' : `an ordinary note for visit ${i}`));
    const { run, rows } = await batch('large.csv', lines.join('\n') + '\n');
    ok(run);
    expect(rows).toHaveLength(n);
    expect(rows.every((r, i) => r.id === `L${i + 1}`)).toBe(true);
    expect(rows.filter((r) => r.error !== '').map((r) => [r.id, /^line 9001, column 9 \("note"\): .*never closed/.test(r.error ?? '')])).toEqual([['L9000', true]]);
    expect(run.stderr).toMatch(new RegExp(`${n} record\\(s\\) read, ${n} written, 1 with an error`));
  });

  it('a quoted cell running on for more than 1 MiB is an error row; the lines inside it are read as records of their own', async () => {
    const long = `${'y'.repeat(999)}\n`.repeat(1100); // 1,100,000 characters over 1,100 lines
    const text = `${HEADER}\n${line('G1')}\n${line('G2', `"${long}x"`)}\n${line('G3')}\n`;
    const { run, rows } = await batch('long-cell.csv', text);
    ok(run);
    expect(rows[0]!.id).toBe('G1');
    expect(rows[1]!.error).toMatch(/^line 3, column 9 \("note"\): .*runs on for more than 1048576 characters/);
    expect(rows.at(-1)!.id).toBe('G3');
    expect(rows.at(-1)!.error).toBe('');
    // G1, G2 (its line holds the first line of y), the other 1,099 lines of y, the line `x"`, G3: every line after
    // the bad one is a record of its own.
    expect(rows).toHaveLength(1 + 1 + 1099 + 1 + 1);
  });

  it('old Mac line ends (CR alone): a stray quote is reported at the right line', async () => {
    const text = [HEADER, line('R1'), line('R2', '"oops'), line('R3'), ''].join('\r');
    const { run, rows } = await batch('cr.csv', text);
    ok(run);
    expect(rows.map((r) => r.id)).toEqual(['R1', 'R2', 'R3']);
    expect(rows[1]!.error).toMatch(/^line 3, column 9 \("note"\): .*never closed/);
    expect(rows[2]!.error).toBe('');
  });

  it('a header whose quote is never closed is refused with exit 2 and no output file', async () => {
    const out = join(dir, 'never.csv');
    const { run } = await batch('bad-header.csv', `id,"sbp,dbp\n${line('H1')}\n`, ['--out', out]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/header, line 1, column 2: got .*a double quote opens this column name and the quoted cell is never closed/);
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(() => readFileSync(out)).toThrow();
  });
});

describe('a record that never ends', () => {
  it('a line of more than 4 MiB without a line break refuses the file at once (exit 2), naming the line; no output file', async () => {
    const out = join(dir, 'never-long.csv');
    const { run } = await batch('endless.csv', `${HEADER}\n${line('E1')}\n${'9'.repeat(5 * 1024 * 1024)}`, ['--out', out]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/batch file, line 3: got ".*endless\.csv"; a record runs on for more than 4194304 characters without a line break/);
    expect(() => readFileSync(out)).toThrow();
  });
});

/** Text cells a spreadsheet would run (OWASP CSV-injection guidance: =, +, -, @, tab, carriage return). */
const FORMULAS = ['=HYPERLINK("http://example.invalid","x")', '+1+cmd|\' /C calc\'!A0', '-2+3', '@SUM(1,2)', '\t=1+1', '\r=1+1'];

describe('spreadsheet formulas are neutralised, numbers stay numbers (issue 8, item 8)', () => {
  it('batch: ids, notes, pass-through text and column names get a leading single quote; negative numbers and results stay numbers', async () => {
    const rows = [['id', 'sbp', 'dbp', 'hr', 'edv', 'esv', 'pep', 'et', 'delta', 'note', '=cmd']];
    FORMULAS.forEach((f, i) => rows.push([f, '120', '80', '60', '120', '50', '90', '290', '-2.5', `visit ${i}`, f]));
    rows.push(['P7', '120', '80', '60', '120', '50', '90', '290', '-2.5', '@note', '']);
    const { run, rows: out } = await batch('formulas.csv', stringify(rows));
    ok(run);
    const header = parse(run.stdout, { to_line: 1 })[0] as string[];
    expect(header[10]).toBe("'=cmd");
    const cells = parse(run.stdout, { from_line: 2 }) as string[][];
    FORMULAS.forEach((f, i) => {
      expect(cells[i]![0]).toBe(`'${f}`);
      expect(cells[i]![10]).toBe(`'${f}`);
    });
    expect(cells[6]![9]).toBe("'@note");
    for (const r of out) {
      expect(r.delta).toBe('-2.5'); // a number in a pass-through column is a number
      // v0 (the implied volume intercept) is negative for these inputs, and written as a number.
      expect(r.v0).toMatch(/^-\d+(\.\d+)?$/);
      expect(r.error).toBe('');
    }
  });

  it('export: a note that begins like a formula is quoted, negative results stay numbers', async () => {
    const subject = join(dir, 'formula.subject.json');
    writeFileSync(
      subject,
      JSON.stringify({
        format: 'elastimate-subject',
        schemaVersion: 1,
        subject: { id: '@EV-01' },
        visits: FORMULAS.map((note, i) => ({ date: `2024-0${i + 1}-01`, inputs: { sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, pep: 90, et: 290 }, note })),
      }),
    );
    const run = ok(await runCli(['export', subject]));
    const rows = parse(run.stdout, { columns: true }) as Row[];
    expect(rows.map((r) => r.note)).toEqual(FORMULAS.map((f) => `'${f}`));
    for (const r of rows) {
      expect(r.subject).toBe("'@EV-01");
      expect(r.v0).toMatch(/^-\d+(\.\d+)?$/);
    }
  });
});
