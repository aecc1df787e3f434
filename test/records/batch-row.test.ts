import { parse } from 'csv-parse/sync';
import { csvParseRows } from 'd3-dsv';
import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { RESULT_KEYS, RESULT_UNITS } from '../../src/assessment/graph/index.js';
import { parseInputs } from '../../src/assessment/inputs.js';
import { METHODS_VERSION } from '../../src/assessment/result.js';
import { batchRow, planBatch, rawFromCells } from '../../src/records/batch-row.js';
import { RecordSplitter, type Segment } from '../../src/records/csv-records.js';
import { CsvBytes, csvNumber, csvText, safeCell } from '../../src/render/csv.js';

const HEADER = ['id', 'visit_date', 'SBP', 'dbp', 'hr', 'edv', 'esv', 'pep', 'ET', 'lvot_diameter', 'LVOT-VTI', 'aortic-stenosis', 'Rhythm', 'comment'];

describe('batch rows', () => {
  const layout = planBatch(HEADER);

  it('recognises columns named like the flags, ignoring case and punctuation, and passes the rest through', () => {
    expect(layout.recognised.map((r) => r.column.key)).toEqual(['sbp', 'dbp', 'hr', 'edv', 'esv', 'pep', 'et', 'lvotDiameter', 'lvotVti', 'aorticStenosis', 'rhythm']);
    // Output: the input columns, the numeric inputs as used (suffix Used, registry order), then one column per
    // result key named as the JSON keys, then the trailing columns.
    const used = ['sbpUsed', 'dbpUsed', 'hrUsed', 'edvUsed', 'esvUsed', 'lvotDiameterUsed', 'lvotVtiUsed', 'pepUsed', 'etUsed'];
    expect(layout.outputHeader).toEqual([...HEADER, ...used, ...RESULT_KEYS, 'flags', 'notComputable', 'methodsVersion', 'error']);
  });

  it('computes a row exactly as assess does', () => {
    const cells = ['P-1', '2024-01-02', '118;122', '80', '60', '120', '50', '90', '290', '2.0', '20', 'no', 'Sinus', 'ok'];
    const raw = rawFromCells(layout, cells);
    expect(raw).toEqual({ sbp: ['118', '122'], dbp: '80', hr: '60', edv: '120', esv: '50', pep: '90', et: '290', lvotDiameter: '2.0', lvotVti: '20', aorticStenosis: false, rhythm: 'sinus' });
    const out = batchRow(layout, cells);
    expect(out.slice(0, HEADER.length)).toEqual(cells);
    const a = assess(parseInputs(raw));
    const byName = Object.fromEntries(layout.outputHeader.map((h, i) => [h, out[i]]));
    for (const key of RESULT_KEYS) expect(byName[key]).toBe(csvNumber(a.results[key].value, a.results[key].unit));
    // Doppler SV from LVOT: π·(2.0/2)²·20 = 62.83 mL, which feeds Ea (Chen 2001 used Doppler SV).
    expect(Number(byName.svUsed)).toBeCloseTo(Math.PI * 20, 2);
    expect(byName.methodsVersion).toBe(METHODS_VERSION);
    expect(byName.error).toBe('');
  });

  it('puts the reason of a bad row in the error column and leaves the results empty', () => {
    const out = batchRow(layout, ['P-2', '', '120', '130', '60', '120', '50', '90', '290', '', '', '', '', 'dbp typo']);
    const byName = Object.fromEntries(layout.outputHeader.map((h, i) => [h, out[i]]));
    expect(byName.error).toBe('dbp: got 130; not below SBP 120 mmHg; accepted: DBP lower than SBP');
    for (const key of RESULT_KEYS) expect(byName[key]).toBe('');
    expect(byName.comment).toBe('dbp typo');
    expect(out).toHaveLength(layout.outputHeader.length);
  });

  it('lists every missing or bad field of a row together', () => {
    const out = batchRow(layout, ['P-3', '', 'abc', '', '60', '120', '50', '', '290', '', '', 'maybe', '', '']);
    expect(out[out.length - 1]).toBe('aortic-stenosis: got "maybe"; accepted: 1/0, yes/no, y/n, true/false or present/absent (empty = no)');
    const out2 = batchRow(layout, ['P-3', '', 'abc', '', '60', '120', '50', '', '290', '', '', '', '', '']);
    expect(out2[out2.length - 1]).toMatch(/dbp: missing; required.*pep: missing; required.*sbp: got "abc"/);
  });

  it('handles short rows (missing cells are empty) and refuses extra cells', () => {
    const short = batchRow(layout, ['P-4', '', '120', '80', '60', '120', '50', '90', '290']);
    expect(short).toHaveLength(layout.outputHeader.length);
    expect(short[short.length - 1]).toBe('');
    const long = batchRow(layout, [...HEADER.map(() => ''), 'surplus']);
    expect(long[long.length - 1]).toMatch(/row has 15 cells but the header has 14/);
  });

  it('needs no renaming when inputs sv and ef are columns: the results are svUsed and efUsed', () => {
    const l = planBatch(['sbp', 'dbp', 'edv', 'esv', 'pep', 'et', 'sv', 'EF']);
    expect(l.outputHeader.filter((h) => h.toLowerCase() === 'sv' || h.toLowerCase() === 'ef')).toEqual(['sv', 'EF']);
    expect(l.outputHeader.filter((h) => h === 'svUsed')).toHaveLength(1);
    expect(l.outputHeader.filter((h) => h === 'efUsed')).toHaveLength(1);
  });

  it('refuses a header with repeated, empty or unusable names', () => {
    expect(() => planBatch(['sbp', 'dbp', 'SBP'])).toThrow(/column 3: got "SBP"; same name as column 1/);
    expect(() => planBatch(['sbp', '', 'dbp'])).toThrow(/column 2: missing; the header cell is empty/);
    expect(() => planBatch(['lvotVti', 'lvot-vti', 'sbp'])).toThrow(/names the same input as column "lvotVti"/);
    expect(() => planBatch(['name', 'value'])).toThrow(/no measurement columns recognised/);
    expect(() => planBatch(['sbp', 'sv', 'svUsed'])).toThrow(/column "svUsed".*needs this name/);
    expect(() => planBatch(['sbp', 'dbp', 'sbpUsed'])).toThrow(/column "sbpUsed".*needs this name/);
  });
});

