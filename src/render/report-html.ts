/**
 * The case-conference report as one self-contained HTML page: inline CSS and
 * SVG, no script, no network, printable on A4 and Letter (each `.sheet` is
 * one printed page). Pure: a ReportModel in, a string out. The Markdown
 * version (report-markdown.ts) is built from the same model and helpers.
 */
import { escapeMarkup } from '../text/sanitize.js';
import type { Assessment } from '../assessment/assess.js';
import type { ResultKey } from '../assessment/graph/index.js';
import type { Quantity } from '../assessment/result.js';
import type { UncertaintyReport } from '../assessment/uncertainty.js';
import { compareVisits, type Comparison } from '../records/compare.js';
import type { SubjectInfo } from '../records/subject-schema.js';
import { sourceForReaders, CALIBRATED_EES_LABEL, END_EST_WORDS, CALIBRATION_SHIFT_NOTE, EA_RT_LABEL, V0_DIASTOLIC, V0_END_SYSTOLIC, couplingNote } from '../assessment/labels.js';
import { decimalsFor, formatNumber, formatValue } from './format.js';
import { renderPvDiagram, type ModelLoopOverlay, type PvVisit } from './pv-diagram.js';
import { rightHeartRows } from './right-heart-text.js';
import { comparisonSummary, judgementWords } from './series.js';
import { renderTrendChart, type TrendChartSpec } from './trend-chart.js';

export interface ReportVisit {
  /** Visit number in date order (as `record show` prints it). */
  index: number;
  date: string;
  note?: string;
  /** Results carry `interval95` when the uncertainty was computed. */
  assessment: Assessment;
  uncertainty: UncertaintyReport | null;
}

export interface ReportModel {
  subject: SubjectInfo;
  /** All visits, in date order. */
  visits: ReportVisit[];
  /** Position in `visits` of the visit the report is about. */
  selected: number;
  /** Position of the visit overlaid and compared with it (the previous one), or null. */
  compared: number | null;
  /** compareVisits(compared, selected), rows carrying `noise` when the uncertainty was computed. */
  comparison: Comparison | null;
  /** YYYY-MM-DD, passed in by the command (modules do not read the clock). */
  generated: string;
  toolVersion: string;
  /** How the intervals were computed (draws, seed), or why there are none. */
  uncertaintyNote: string;
  /** On request (`--model-loop`): the simulated loop of the model fitted to the reported visit, overlaid on the diagram. */
  modelLoop?: ModelLoopOverlay;
}

/** What the trend charts show, under their heading in both report formats. */
export const TREND_NOTE =
  "The grey band is the least significant change around the first visit (2.77 × the repeat CV, on the log scale), drawn through each visit's own limit, the one record compare applies to the change from the first visit; filled markers lie beyond it. Whiskers: 95 % intervals from input measurement error.";

export const REPORT_TITLE = 'Ventricular–arterial coupling: case-conference summary';

/** Escaping of user and report text for HTML and SVG: the one sanitiser (src/text/sanitize.ts). */
const esc = escapeMarkup;

export function selectedVisit(m: ReportModel): ReportVisit {
  return m.visits[m.selected]!;
}

export function comparedVisit(m: ReportModel): ReportVisit | null {
  return m.compared === null ? null : (m.visits[m.compared] ?? null);
}

export function visitLabel(v: ReportVisit): string {
  return `Visit ${v.index} · ${v.date}`;
}

/** The visits drawn in the pressure–volume diagram: selected first, compared overlaid. */
export function diagramVisits(m: ReportModel): PvVisit[] {
  const out: PvVisit[] = [];
  for (const v of [selectedVisit(m), comparedVisit(m)]) {
    if (v?.assessment.mechanics) out.push({ label: visitLabel(v), loop: v.assessment.mechanics.loop });
  }
  return out;
}

export function pvDiagramSvg(m: ReportModel): string {
  return renderPvDiagram(diagramVisits(m), { title: `${m.subject.id}: estimated pressure–volume diagram`, ...(m.modelLoop ? { modelLoop: m.modelLoop } : {}) });
}

/** The caption's sentence on the model loop (HTML and Markdown), or '' when none was asked for. */
export function modelLoopCaption(m: ReportModel): string {
  if (!m.modelLoop) return '';
  return m.modelLoop.points.length > 1
    ? ' The dashed green loop is a model loop: simulated by a model fitted to the reported visit (docs/model.md), not measured; its fit and cautions are printed under the diagram.'
    : ` ${m.modelLoop.notes[0] ?? ''}`;
}

