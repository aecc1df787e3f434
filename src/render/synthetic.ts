/**
 * Views of a virtual cohort (src/model/synthetic.ts): per-subject CSV rows,
 * JSON, a summary in words and a Bland–Altman SVG. Pure.
 */
import { DOUBLE_HILL_SETS, type ElastanceShape } from '../model/double-hill.js';
import type { AgreementSummary, NEAR_WINDOWS, NearTarget, SyntheticRow } from '../model/synthetic.js';
import { csvNumber, csvText } from './csv.js';
import { formatNumber } from './format.js';
import { wrap } from './terminal.js';

export interface CohortSummary {
  seed: number;
  n: number;
  shapes: ElastanceShape[];
  /** per shape: estimated Ees against the model's Emax, and against the virtual occlusion */
  byShape: Partial<Record<ElastanceShape, { againstEmax: AgreementSummary; againstOcclusion: AgreementSummary }>>;
  /** with --near: what was observed, the windows, and how many hearts were drawn */
  near?: { target: NearTarget; windows: typeof NEAR_WINDOWS; drawn: number };
}

export const COHORT_NOTE =
  'This measures agreement within the model, not in people. The single-beat method\'s normalized elastance curve was fitted to human ventricles; a double Hill ventricle has its own curve (at tNd 0.24 the method\'s ENd(avg) is 0.34, set A gives about 0.18 and set B about 0.32), so the bias found depends on the shape. Both shapes are reported; nothing is tuned to make the estimator look good.';

const HEADER = ['id', 'shape', 'true_ees', 'occlusion_ees', 'estimated_ees', 'tnd', 'ea', 'ea_ees', 'edv', 'esv', 'ef', 'sbp', 'dbp', 'hr', 'pep', 'et', 'v0', 'resistance', 'compliance', 'reason'];

export function syntheticCsv(rows: readonly SyntheticRow[]): string {
  return csvText([
    HEADER,
    ...rows.map((r) => {
      const o = r.observed;
      return [
        String(r.id), r.shape, csvNumber(r.trueEes, 'mmHg/mL'), csvNumber(r.occlusionEes, 'mmHg/mL'), csvNumber(r.estimatedEes, 'mmHg/mL'),
        csvNumber(r.tNd, ''), csvNumber(r.ea, 'mmHg/mL'), csvNumber(r.eaEes, ''), csvNumber(o?.edv, 'mL'), csvNumber(o?.esv, 'mL'), csvNumber(o?.ef, '%'),
        csvNumber(o?.sbp, 'mmHg'), csvNumber(o?.dbp, 'mmHg'), csvNumber(o?.hr, 'bpm'), csvNumber(o?.pep, 'ms'), csvNumber(o?.et, 'ms'),
        csvNumber(r.heart.v0, 'mL'), csvNumber(r.heart.resistance, 'mL/mmHg'), csvNumber(r.heart.compliance, 'mL/mmHg'), r.reason ?? '',
      ];
    }),
  ]);
}

export function syntheticJson(rows: readonly SyntheticRow[], summary: CohortSummary, toolVersion: string): Record<string, unknown> {
  const main = summary.byShape[summary.shapes.includes('hill-b') ? 'hill-b' : summary.shapes[0]!]!;
  return {
    tool: `elastimate ${toolVersion}`,
    subjects: rows.map((r) => ({
      id: r.id, shape: r.shape, trueEes: r.trueEes, occlusionEes: r.occlusionEes, estimatedEes: r.estimatedEes, tNd: r.tNd, ea: r.ea, eaEes: r.eaEes,
      observed: r.observed, heart: r.heart, ...(r.reason ? { reason: r.reason } : {}),
    })),
    summary: { shape: summary.shapes.includes('hill-b') ? 'hill-b' : summary.shapes[0], ...main.againstEmax, seed: summary.seed, byShape: summary.byShape, ...(summary.near ? { near: summary.near } : {}) },
    note: COHORT_NOTE,
  };
}

function agreementWords(a: AgreementSummary): string {
  if (a.bias === null || a.loa === null) return `estimated Ees was computable in ${a.computable} of ${a.n}: too few to compare.`;
  const f = a.failures;
  return `computable in ${a.computable} of ${a.n}; bias ${formatNumber(a.bias, 2)} mmHg/mL, limits of agreement ${formatNumber(a.loa[0], 2)} to ${formatNumber(a.loa[1], 2)} mmHg/mL, r ${formatNumber(a.r, 2)}. Not computable: tNd outside the method's window ${f.tNdOutsideWindow}, Ees not positive ${f.eesNotPositive}, observations outside the tool's input ranges (an implausible adult) ${f.outsideInputRanges}, no steady state ${f.notSimulated}, other ${f.other}.`;
}