describe('cutting a CSV stream at record boundaries', () => {
  const text = 'id,note\r\n1,"a, ""quoted""\r\nnote"\r\n2,plain\r\n3,"ends with ""\r\n"\r\n';

  /** The records of `text` fed in chunks of `size`, each good segment parsed by d3-dsv. */
  function recordsOf(text: string, size: number): string[][] {
    const splitter = new RecordSplitter();
    const rows: string[][] = [];
    const take = (segments: ReturnType<RecordSplitter['push']>) => {
      for (const s of segments) rows.push(...(s.bad ? [['BAD', String(s.bad.line), ...s.bad.cells]] : csvParseRows(s.text)));
    };
    for (let i = 0; i < text.length; i += size) take(splitter.push(text.slice(i, i + size)));
    take(splitter.end());
    return rows;
  }

  it('gives the same records as a general-purpose parser (csv-parse) wherever the chunks are cut', () => {
    const reference = parse(text, { relax_column_count: true }) as string[][];
    for (let size = 1; size <= text.length; size++) expect(recordsOf(text, size)).toEqual(reference);
  });

  it('drops a byte-order mark and keeps a last record without a line break', () => {
    expect(recordsOf('\ufeffsbp,dbp\n120,80', 3)).toEqual([['sbp', 'dbp'], ['120', '80']]);
  });

  it('reports a stray quote at the line where it opened and reads on from the next line, wherever the chunks are cut', () => {
    const stray = 'id,sbp,note\n1,120,ok\n2,"stray,x\n3,130,"two\nlines"\n4,140,end\n';
    const expected = [['id', 'sbp', 'note'], ['1', '120', 'ok'], ['BAD', '3', '2', '"stray', 'x'], ['3', '130', 'two\nlines'], ['4', '140', 'end']];
    for (let size = 1; size <= stray.length; size++) expect(recordsOf(stray, size)).toEqual(expected);
  });
});

describe('CSV cells', () => {
  it('writes numbers with two decimals more than the report, trailing zeros dropped, never NaN', () => {
    expect(csvNumber(108 / 70, 'mmHg/mL')).toBe('1.5429');
    expect(csvNumber(108, 'mmHg')).toBe('108');
    expect(csvNumber(-27.789, 'mL')).toBe('-27.79');
    expect(csvNumber(0.236842, '')).toBe('0.23684');
    expect(csvNumber(0.000004, '')).toBe('0');
    expect(csvNumber(-0.0001, 'mmHg')).toBe('0');
    expect(csvNumber(0.05, 'mmHg')).toBe('0.05');
    expect(csvNumber(null, 'mL')).toBe('');
    expect(csvNumber(Number.NaN, 'mL')).toBe('');
    expect(csvNumber(Number.POSITIVE_INFINITY, 'mL')).toBe('');
  });

  it('quotes cells as RFC 4180 asks, with CRLF line ends, readable by csv-parse', () => {
    const rows = [['a', 'b,c', 'say "hi"', 'two\nlines', '']];
    const text = csvText(rows);
    expect(text).toBe('a,"b,c","say ""hi""","two\nlines",\r\n');
    expect(parse(text)).toEqual(rows);
  });

  it('guards formula-like text after sanitising it, the same in csvText and in the byte writer (OWASP CSV injection)', () => {
    const cells = ['=1+1', '-2.5', '+3', '@x', '\t=1', '-', '\u001b=1', '=1\u001b', 'plain', 'a, b', ''];
    const expected = ["'=1+1", '-2.5', '+3', "'@x", "'\t=1", "'-", '\u241b=1', "'=1\u241b", 'plain', 'a, b', ''];
    expect(cells.map(safeCell)).toEqual(expected);
    const text = csvText([cells]);
    expect(parse(text)).toEqual([expected]);
    const out = new CsvBytes();
    out.cells(cells, cells.length);
    out.endRow();
    expect(new TextDecoder().decode(out.take())).toBe(text);
  });

  it('every result key has the unit its node declares (the graph is the one place units are decided)', () => {
    const a = assess(parseInputs({ sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, pep: 90, et: 290, height: 170, weight: 70 }));
    for (const key of RESULT_KEYS) expect(RESULT_UNITS[key], key).toBe(a.results[key].unit);
  });
});

