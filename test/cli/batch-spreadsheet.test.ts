/**
 * `elastimate batch` on the spreadsheets researchers have (issue 9, item 11), spawned as a user would
 * run it (needs dist/: `npm run build`): missing-value marks, codings, units in headers, semicolon and
 * tab files with a decimal comma, several readings in a cell, and the inputs-as-used columns. Output
 * is read back with csv-parse, a general-purpose RFC 4180 parser independent of the tool.
 * Unit factors: 1 mmHg = 133.322 Pa (conventional millimetre of mercury, 13.5951 g/cm³ × 9.80665 m/s²,
 * as mathjs defines it); 1 s = 1000 ms; 1 m = 100 cm; 1 L = 1000 mL (SI).
 */
import { parse } from 'csv-parse/sync';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { STACK_FRAME, ok, requireBuild, runCli } from './fixtures/run-cli.js';

type Row = Record<string, string>;
let dir: string;
beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-sheet-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function batch(name: string, text: string): Promise<{ rows: Row[]; header: string[]; stderr: string; code: number | null }> {
  const path = join(dir, name);
  writeFileSync(path, text);
  const run = await runCli(['batch', path]);
  if (run.code !== 0) return { rows: [], header: [], stderr: run.stderr, code: run.code };
  ok(run);
  return { rows: parse(run.stdout, { columns: true }) as Row[], header: parse(run.stdout, { to_line: 1 })[0] as string[], stderr: run.stderr, code: run.code };
}

describe('missing values, codings and several readings', () => {
  const header = 'id,sbp,dbp,hr,edv,esv,pep,et,weight,sex,rhythm,mitral regurgitation';
  let rows: Row[];
  beforeAll(async () => {
    rows = (
      await batch(
        'codes.csv',
        [
          header,
          'M1,120,80,NA,120,50,90,290,.,F,SR,N/A',
          'M2,118|122,80,-,120,50,90,290,n/a,male,AF,present',
          'M3,118 122,80,60,120,50,90,290,70,m,Atrial fibrillation,y',
          'M4,120,80,60,120,50,90,290,70,x,sinus,0',
          'M5,120,80,60,120,50,90,290,70,FEMALE,nsr,absent',
          'M6,120,NA,60,120,50,90,290,70,f,sinus,0',
          '',
        ].join('\n'),
      )
    ).rows;
  });

  it('reads NA, N/A, "." and "-" as absent inputs', () => {
    expect(rows[0]!.error).toBe('');
    expect(rows[0]!.hrUsed).toBe('');
    expect(rows[0]!.co).toBe(''); // no heart rate, no cardiac output
    expect(rows[1]!.hrUsed).toBe('');
    // A missing required input is named.
    expect(rows[5]!.error).toMatch(/^dbp: missing; required/);
  });

  it('reads sex as F/M/female/male in any case, and rhythm and valve codings', () => {
    expect(rows.map((r) => r.error === '')).toEqual([true, true, true, false, true, false]);
    expect(rows[3]!.error).toMatch(/sex: got "x"; accepted: F, M, female or male \(any case\)/);
    // Atrial fibrillation and mitral regurgitation each raise their check (flag codes as in docs/csv-export.md).
    expect(rows[0]!.flags).not.toMatch(/rhythm/);
    expect(rows[1]!.flags).toMatch(/rhythm/);
    expect(rows[1]!.flags).toMatch(/mitral-regurgitation/);
    expect(rows[2]!.flags).toMatch(/rhythm/);
    expect(rows[4]!.flags).not.toMatch(/rhythm|mitral/);
  });

  it('averages readings separated by "|" or spaces, and reports the mean in sbpUsed beside the text as typed', () => {
    expect(rows[1]!.sbp).toBe('118|122');
    expect(rows[1]!.sbpUsed).toBe('120');
    expect(rows[2]!.sbp).toBe('118 122');
    expect(rows[2]!.sbpUsed).toBe('120');
    expect(Number(rows[1]!.pes)).toBe(108); // 0.9 × 120 (Kelly 1992), as for a single reading of 120
  });
});

