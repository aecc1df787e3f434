/**
 * Issue 9, items 2–6: summaries that never contradict themselves, the
 * trade's words instead of internal tokens, labels that say what they are,
 * and text that fits the screen and the picture. The words checked here are
 * the trade's (common practice: "atrial fibrillation", "0.9 × SBP", "R/T
 * estimate of Ea", Kelly 1992; the invasive-equivalent Ees of the Chen 2001
 * calibration 0.86·Ees + 0.40); the layout bound is stated where it is used.
 */
import { DOMParser } from '@xmldom/xmldom';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { CALIBRATION_SHIFT_NOTE, couplingNote } from '../../src/assessment/labels.js';
import { parseInputs } from '../../src/assessment/inputs.js';
import { assessUncertainty } from '../../src/assessment/uncertainty.js';
import { checksFiredLine } from '../../src/cli/record-add-command.js';
import { buildReportModel } from '../../src/cli/report-command.js';
import { compareVisits, type Comparison } from '../../src/records/compare.js';
import { assessSeries } from '../../src/records/series.js';
import { SubjectFileSchema, type SubjectFile } from '../../src/records/subject-schema.js';
import { assessmentToJson } from '../../src/render/json.js';
import { keyRows, renderReportHtml, trendSvgs } from '../../src/render/report-html.js';
import { comparisonSummary, judgementWords, renderComparison, renderSeries } from '../../src/render/series.js';
import { plainStyle, screenWidth } from '../../src/render/style.js';
import { renderTerminal, wrap } from '../../src/render/terminal.js';
import { renderPvSketch } from '../../src/render/terminal-plot.js';
import { renderTrendChart } from '../../src/render/trend-chart.js';
import { renderTerminalWithUncertainty, seriesIntervalLines, uncertaintyJson, uncertaintySection } from '../../src/render/uncertainty.js';
import { elements } from './svg-helpers.js';

const ROOT = join(import.meta.dirname, '..', '..');
const BASE = { sbp: 150, dbp: 93, hr: 68, edv: 118, esv: 46, ef: 61, lvotDiameter: 2.1, lvotVti: 21, pep: 95, et: 285, height: 174, weight: 88, age: 58, lvids: 3.2, pwts: 1.3, eOverEPrime: 11 };
const visit = (over: Record<string, unknown> = {}) => assess(parseInputs({ ...BASE, ...over }));
const FILE: SubjectFile = { format: 'elastimate-subject', schemaVersion: 1, subject: { id: 'PW-001' }, visits: [] };
const REF = { index: 1, date: '2024-01-10' };
const REF2 = { index: 2, date: '2024-04-10' };

/** Lines of one terminal section: from its heading to the next blank line. */
function section(text: string, heading: string): string[] {
  const lines = text.split('\n');
  const at = lines.findIndex((l) => l.startsWith(heading));
  expect(at, heading).toBeGreaterThanOrEqual(0);
  const end = lines.findIndex((l, i) => i > at && l === '');
  return lines.slice(at + 1, end === -1 ? undefined : end);
}

