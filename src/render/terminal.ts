/**
 * The terminal report: sections in the order a reader checks them. Pure:
 * an assessment and a Style in, text out.
 */
import type { Assessment } from '../assessment/assess.js';
import { fieldByKey, type NumericKey } from '../assessment/fields.js';
import type { Quantity } from '../assessment/result.js';
import { formatNumber, formatQuantity, formatValue, pad, padLeft } from './format.js';
import { mechanicsSections } from './mechanics-text.js';
import { plainStyle, type Style } from './style.js';

const LABEL_WIDTH = 34;

export interface TerminalOptions {
  style?: Style;
  /** Show the recheck view (method variants side by side). */
  recheck?: boolean;
  /** A title line, e.g. the subject id and visit date. */
  title?: string;
  /** Where inputs came from when not typed (e.g. "from DICOM SR LN 79996-5 …"), by input key. */
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
  line('  resistance view TPR × HR/60', r.eaResistance);
  if (r.ea.value !== null && r.eaResistance.value !== null) {
    const pulsatile = r.ea.value - r.eaResistance.value;
    out.push(s.dim(`  ${pad('', LABEL_WIDTH)}Pes/SV − TPR·HR/60 = ${formatNumber(pulsatile, 2)} mmHg/mL: the pulsatile part of the load`));
  }

  section('Ventricular elastance (single-beat, Chen 2001)');
  line('Normalized time tNd', r.tNd);
  line('ENd(avg)', r.normalizedElastanceAvg);
  line('ENd(est)', r.normalizedElastanceEst);
  line('End-systolic elastance Ees', r.ees);
  line('  Ees indexed to BSA', r.eesIndexed);
  line('  implied V0', r.v0);
  line('  crude Pes/ESV (V0 = 0)', r.eesNoIntercept);

  section('Coupling');
  line('Ea/Ees', r.eaEes, r.eaEes.value !== null ? (r.eaEes.value > 1.2 ? s.caution('above the 1.2 cut-off') : s.dim('at or below the 1.2 cut-off')) : undefined);
  line('  cross-check 1/EF − 1', r.eaEesFromEf);

  if (options.recheck) {
    section('Recheck: the same subject under each method variant');
    out.push(...renderVariants(a, s));
  }
  for (const extra of [...mechanicsSections(a), ...(options.extraSections ?? [])]) {
    section(extra.title);
    out.push(...extra.lines.map((l) => '  ' + l));
  }

  section('Checks and caveats');
  for (const f of a.flags) {
    const tag = f.level === 'attention' ? s.attention('[attention]') : f.level === 'caution' ? s.caution('[caution]  ') : s.dim('[note]     ');
    out.push(`  ${tag} ${f.message}`);
  }
  if (a.flags.length === 0) out.push('  No consistency or validity problem found.');
  for (const c of a.caveats.filter((c) => !c.startsWith('Method limits'))) out.push(`  ${s.dim('•')} ${c}`);

  section('Referral note (paste-ready)');
  out.push(...wrap(a.referral, 96).map((l) => '  ' + l));
  out.push('');
  return out.join('\n');
}

export function renderVariants(a: Assessment, s: Style = plainStyle): string[] {
  const header = `${pad('Pes estimate', 24)}${pad('SV source', 12)}${padLeft('Pes', 6)}${padLeft('SV', 6)}${padLeft('Ea', 7)}  ${pad('Ees method', 12)}${padLeft('Ees', 7)}${padLeft('Ea/Ees', 8)}`;
  const lines = [s.dim(header)];
  for (const v of a.variants) {
    const text =
      `${pad(v.pesMethod === 'sbp90' ? '0.9×SBP' : v.pesMethod === 'weighted' ? '(2·SBP+DBP)/3' : 'measured', 24)}` +
      `${pad(v.strokeVolumeSource, 12)}${padLeft(formatNumber(v.pes, 0), 6)}${padLeft(formatNumber(v.svUsed, 0), 6)}${padLeft(formatNumber(v.ea, 2), 7)}  ` +
      `${pad(v.eesMethod, 12)}${padLeft(formatNumber(v.ees, 2), 7)}${padLeft(formatNumber(v.eaEes, 2), 8)}`;
    lines.push(v.isMain ? s.strong(text + '  ← reported') : text);
  }
  lines.push(s.dim('Pes estimates side by side: ' + a.pesEstimates.map((p) => `${p.method} ${p.value === null ? '— (not given)' : formatValue(p.value, 'mmHg')}`).join('; ')));
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
  for (const k of ['hr', 'edv', 'esv', 'ef', 'sv', 'lvotDiameter', 'lvotVti', 'pep', 'et', 'height', 'weight', 'age', 'pesMeasured', 'edp', 'eOverEPrime', 'lvids', 'pwts'] as NumericKey[]) numeric(k);
  rows.push({ label: 'Rhythm', value: i.rhythm, source: '' });
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

/** Word-wrap a paragraph to a width. */
export function wrap(text: string, width: number): string[] {
  const words = text.split(/\s+/);
  const lines: string[] = [];
  let current = '';
  for (const w of words) {
    if (current && current.length + 1 + w.length > width) {
      lines.push(current);
      current = w;
    } else current = current ? current + ' ' + w : w;
  }
  if (current) lines.push(current);
  return lines;
}