const TREND_KEYS = [
  { key: 'ea', title: 'Arterial elastance Ea', resultKey: 'ea' },
  { key: 'ees', title: 'End-systolic elastance Ees (single-beat)', resultKey: 'ees' },
  { key: 'eaEes', title: 'Coupling ratio Ea/Ees', resultKey: 'eaEes' },
] as const satisfies readonly { key: 'ea' | 'ees' | 'eaEes'; title: string; resultKey: ResultKey }[];

/**
 * The trend charts. Each visit's band edge and verdict come from the
 * comparison of the first visit with that visit (compareVisits, the one rule
 * `record compare` applies), so a marker and `record compare 1 <visit>` agree.
 */
export function trendSpecs(m: ReportModel): TrendChartSpec[] {
  const first = m.visits[0];
  const fromFirst = m.visits.map((v) => (first ? compareVisits(first.assessment, v.assessment) : null));
  return TREND_KEYS.map(({ key, title, resultKey }) => {
    const unit = m.visits[0]?.assessment.results[resultKey].unit ?? '';
    const spec: TrendChartSpec = {
      key,
      title,
      unit,
      decimals: decimalsFor(unit),
      selectedIndex: selectedVisit(m).index,
      points: m.visits.map((v, i) => {
        const q = v.assessment.results[resultKey];
        const p: TrendChartSpec['points'][number] = { index: v.index, date: v.date, value: q.value };
        if (q.interval95) p.interval95 = q.interval95;
        if (q.reason) p.reason = q.reason;
        const row = fromFirst[i]?.rows.find((r) => r.key === key);
        if (row) p.logLimit = row.lsc.logLimit;
        return p;
      }),
    };
    const source = fromFirst[0]?.rows.find((r) => r.key === key)?.lsc.source;
    if (source) spec.bandSource = sourceForReaders(source, 'docs/subject-file.md');
    if (key === 'eaEes') spec.reference = { value: 1.2, label: 'cut-off 1.2 (Cheng 2008)' };
    return spec;
  });
}

export function trendSvgs(m: ReportModel): { key: string; svg: string }[] {
  return trendSpecs(m).map((s) => ({ key: s.key, svg: renderTrendChart(s) }));
}

/** One row of the key-results table. */
export interface KeyRow {
  label: string;
  value: string;
  interval: string;
  note: string;
}

function intervalText(q: Quantity): string {
  if (q.value === null || !q.interval95) return '—';
  const d = decimalsFor(q.unit);
  return `${formatNumber(q.interval95[0], d)} to ${formatNumber(q.interval95[1], d)}`;
}

function pairText(pair: [number, number] | null, decimals: number): string {
  return pair ? `${formatNumber(pair[0], decimals)} to ${formatNumber(pair[1], decimals)}` : '—';
}

export function keyRows(v: ReportVisit): KeyRow[] {
  const r = v.assessment.results;
  const u = v.uncertainty;
  const q = (label: string, x: Quantity, note = x.method ?? ''): KeyRow => ({
    label,
    value: x.value === null ? `not computable (${x.reason ?? 'missing input'})` : formatValue(x.value, x.unit),
    interval: intervalText(x),
    note,
  });
  const rows: KeyRow[] = [
    q('End-systolic pressure Pes', r.pes),
    q('Stroke volume used', r.svUsed),
    q('Ejection fraction', r.efUsed),
    q('Arterial elastance Ea', r.ea),
    q('End-systolic elastance Ees', r.ees, `single-beat (Chen 2001); ${END_EST_WORDS}`),
    q('Coupling ratio Ea/Ees', r.eaEes, couplingNote(r.eaEes.value)),
    q(V0_END_SYSTOLIC, r.v0, 'ESV − Pes/Ees; often negative'),
  ];
  if (u) {
    rows.push({
      label: CALIBRATED_EES_LABEL,
      value: u.methodError.calibratedEes === null ? '—' : formatValue(u.methodError.calibratedEes, 'mmHg/mL'),
      interval: pairText(u.methodError.eesCombined, 2),
      note: 'predicted by the published calibration 0.86·Ees + 0.40 (Chen 2001); interval adds its SEE 0.64 mmHg/mL',
    });
    if (u.coupling.probabilityAbove !== null) {
      rows.push({
        label: 'Probability Ea/Ees > 1.2',
        value: `${formatNumber(u.coupling.probabilityAbove * 100, 0)} %`,
        interval: '—',
        note: u.coupling.probabilityAboveWithMethodError !== null ? `${formatNumber(u.coupling.probabilityAboveWithMethodError * 100, 0)} % with the method's own error added. ${CALIBRATION_SHIFT_NOTE}` : 'measurement error only',
      });
    }
    if (u.ees.notComputableFraction > 0) {
      rows.push({ label: 'Draws where Ees is not computable', value: `${formatNumber(u.ees.notComputableFraction * 100, 1)} %`, interval: '—', note: 'counted, not dropped' });
    }
    if (u.driver) {
      rows.push({ label: 'Largest source of uncertainty', value: u.driver.label, interval: '—', note: `${formatNumber(u.driver.share * 100, 0)} % of the variance of ${u.driver.output === 'ees' ? 'Ees' : 'Ea/Ees'}: repeat this measurement to tighten the interval` });
    }
  }
  return rows;
}