describe('summaries never contradict themselves (item 2)', () => {
  // Two visits; Pes within the least significant change but, by construction, outside the inputs' uncertainty.
  const c: Comparison = compareVisits(visit(), visit({ sbp: 156 }));
  const pes = c.rows.find((r) => r.key === 'pes')!;
  pes.noise = { interval95: [0.5, 10], exceeds: true, source: 'test' };
  for (const r of c.rows.filter((x) => x.key !== 'pes')) r.noise = { interval95: [-1, 1], exceeds: false, source: 'test' };
  const lines = comparisonSummary(c);

  it('states the two yardsticks once each, what each says, and which one the verdict follows where they differ', () => {
    expect(pes.verdict).toBe('within-noise'); // ln(156/150) = 0.039 < 2.77 × 8/153 = 0.145
    expect(lines[0]).toMatch(/^Yardstick 1, the method's least significant change .*: every change \(Ea, Pes, Ees and Ea\/Ees\) is within it/);
    expect(lines[1]).toMatch(/^Yardstick 2, the propagated uncertainty of this subject's own inputs .*excludes zero for Pes and includes zero for Ea, Ees and Ea\/Ees\.$/);
    expect(lines[2]).toMatch(/^The two yardsticks differ for Pes\. .*the verdict \(beyond or within noise\) follows it\.$/);
    expect(lines.filter((l) => /least significant change \(how much/.test(l))).toHaveLength(1);
    expect(lines.filter((l) => /propagated uncertainty/.test(l))).toHaveLength(1);
  });

  it('never uses a double negative, in the summary, the rows, the judgement column or the full comparison', () => {
    const text = [...lines, ...c.rows.map(judgementWords), renderComparison(FILE, REF, REF2, c)].join('\n');
    expect(text).not.toMatch(/(excludes|includes) no change|not .*no change/);
    expect(text).toMatch(/includes zero/);
    expect(text).toMatch(/excludes zero/);
    expect(text).not.toMatch(/within noise too/);
  });
});

describe('the probability of Ea/Ees > 1.2 says why it moves (item 3)', () => {
  const a = visit();
  const report = assessUncertainty(a.inputs, { draws: 2000, seed: 1 }, a.choice, a.results);

  it('the terminal says, on the line after the two probabilities, that the calibration moves the centre', () => {
    const lines = uncertaintySection(a, report).lines;
    const at = lines.findIndex((l) => l.startsWith('Probability that Ea/Ees exceeds 1.2'));
    const after = lines.slice(at).join(' ').replace(/\s+/g, ' ');
    expect(after).toMatch(/^Probability that Ea\/Ees exceeds 1\.2: .* from measurement error; .* with the method's own error added\. The published/);
    expect(after).toContain('The published calibration (0.86·Ees + 0.40, Chen 2001) moves the centre, not only the spread.');
  });

  it('the report\'s probability row says the same', async () => {
    const subject = SubjectFileSchema.parse(JSON.parse(readFileSync(join(ROOT, 'cases', 'cardio-oncology.subject.json'), 'utf8')));
    const model = await buildReportModel(subject, { generated: '2024-08-01', toolVersion: '0', draws: 1000, seed: 1 });
    const row = keyRows(model.visits[model.selected]!).find((r) => r.label.startsWith('Probability'))!;
    expect(row.note).toContain(CALIBRATION_SHIFT_NOTE);
  });
});

describe('prose uses the trade\'s words; tokens stay in JSON (item 4)', () => {
  const af = visit({ rhythm: 'atrial-fibrillation', mitralRegurgitation: true, aorticStenosis: true });
  const TOKENS = /atrial-fibrillation|mitral-regurgitation|aortic-stenosis|aortic-regurgitation|outflow-obstruction|\bsbp90\b|\bdoppler\b/;

  it('the terminal report with the recheck view, the referral note and the comparison cautions', () => {
    const text = renderTerminal(af, { recheck: true });
    const compared = renderComparison(FILE, REF, REF2, compareVisits(visit(), af));
    for (const t of [text, af.referral, compared]) expect(t).not.toMatch(TOKENS);
    expect(text).toMatch(/Rhythm\s+atrial fibrillation/);
    expect(text).toContain('Rhythm is atrial fibrillation');
    expect(af.referral).toContain('Method limits apply (atrial fibrillation, aortic stenosis and mitral regurgitation)');
    expect(compared.replace(/\s+/g, ' ')).toContain('Method limits apply (atrial fibrillation, aortic stenosis and mitral regurgitation)');
    expect(text).toMatch(/^\s*0\.9 × SBP +Doppler +\d+/m);
    expect(text).toMatch(/^\s*\(2·SBP \+ DBP\)\/3 +EDV − ESV +\d+/m);
    expect(text).toMatch(/Pes estimates side by side: 0\.9 × SBP \d+ mmHg; \(2·SBP \+ DBP\)\/3 \d+ mmHg/);
  });

  it('JSON keeps the tokens', () => {
    const json = JSON.stringify(assessmentToJson(af, '0'));
    expect(json).toContain('"atrial-fibrillation"');
    expect(json).toContain('"mitral-regurgitation"');
    expect(json).toContain('"sbp90"');
  });
});

describe('labels that say what they are (item 5)', () => {
  const a = visit();
  const report = assessUncertainty(a.inputs, { draws: 2000, seed: 1 }, a.choice, a.results);
  const text = renderTerminalWithUncertainty(a, report, { recheck: true });

  it('the calibrated Ees is named the invasive-equivalent Ees', () => {
    expect(text).toMatch(/Invasive-equivalent Ees\s+[\d.]+ mmHg\/mL/);
    expect(text).not.toMatch(/Ees with the method's own error/);
  });

  it('two volumes at zero pressure have two names, and no bare V0 is left', () => {
    expect(text).toMatch(/V0\(ES\), end-systolic intercept\s+-?\d+ mL/);
    expect(text).toMatch(/V0\(ED\), diastolic curve at zero pressure -?\d+ mL/);
    expect(text).not.toMatch(/\bV0\b(?!\()/);
  });

  it('the report names ENd(est) in words where it first shows it, and no longer says "[from memory]" in its sources', async () => {
    const subject = SubjectFileSchema.parse(JSON.parse(readFileSync(join(ROOT, 'cases', 'cardio-oncology.subject.json'), 'utf8')));
    const model = await buildReportModel(subject, { generated: '2024-08-01', toolVersion: '0', draws: 1000, seed: 1 });
    expect(keyRows(model.visits[model.selected]!).find((r) => r.label === 'End-systolic elastance Ees')!.note).toContain("ENd(est) = this subject's normalized elastance");
    expect(renderReportHtml(model)).not.toMatch(/from memory/);
  });

  it('ENd(avg) and ENd(est) have plain words beside them; Ea from resistance is the R/T estimate', () => {
    expect(text).toMatch(/ENd\(avg\), group average\s+[\d.]+/);
    expect(text).toMatch(/ENd\(est\), this subject\s+[\d.]+/);
    expect(text.replace(/\s+/g, ' ')).toContain('Normalized elastance ENd is elastance at the onset of ejection divided by Ees');
    expect(text).toMatch(/R\/T estimate of Ea\s+[\d.]+ mmHg\/mL/);
    expect(text).not.toMatch(/resistance view/);
  });

  it('one phrase for intervals: "95 % interval", in the terminal, record show and the report', async () => {
    const subject = SubjectFileSchema.parse(JSON.parse(readFileSync(join(ROOT, 'cases', 'cardio-oncology.subject.json'), 'utf8')));
    const series = assessSeries(subject);
    const reports = series.map((e) => assessUncertainty(e.assessment.inputs, { draws: 1000, seed: 1, sensitivity: false }));
    const model = await buildReportModel(subject, { generated: '2024-08-01', toolVersion: '0', draws: 1000, seed: 1 });
    for (const t of [text, seriesIntervalLines(series, reports).join('\n'), renderReportHtml(model)]) {
      expect(t).not.toMatch(/95%|95 % range|95 % ranges/);
      expect(t).toMatch(/95 % interval/);
    }
  });

  it('"[from memory]" reads as an assumed default on the terminal; the JSON keeps the exact provenance', () => {
    expect(text).not.toContain('[from memory]');
    expect(text).toMatch(/heart rate\s+3\.0 bpm\s+3 bpm \[assumed default; see docs\/uncertainty\.md\]/);
    const json = uncertaintyJson(report).uncertainty as { errorModel: { input: string; provenance: string }[] };
    expect(json.errorModel.find((e) => e.input === 'hr')!.provenance).toBe('from memory');
  });

  it('the sketch says why its Ea line differs from the reported Ea (EDV − ESV against Doppler SV)', () => {
    // Pes = 0.9 × 150 = 135 mmHg; Ea line slope 135/(118 − 46) = 1.875; Doppler SV π·1.05²·21 = 72.7 mL, Ea 1.857 (hand-worked).
    const sketch = renderPvSketch([{ label: 'this visit', loop: a.mechanics!.loop }]).join('\n');
    expect(sketch.replace(/\s+/g, ' ')).toContain("The Ea line's slope is Pes/(EDV − ESV) = 1.88 mmHg/mL; the reported Ea 1.86 uses the Doppler stroke volume.");
  });

  it('record add names the checks that fired, in words', () => {
    const af = visit({ rhythm: 'atrial-fibrillation', hr: 110 });
    expect(checksFiredLine(af, 'x.subject.json')).toBe('  Checks that fired: atrial fibrillation and tachycardia; see `elastimate record show x.subject.json`.\n');
    expect(checksFiredLine(a, 'x.subject.json')).toBe('');
  });

  it('record show, assess and the report give the same coupling note', async () => {
    const subject = SubjectFileSchema.parse(JSON.parse(readFileSync(join(ROOT, 'cases', 'cardio-oncology.subject.json'), 'utf8')));
    const series = assessSeries(subject);
    const shown = renderSeries(subject, series, series.map(() => null));
    const model = await buildReportModel(subject, { generated: '2024-08-01', toolVersion: '0', draws: 1000, seed: 1 });
    for (const e of series) {
      const note = couplingNote(e.assessment.results.eaEes.value);
      expect(note).toMatch(/(above|at or below) the 1\.2 cut-off \(Cheng 2008\)/);
      expect(shown).toMatch(new RegExp(`^ {2}${e.index} +Ea/Ees [\\d.]+: ${note.replace(/[()]/g, '\\$&')}$`, 'm'));
      expect(renderTerminal(e.assessment)).toContain(note);
      expect(keyRows(model.visits[e.index - 1]!).find((r) => r.label === 'Coupling ratio Ea/Ees')!.note).toBe(note);
    }
  });
});

describe('text fits the screen and the picture (item 6)', () => {
  const a = visit({ rhythm: 'atrial-fibrillation', mitralRegurgitation: true });

  it('prose wraps to the style\'s width: 80 columns by default, narrower when the terminal is', () => {
    for (const width of [80, 60]) {
      const text = renderTerminal(a, { style: { ...plainStyle, width } });
      for (const heading of ['Checks and caveats', 'Referral note (paste-ready)']) {
        const lines = section(text, heading);
        expect(lines.length).toBeGreaterThan(2);
        for (const l of lines) expect([...l].length, l).toBeLessThanOrEqual(width);
      }
      const compared = renderComparison(FILE, REF, REF2, compareVisits(visit(), a), { ...plainStyle, width });
      for (const l of section(compared, 'In plain words')) expect([...l].length, l).toBeLessThanOrEqual(width);
    }
  });

  it('record show --uncertainty keeps its columns aligned when a value is one character shorter', () => {
    // Pes = 0.9 × SBP: 99 mmHg at SBP 110, 105 mmHg at SBP 117 (two digits against three).
    const entries = [visit({ sbp: 110, dbp: 70 }), visit({ sbp: 117, dbp: 70 })].map((assessment, i) => ({ index: i + 1, date: `2024-0${i + 1}-10`, assessment }));
    const reports = entries.map((e) => assessUncertainty(e.assessment.inputs, { draws: 1000, seed: 1, sensitivity: false }));
    const rows = seriesIntervalLines(entries, reports).filter((l) => /^ {2}\d /.test(l));
    expect(rows[0]).toMatch(/Pes 99 \(/);
    expect(rows[1]).toMatch(/Pes 105 \(/);
    for (const label of [' Ea ', ' Ees ', ' Ea/Ees ']) expect(rows[0]!.indexOf(label), label).toBe(rows[1]!.indexOf(label));
  });

  it('dates do not wrap in the report\'s visit table', async () => {
    const subject = SubjectFileSchema.parse(JSON.parse(readFileSync(join(ROOT, 'cases', 'cardio-oncology.subject.json'), 'utf8')));
    const html = renderReportHtml(await buildReportModel(subject, { generated: '2024-08-01', toolVersion: '0', draws: 1000, seed: 1 }));
    for (const e of assessSeries(subject)) expect(html).toContain(`<td class="nowrap">${e.date}</td>`);
    expect(html).toMatch(/td\.nowrap[^{]*\{\s*white-space:\s*nowrap;/);
  });
});

/**
 * Text extents from a per-character bound: 0.62 em per character (Helvetica
 * and Arial, the faces the charts ask for: digits 0.556 em, lower-case text
 * about 0.5 em on average; from memory of their metrics), glyphs from 0.8 em
 * above the baseline to 0.25 em below.
 */
const EM = 0.62;
function textBoxes(svg: string): { box: [number, number, number, number]; text: string; cls: string; inKey: boolean }[] {
  const doc = new DOMParser().parseFromString(svg, 'image/svg+xml');
  return elements(doc, 'text').map((t) => {
    let size = 16;
    let inKey = false;
    for (let n: Element | null = t as unknown as Element; n && n.getAttribute; n = n.parentNode as Element | null) {
      if (size === 16 && n.getAttribute('font-size')) size = Number(n.getAttribute('font-size'));
      if (n.getAttribute('class') === 'key') inKey = true;
    }
    const content = t.textContent ?? '';
    const w = [...content].length * size * EM;
    const x = Number(t.getAttribute('x'));
    const y = Number(t.getAttribute('y'));
    const anchor = t.getAttribute('text-anchor') ?? 'start';
    const left = anchor === 'middle' ? x - w / 2 : anchor === 'end' ? x - w : x;
    return { box: [left, y - 0.8 * size, left + w, y + 0.25 * size], text: content, cls: t.getAttribute('class') ?? '', inKey };
  });
}
const overlap = (a: number[], b: number[]) => a[0]! < b[2]! && b[0]! < a[2]! && a[1]! < b[3]! && b[1]! < a[3]!;

describe('every label of every trend chart fits inside its SVG (item 6)', async () => {
  const subjects = [join(ROOT, 'cases', 'cardio-oncology.subject.json'), join(ROOT, 'test', 'report', 'fixtures', 'HT-014.subject.json')];
  const charts: { name: string; svg: string }[] = [];
  for (const path of subjects) {
    const subject = SubjectFileSchema.parse(JSON.parse(readFileSync(path, 'utf8')));
    const model = await buildReportModel(subject, { generated: '2024-08-01', toolVersion: '0', draws: 1000, seed: 1 });
    for (const t of trendSvgs(model)) charts.push({ name: `${subject.subject.id} ${t.key}`, svg: t.svg });
  }
  // A hard case of our own: eight visits, a value rising to the top right, intervals and the reference line.
  charts.push({
    name: 'synthetic',
    svg: renderTrendChart({
      key: 'eaEes', title: 'Coupling ratio Ea/Ees', unit: '', decimals: 3, selectedIndex: 8, bandSource: 'test',
      reference: { value: 1.2, label: 'cut-off 1.2 (Cheng 2008)' },
      points: Array.from({ length: 8 }, (_, i) => ({ index: i + 1, date: `2024-0${i + 1}-15`, value: 0.8 + 0.25 * i, interval95: [0.6 + 0.2 * i, 1 + 0.3 * i] as [number, number], logLimit: 0.5 + 0.01 * i })),
    }),
  });

  it.each(charts.map((c) => [c.name, c.svg]))('%s', (_name, svg) => {
    const [, , width, height] = svg.match(/viewBox="([^"]+)"/)![1]!.split(' ').map(Number) as [number, number, number, number];
    const boxes = textBoxes(svg);
    expect(boxes.length).toBeGreaterThan(10);
    for (const b of boxes) {
      expect(b.box[0], `"${b.text}" left edge`).toBeGreaterThanOrEqual(0);
      expect(b.box[2], `"${b.text}" right edge`).toBeLessThanOrEqual(width);
      expect(b.box[1], `"${b.text}" top`).toBeGreaterThanOrEqual(0);
      expect(b.box[3], `"${b.text}" bottom`).toBeLessThanOrEqual(height);
    }
    const key = boxes.filter((b) => b.inKey);
    expect(key.length).toBeGreaterThan(2);
    for (const v of boxes.filter((b) => b.cls === 'value-label')) {
      for (const k of key) expect(overlap(v.box, k.box), `value "${v.text}" over key "${k.text}"`).toBe(false);
    }
  });
});

describe('the one wrapper', () => {
  it('breaks at spaces within the width, never between a number and its percent sign', () => {
    const lines = wrap('the least significant change (±0.562 in ln (+75 % / −43 %), repeat CV 20.3 %)', 43);
    expect(lines).toEqual(['the least significant change (±0.562 in ln', '(+75 % / −43 %), repeat CV 20.3 %)']);
    // "xx (+75" fills 7 columns exactly: the percent sign must take its number to the next line, not start one.
    expect(wrap('xx (+75 % / −43 %)', 7)).toEqual(['xx', '(+75 %', '/', '−43 %)']);
  });
});

describe('the width prose wraps to', () => {
  it('is the terminal\'s columns on a terminal (at least 40) and 80 off one', () => {
    expect(screenWidth({ isTTY: true, columns: 120 })).toBe(120);
    expect(screenWidth({ isTTY: true, columns: 20 })).toBe(40);
    expect(screenWidth({ isTTY: false, columns: 120 })).toBe(80);
    expect(screenWidth({ isTTY: true })).toBe(80);
    expect(screenWidth({})).toBe(80);
  });
});
