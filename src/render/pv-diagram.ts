/**
 * The estimated pressure–volume diagram as an SVG string: pure, no DOM, no
 * file system. One visit, or two with the second overlaid in a distinct
 * style. Drawn from the loop geometry of src/assessment/mechanics.ts:
 * end-systolic line (slope Ees, intercept V0), single-beat diastolic curve,
 * the Ea line from (EDV, 0) to (ESV, Pes), and the loop built from them.
 *
 * Readable for colour-blind readers and in greyscale print: the two visits
 * differ in colour (Okabe & Ito's colour-universal-design palette: blue
 * #0072B2 and orange #E69F00, which also differ in lightness), in marker shape
 * (filled circles vs open squares) and in line weight; the four kinds of line
 * differ in dash pattern, and each is named in the legend and next to it.
 */
import { escapeMarkup } from '../text/sanitize.js';
import { volumeOnEndDiastolicCurve, pressureOnEndDiastolicCurve } from '../physiology/end-diastolic-pressure-volume.js';
import { loopOutline, type LoopGeometry } from '../assessment/mechanics.js';
import { formatNumber } from './format.js';
import { wrap } from './terminal.js';

export interface PvVisit {
  /** Short label, e.g. "Visit 3 · 2024-06-02". */
  label: string;
  loop: LoopGeometry;
}

export interface PvDiagramOptions {
  /** Overall title drawn above the plot. */
  title?: string;
  width?: number;
  /** A simulated loop of the model fitted to the visit (src/model), drawn over the estimated one on request. */
  modelLoop?: ModelLoopOverlay;
}

/**
 * A model loop to overlay: the points of the simulated steady beat, its
 * legend label, and the notes that must travel with it (what it is, the
 * model's cautions, or why no loop could be simulated: then `points` is empty).
 */
export interface ModelLoopOverlay {
  points: readonly { volume: number; pressure: number }[];
  label: string;
  notes: readonly string[];
}

/** The model loop's style: Okabe & Ito's bluish green, distinct from both visits' colours in hue and in greyscale lightness. */
export const MODEL_LOOP_STYLE = { colour: '#009E73', width: 2.0, dash: '7 3' } as const;

/** Axis extents shared by the SVG and the terminal drawing. */
export interface PvDomain {
  volumeMax: number;
  pressureMax: number;
  volumeTicks: number[];
  pressureTicks: number[];
}

export const VISIT_STYLES = [
  { colour: '#0072B2', width: 2.6, marker: 'circle', name: 'blue, filled circles' },
  { colour: '#E69F00', width: 2.0, marker: 'square', name: 'orange, open squares' },
] as const;

export const SERIES_DASH = {
  loop: '',
  espvr: '10 5',
  edpvr: '2 3',
  ea: '12 4 2 4',
} as const;

const INK = '#1a1a1a';
const GRID = '#d9d9d9';
const MUTED = '#555555';

/** "Nice" tick step: 1, 2, 2.5 or 5 × 10^k giving about `target` intervals. */
export function niceTicks(max: number, target = 5): number[] {
  const safeMax = Number.isFinite(max) && max > 0 ? max : 1;
  const raw = safeMax / target;
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * magnitude).find((s) => s >= raw) ?? 10 * magnitude;
  const ticks: number[] = [];
  for (let t = 0; t <= safeMax + step * 1e-9; t += step) ticks.push(Math.round(t * 1e6) / 1e6);
  if ((ticks[ticks.length - 1] ?? 0) < safeMax - step * 1e-9) ticks.push(Math.round((ticks.length * step) * 1e6) / 1e6);
  return ticks;
}

export function pvDomain(visits: readonly PvVisit[], modelLoop?: ModelLoopOverlay): PvDomain {
  let vMax = 0;
  let pMax = 0;
  for (const q of modelLoop?.points ?? []) {
    vMax = Math.max(vMax, q.volume * 1.1);
    pMax = Math.max(pMax, q.pressure * 1.08);
  }
  for (const { loop } of visits) {
    vMax = Math.max(vMax, loop.edv * 1.2);
    pMax = Math.max(pMax, loop.peakPressure * 1.12, (loop.pes ?? 0) * 1.12, (loop.edp ?? 0) * 1.5);
  }
  const volumeTicks = niceTicks(vMax, 5);
  const pressureTicks = niceTicks(pMax, 5);
  return {
    volumeMax: volumeTicks[volumeTicks.length - 1] ?? vMax,
    pressureMax: pressureTicks[pressureTicks.length - 1] ?? pMax,
    volumeTicks,
    pressureTicks,
  };
}