/** The visit table: one row per visit. */
export const VISIT_COLUMNS: { title: string; unit: string; nowrap?: boolean; cell(v: ReportVisit): string }[] = [
  { title: 'Visit', unit: '', cell: (v) => String(v.index) },
  { title: 'Date', unit: '', nowrap: true, cell: (v) => v.date },
  { title: 'HR', unit: 'bpm', cell: (v) => formatNumber(v.assessment.inputs.hr, 0) },
  { title: 'SBP/DBP', unit: 'mmHg', cell: (v) => `${formatNumber(v.assessment.inputs.sbp, 0)}/${formatNumber(v.assessment.inputs.dbp, 0)}` },
  { title: 'EDV/ESV', unit: 'mL', cell: (v) => `${formatNumber(v.assessment.inputs.edv, 0)}/${formatNumber(v.assessment.inputs.esv, 0)}` },
  { title: 'EF', unit: '%', cell: (v) => formatNumber(v.assessment.results.efUsed.value, 0) },
  { title: 'SV', unit: 'mL', cell: (v) => formatNumber(v.assessment.results.svUsed.value, 0) },
  { title: 'Pes', unit: 'mmHg', cell: (v) => formatNumber(v.assessment.results.pes.value, 0) },
  { title: 'Ea', unit: 'mmHg/mL', cell: (v) => formatNumber(v.assessment.results.ea.value, 2) },
  { title: 'Ees', unit: 'mmHg/mL', cell: (v) => formatNumber(v.assessment.results.ees.value, 2) },
  { title: 'Ea/Ees', unit: '', cell: (v) => formatNumber(v.assessment.results.eaEes.value, 2) },
  { title: 'σ meridional', unit: '10³ dyn/cm²', cell: (v) => formatNumber(v.assessment.mechanics?.wallStress.meridional.value, 0) },
];

