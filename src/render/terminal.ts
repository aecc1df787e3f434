/**
 * The terminal report: sections in the order a reader checks them. Pure:
 * an assessment and a Style in, text out.
 */
import type { Assessment } from '../assessment/assess.js';
import { fieldByKey, type NumericKey } from '../assessment/fields.js';
import type { Quantity } from '../assessment/result.js';
import { formatNumber, formatQuantity, formatValue, pad, padLeft } from './format.js';
import { mechanicsSections } from './mechanics-text.js';
import { rightHeartRows } from './right-heart-text.js';
import { plainStyle, type Style } from './style.js';
import {
  EA_RT_LABEL, END_AVG_LABEL, END_EST_LABEL, END_NOTE, PES_METHOD_WORDS, RHYTHM_WORDS, STROKE_VOLUME_SOURCE_WORDS, V0_END_SYSTOLIC, couplingNote,
} from '../assessment/labels.js';
import { COUPLING_CUTOFF } from '../physiology/coupling.js';

const LABEL_WIDTH = 34;

export interface TerminalOptions {
  style?: Style;
  /** Show the recheck view (method variants side by side). */
  recheck?: boolean;
  /** A title line, e.g. the subject id and visit date. */
  title?: string;
  /** Where inputs came from when not typed (e.g. "from DICOM SR LN 79996-5 …", "from --hr; the visit file had 68"), by input key. */
  inputSources?: Readonly<Record<string, string>>;
  /** Extra sections appended before the caveats (uncertainty, wall stress…). */
  extraSections?: { title: string; lines: string[] }[];
}

