/**
 * A compact text drawing of the estimated pressure–volume diagram for a quick
 * look at the terminal: the same pieces as the SVG (src/render/pv-diagram.ts),
 * rasterised onto a character grid. Plain characters only, so it survives
 * NO_COLOR, pipes and copy-paste; each kind of line has its own glyph.
 */
import { DEFAULT_WIDTH } from './style.js';
import { wrap } from './terminal.js';
import { loopOutline } from '../assessment/mechanics.js';
import { formatNumber, padLeft } from './format.js';
import { arterialLine, diagramNotes, diastolicCurvePoints, endSystolicLine, pvDomain, type ModelLoopOverlay, type PvVisit } from './pv-diagram.js';

export interface SketchOptions {
  /** Plot columns (default 56) and rows (default 16), axes excluded. */
  columns?: number;
  rows?: number;
  /** Width the legend's notes wrap to (default 80, the width off a terminal). */
  width?: number;
  /** A simulated loop of the model fitted to the visit, drawn over the estimated one on request. */
  modelLoop?: ModelLoopOverlay;
}

/** Glyphs, in drawing order (later ones win a shared cell). */
export const SKETCH_GLYPHS = {
  edpvr: '.',
  espvr: '/',
  ea: '\\',
  loop: ['#', 'o'],
  endSystole: ['S', 's'],
  endDiastole: ['D', 'd'],
  modelLoop: '*',
} as const;

type Point = [number, number];

export function renderPvSketch(visits: readonly PvVisit[], options: SketchOptions = {}): string[] {
  const shown = visits.slice(0, 2);
  const cols = Math.max(20, Math.min(120, options.columns ?? 56));
  const rows = Math.max(8, Math.min(48, options.rows ?? 16));
  const model = options.modelLoop;
  const domain = pvDomain(shown, model);
  const grid: string[][] = Array.from({ length: rows }, () => Array.from({ length: cols }, () => ' '));

  const cell = ([v, p]: Point): [number, number] | null => {
    if (!(Number.isFinite(v) && Number.isFinite(p))) return null;
    const c = Math.round((v / domain.volumeMax) * (cols - 1));
    const r = rows - 1 - Math.round((p / domain.pressureMax) * (rows - 1));
    return c >= 0 && c < cols && r >= 0 && r < rows ? [r, c] : null;
  };
  const plotPoint = (p: Point, glyph: string) => {
    const at = cell(p);
    if (at) grid[at[0]]![at[1]] = glyph;
  };
  const plotPath = (points: Point[], glyph: string) => {
    for (let i = 1; i < points.length; i++) {
      const [a, b] = [points[i - 1]!, points[i]!];
      const steps = Math.max(2, cols * 2, rows * 2);
      for (let k = 0; k <= steps; k++) {
        const t = k / steps;
        plotPoint([a[0] + (b[0] - a[0]) * t, a[1] + (b[1] - a[1]) * t], glyph);
      }
    }
  };

  for (let i = shown.length - 1; i >= 0; i--) {
    const loop = shown[i]!.loop;
    plotPath(diastolicCurvePoints(loop, domain), SKETCH_GLYPHS.edpvr);
    const es = endSystolicLine(loop, domain);
    if (es) plotPath(es, SKETCH_GLYPHS.espvr);
    const ea = arterialLine(loop);
    if (ea) plotPath(ea, SKETCH_GLYPHS.ea);
    for (const seg of loopOutline(loop)) plotPath(seg.points, SKETCH_GLYPHS.loop[i]!);
  }
  if (model && model.points.length > 1) plotPath([...model.points, model.points[0]!].map((q): Point => [q.volume, q.pressure]), SKETCH_GLYPHS.modelLoop);
  // Markers last, so no line hides them.
  for (let i = shown.length - 1; i >= 0; i--) {
    const loop = shown[i]!.loop;
    if (loop.pes !== null) plotPoint([loop.esv, loop.pes], SKETCH_GLYPHS.endSystole[i]!);
    if (loop.edp !== null && loop.diastolicCurve) plotPoint([loop.edv, loop.edp], SKETCH_GLYPHS.endDiastole[i]!);
  }

  const labelWidth = Math.max(...domain.pressureTicks.map((t) => String(t).length)) + 1;
  const tickRow = new Map<number, number>();
  for (const t of domain.pressureTicks) tickRow.set(rows - 1 - Math.round((t / domain.pressureMax) * (rows - 1)), t);
  const lines: string[] = [`${padLeft('mmHg', labelWidth + 1)}`];
  grid.forEach((row, r) => {
    const t = tickRow.get(r);
    lines.push(`${padLeft(t !== undefined ? String(t) : '', labelWidth)} ${t !== undefined ? '┤' : '│'}${row.join('').replace(/\s+$/, '')}`);
  });
  const axis = Array.from({ length: cols }, () => '─');
  const labels = Array.from({ length: cols + 8 }, () => ' ');
  for (const t of domain.volumeTicks) {
    const c = Math.round((t / domain.volumeMax) * (cols - 1));
    axis[c] = '┬';
    const text = String(t);
    const start = Math.max(0, Math.min(cols + 8 - text.length, c - Math.floor(text.length / 2)));
    for (let k = 0; k < text.length; k++) labels[start + k] = text[k]!;
  }
  lines.push(`${' '.repeat(labelWidth)} └${axis.join('')}`);
  lines.push(`${' '.repeat(labelWidth + 2)}${labels.join('').replace(/\s+$/, '')}  mL`);
  lines.push(...sketchLegend(shown, model, options.width ?? DEFAULT_WIDTH));
  return lines;
}

function sketchLegend(visits: readonly PvVisit[], model: ModelLoopOverlay | undefined, width: number): string[] {
  const lines: string[] = [];
  visits.forEach((v, i) => {
    const l = v.loop;
    const parts = [`${SKETCH_GLYPHS.loop[i]} loop ${v.label}`];
    if (l.ees !== null) parts.push(`Ees ${formatNumber(l.ees, 2)}`);
    if (l.eaLineSlope !== null) parts.push(`Ea line ${formatNumber(l.eaLineSlope, 2)} mmHg/mL`);
    parts.push(`${SKETCH_GLYPHS.endSystole[i]} end-systole`);
    if (l.edp !== null && l.diastolicCurve) parts.push(`${SKETCH_GLYPHS.endDiastole[i]} end-diastole (EDP ${formatNumber(l.edp, 0)} mmHg${l.edpSource === 'estimated' ? ', estimated from E/e′' : ''})`);
    lines.push(parts.join('  '));
  });
  lines.push(`${SKETCH_GLYPHS.espvr} end-systolic line   ${SKETCH_GLYPHS.ea} Ea line (EDV,0)→(ESV,Pes)   ${SKETCH_GLYPHS.edpvr} diastolic curve`);
  // The same notes as the SVG: what is estimated, what is missing and why.
  lines.push(...diagramNotes(visits).flatMap((n) => wrap(n.charAt(0).toUpperCase() + n.slice(1), width)));
  if (model) {
    if (model.points.length > 1) lines.push(`${SKETCH_GLYPHS.modelLoop} ${model.label}`);
    lines.push(...model.notes.flatMap((n) => wrap(n, width)));
  }
  return lines;
}
