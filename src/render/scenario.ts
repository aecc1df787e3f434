/**
 * Views of a projection (src/model/scenario.ts): JSON and the side-by-side
 * terminal table. Pure: the result in, text or a JSON-ready object out.
 */
import { STANDING_CAVEATS } from '../assessment/caveats.js';
import { DECIMALS_OF_SCENARIO, describeChanges } from '../model/scenario-text.js';
import { SCENARIO_CAUTIONS, SCENARIO_LABELS, type ScenarioResult } from '../model/scenario.js';
import { SCENARIO_KEYS, SCENARIO_UNITS, type ScenarioKey, type ScenarioValues } from '../model/project.js';
import { FAILURE_KINDS, type ScenarioIntervals } from '../model/scenario-intervals.js';
import { formatNumber, pad, padLeft } from './format.js';
import { esc } from './model-loops.js';
import { plainStyle, type Style } from './style.js';
import { wrap } from './terminal.js';

const FAILURE_WORDS: Record<(typeof FAILURE_KINDS)[number], string> = {
  inputsOutOfRange: 'inputs drawn outside their physical range',
  eesNotComputable: 'Ees not computable',
  fitFailed: 'fit failed',
  projectionFailed: 'projection failed',
};

function block(values: ScenarioValues | null, intervals?: ScenarioIntervals): Record<string, unknown> | null {
  if (values === null) return null;
  return Object.fromEntries(
    SCENARIO_KEYS.map((k) => {
      const entry: Record<string, unknown> = { value: values[k], unit: SCENARIO_UNITS[k] };
      const ci = intervals?.interval95[k];
      if (intervals) entry.interval95 = ci ?? null;
      return [k, entry];
    }),
  );
}

export function scenarioToJson(r: ScenarioResult, toolVersion: string, intervals?: ScenarioIntervals): Record<string, unknown> {
  const fit: Record<string, unknown> = { ok: r.fit.ok, residuals: r.fit.residuals ?? null, tolerance: r.fit.tolerance, shape: r.fit.shape, shapeLabel: r.fit.shapeLabel };
  if (r.fit.reason) fit.reason = r.fit.reason;
  if (r.fit.parameters) fit.parameters = r.fit.parameters;
  if (r.fit.timing) fit.modelTiming = r.fit.timing;
  const out: Record<string, unknown> = {
    tool: `elastimate ${toolVersion}`,
    measured: block(r.measured),
    baseline: block(r.baseline),
    projected: block(r.projected, intervals),
    fit,
    changes: r.changes,
  };
  if (r.projectionReason) out.projectionReason = r.projectionReason;
  if (intervals) {
    out.intervals = {
      draws: intervals.draws, seed: intervals.seed, succeeded: intervals.succeeded, failed: intervals.failures,
      method: `the first ${intervals.draws} draws of assess --uncertainty with seed ${intervals.seed}: the visit's error model, one stream per input (docs/uncertainty.md); each draw refitted and projected`,
    };
  }
  out.notes = r.notes;
  out.cautions = [...SCENARIO_CAUTIONS, ...STANDING_CAVEATS];
  return out;
}

function cell(v: number | null | undefined, key: ScenarioKey): string {
  return formatNumber(v, DECIMALS_OF_SCENARIO[key]);
}

export function renderScenario(r: ScenarioResult, options: { style?: Style; intervals?: ScenarioIntervals; width?: number } = {}): string {
  const s = options.style ?? plainStyle;
  const width = Math.max(60, Math.min(options.width ?? 100, 120));
  const out: string[] = [];
  out.push(s.strong('elastimate scenario: a model of this subject\'s ventricle and arteries'));
  out.push(s.dim('research use only, not a diagnosis'));
  out.push('');
  out.push(s.heading('Changes'));
  out.push(...wrap(describeChanges(r.changes), width - 2).map((l) => '  ' + l));
  out.push('');
  out.push(s.heading('Fit'));
  if (!r.fit.ok) {
    out.push(...wrap(`No model: ${r.fit.reason ?? 'the fit failed'}. Nothing is projected.`, width - 2).map((l) => '  ' + l));
  } else {
    const res = r.fit.residuals!;
    out.push(...wrap(`Fitted to EDV, SV, SBP and DBP within ${100 * r.fit.tolerance} % each: residuals EDV ${pct(res.edv)}, SV ${pct(res.sv)}, SBP ${pct(res.sbp)}, DBP ${pct(res.dbp)}. Elastance shape: ${r.fit.shapeLabel}.`, width - 2).map((l) => '  ' + l));
    const p = r.fit.parameters!;
    out.push(...wrap(`Fitted: filling pressure ${formatNumber(p.sourcePressure, 1)} mmHg, peripheral resistance ${formatNumber(p.resistance, 3)} mmHg·s/mL, compliance ${formatNumber(p.compliance, 2)} mL/mmHg, characteristic impedance ${formatNumber(p.characteristicImpedance, 3)} mmHg·s/mL. Fixed: Ees ${formatNumber(p.ees, 2)} mmHg/mL, V0 ${formatNumber(p.v0, 0)} mL, time to peak elastance ${formatNumber(p.timeToPeak, 0)} ms.`, width - 2).map((l) => '  ' + l));
    if (r.fit.timing) out.push(...wrap(`The model's own valve events (not fitted): PEP ${formatNumber(r.fit.timing.pep, 0)} ms, ET ${formatNumber(r.fit.timing.et, 0)} ms.`, width - 2).map((l) => '  ' + l));
  }
  for (const n of r.notes) out.push(...wrap(n, width - 4).map((l, i) => (i === 0 ? '  • ' : '    ') + l));
  out.push('');
  const iv = options.intervals;
  const head = `${pad('', 32)}${padLeft('measured', 10)}${padLeft('model', 10)}${padLeft('projected', 11)}${iv ? padLeft('95 % interval', 20) : ''}  unit`;
  out.push(s.heading('Side by side'));
  out.push('  ' + s.dim(head));
  for (const k of SCENARIO_KEYS) {
    const ci = iv?.interval95[k];
    const range = iv ? padLeft(ci ? `${cell(ci[0], k)} – ${cell(ci[1], k)}` : '—', 20) : '';
    out.push(`  ${pad(SCENARIO_LABELS[k], 32)}${padLeft(cell(r.measured[k], k), 10)}${padLeft(cell(r.baseline?.[k], k), 10)}${padLeft(cell(r.projected?.[k], k), 11)}${range}  ${SCENARIO_UNITS[k]}`);
  }
  if (r.projectionReason) out.push(...wrap(`No projection: ${r.projectionReason}.`, width - 2).map((l) => '  ' + l));
  if (iv) {
    const failed = FAILURE_KINDS.filter((k) => iv.failures[k] > 0).map((k) => `${iv.failures[k]} ${FAILURE_WORDS[k]}`);
    out.push(...wrap(`Intervals: ${iv.draws} Monte Carlo draws over the input measurement error, the first ${iv.draws} draws of assess --uncertainty with seed ${iv.seed} (docs/uncertainty.md), each fit warm-started from this one; ${iv.succeeded} used${failed.length ? `, ${failed.join(', ')}` : ', none failed'}.`, width - 2).map((l) => '  ' + l));
  }
  out.push('');
  out.push(s.heading('Cautions'));
  for (const c of [...SCENARIO_CAUTIONS, ...STANDING_CAVEATS]) out.push(...wrap(c, width - 4).map((l, i) => (i === 0 ? '  • ' : '    ') + l));
  out.push('');
  return out.join('\n');
}