describe('a separator line before the header', () => {
  /** The pieces the splitter gives for `text` pushed in pieces of `size` characters, joined, with the dialect. */
  function split(text: string, size: number): { text: string; separator: string | undefined; decimalComma: boolean | undefined } {
    const splitter = new RecordSplitter();
    let out = '';
    const take = (segments: Segment[]) => {
      for (const s of segments) out += s.bad ? '(bad record)' : s.text;
    };
    for (let at = 0; at < text.length; at += size) take(splitter.push(text.slice(at, at + size)));
    take(splitter.end());
    return { text: out, separator: splitter.dialect?.separator, decimalComma: splitter.dialect?.decimalComma };
  }

  it('names the dialect and is left out of the pieces, wherever the input is cut', () => {
    const body = 'id;sbp,x;dbp\r\nP1;120,5;80\r\n';
    for (const first of ['sep=;\r\n', 'SEP=;\n', '\ufeffsep=; \n', '\n\nsep=;\n']) {
      for (let size = 1; size <= first.length + body.length; size++) {
        expect(split(first + body, size), JSON.stringify([first, size])).toEqual({ text: body, separator: ';', decimalComma: true });
      }
    }
    // Without it the comma wins the header (two commas against two semicolons: a comma on a tie).
    expect(split('id;sbp,x;dbp,y\n', 4).separator).toBe(',');
    // A header that only begins like one is a header.
    expect(split('sep=;id;sbp\n1;2;3\n', 3)).toEqual({ text: 'sep=;id;sbp\n1;2;3\n', separator: ';', decimalComma: true });
  });
});

describe('the record splitter on any text (self-consistency: chunked against whole)', () => {
  /** Every segment as records: good text parsed by d3-dsv, a bad record as its line, column and cells. */
  function segmentsOf(text: string, cuts: number[]): unknown[] {
    const splitter = new RecordSplitter();
    const out: unknown[] = [];
    const take = (segments: ReturnType<RecordSplitter['push']>) => {
      for (const s of segments) out.push(...(s.bad ? [{ line: s.bad.line, column: s.bad.column, cells: s.bad.cells }] : csvParseRows(s.text)));
    };
    if (cuts.length === 0) take(splitter.push(text));
    else for (let at = 0, k = 0; at < text.length; k++) {
      const size = cuts[k % cuts.length]!;
      take(splitter.push(text.slice(at, at + size)));
      at += size;
    }
    take(splitter.end());
    return out;
  }

  it('gives the same records and the same bad lines wherever the input is cut, bad lines in order and inside the text', async () => {
    const fc = (await import('fast-check')).default;
    const piece = fc.constantFrom('a', 'b1', ',', ',', '"', '""', '\n', '\r\n', '\r', ' ', 'é');
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 60 }), fc.array(fc.integer({ min: 1, max: 7 }), { minLength: 1, maxLength: 4 }), (parts, cuts) => {
        const text = `h1,h2,h3\n${parts.join('')}`;
        const whole = segmentsOf(text, []);
        expect(segmentsOf(text, cuts)).toEqual(whole);
        // Every bad record's line exists in the text, and lines are reported in order.
        const lines = text.split(/\r\n|\r|\n/).length;
        const bad = whole.filter((r): r is { line: number } => !Array.isArray(r));
        for (const [i, b] of bad.entries()) {
          expect(b.line).toBeGreaterThan(1);
          expect(b.line).toBeLessThanOrEqual(lines);
          if (i > 0) expect(b.line).toBeGreaterThan(bad[i - 1]!.line);
        }
      }),
      { numRuns: 2000 },
    );
  });
});