type Point = [number, number];

/** Liang–Barsky clipping of a segment to [0, vMax] × [0, pMax]; null when outside. */
export function clipSegment(a: Point, b: Point, vMax: number, pMax: number): [Point, Point] | null {
  let t0 = 0;
  let t1 = 1;
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const edges: [number, number][] = [
    [-dx, a[0]],
    [dx, vMax - a[0]],
    [-dy, a[1]],
    [dy, pMax - a[1]],
  ];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return null;
      continue;
    }
    const r = q / p;
    if (p < 0) t0 = Math.max(t0, r);
    else t1 = Math.min(t1, r);
    if (t0 > t1) return null;
  }
  return [
    [a[0] + t0 * dx, a[1] + t0 * dy],
    [a[0] + t1 * dx, a[1] + t1 * dy],
  ];
}

/** The end-systolic line P = Ees·(V − V0), clipped to the plot. */
export function endSystolicLine(loop: LoopGeometry, domain: PvDomain): [Point, Point] | null {
  if (loop.ees === null || loop.v0 === null || !(loop.ees > 0)) return null;
  const { ees, v0 } = loop;
  const far = domain.volumeMax * 4;
  return clipSegment([v0, 0], [far, ees * (far - v0)], domain.volumeMax, domain.pressureMax);
}

/** The Ea line from (EDV, 0) to (ESV, Pes). */
export function arterialLine(loop: LoopGeometry): [Point, Point] | null {
  if (loop.pes === null) return null;
  return [[loop.edv, 0], [loop.esv, loop.pes]];
}

/** Points of the diastolic curve from V = 0 up to the plot's edge; EDV is always one of them. */
export function diastolicCurvePoints(loop: LoopGeometry, domain: PvDomain, samples = 60): Point[] {
  const curve = loop.diastolicCurve;
  if (!curve) return [];
  const top = Math.min(domain.volumeMax, volumeOnEndDiastolicCurve(curve, domain.pressureMax));
  const volumes = new Set<number>();
  for (let i = 0; i <= samples; i++) volumes.add((i / samples) * top);
  if (curve.edv <= top) volumes.add(curve.edv);
  return [...volumes]
    .sort((x, y) => x - y)
    .map((v): Point => [v, v === curve.edv ? curve.edp : pressureOnEndDiastolicCurve(curve, v)])
    .filter(([v, p]) => Number.isFinite(v) && Number.isFinite(p) && p <= domain.pressureMax + 1e-9);
}

/** Notes that must travel with the picture (estimates, missing pieces). */
export function diagramNotes(visits: readonly PvVisit[]): string[] {
  const notes: string[] = [];
  visits.forEach((v, i) => {
    const who = visits.length > 1 ? `${v.label}: ` : '';
    const l = v.loop;
    if (l.pes === null) notes.push(`${who}no end-systolic pressure, so no loop or Ea line.`);
    if (l.ees === null) notes.push(`${who}Ees not computable, so no end-systolic line.`);
    if (l.edpSource === 'none') notes.push(`${who}the diastolic curve needs EDP or E/e′; drawn without it (ejection limb only).`);
    if (l.edpSource === 'estimated') notes.push(`${who}diastolic curve from EDP ${formatNumber(l.edp, 0)} mmHg ESTIMATED from E/e′ (Nagueh 1997), ±8 mmHg.`);
    if (i === 0 && l.ea !== null && l.eaLineSlope !== null && formatNumber(l.ea, 2) !== formatNumber(l.eaLineSlope, 2)) {
      notes.push(`${who}the Ea line's slope is Pes/(EDV − ESV) = ${formatNumber(l.eaLineSlope, 2)} mmHg/mL; the reported Ea ${formatNumber(l.ea, 2)} uses the Doppler stroke volume.`);
    }
    if (l.v0 !== null && l.v0 < 0 && l.ees !== null) notes.push(`${who}V0(ES) = ${formatNumber(l.v0, 0)} mL, the end-systolic line's intercept, lies left of the volume axis (the single-beat intercept is often negative).`);
    if (i === 0 && l.diastolicCurve && l.diastolicCurve.anchorPressure === 15) {
      notes.push(`${who}EDP above 22 mmHg: diastolic curve anchored at 15 mmHg (Klotz protocol).`);
    }
  });
  notes.push('Estimated from cuff pressure and echo volumes (Chen 2001; Klotz 2006): a model, not a measured loop. Research use only.');
  return notes;
}

/** Escaping of user and report text for HTML and SVG: the one sanitiser (src/text/sanitize.ts). */
const esc = escapeMarkup;
const n2 = (x: number) => formatNumber(x, 2);