/** Rows of the mechanics table (afterload, energetics, diastolic side) for one visit. */
export function mechanicsRows(a: Assessment): { group: string; label: string; value: string; note: string }[] {
  const m = a.mechanics;
  if (!m) return [];
  // Short values; a reason for "not computable" goes to the note column.
  const val = (x: Quantity) => (x.value === null ? '—' : formatValue(x.value, x.unit));
  const note = (x: Quantity, text: string) => (x.value === null ? `not computable: ${x.reason ?? 'missing input'}` : text);
  const joules = (x: Quantity, j: Quantity) => (x.value === null || j.value === null ? val(x) : `${val(x)} (${formatValue(j.value, 'J')})`);
  const e = m.energetics;
  const rows = [
    { group: 'Afterload', label: 'End-systolic pressure Pes', value: val(a.results.pes), note: note(a.results.pes, a.results.pes.method ?? '') },
    { group: 'Afterload', label: 'Arterial elastance Ea', value: val(a.results.ea), note: note(a.results.ea, `${EA_RT_LABEL}: ${formatValue(a.results.eaResistance.value, 'mmHg/mL')}`) },
    { group: 'Afterload', label: 'Wall stress, thin wall (Laplace)', value: val(m.wallStress.thinWall), note: note(m.wallStress.thinWall, 'σ = P·r/(2h), r = LVIDs/2, h = PWTs, P = cuff SBP') },
    { group: 'Afterload', label: 'Wall stress, meridional (Reichek 1982)', value: val(m.wallStress.meridional), note: note(m.wallStress.meridional, '0.334·P·LVIDs/[PWTs·(1 + PWTs/LVIDs)], P = cuff SBP as validated; published normal 65 ± 20') },
    { group: 'Energetics', label: 'Stroke work SW', value: joules(e.strokeWork, e.strokeWorkJoules), note: note(e.strokeWork, 'Pes × SV') },
    { group: 'Energetics', label: 'Potential energy PE', value: joules(e.potentialEnergy, e.potentialEnergyJoules), note: note(e.potentialEnergy, 'Pes·(ESV − V0(ES))/2') },
    { group: 'Energetics', label: 'Pressure–volume area PVA', value: joules(e.pressureVolumeArea, e.pressureVolumeAreaJoules), note: note(e.pressureVolumeArea, 'SW + PE (Suga)') },
    { group: 'Energetics', label: 'Mechanical efficiency SW/PVA', value: val(e.efficiency), note: note(e.efficiency, '= 1/(1 + Ea/(2·Ees)) in the linear model (Burkhoff & Sagawa 1986)') },
    { group: 'Diastole', label: 'End-diastolic pressure used', value: val(m.diastolic.edp), note: note(m.diastolic.edp, m.diastolic.edpSource === 'estimated' ? 'ESTIMATED from E/e′ (Nagueh 1997, lateral e′), ±8 mmHg' : 'entered') },
  ];
  const c = m.diastolic.curve;
  rows.push({
    group: 'Diastole',
    label: 'Diastolic curve (Klotz 2006)',
    value: c ? `P = α·V^${formatNumber(c.beta, 2)}` : '—',
    note: c
      ? `${c.anchorPressure} mmHg at ${formatNumber(c.anchorVolume, 0)} mL; ${V0_DIASTOLIC} ${formatNumber(c.unstressedVolume, 0)} mL; ${c.anchorPressure === 15 ? 'EDP > 22 mmHg: anchored at 15 mmHg (Klotz protocol)' : 'single-beat, from one point'}`
      : `not drawn: ${m.diastolic.reason ?? 'not computable'}`,
  });
  for (const r of rightHeartRows(a)) rows.push({ group: 'Right heart', label: r.label.trim(), value: r.value, note: r.note });
  return rows;
}

/** Caveats for the selected visit: standing ones, flags, and the diagram's own notes. */
export function reportCaveats(v: ReportVisit): { flags: { level: string; message: string }[]; caveats: string[] } {
  const a = v.assessment;
  return {
    flags: a.flags.map((f) => ({ level: f.level, message: f.message })),
    caveats: [
      ...a.caveats,
      'The pressure–volume diagram is built from the estimates above (end-systolic line from single-beat Ees and its intercept V0(ES), diastolic curve from one point by the Klotz method, a schematic ejection limb peaking at cuff SBP); it is a picture of the model, not a measured loop.',
      'Wall stress uses M-mode end-systolic dimension and posterior wall thickness and cuff SBP; it is a geometric estimate of the load on the muscle, not of the arteries.',
    ],
  };
}

export const REFERENCES = [
  'Chen CH et al. Noninvasive single-beat determination of left ventricular end-systolic elastance in humans. J Am Coll Cardiol 2001;38:2028–34.',
  'Kelly RP et al. Effective arterial elastance as index of arterial vascular load in humans. Circulation 1992;86:513–21.',
  'Klotz S et al. Single-beat estimation of end-diastolic pressure–volume relationship. Am J Physiol Heart Circ Physiol 2006;291:H403 (constants as quoted by a secondary implementation citing the authors\' protocol, Nat Protoc 2007;2:2152; see docs/methods.md).',
  'Nagueh SF et al. Doppler tissue imaging … estimation of filling pressures. J Am Coll Cardiol 1997;30:1527–33.',
  'Reichek N et al. Noninvasive determination of left ventricular end-systolic stress. Circulation 1982;65:99.',
  'Suga H. Ventricular energetics. Physiol Rev 1990;70:247–77; Burkhoff D, Sagawa K. Am J Physiol 1986;250:R1021.',
  'Cheng HM et al. Systolic time intervals and abnormal ventriculo-arterial coupling. Eur J Heart Fail 2008;10:1192–1200.',
];