export function renderTerminal(a: Assessment, options: TerminalOptions = {}): string {
  const s = options.style ?? plainStyle;
  const out: string[] = [];
  const section = (title: string) => {
    out.push('');
    out.push(s.heading(title));
  };
  const line = (label: string, q: Quantity, note?: string) => {
    const method = q.value !== null && q.method ? s.dim(`  ${q.method}`) : '';
    out.push(`  ${pad(label, LABEL_WIDTH)}${q.value === null ? s.dim(formatQuantity(q)) : s.strong(formatQuantity(q))}${method}${note ? '  ' + note : ''}`);
  };
  const r = a.results;
  out.push(s.strong(options.title ?? 'elastimate: ventricular–arterial coupling estimate'));
  out.push(s.dim(`methods ${a.methodsVersion}; research use only, not a diagnosis`));

  section('Inputs as used');
  for (const row of inputRows(a, options.inputSources)) {
    const head = `  ${pad(row.label, LABEL_WIDTH)}${row.value}`;
    // A long source (an imported value's provenance) continues under the value, wrapped to 100 columns.
    if (row.source.length + head.length + 2 <= 100) out.push(`${head}${row.source ? s.dim('  ' + row.source) : ''}`);
    else {
      const [first, ...rest] = wrap(row.source, 100 - head.length - 2);
      out.push(`${head}${s.dim('  ' + first)}`);
      for (const more of rest.length ? wrap(rest.join(' '), 100 - LABEL_WIDTH - 6) : []) out.push(s.dim(`${' '.repeat(LABEL_WIDTH + 6)}${more}`));
    }
  }

  section('Pressures');
  line('End-systolic pressure (Pes)', r.pes);
  line('Mean arterial pressure', r.map);
  line('Pulse pressure', r.pp);

  section('Flow and arterial load');
  line('Stroke volume used', r.svUsed);
  if (r.svDoppler.value !== null) line('  volumetric SV', r.svVolumetric);
  line('Ejection fraction used', r.efUsed);
  if (a.inputs.ef !== null) line('  EF from volumes', r.efVolumes);
  line('Cardiac output', r.co);
  line('Cardiac index', r.ci);
  line('Body surface area', r.bsa);
  line('Total peripheral resistance', r.tpr);
  line('  in dyn·s·cm⁻⁵', r.tprDyn);
  line('Arterial compliance (SV/PP)', r.compliance);
  line('Arterial elastance Ea', r.ea);
  line('  Ea indexed to BSA', r.eaIndexed);
  line(`  ${EA_RT_LABEL}`, r.eaResistance);
  if (r.ea.value !== null && r.eaResistance.value !== null) {
    const pulsatile = r.ea.value - r.eaResistance.value;
    out.push(s.dim(`  ${pad('', LABEL_WIDTH)}Pes/SV − TPR·HR/60 = ${formatNumber(pulsatile, 2)} mmHg/mL: the pulsatile part of the load`));
  }

  section('Ventricular elastance (single-beat, Chen 2001)');
  line('Normalized time tNd', r.tNd);
  line(END_AVG_LABEL, r.normalizedElastanceAvg);
  line(END_EST_LABEL, r.normalizedElastanceEst);
  out.push(...wrapIndented(END_NOTE, s.width, '  ').map((l) => s.dim(l)));
  line('End-systolic elastance Ees', r.ees);
  line('  Ees indexed to BSA', r.eesIndexed);
  line(`  ${V0_END_SYSTOLIC}`, r.v0);
  line('  crude Pes/ESV (V0(ES) = 0)', r.eesNoIntercept);

  section('Coupling');
  const coupling = couplingNote(r.eaEes.value);
  line('Ea/Ees', r.eaEes, coupling ? (r.eaEes.value! > COUPLING_CUTOFF ? s.caution(coupling) : s.dim(coupling)) : undefined);
  line('  cross-check 1/EF − 1', r.eaEesFromEf);

  const rightHeart = rightHeartRows(a);
  if (rightHeart.length) {
    section('Right heart: RV–pulmonary artery coupling');
    for (const row of rightHeart) {
      const head = `  ${pad(row.label, LABEL_WIDTH)}`;
      const value = row.value === '—' ? s.dim(row.value) : s.strong(row.value);
      // The note follows the value when it fits the screen, else it wraps on the lines below.
      // The note follows the value, wrapped to the screen under the value's column.
      // (a run of non-spaces as long as the value and one space holds the value's place while wrapping)
      const holder = 'x'.repeat([...row.value].length + 1);
      const [first = '', ...rest] = row.note ? wrap(`${holder} ${row.note}`, Math.max(20, s.width - head.length)) : [holder];
      out.push(`${head}${value}${s.dim(' ' + first.slice(holder.length))}`.trimEnd(), ...rest.map((l) => s.dim(' '.repeat(head.length) + l)));
    }
  }

  if (options.recheck) {
    section('Recheck: the same subject under each method variant');
    out.push(...renderVariants(a, s));
  }
  for (const extra of [...mechanicsSections(a, s.width), ...(options.extraSections ?? [])]) {
    section(extra.title);
    out.push(...extra.lines.map((l) => '  ' + l));
  }

  section('Checks and caveats');
  for (const f of a.flags) {
    const tag = f.level === 'attention' ? s.attention('[attention]') : f.level === 'caution' ? s.caution('[caution]  ') : s.dim('[note]     ');
    out.push(...wrapIndented(f.message, s.width, '  ' + ' '.repeat(12)).map((l, i) => (i === 0 ? `  ${tag} ${l.trimStart()}` : l)));
  }
  if (a.flags.length === 0) out.push('  No consistency or validity problem found.');
  for (const c of a.caveats.filter((c) => !c.startsWith('Method limits'))) out.push(...bullet(c, s.width, s.dim('•')));

  section('Referral note (paste-ready)');
  out.push(...wrapIndented(a.referral, s.width, '  '));
  out.push('');
  return out.join('\n');
}

export function renderVariants(a: Assessment, s: Style = plainStyle): string[] {
  const header = `${pad('Pes estimate', 18)}${pad('SV source', 12)}${padLeft('Pes', 6)}${padLeft('SV', 6)}${padLeft('Ea', 7)}  ${pad('Ees method', 12)}${padLeft('Ees', 7)}${padLeft('Ea/Ees', 8)}`;
  const lines = [s.dim(header)];
  for (const v of a.variants) {
    const text =
      `${pad(PES_METHOD_WORDS[v.pesMethod], 18)}` +
      `${pad(STROKE_VOLUME_SOURCE_WORDS[v.strokeVolumeSource], 12)}${padLeft(formatNumber(v.pes, 0), 6)}${padLeft(formatNumber(v.svUsed, 0), 6)}${padLeft(formatNumber(v.ea, 2), 7)}  ` +
      `${pad(v.eesMethod, 12)}${padLeft(formatNumber(v.ees, 2), 7)}${padLeft(formatNumber(v.eaEes, 2), 8)}`;
    lines.push(v.isMain ? s.strong(text + '  ← reported') : text);
  }
  const side = 'Pes estimates side by side: ' + a.pesEstimates.map((p) => `${PES_METHOD_WORDS[p.method]} ${p.value === null ? '— (not given)' : formatValue(p.value, 'mmHg')}`).join('; ');
  lines.push(...wrap(side, s.width).map((l) => s.dim(l)));
  return lines;
}