describe('units in headers', () => {
  it('strips a bracketed unit from the header and applies it to the bare numbers of the column', async () => {
    const { rows, header } = await batch(
      'units.csv',
      'ID,SBP (kPa),DBP (mmHg),HR [bpm],EDV [L],ESV [mL],PEP (s),ET (s),Height (m),Weight [kg],Note (free text)\r\n' +
        'U1,16,80,60,0.12,50,0.09,0.29,1.7,70,first\r\nU2,120 mmHg,80,60,120 mL,50,90 ms,0.29,1.7,70,cell units win\r\n',
    );
    expect(header.slice(0, 11)).toEqual(['ID', 'SBP (kPa)', 'DBP (mmHg)', 'HR [bpm]', 'EDV [L]', 'ESV [mL]', 'PEP (s)', 'ET (s)', 'Height (m)', 'Weight [kg]', 'Note (free text)']);
    expect(rows.map((r) => r.error)).toEqual(['', '']);
    // 16 kPa = 16000 / 133.322 = 120.01 mmHg.
    expect(Number(rows[0]!.sbpUsed)).toBeCloseTo(16000 / 133.322, 1);
    expect(Number(rows[0]!.edvUsed)).toBe(120);
    expect(Number(rows[0]!.pepUsed)).toBe(90);
    expect(Number(rows[0]!.etUsed)).toBe(290);
    expect(Number(rows[0]!.heightUsed)).toBe(170);
    expect(Number(rows[1]!.sbpUsed)).toBe(120);
    expect(Number(rows[1]!.pepUsed)).toBe(90);
    // tNd = PEP / (PEP + ET) (Chen 2001): 90 / 380.
    for (const r of rows) expect(Number(r.tNd)).toBeCloseTo(90 / 380, 4);
  });

  it('refuses, with exit 2 naming the column, a header unit of the wrong kind', async () => {
    const r = await batch('bad-unit.csv', 'sbp (mL),dbp,edv,esv,pep,et\n120,80,120,50,90,290\n');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/column 1: got "sbp \(mL\)"; the unit "mL" is not one for Brachial systolic pressure; accepted: a unit of the input's kind in brackets: mmHg/);
    expect(r.stderr).not.toMatch(STACK_FRAME);
  });
});

describe('semicolon- and tab-separated files', () => {
  it('detects the semicolon from the header, reads decimal commas and readings separated by spaces or "|"', async () => {
    const text =
      'Patient;SBP (mmHg);DBP;HR;EDV;ESV;PEP (s);ET;Note\r\n' +
      'S1;118,5 121,5;80,0;60;120;50;0,09;290;"says; ""fine"""\r\n' +
      'S2;118|122;79,5;300,5;120;50;0,09;290;\r\n' +
      'S3;120;80;60;120,0;50;90 ms;290;-\r\n';
    const { rows } = await batch('semicolon.csv', text);
    expect(rows.map((r) => r.Patient)).toEqual(['S1', 'S2', 'S3']);
    expect(rows[0]!.error).toBe('');
    expect(rows[0]!.Note).toBe('says; "fine"');
    expect(rows[0]!.sbpUsed).toBe('120'); // (118.5 + 121.5) / 2
    expect(rows[0]!.dbpUsed).toBe('80');
    expect(rows[0]!.pepUsed).toBe('90');
    // The value as the spreadsheet holds it, quoted as everywhere else.
    expect(rows[1]!.error).toBe('hr: got "300,5"; outside the accepted range; accepted: Heart rate, 25–220 bpm');
    expect(rows[2]!.error).toBe('');
    expect(rows[2]!.Note).toBe("'-"); // text beginning with "-" behind the cell guard
  });

  it('takes the separator from a "sep=" line before the header (as some spreadsheet exports begin), which is no record', async () => {
    // A comma in the header would win detection; the separator line says semicolon.
    const semicolon = await batch('sep-semicolon.csv', '\ufeffsep=;\r\nid;sbp;dbp;edv;esv;pep;et;note, free text\r\nP1;120,5;80;120;50;90;290;a, b\r\n');
    expect(semicolon.header.slice(0, 8)).toEqual(['id', 'sbp', 'dbp', 'edv', 'esv', 'pep', 'et', 'note, free text']);
    expect(semicolon.rows).toHaveLength(1);
    expect(semicolon.rows[0]!.error).toBe('');
    expect(semicolon.rows[0]!.sbpUsed).toBe('120.5'); // decimal comma, as in any semicolon file
    // Line numbers count the separator line: the stray quote is on line 4.
    const comma = await batch('sep-comma.csv', 'SEP=,\nid,sbp,dbp,edv,esv,pep,et\nP1,120,80,120,50,90,290\nP2,120,"8"0,120,50,90,290\n');
    expect(comma.rows.map((r) => r.id)).toEqual(['P1', 'P2']);
    expect(comma.rows[0]!.error).toBe('');
    expect(comma.rows[1]!.error).toMatch(/^line 4, column 3/);
    const tab = await batch('sep-tab.tsv', 'sep=\t\nid\tsbp\tdbp\tedv\tesv\tpep\tet\nP1\t120\t80\t120\t50\t90\t290\n');
    expect(tab.rows[0]!.error).toBe('');
  });

  it('refuses a separator line that names another separator: one message, exit 2', async () => {
    const run = await batch('sep-pipe.csv', 'sep=|\nid|sbp|dbp|edv|esv|pep|et\n');
    expect(run.code).toBe(2);
    expect(run.stderr.trim().split('\n')).toEqual(['elastimate: batch file, line 1 (separator line): got "sep=|"; accepted: sep=, or sep=; or sep= and a tab, or no separator line (the separator is then read from the header)']);
  });

  it('detects the tab from the header', async () => {
    const { rows } = await batch('tabs.tsv', 'id\tsbp\tdbp\tedv\tesv\tpep\tet\tnote\nT1\t118;122\t80\t120\t50\t90\t290\ta, b\n');
    expect(rows).toHaveLength(1);
    expect(rows[0]!.note).toBe('a, b');
    expect(rows[0]!.sbpUsed).toBe('120');
    expect(Number(rows[0]!.ea)).toBeCloseTo(108 / 70, 4); // method notes §4 worked example: Ea 1.5429
  });
});