function pct(r: number): string {
  return `${r >= 0 ? '+' : '−'}${formatNumber(Math.abs(100 * r), 2)} %`;
}

/** The projection as one self-contained HTML page: the table, the simulated loops (inline SVG) and the cautions. */
export function scenarioHtml(r: ScenarioResult, options: { intervals?: ScenarioIntervals; loopsSvg?: string | null; generated: string; toolVersion: string }): string {
  const iv = options.intervals;
  const rows = SCENARIO_KEYS.map((k) => {
    const ci = iv?.interval95[k];
    const range = iv ? `<td>${ci ? `${esc(cell(ci[0], k))} – ${esc(cell(ci[1], k))}` : '—'}</td>` : '';
    return `<tr><th scope="row">${esc(SCENARIO_LABELS[k])}</th><td>${esc(cell(r.measured[k], k))}</td><td>${esc(cell(r.baseline?.[k], k))}</td><td>${esc(cell(r.projected?.[k], k))}</td>${range}<td>${esc(SCENARIO_UNITS[k])}</td></tr>`;
  });
  // The terminal text's Fit and Changes paragraphs, reused so both views say the same.
  const text = renderScenario(r, iv ? { intervals: iv, width: 120 } : { width: 120 });
  const section = (title: string) => {
    const m = new RegExp(`\\n${title}\\n([\\s\\S]*?)\\n\\n`).exec(text);
    return m ? m[1]!.split('\n').map((l) => l.trim()).join(' ') : '';
  };
  return [
    '<!doctype html>',
    '<html lang="en"><head><meta charset="utf-8"><title>elastimate scenario</title>',
    '<style>body{font-family:Helvetica,Arial,sans-serif;max-width:52rem;margin:2rem auto;color:#1a1a1a;line-height:1.4}table{border-collapse:collapse}td,th{padding:.2rem .6rem;border-bottom:1px solid #ddd;text-align:right}th[scope=row]{text-align:left;font-weight:normal}.caution{color:#555}</style>',
    '</head><body>',
    `<h1>A model of this subject's ventricle and arteries</h1>`,
    `<p class="caution">Research use only, not a diagnosis. Generated ${esc(options.generated)} by elastimate ${esc(options.toolVersion)}.</p>`,
    `<h2>Changes</h2><p>${esc(section('Changes'))}</p>`,
    `<h2>Fit</h2><p>${esc(section('Fit'))}</p>`,
    ...(r.notes.length ? [`<ul>${r.notes.map((n) => `<li>${esc(n)}</li>`).join('')}</ul>`] : []),
    '<h2>Side by side</h2>',
    `<table><thead><tr><th></th><th>measured</th><th>model</th><th>projected</th>${iv ? '<th>95 % interval</th>' : ''}<th>unit</th></tr></thead><tbody>${rows.join('')}</tbody></table>`,
    ...(r.projectionReason ? [`<p>No projection: ${esc(r.projectionReason)}.</p>`] : []),
    ...(iv ? [`<p>${esc(section('Side by side').replace(/^[\s\S]*?(Intervals:)/, '$1'))}</p>`] : []),
    ...(options.loopsSvg ? ['<h2>Simulated loops</h2>', options.loopsSvg] : []),
    '<h2>Cautions</h2>',
    `<ul class="caution">${[...SCENARIO_CAUTIONS, ...STANDING_CAVEATS].map((c) => `<li>${esc(c)}</li>`).join('')}</ul>`,
    '</body></html>',
    '',
  ].join('\n');
}