export function renderPvDiagram(visits: readonly PvVisit[], options: PvDiagramOptions = {}): string {
  const shown = visits.slice(0, 2);
  const model = options.modelLoop;
  const domain = pvDomain(shown, model);
  const width = options.width ?? 640;
  const plot = { left: 66, top: options.title ? 40 : 18, width: width - 66 - 22, height: 330 };
  const notes = [...diagramNotes(shown), ...(model?.notes ?? [])].flatMap((n) => wrap(n, Math.floor((width - 40) / 5.9)));
  const legendTop = plot.top + plot.height + 48;
  const modelRow = model && model.points.length > 1 ? 1 : 0;
  const notesTop = legendTop + 22 * (3 + modelRow) + 6;
  const height = notesTop + notes.length * 14 + 8;

  const x = (v: number) => plot.left + (v / domain.volumeMax) * plot.width;
  const y = (p: number) => plot.top + plot.height - (p / domain.pressureMax) * plot.height;
  const pt = ([v, p]: Point) => `${n2(x(v))},${n2(y(p))}`;

  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${n2(height)}" width="${width}" height="${n2(height)}" role="img" font-family="Helvetica, Arial, sans-serif" class="pv-diagram">`);
  out.push(`<title>${esc(options.title ?? 'Estimated pressure–volume diagram')}</title>`);
  out.push(`<desc>${esc(describe(shown))}</desc>`);
  out.push(`<rect x="0" y="0" width="${width}" height="${n2(height)}" fill="#ffffff"/>`);
  if (options.title) out.push(`<text x="${plot.left}" y="24" font-size="15" font-weight="bold" fill="${INK}">${esc(options.title)}</text>`);

  // Grid and axes.
  out.push(`<g class="axes" font-size="12" fill="${INK}">`);
  for (const t of domain.volumeTicks) {
    out.push(`<g class="tick" data-axis="volume" data-value="${t}"><line x1="${n2(x(t))}" y1="${plot.top}" x2="${n2(x(t))}" y2="${plot.top + plot.height}" stroke="${GRID}" stroke-width="1"/><text x="${n2(x(t))}" y="${plot.top + plot.height + 17}" text-anchor="middle">${t}</text></g>`);
  }
  for (const t of domain.pressureTicks) {
    out.push(`<g class="tick" data-axis="pressure" data-value="${t}"><line x1="${plot.left}" y1="${n2(y(t))}" x2="${plot.left + plot.width}" y2="${n2(y(t))}" stroke="${GRID}" stroke-width="1"/><text x="${plot.left - 8}" y="${n2(y(t) + 4)}" text-anchor="end">${t}</text></g>`);
  }
  out.push(`<line x1="${plot.left}" y1="${plot.top + plot.height}" x2="${plot.left + plot.width}" y2="${plot.top + plot.height}" stroke="${INK}" stroke-width="1.2"/>`);
  out.push(`<line x1="${plot.left}" y1="${plot.top}" x2="${plot.left}" y2="${plot.top + plot.height}" stroke="${INK}" stroke-width="1.2"/>`);
  out.push(`<text x="${n2(plot.left + plot.width / 2)}" y="${plot.top + plot.height + 38}" text-anchor="middle" font-size="13">LV volume (mL)</text>`);
  out.push(`<text transform="translate(18 ${n2(plot.top + plot.height / 2)}) rotate(-90)" text-anchor="middle" font-size="13">LV pressure (mmHg)</text>`);
  out.push('</g>');

  // Draw the comparison visit first so the selected one sits on top.
  const box: Box = { left: plot.left, top: plot.top, right: plot.left + plot.width, bottom: plot.top + plot.height };
  for (let i = shown.length - 1; i >= 0; i--) out.push(...drawVisit(shown[i]!, i, domain, pt, i === 0, box));
  if (model && modelRow) {
    const inside = model.points.map((q): Point => [Math.min(Math.max(q.volume, 0), domain.volumeMax), Math.min(Math.max(q.pressure, 0), domain.pressureMax)]);
    out.push(`<polygon class="model-loop" data-series="model-loop" points="${inside.map(pt).join(' ')}" fill="none" stroke="${MODEL_LOOP_STYLE.colour}" stroke-width="${MODEL_LOOP_STYLE.width}" stroke-dasharray="${MODEL_LOOP_STYLE.dash}" stroke-linejoin="round"/>`);
  }

  // Legend: visits (colour + marker), then line kinds (dash pattern).
  out.push(`<g class="legend" font-size="12" fill="${INK}">`);
  shown.forEach((v, i) => {
    const s = VISIT_STYLES[i]!;
    const lx = plot.left + i * ((plot.width + 10) / 2);
    out.push(`<line x1="${lx}" y1="${legendTop}" x2="${lx + 26}" y2="${legendTop}" stroke="${s.colour}" stroke-width="${s.width}"/>`);
    out.push(marker(lx + 13, legendTop, i, 'legend'));
    out.push(`<text x="${lx + 34}" y="${legendTop + 4}">${esc(v.label)}${shown.length > 1 ? (i === 0 ? ' (selected)' : ' (compared)') : ''}</text>`);
  });
  const kinds: [keyof typeof SERIES_DASH, string][] = [
    ['loop', 'estimated loop'],
    ['espvr', 'end-systolic line (slope Ees)'],
    ['edpvr', 'diastolic curve (EDPVR)'],
    ['ea', 'Ea line (EDV,0)→(ESV,Pes)'],
  ];
  kinds.forEach(([k, label], j) => {
    const col = j % 2;
    const row = Math.floor(j / 2);
    const lx = plot.left + col * ((plot.width + 10) / 2);
    const ly = legendTop + 22 * (row + 1);
    const dash = SERIES_DASH[k] ? ` stroke-dasharray="${SERIES_DASH[k]}"` : '';
    out.push(`<line x1="${lx}" y1="${ly}" x2="${lx + 26}" y2="${ly}" stroke="${MUTED}" stroke-width="${k === 'loop' ? 2.4 : 1.6}"${dash}/>`);
    out.push(`<text x="${lx + 34}" y="${ly + 4}">${esc(label)}</text>`);
  });
  if (model && modelRow) {
    const ly = legendTop + 22 * 3;
    out.push(`<line x1="${plot.left}" y1="${ly}" x2="${plot.left + 26}" y2="${ly}" stroke="${MODEL_LOOP_STYLE.colour}" stroke-width="${MODEL_LOOP_STYLE.width}" stroke-dasharray="${MODEL_LOOP_STYLE.dash}"/>`);
    out.push(`<text x="${plot.left + 34}" y="${ly + 4}">${esc(model.label)}</text>`);
  }
  out.push('</g>');

  out.push(`<g class="notes" font-size="11" fill="${MUTED}">`);
  notes.forEach((note, i) => out.push(`<text x="${plot.left - 50}" y="${n2(notesTop + 12 + i * 14)}">${esc(note)}</text>`));
  out.push('</g>');
  out.push('</svg>');
  return out.join('\n');
}