function subjectFacts(m: ReportModel): string[] {
  const s = m.subject;
  const facts = [`Subject ${s.id}`];
  if (s.sex) facts.push(s.sex);
  if (s.birthYear !== undefined) facts.push(`born ${s.birthYear}`);
  if (s.height !== undefined) facts.push(`height ${typeof s.height === 'number' ? formatValue(s.height, 'cm') : s.height}`);
  facts.push(`${m.visits.length} visit${m.visits.length === 1 ? '' : 's'}`);
  return facts;
}

export function subjectLine(m: ReportModel): string {
  return subjectFacts(m).join(' · ');
}

export function provenanceLine(m: ReportModel): string {
  const v = selectedVisit(m);
  return `Generated ${m.generated} by elastimate ${m.toolVersion}, methods ${v.assessment.methodsVersion}. Results computed from the stored inputs when the report was made. Research use only; not a diagnosis.`;
}

const CSS = `
:root { --ink: #1a1a1a; --muted: #555; --rule: #c9c9c9; --accent: #0072B2; --warm: #D55E00; --paper: #fff; }
* { box-sizing: border-box; }
html { background: #eef0f2; }
body { margin: 0; color: var(--ink); font: 14px/1.45 "Helvetica Neue", Helvetica, Arial, sans-serif; }
.sheet { background: var(--paper); max-width: 190mm; margin: 12px auto; padding: 12mm 12mm 10mm; box-shadow: 0 1px 4px rgba(0,0,0,.15); }
header.report-head { border-bottom: 2.5px solid var(--ink); padding-bottom: 6px; margin-bottom: 10px; }
h1 { font-size: 20px; margin: 0 0 2px; letter-spacing: .01em; }
h2 { font-size: 15px; margin: 14px 0 6px; padding-left: 7px; border-left: 4px solid var(--accent); }
h3 { font-size: 13px; margin: 10px 0 4px; }
p { margin: 4px 0 6px; }
.facts { font-weight: 600; }
.muted, .provenance { color: var(--muted); font-size: 12px; }
.badge { display: inline-block; border: 1.5px solid var(--warm); color: var(--warm); font-weight: 700; font-size: 11px; padding: 1px 6px; border-radius: 3px; letter-spacing: .04em; text-transform: uppercase; }
table { border-collapse: collapse; width: 100%; font-size: 12.5px; margin: 4px 0 8px; }
th, td { text-align: left; padding: 3px 6px; border-bottom: 1px solid var(--rule); vertical-align: top; }
th { border-bottom: 1.5px solid var(--ink); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.nowrap, th.nowrap { white-space: nowrap; }
tr.selected td { font-weight: 700; background: #f1f6fa; }
.unit { font-weight: 400; color: var(--muted); font-size: 11px; display: block; }
figure { margin: 6px 0; break-inside: avoid; page-break-inside: avoid; }
figure svg { display: block; width: 100%; height: auto; }
figure.pv svg { max-width: 158mm; margin: 0 auto; }
figure.trend svg { max-width: 176mm; margin: 0 auto; }
figcaption { font-size: 11.5px; color: var(--muted); margin-top: 2px; }
.note-box { border: 1.5px solid var(--ink); padding: 8px 10px; margin: 6px 0; background: #fafafa; }
ul.caveats { margin: 4px 0; padding-left: 18px; }
ul.caveats li { margin: 2px 0; }
.flag { font-weight: 700; }
.flag.attention { color: var(--warm); }
ol.refs { font-size: 11.5px; padding-left: 18px; color: var(--muted); }
.change-lines p { margin: 2px 0; font-size: 12.5px; }
@page { margin: 11mm; }
@media print {
  html { background: #fff; }
  body { font-size: 9pt; line-height: 1.35; }
  table { font-size: 8.5pt; }
  h1 { font-size: 15pt; }
  h2 { font-size: 11pt; margin-top: 9px; }
  .sheet { box-shadow: none; margin: 0; padding: 0; max-width: none; break-after: page; page-break-after: always; }
  .sheet:last-child { break-after: auto; page-break-after: auto; }
  h2 { break-after: avoid; page-break-after: avoid; }
  table, .note-box { break-inside: avoid; page-break-inside: avoid; }
  figure.pv svg { max-width: 96mm; }
  td { padding: 2px 5px; }
  .muted, .provenance, figcaption { font-size: 7.5pt; }
  .change-lines { column-count: 2; column-gap: 6mm; }
  .change-lines p { font-size: 7.5pt; break-inside: avoid; }
  figure.trend svg { max-width: 160mm; }
}
`;

