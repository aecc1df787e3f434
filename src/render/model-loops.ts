/**
 * The simulated pressure–volume loops of a projection (src/model/scenario.ts):
 * the fitted model's baseline beat and the projected beat overlaid, with the
 * end-systolic line(s), as SVG and as a compact text drawing. Pure. Colours
 * and tick rules are those of the estimated diagram (pv-diagram.ts).
 */
import type { PressureVolumePoint } from '../model/beat.js';
import { formatNumber } from './format.js';
import { niceTicks, SERIES_DASH, VISIT_STYLES } from './pv-diagram.js';

export interface ModelLoops {
  baseline: PressureVolumePoint[];
  projected: PressureVolumePoint[];
  /** end-systolic lines: slope (mmHg/mL) and volume intercept (mL) */
  baselineLine: { ees: number; v0: number } | null;
  projectedLine: { ees: number; v0: number } | null;
}

/** Text for SVG and HTML: the markup characters escaped. */
export const esc = (s: string): string => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

function extents(l: ModelLoops): { vMax: number; pMax: number; vTicks: number[]; pTicks: number[] } {
  const all = [...l.baseline, ...l.projected];
  const vTicks = niceTicks(Math.max(50, ...all.map((p) => p.volume)) * 1.1, 5);
  const pTicks = niceTicks(Math.max(50, ...all.map((p) => p.pressure)) * 1.1, 5);
  return { vMax: vTicks[vTicks.length - 1]!, pMax: pTicks[pTicks.length - 1]!, vTicks, pTicks };
}

export function renderModelLoopsSvg(l: ModelLoops, title = 'Model pressure–volume loops: baseline and projection'): string {
  const W = 640;
  const plot = { left: 66, top: 40, width: W - 66 - 22, height: 330 };
  const H = plot.top + plot.height + 110;
  const { vMax, pMax, vTicks, pTicks } = extents(l);
  const x = (v: number) => plot.left + (Math.max(0, Math.min(v, vMax)) / vMax) * plot.width;
  const y = (p: number) => plot.top + plot.height - (Math.max(0, Math.min(p, pMax)) / pMax) * plot.height;
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${W} ${H}" width="${W}" height="${H}" role="img" font-family="Helvetica, Arial, sans-serif">`);
  out.push(`<title>${esc(title)}</title>`);
  out.push(`<rect x="0" y="0" width="${W}" height="${H}" fill="#ffffff"/>`);
  out.push(`<text x="${plot.left}" y="24" font-size="15" font-weight="bold">${esc(title)}</text>`);
  for (const t of vTicks) out.push(`<line x1="${x(t)}" y1="${plot.top}" x2="${x(t)}" y2="${plot.top + plot.height}" stroke="#d9d9d9"/><text x="${x(t)}" y="${plot.top + plot.height + 17}" text-anchor="middle" font-size="12">${t}</text>`);
  for (const t of pTicks) out.push(`<line x1="${plot.left}" y1="${y(t)}" x2="${plot.left + plot.width}" y2="${y(t)}" stroke="#d9d9d9"/><text x="${plot.left - 8}" y="${y(t) + 4}" text-anchor="end" font-size="12">${t}</text>`);
  out.push(`<text x="${plot.left + plot.width / 2}" y="${plot.top + plot.height + 38}" text-anchor="middle" font-size="13">LV volume (mL)</text>`);
  out.push(`<text transform="translate(18 ${plot.top + plot.height / 2}) rotate(-90)" text-anchor="middle" font-size="13">LV pressure (mmHg)</text>`);
  const series: [PressureVolumePoint[], { ees: number; v0: number } | null, string][] = [
    [l.baseline, l.baselineLine, 'model baseline'],
    [l.projected, l.projectedLine, 'projection'],
  ];
  series.forEach(([loop, line, label], i) => {
    const s = VISIT_STYLES[i]!;
    if (line) {
      const vA = Math.max(0, line.v0);
      const vB = Math.min(vMax, line.v0 + pMax / line.ees);
      out.push(`<line data-series="espvr" x1="${formatNumber(x(vA), 2)}" y1="${formatNumber(y(line.ees * (vA - line.v0)), 2)}" x2="${formatNumber(x(vB), 2)}" y2="${formatNumber(y(line.ees * (vB - line.v0)), 2)}" stroke="${s.colour}" stroke-width="1.4" stroke-dasharray="${SERIES_DASH.espvr}"/>`);
    }
    if (loop.length > 1) out.push(`<polygon data-series="loop" points="${loop.map((p) => `${formatNumber(x(p.volume), 2)},${formatNumber(y(p.pressure), 2)}`).join(' ')}" fill="none" stroke="${s.colour}" stroke-width="${s.width}" stroke-linejoin="round"/>`);
    const ly = plot.top + plot.height + 62 + i * 20;
    out.push(`<line x1="${plot.left}" y1="${ly}" x2="${plot.left + 26}" y2="${ly}" stroke="${s.colour}" stroke-width="${s.width}"/><text x="${plot.left + 34}" y="${ly + 4}" font-size="12">${esc(label)}${line ? `, end-systolic line Ees ${formatNumber(line.ees, 2)} mmHg/mL (dashed)` : ''}</text>`);
  });
  out.push(`<text x="${plot.left}" y="${H - 6}" font-size="11" fill="#555555">Simulated by the model fitted to this visit (docs/model.md): a model projection, not a measured loop. Research use only.</text>`);
  out.push('</svg>');
  return out.join('\n') + '\n';
}

/** A compact text drawing: `o` baseline, `*` projection, `#` where both pass. */
export function renderModelLoopsSketch(l: ModelLoops, cols = 60, rows = 16): string[] {
  const { vMax, pMax } = extents(l);
  const grid: string[][] = Array.from({ length: rows }, () => Array.from({ length: cols }, () => ' '));
  const put = (p: PressureVolumePoint, ch: string) => {
    const c = Math.round((Math.max(0, Math.min(p.volume, vMax)) / vMax) * (cols - 1));
    const r = rows - 1 - Math.round((Math.max(0, Math.min(p.pressure, pMax)) / pMax) * (rows - 1));
    const cur = grid[r]![c]!;
    grid[r]![c] = cur === ' ' || cur === ch ? ch : '#';
  };
  for (const p of l.baseline) put(p, 'o');
  for (const p of l.projected) put(p, '*');
  const lines = grid.map((row, i) => `${i === 0 ? String(pMax).padStart(4) : i === rows - 1 ? '   0' : '    '} |${row.join('')}`);
  lines.push(`     +${'-'.repeat(cols)}`);
  lines.push(`      0${' '.repeat(Math.max(1, cols - 12))}${vMax} mL`);
  lines.push('      o model baseline   * projection   # both   (pressure in mmHg)');
  return lines;
}