function drawVisit(v: PvVisit, index: number, domain: PvDomain, pt: (p: Point) => string, labelled: boolean, box: Box): string[] {
  const s = VISIT_STYLES[index]!;
  const l = v.loop;
  const out: string[] = [`<g class="visit" data-visit="${index}" fill="none" stroke="${s.colour}">`];
  // Labels go last, over the lines, each with a white halo.
  const labels: string[] = [];
  const lineWidth = index === 0 ? 1.8 : 1.4;
  // A white halo keeps labels readable where they cross lines.
  const textAttrs = `fill="${s.colour}" stroke="#ffffff" stroke-width="3" paint-order="stroke" stroke-linejoin="round" font-size="12"`;

  const edpvr = diastolicCurvePoints(l, domain);
  if (edpvr.length > 1) {
    out.push(`<polyline data-series="edpvr" points="${edpvr.map(pt).join(' ')}" stroke-width="${lineWidth}" stroke-dasharray="${SERIES_DASH.edpvr}"/>`);
  }
  const es = endSystolicLine(l, domain);
  if (es) {
    const [a, b] = es;
    out.push(`<line data-series="espvr" ${ends(a, b, pt)} stroke-width="${lineWidth}" stroke-dasharray="${SERIES_DASH.espvr}"/>`);
    if (labelled) labels.push(placeLabel(b, `Ees ${formatNumber(l.ees, 2)} mmHg/mL`, [[8, 14, 'start'], [-10, -6, 'end'], [-10, 16, 'end']], textAttrs, pt, box));
  }
  const ea = arterialLine(l);
  if (ea) {
    const [a, b] = ea;
    out.push(`<line data-series="ea" ${ends(a, b, pt)} stroke-width="${lineWidth}" stroke-dasharray="${SERIES_DASH.ea}"/>`);
    if (labelled && l.eaLineSlope !== null) {
      const mid: Point = [(a[0] * 3 + b[0]) / 4, (a[1] * 3 + b[1]) / 4];
      labels.push(placeLabel(mid, `Ea line ${formatNumber(l.eaLineSlope, 2)}`, [[8, -4, 'start'], [-8, -4, 'end']], textAttrs, pt, box));
    }
  }
  const segments = loopOutline(l);
  if (segments.length > 0) {
    const points = segments.flatMap((seg, i) => (i === 0 ? seg.points : seg.points.slice(1)));
    const closed = segments.length === 4;
    out.push(`<${closed ? 'polygon' : 'polyline'} data-series="loop" points="${points.map(pt).join(' ')}" stroke-width="${s.width}" stroke-linejoin="round"/>`);
  }
  if (l.pes !== null) out.push(marker(...xy(pt([l.esv, l.pes])), index, 'end-systole'));
  if (l.edp !== null && l.diastolicCurve) out.push(marker(...xy(pt([l.edv, l.edp])), index, 'end-diastole'));
  if (labelled && l.pes !== null) {
    labels.push(placeLabel([l.esv, l.pes], `ES (${formatNumber(l.esv, 0)} mL, ${formatNumber(l.pes, 0)} mmHg)`, [[-8, -8, 'end'], [8, 18, 'start']], textAttrs, pt, box));
  }
  if (labelled && l.edp !== null && l.diastolicCurve) {
    const text = `ED (${formatNumber(l.edv, 0)} mL, ${formatNumber(l.edp, 0)} mmHg${l.edpSource === 'estimated' ? ', estimated' : ''})`;
    labels.push(placeLabel([l.edv, l.edp], text, [[8, -8, 'start'], [-10, -10, 'end']], textAttrs, pt, box));
  }
  out.push(...labels, '</g>');
  return out;
}