interface InputRow {
  label: string;
  value: string;
  source: string;
}

function inputRows(a: Assessment, sources: Readonly<Record<string, string>> = {}): InputRow[] {
  const i = a.inputs;
  const rows: InputRow[] = [];
  const numeric = (key: NumericKey, typed = 'as entered') => {
    const source = sources[key] ?? typed;
    const v = i[key as keyof typeof i] as number | null;
    if (v === null) return;
    const f = fieldByKey(key);
    rows.push({ label: f.label, value: formatValue(v, f.unit, f.unit === 'cm' ? 1 : 0), source });
  };
  const readings = (list: number[]) => (list.length > 1 ? `mean of ${list.length} readings: ${list.map((x) => formatNumber(x, 0)).join(', ')}` : 'one reading');
  numeric('sbp', readings(i.sbpReadings));
  numeric('dbp', readings(i.dbpReadings));
  for (const k of ['hr', 'edv', 'esv', 'ef', 'sv', 'lvotDiameter', 'lvotVti', 'pep', 'et', 'height', 'weight', 'age', 'pesMeasured', 'edp', 'eOverEPrime', 'lvids', 'pwts', 'tapse', 'trVelocity', 'rap', 'ivc', 'ivcCollapse'] as NumericKey[]) numeric(k);
  rows.push({ label: 'Rhythm', value: RHYTHM_WORDS[i.rhythm], source: sources.rhythm ?? '' });
  const valves = [
    i.aorticStenosis && 'aortic stenosis',
    i.aorticRegurgitation && 'aortic regurgitation',
    i.mitralRegurgitation && 'mitral regurgitation',
    i.outflowObstruction && 'outflow obstruction',
  ].filter(Boolean);
  rows.push({ label: 'Valve and outflow findings', value: valves.length ? valves.join(', ') : 'none flagged', source: '' });
  if (i.sex) rows.push({ label: 'Sex', value: i.sex, source: 'for reference ranges' });
  return rows;
}

/**
 * The one word-wrapper for prose on a terminal: a paragraph broken into
 * lines of at most `width` characters (a single word longer than that keeps
 * its own line), counting characters, not bytes; a percent sign stays with its number.
 */
export function wrap(text: string, width: number): string[] {
  // A unit written after a space ("75 %", "12 mmHg") stays on its number's line for the percent sign.
  const words: string[] = [];
  for (const w of text.split(/\s+/)) {
    if (w === '') continue;
    if (/^%/.test(w) && words.length > 0) words[words.length - 1] += ' ' + w;
    else words.push(w);
  }
  const lines: string[] = [];
  let current = '';
  const len = (t: string) => [...t].length;
  for (const w of words) {
    if (current && len(current) + 1 + len(w) > width) {
      lines.push(current);
      current = w;
    } else current = current ? current + ' ' + w : w;
  }
  if (current) lines.push(current);
  return lines;
}

/** A paragraph wrapped to the screen width with every line indented. */
export function wrapIndented(text: string, width: number, indent: string): string[] {
  return wrap(text, Math.max(20, width - [...indent].length)).map((l) => indent + l);
}

/** A bullet item wrapped to the screen width: "  • text", continuation lines aligned under the text. */
export function bullet(text: string, width: number, mark = '•', indent = '  '): string[] {
  const hang = indent + '  ';
  return wrap(text, Math.max(20, width - [...hang].length)).map((l, i) => (i === 0 ? `${indent}${mark} ${l}` : hang + l));
}