export function syntheticSummaryText(s: CohortSummary, width = 100): string {
  const out: string[] = [`Virtual cohort: ${s.n} adults, seed ${s.seed} (docs/model.md).`];
  if (s.near) {
    const t = s.near.target;
    const w = s.near.windows;
    out.push(...wrap(`Near one subject: of ${s.near.drawn} hearts drawn (heart rate and EDV within the windows, everything else as widely as ever), only those whose simulated observations fall within EF ${formatNumber(t.ef, 0)} ± ${w.ef} points, SBP ${formatNumber(t.sbp, 0)} ± ${w.sbp} and DBP ${formatNumber(t.dbp, 0)} ± ${w.dbp} mmHg, heart rate ${formatNumber(t.hr, 0)} ± ${w.hr} bpm, EDV ${formatNumber(t.edv, 0)} mL ± ${100 * w.edvFraction} % and tNd ${formatNumber(t.tNd, 3)} ± ${w.tNd} are kept; chosen by what was observed, never by the fitted Ees.`, width));
  }
  for (const shape of s.shapes) {
    const b = s.byShape[shape]!;
    out.push('');
    out.push(`${DOUBLE_HILL_SETS[shape].label}:`);
    out.push(...wrap(`Single-beat Ees against the model's Emax: ${agreementWords(b.againstEmax)}`, width - 2).map((l) => '  ' + l));
    out.push(...wrap(`Against the virtual preload reduction: ${agreementWords(b.againstOcclusion)}`, width - 2).map((l) => '  ' + l));
  }
  out.push('');
  out.push(...wrap(COHORT_NOTE, width));
  out.push(...wrap('Research use only; not a diagnosis. Defer to clinical judgement and local protocols.', width));
  return out.join('\n') + '\n';
}

/** Bland–Altman plot (Bland & Altman, Lancet 1986): difference against mean, one colour per shape, bias and limits as lines. */
export function blandAltmanSvg(rows: readonly SyntheticRow[], s: CohortSummary): string {
  const W = 640;
  const H = 420;
  const m = { l: 60, r: 20, t: 40, b: 50 };
  const colours: Record<ElastanceShape, string> = { 'hill-a': '#b5482a', 'hill-b': '#2a6fb5' };
  const pts = rows.filter((r) => r.estimatedEes !== null).map((r) => ({ shape: r.shape, mean: (r.estimatedEes! + r.trueEes) / 2, diff: r.estimatedEes! - r.trueEes }));
  const xs = pts.map((p) => p.mean);
  const ys = pts.map((p) => p.diff);
  const x0 = Math.min(0, ...xs);
  const x1 = Math.max(1, ...xs);
  const yAbs = Math.max(1, ...ys.map(Math.abs));
  const sx = (x: number) => m.l + ((x - x0) / (x1 - x0)) * (W - m.l - m.r);
  const sy = (y: number) => m.t + ((yAbs - y) / (2 * yAbs)) * (H - m.t - m.b);
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" font-family="sans-serif" font-size="12">`);
  parts.push(`<text x="${m.l}" y="20" font-size="14">Single-beat Ees against the model's Emax (Bland–Altman), virtual cohort, seed ${s.seed}</text>`);
  parts.push(`<line x1="${m.l}" y1="${sy(0)}" x2="${W - m.r}" y2="${sy(0)}" stroke="#999"/>`);
  parts.push(`<line x1="${m.l}" y1="${m.t}" x2="${m.l}" y2="${H - m.b}" stroke="#333"/>`);
  parts.push(`<text x="${W / 2}" y="${H - 12}" text-anchor="middle">mean of estimated and true Ees (mmHg/mL)</text>`);
  parts.push(`<text x="16" y="${H / 2}" transform="rotate(-90 16 ${H / 2})" text-anchor="middle">estimated − true (mmHg/mL)</text>`);
  for (const t of [-yAbs, 0, yAbs]) parts.push(`<text x="${m.l - 6}" y="${sy(t) + 4}" text-anchor="end">${formatNumber(t, 1)}</text>`);
  for (const t of [x0, (x0 + x1) / 2, x1]) parts.push(`<text x="${sx(t)}" y="${H - m.b + 16}" text-anchor="middle">${formatNumber(t, 1)}</text>`);
  for (const p of pts) parts.push(`<circle cx="${sx(p.mean).toFixed(1)}" cy="${sy(p.diff).toFixed(1)}" r="2.5" fill="${colours[p.shape]}" fill-opacity="0.6"/>`);
  s.shapes.forEach((shape, i) => {
    const a = s.byShape[shape]!.againstEmax;
    if (a.bias === null || a.loa === null) return;
    for (const [y, dash] of [[a.bias, ''], [a.loa[0], '4 3'], [a.loa[1], '4 3']] as const) {
      parts.push(`<line x1="${m.l}" y1="${sy(y).toFixed(1)}" x2="${W - m.r}" y2="${sy(y).toFixed(1)}" stroke="${colours[shape]}"${dash ? ` stroke-dasharray="${dash}"` : ''}/>`);
    }
    parts.push(`<text x="${W - m.r - 4}" y="${m.t + 14 + 14 * i}" text-anchor="end" fill="${colours[shape]}">${shape === 'hill-a' ? 'set A' : 'set B'}: bias ${formatNumber(a.bias, 2)}, limits ${formatNumber(a.loa[0], 2)} to ${formatNumber(a.loa[1], 2)}</text>`);
  });
  parts.push('</svg>');
  return parts.join('\n') + '\n';
}