function ends(a: Point, b: Point, pt: (p: Point) => string): string {
  const [x1, y1] = xy(pt(a));
  const [x2, y2] = xy(pt(b));
  return `x1="${n2(x1)}" y1="${n2(y1)}" x2="${n2(x2)}" y2="${n2(y2)}"`;
}

function xy(s: string): [number, number] {
  const [a, b] = s.split(',');
  return [Number(a), Number(b)];
}

interface Box {
  left: number;
  top: number;
  right: number;
  bottom: number;
}

/**
 * A text label beside a point: the first of the candidate offsets whose text
 * (width estimated at 6.7 px per character, 12 px type) stays inside the plot.
 */
function placeLabel(at: Point, text: string, candidates: [number, number, 'start' | 'end'][], attrs: string, pt: (p: Point) => string, box: Box): string {
  const [px, py] = xy(pt(at));
  const width = [...text].length * 6.7;
  const fits = ([dx, dy, anchor]: [number, number, 'start' | 'end']) => {
    const x0 = anchor === 'start' ? px + dx : px + dx - width;
    const y0 = py + dy;
    return x0 >= box.left && x0 + width <= box.right && y0 - 12 >= box.top && y0 <= box.bottom;
  };
  const [dx, dy, anchor] = candidates.find(fits) ?? candidates[0]!;
  return `<text x="${n2(px + dx)}" y="${n2(py + dy)}" text-anchor="${anchor}" ${attrs}>${esc(text)}</text>`;
}

function marker(cx: number, cy: number, visit: number, role: string): string {
  const s = VISIT_STYLES[visit]!;
  if (s.marker === 'circle') return `<circle data-marker="${role}" cx="${n2(cx)}" cy="${n2(cy)}" r="4.5" fill="${s.colour}" stroke="${s.colour}" stroke-width="1.5"/>`;
  return `<rect data-marker="${role}" x="${n2(cx - 4.5)}" y="${n2(cy - 4.5)}" width="9" height="9" fill="#ffffff" stroke="${s.colour}" stroke-width="2"/>`;
}

function describe(visits: readonly PvVisit[]): string {
  return visits
    .map((v) => {
      const l = v.loop;
      const parts = [`EDV ${formatNumber(l.edv, 0)} mL`, `ESV ${formatNumber(l.esv, 0)} mL`, `Pes ${formatNumber(l.pes, 0)} mmHg`];
      if (l.ees !== null) parts.push(`Ees ${formatNumber(l.ees, 2)} mmHg/mL`, `V0(ES) ${formatNumber(l.v0, 0)} mL`);
      if (l.eaLineSlope !== null) parts.push(`Ea line slope ${formatNumber(l.eaLineSlope, 2)} mmHg/mL`);
      if (l.edp !== null) parts.push(`EDP ${formatNumber(l.edp, 0)} mmHg (${l.edpSource})`);
      return `${v.label}: ${parts.join(', ')}`;
    })
    .join('. ');
}