function cellClass(h: { num?: boolean; nowrap?: boolean } | undefined): string {
  const names = [h?.num ? 'num' : '', h?.nowrap ? 'nowrap' : ''].filter(Boolean);
  return names.length ? ` class="${names.join(' ')}"` : '';
}

function table(headers: { title: string; unit?: string; num?: boolean; nowrap?: boolean; width?: string }[], rows: { cells: string[]; selected?: boolean }[]): string {
  const cols = headers.some((h) => h.width) ? `<colgroup>${headers.map((h) => `<col${h.width ? ` style="width:${h.width}"` : ''}>`).join('')}</colgroup>\n` : '';
  const head = headers.map((h) => `<th${cellClass(h)}>${esc(h.title)}${h.unit ? `<span class="unit">${esc(h.unit)}</span>` : ''}</th>`).join('');
  const body = rows
    .map((r) => `<tr${r.selected ? ' class="selected"' : ''}>${r.cells.map((c, i) => `<td${cellClass(headers[i])}>${esc(c)}</td>`).join('')}</tr>`)
    .join('\n');
  return `<table>\n${cols}<thead><tr>${head}</tr></thead>\n<tbody>\n${body}\n</tbody>\n</table>`;
}

export function renderReportHtml(m: ReportModel): string {
  const sel = selectedVisit(m);
  const cmp = comparedVisit(m);
  const a = sel.assessment;
  const parts: string[] = [];
  parts.push('<!DOCTYPE html>');
  parts.push('<html lang="en">');
  parts.push('<head>');
  parts.push('<meta charset="utf-8">');
  parts.push('<meta name="viewport" content="width=device-width, initial-scale=1">');
  parts.push(`<meta name="generator" content="elastimate ${esc(m.toolVersion)}">`);
  parts.push(`<title>${esc(`${m.subject.id}: ${REPORT_TITLE}`)}</title>`);
  parts.push(`<style>${CSS}</style>`);
  parts.push('</head>');
  parts.push('<body>');

  // Sheet 1: who, which visit, the key numbers and the picture.
  parts.push('<section class="sheet" id="summary">');
  parts.push('<header class="report-head">');
  parts.push(`<h1>${esc(REPORT_TITLE)}</h1>`);
  parts.push(`<p class="facts">${esc(subjectLine(m))}</p>`);
  parts.push(`<p>Visit reported: <strong>${esc(visitLabel(sel))}</strong>${cmp ? `; compared with ${esc(visitLabel(cmp))}` : ''}. <span class="badge">research use · not a diagnosis</span></p>`);
  parts.push(`<p class="provenance">${esc(provenanceLine(m))}</p>`);
  if (sel.note) parts.push(`<p class="muted">Visit note: ${esc(sel.note)}</p>`);
  parts.push('</header>');
  parts.push('<h2>Key results</h2>');
  parts.push(table(
    [{ title: 'Quantity', width: '27%' }, { title: 'Value', num: true, width: '16%' }, { title: '95 % interval', unit: 'input measurement error', num: true, width: '17%' }, { title: 'Method or note' }],
    keyRows(sel).map((r) => ({ cells: [r.label, r.value, r.interval, r.note] })),
  ));
  parts.push(`<p class="muted">${esc(m.uncertaintyNote)}</p>`);
  parts.push('<figure class="pv">');
  parts.push(pvDiagramSvg(m));
  parts.push(`<figcaption>Estimated pressure–volume diagram of ${esc(visitLabel(sel))}${cmp ? `, with ${esc(visitLabel(cmp))} overlaid (orange, open squares)` : ''}. End-systolic line from single-beat Ees and V0(ES); diastolic curve by the Klotz single-beat method; Ea line from (EDV, 0) to (ESV, Pes).${esc(modelLoopCaption(m))}</figcaption>`);
  parts.push('</figure>');
  parts.push('</section>');

  // Sheet 2: afterload beside Ea, energetics, the visits and the change.
  parts.push('<section class="sheet" id="mechanics">');
  parts.push(`<h2>Afterload beside Ea, energetics and the diastolic side (${esc(visitLabel(sel))})</h2>`);
  parts.push(table(
    [{ title: '', width: '12%' }, { title: 'Quantity', width: '30%' }, { title: 'Value', num: true, width: '20%' }, { title: 'Method or note' }],
    mechanicsRows(a).map((r) => ({ cells: [r.group, r.label, r.value, r.note] })),
  ));
  if (a.mechanics) parts.push(`<p>${esc(a.mechanics.afterloadNote)}</p>`);
  parts.push('<h2>Visits</h2>');
  parts.push(table(
    VISIT_COLUMNS.map((c, i) => ({ title: c.title, unit: c.unit, num: i >= 2, nowrap: c.nowrap === true })),
    m.visits.map((v) => ({ cells: VISIT_COLUMNS.map((c) => c.cell(v)), selected: v === sel })),
  ));
  if (m.comparison && cmp) {
    parts.push(`<h2>Change from ${esc(visitLabel(cmp))} to ${esc(visitLabel(sel))}</h2>`);
    parts.push(table(
      [{ title: 'Quantity' }, { title: 'From', num: true }, { title: 'To', num: true }, { title: 'Change', num: true }, { title: 'Least significant change', num: true }, { title: 'Judgement' }],
      m.comparison.rows.map((row) => {
        const d = decimalsFor(row.unit);
        return {
          cells: [
            row.label,
            formatNumber(row.from, d),
            formatNumber(row.to, d),
            row.percentChange === null ? '—' : `${row.percentChange > 0 ? '+' : ''}${formatNumber(row.percentChange, 0)} %`,
            `+${formatNumber(row.lsc.percentUp, 0)} % / −${formatNumber(row.lsc.percentDown, 0)} %`,
            judgementWords(row),
          ],
        };
      }),
    ));
    parts.push('<div class="change-lines">');
    for (const line of comparisonSummary(m.comparison)) parts.push(`<p>${esc(line)}</p>`);
    for (const c of m.comparison.cautions) parts.push(`<p class="muted">${esc(c)}</p>`);
    parts.push('</div>');
  }
  parts.push('</section>');

  // Sheet 3: the trends.
  parts.push('<section class="sheet" id="trends">');
  parts.push('<h2>Trends across visits</h2>');
  parts.push(`<p class="muted">${esc(TREND_NOTE)}</p>`);
  const specs = trendSpecs(m);
  for (const spec of specs) {
    parts.push('<figure class="trend">');
    parts.push(renderTrendChart(spec));
    parts.push(`<figcaption>${esc(spec.bandSource ? `Repeat CV: ${spec.bandSource}.` : 'No least-significant-change band: no baseline value.')}</figcaption>`);
    parts.push('</figure>');
  }
  parts.push('</section>');

  // Sheet 4: checks, caveats, referral note, sources.
  parts.push('<section class="sheet" id="caveats">');
  parts.push(`<h2>Checks and caveats (${esc(visitLabel(sel))})</h2>`);
  const c = reportCaveats(sel);
  parts.push('<ul class="caveats">');
  for (const f of c.flags) parts.push(`<li><span class="flag ${esc(f.level)}">[${esc(f.level)}]</span> ${esc(f.message)}</li>`);
  if (c.flags.length === 0) parts.push('<li>No consistency or validity problem found.</li>');
  for (const cv of c.caveats) parts.push(`<li>${esc(cv)}</li>`);
  parts.push('</ul>');
  parts.push('<h2>Referral note (ready to paste)</h2>');
  parts.push(`<div class="note-box"><p>${esc(a.referral)}</p></div>`);
  parts.push('<h2>Methods and sources</h2>');
  parts.push('<ol class="refs">');
  for (const r of REFERENCES) parts.push(`<li>${esc(r)}</li>`);
  parts.push('</ol>');
  parts.push(`<p class="provenance">${esc(provenanceLine(m))} Defer to local protocols and licensed clinical practice.</p>`);
  parts.push('</section>');

  parts.push('</body>');
  parts.push('</html>');
  return parts.join('\n') + '\n';
}
