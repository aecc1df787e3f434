/**
 * A trend chart of one quantity across a subject's visits, as an SVG string:
 * the value at each visit with its 95 % interval when one was computed, and
 * the least-significant-change band around the first visit, so a reader sees
 * at once which visits moved beyond measurement noise. Pure.
 *
 * The band and the markers use the rule `record compare` judges by
 * (changeVerdict in src/records/compare.ts): |Δln x| > L, where L is the
 * least significant change of the comparison of the first visit with that
 * visit. L can differ from visit to visit (for Pes and Ea it depends on the
 * two visits' mean SBP), so the band's edges, baseline·e^(±L), are drawn
 * through each visit's own limit. Visits beyond it are filled markers, visits
 * within it open ones, so the distinction survives greyscale print; each
 * marker carries `data-verdict`, the word `record compare` prints.
 *
 * Every label fits inside the viewBox: the key sits below the plot and
 * flows onto as many rows as it needs, measured with TEXT_EM_BOUND.
 */
import { changeVerdict, type Verdict } from '../records/compare.js';
import { escapeMarkup } from '../text/sanitize.js';
import { formatNumber } from './format.js';
import { niceTicks } from './pv-diagram.js';

export interface TrendPoint {
  /** Visit number as `record show` prints it. */
  index: number;
  date: string;
  value: number | null;
  interval95?: [number, number];
  /** Why there is no value. */
  reason?: string;
  /** The least significant change (limit on |Δln x|) of the change from the first visit to this one. */
  logLimit?: number;
}

export interface TrendChartSpec {
  /** Machine-friendly key, e.g. `ea`. */
  key: string;
  title: string;
  unit: string;
  decimals: number;
  points: TrendPoint[];
  /** Where the repeat CV behind the band comes from. */
  bandSource?: string;
  /** A horizontal reference line, e.g. the 1.2 cut-off of Ea/Ees. */
  reference?: { value: number; label: string };
  /** Visit number to emphasise (the one the report is about). */
  selectedIndex?: number;
}

/**
 * An upper bound on the advance of one character, in em, for the sans-serif
 * faces the charts ask for (Helvetica and Arial: digits 0.556 em, average
 * lower-case text about 0.5 em; from memory of their metrics). Layout uses it
 * to keep every label inside the picture.
 */
export const TEXT_EM_BOUND = 0.62;

export function textWidth(text: string, fontSize: number): number {
  return [...text].length * fontSize * TEXT_EM_BOUND;
}

const INK = '#1a1a1a';
const GRID = '#d9d9d9';
const LINE = '#0072B2';
const BAND = '#e8e8e8';
const BAND_EDGE = '#8c8c8c';
const REFERENCE = '#D55E00';

/** Escaping of user and report text for HTML and SVG: the one sanitiser (src/text/sanitize.ts). */
const esc = escapeMarkup;
const n2 = (x: number) => formatNumber(x, 2);

export interface TrendBand {
  baseline: number;
  baselineIndex: number;
  /** The band's edges at each visit that has a limit, in point order. */
  edges: { index: number; low: number; high: number; logLimit: number }[];
}

/** The band around the first visit; null when the first visit has no value or no limit is known. */
export function trendBand(spec: TrendChartSpec): TrendBand | null {
  const first = spec.points[0];
  if (!first || first.value === null || !(first.value > 0)) return null;
  const baseline = first.value;
  const edges = spec.points
    .filter((p): p is TrendPoint & { logLimit: number } => p.logLimit !== undefined)
    .map((p) => ({ index: p.index, low: baseline * Math.exp(-p.logLimit), high: baseline * Math.exp(p.logLimit), logLimit: p.logLimit }));
  return edges.length ? { baseline, baselineIndex: first.index, edges } : null;
}

/**
 * The verdict of each visit's change from the first visit, by the one rule
 * (changeVerdict): the word `record compare <first> <visit> --json` gives.
 */
export function trendVerdict(spec: TrendChartSpec, point: TrendPoint): Verdict {
  const first = spec.points[0];
  if (!first || first.value === null || point.value === null || !(first.value > 0) || !(point.value > 0) || point.logLimit === undefined) return 'not-computable';
  return changeVerdict(Math.log(point.value / first.value), point.logLimit);
}

interface KeyItem {
  /** SVG of the swatch, drawn in a 16 × 12 box whose top-left is (x, y). */
  swatch(x: number, y: number): string;
  text: string;
}

function limitText(edges: TrendBand['edges']): string {
  const factors = edges.map((e) => Math.exp(e.logLimit));
  const lo = formatNumber(Math.min(...factors), 2);
  const hi = formatNumber(Math.max(...factors), 2);
  return lo === hi ? `×/÷ ${lo}` : `×/÷ ${lo} to ${hi}`;
}

export function renderTrendChart(spec: TrendChartSpec, width = 640): string {
  const band = trendBand(spec);
  const keyFont = 10.5;
  const plot = { left: 62, top: 34, width: width - 62 - 48, height: 150 };
  let top = 0;
  for (const p of spec.points) {
    if (p.value !== null) top = Math.max(top, p.value);
    if (p.interval95) top = Math.max(top, p.interval95[1]);
  }
  if (band) for (const e of band.edges) top = Math.max(top, e.high);
  if (spec.reference) top = Math.max(top, spec.reference.value);
  const ticks = niceTicks(top > 0 ? top * 1.12 : 1, 4);
  const yMax = ticks[ticks.length - 1] ?? 1;
  const count = Math.max(1, spec.points.length);
  const x = (i: number) => plot.left + (count === 1 ? plot.width / 2 : 18 + (i / (count - 1)) * (plot.width - 36));
  const y = (v: number) => plot.top + plot.height - (Math.max(0, Math.min(v, yMax)) / yMax) * plot.height;

  // The key: items flow left to right below the axis labels, onto new rows as needed.
  const items: KeyItem[] = [];
  if (band) {
    items.push({ swatch: (kx, ky) => `<rect x="${kx}" y="${ky + 1}" width="16" height="10" fill="${BAND}" stroke="${BAND_EDGE}" stroke-dasharray="3 2"/>`, text: `noise band around V${band.baselineIndex}: least significant change, ${limitText(band.edges)}` });
    items.push({ swatch: (kx, ky) => `<circle cx="${kx + 8}" cy="${ky + 6}" r="4.5" fill="${LINE}" stroke="${LINE}" stroke-width="2"/>`, text: 'beyond the band (beyond noise)' });
    items.push({ swatch: (kx, ky) => `<circle cx="${kx + 8}" cy="${ky + 6}" r="4.5" fill="#ffffff" stroke="${LINE}" stroke-width="2"/>`, text: 'within the band' });
  }
  if (spec.points.some((p) => p.interval95)) {
    items.push({ swatch: (kx, ky) => `<line x1="${kx + 8}" y1="${ky}" x2="${kx + 8}" y2="${ky + 12}" stroke="${LINE}" stroke-width="1.4"/>`, text: '95 % interval (input measurement error)' });
  }
  if (spec.reference) {
    const label = spec.reference.label;
    items.push({ swatch: (kx, ky) => `<line x1="${kx}" y1="${ky + 6}" x2="${kx + 16}" y2="${ky + 6}" stroke="${REFERENCE}" stroke-width="1.4" stroke-dasharray="2 3"/>`, text: label });
  }
  const keyTop = plot.top + plot.height + 40;
  const rowHeight = 17;
  const placed: { item: KeyItem; x: number; y: number }[] = [];
  let kx = plot.left;
  let ky = keyTop;
  for (const item of items) {
    const w = 22 + textWidth(item.text, keyFont);
    if (kx > plot.left && kx + w > width - 8) {
      kx = plot.left;
      ky += rowHeight;
    }
    placed.push({ item, x: kx, y: ky });
    kx += w + 16;
  }
  const height = (placed.length ? ky + rowHeight : keyTop) + 8;

  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img" font-family="Helvetica, Arial, sans-serif" class="trend-chart" data-key="${esc(spec.key)}">`);
  out.push(`<title>${esc(`${spec.title} across visits`)}</title>`);
  out.push(`<desc>${esc(describe(spec, band))}</desc>`);
  out.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="#ffffff"/>`);
  out.push(`<text x="${plot.left}" y="20" font-size="14" font-weight="bold" fill="${INK}">${esc(spec.title)}${spec.unit ? ` (${esc(spec.unit)})` : ''}</text>`);

  out.push(`<g class="axes" font-size="11" fill="${INK}">`);
  for (const t of ticks) {
    out.push(`<g class="tick" data-axis="value" data-value="${t}"><line x1="${plot.left}" y1="${n2(y(t))}" x2="${plot.left + plot.width}" y2="${n2(y(t))}" stroke="${GRID}"/><text x="${plot.left - 6}" y="${n2(y(t) + 4)}" text-anchor="end">${t}</text></g>`);
  }
  out.push(`<line x1="${plot.left}" y1="${plot.top + plot.height}" x2="${plot.left + plot.width}" y2="${plot.top + plot.height}" stroke="${INK}"/>`);
  spec.points.forEach((p, i) => {
    out.push(`<text x="${n2(x(i))}" y="${plot.top + plot.height + 15}" text-anchor="middle" font-weight="${p.index === spec.selectedIndex ? 'bold' : 'normal'}">V${p.index}</text>`);
    out.push(`<text x="${n2(x(i))}" y="${plot.top + plot.height + 28}" text-anchor="middle" font-size="10" fill="#555555">${esc(p.date)}</text>`);
  });
  out.push('</g>');

  if (band) {
    // Edges through each visit's own limit; a single visit gets a band across the plot.
    const at = (index: number) => spec.points.findIndex((p) => p.index === index);
    const xs = band.edges.length === 1 ? [plot.left, plot.left + plot.width] : band.edges.map((e) => x(at(e.index)));
    const edges = band.edges.length === 1 ? [band.edges[0]!, band.edges[0]!] : band.edges;
    const upper = edges.map((e, k) => `${n2(xs[k]!)},${n2(y(e.high))}`);
    const lower = edges.map((e, k) => `${n2(xs[k]!)},${n2(y(e.low))}`);
    const low = Math.min(...band.edges.map((e) => e.low));
    const high = Math.max(...band.edges.map((e) => e.high));
    out.push(`<g class="lsc-band" data-baseline="${band.baseline}" data-low="${low}" data-high="${high}">`);
    out.push(`<polygon points="${[...upper, ...[...lower].reverse()].join(' ')}" fill="${BAND}"/>`);
    out.push(`<polyline points="${upper.join(' ')}" fill="none" stroke="${BAND_EDGE}" stroke-dasharray="5 3"/>`);
    out.push(`<polyline points="${lower.join(' ')}" fill="none" stroke="${BAND_EDGE}" stroke-dasharray="5 3"/>`);
    for (const e of band.edges) out.push(`<g class="band-edge" data-visit="${e.index}" data-low="${e.low}" data-high="${e.high}"/>`);
    out.push(`<line x1="${n2(xs[0]!)}" y1="${n2(y(band.baseline))}" x2="${n2(xs[xs.length - 1]!)}" y2="${n2(y(band.baseline))}" stroke="${BAND_EDGE}" stroke-width="0.8"/>`);
    out.push('</g>');
  }
  if (spec.reference && spec.reference.value <= yMax) {
    out.push(`<line class="reference" x1="${plot.left}" y1="${n2(y(spec.reference.value))}" x2="${plot.left + plot.width}" y2="${n2(y(spec.reference.value))}" stroke="${REFERENCE}" stroke-width="1.4" stroke-dasharray="2 3"/>`);
  }

  // Intervals, the connecting line, then the markers.
  const drawn = spec.points.map((p, i) => ({ p, i })).filter(({ p }) => p.value !== null);
  out.push(`<g class="series" stroke="${LINE}" fill="none">`);
  for (const { p, i } of drawn) {
    if (p.interval95) {
      const [lo, hi] = p.interval95;
      out.push(`<g class="interval" data-visit="${p.index}"><line x1="${n2(x(i))}" y1="${n2(y(lo))}" x2="${n2(x(i))}" y2="${n2(y(hi))}" stroke-width="1.4"/><line x1="${n2(x(i) - 5)}" y1="${n2(y(lo))}" x2="${n2(x(i) + 5)}" y2="${n2(y(lo))}"/><line x1="${n2(x(i) - 5)}" y1="${n2(y(hi))}" x2="${n2(x(i) + 5)}" y2="${n2(y(hi))}"/></g>`);
    }
  }
  if (drawn.length > 1) out.push(`<polyline points="${drawn.map(({ p, i }) => `${n2(x(i))},${n2(y(p.value as number))}`).join(' ')}" stroke-width="1.8"/>`);
  for (const { p, i } of drawn) {
    const v = p.value as number;
    const verdict = trendVerdict(spec, p);
    const beyond = verdict === 'beyond-noise';
    out.push(`<circle class="point" data-visit="${p.index}" data-value="${v}" data-verdict="${verdict}" cx="${n2(x(i))}" cy="${n2(y(v))}" r="${p.index === spec.selectedIndex ? 5.5 : 4.5}" fill="${beyond ? LINE : '#ffffff'}" stroke-width="2"/>`);
    out.push(`<text class="value-label" x="${n2(x(i) + 8)}" y="${n2(y(v) - 7)}" font-size="11" fill="${INK}" stroke="none">${formatNumber(v, spec.decimals)}</text>`);
  }
  for (const { i, p } of spec.points.map((p, i) => ({ p, i })).filter(({ p }) => p.value === null)) {
    out.push(`<text x="${n2(x(i))}" y="${n2(plot.top + plot.height - 6)}" text-anchor="middle" font-size="10" fill="#555555" stroke="none" data-visit="${p.index}" data-verdict="not-computable">not computable</text>`);
  }
  out.push('</g>');

  out.push(`<g class="key" font-size="${keyFont}" fill="${INK}">`);
  for (const { item, x: ix, y: iy } of placed) {
    out.push(item.swatch(ix, iy));
    out.push(`<text x="${n2(ix + 22)}" y="${n2(iy + 10)}">${esc(item.text)}</text>`);
  }
  out.push('</g>');
  out.push('</svg>');
  return out.join('\n');
}

function describe(spec: TrendChartSpec, band: ReturnType<typeof trendBand>): string {
  const values = spec.points.map((p) => `V${p.index} ${p.date}: ${p.value === null ? 'not computable' : formatNumber(p.value, spec.decimals)}`).join('; ');
  const bandText = band
    ? ` Noise band around V${band.baselineIndex} (least significant change): ${band.edges.map((e) => `V${e.index} ${formatNumber(e.low, spec.decimals)} to ${formatNumber(e.high, spec.decimals)}`).join('; ')}.`
    : '';
  return `${spec.title}: ${values}.${bandText}`;
}
