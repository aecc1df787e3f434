/**
 * A trend chart of one quantity across a subject's visits, as an SVG string:
 * the value at each visit with its 95 % interval when one was computed, and
 * the least-significant-change band around the first visit, so a reader sees
 * at once which visits moved beyond measurement noise. Pure.
 *
 * The band is the limit `record compare` judges by (src/records/compare.ts):
 * |Δln x| > 2.77 × CV, i.e. from baseline·e^(−L) to baseline·e^(+L).
 * Visits beyond it are drawn as filled markers, visits within it as open
 * ones, so the distinction survives greyscale print.
 */
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
}

export interface TrendChartSpec {
  /** Machine-friendly key, e.g. `ea`. */
  key: string;
  title: string;
  unit: string;
  decimals: number;
  points: TrendPoint[];
  /** The limit on |Δln x| (2.77 × CV) and where the CV comes from. */
  lsc?: { logLimit: number; source: string };
  /** A horizontal reference line, e.g. the 1.2 cut-off of Ea/Ees. */
  reference?: { value: number; label: string };
  /** Visit number to emphasise (the one the report is about). */
  selectedIndex?: number;
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

/** The band around the first computable visit; null without a baseline or limit. */
export function trendBand(spec: TrendChartSpec): { baseline: number; baselineIndex: number; low: number; high: number } | null {
  const first = spec.points.find((p) => p.value !== null && p.value > 0);
  if (!first || first.value === null || !spec.lsc) return null;
  return {
    baseline: first.value,
    baselineIndex: first.index,
    low: first.value * Math.exp(-spec.lsc.logLimit),
    high: first.value * Math.exp(spec.lsc.logLimit),
  };
}

export function renderTrendChart(spec: TrendChartSpec, width = 640): string {
  const band = trendBand(spec);
  const plot = { left: 62, top: 34, width: width - 62 - 150, height: 150 };
  const height = plot.top + plot.height + 64;
  let top = 0;
  for (const p of spec.points) {
    if (p.value !== null) top = Math.max(top, p.value);
    if (p.interval95) top = Math.max(top, p.interval95[1]);
  }
  if (band) top = Math.max(top, band.high);
  if (spec.reference) top = Math.max(top, spec.reference.value);
  const ticks = niceTicks(top > 0 ? top * 1.08 : 1, 4);
  const yMax = ticks[ticks.length - 1] ?? 1;
  const count = Math.max(1, spec.points.length);
  const x = (i: number) => plot.left + (count === 1 ? plot.width / 2 : 18 + (i / (count - 1)) * (plot.width - 36));
  const y = (v: number) => plot.top + plot.height - (Math.max(0, Math.min(v, yMax)) / yMax) * plot.height;

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
    out.push(`<g class="lsc-band" data-low="${band.low}" data-high="${band.high}">`);
    out.push(`<rect x="${plot.left}" y="${n2(y(band.high))}" width="${plot.width}" height="${n2(y(band.low) - y(band.high))}" fill="${BAND}"/>`);
    out.push(`<line x1="${plot.left}" y1="${n2(y(band.high))}" x2="${plot.left + plot.width}" y2="${n2(y(band.high))}" stroke="${BAND_EDGE}" stroke-dasharray="5 3"/>`);
    out.push(`<line x1="${plot.left}" y1="${n2(y(band.low))}" x2="${plot.left + plot.width}" y2="${n2(y(band.low))}" stroke="${BAND_EDGE}" stroke-dasharray="5 3"/>`);
    out.push(`<line x1="${plot.left}" y1="${n2(y(band.baseline))}" x2="${plot.left + plot.width}" y2="${n2(y(band.baseline))}" stroke="${BAND_EDGE}" stroke-width="0.8"/>`);
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
    const beyond = band !== null && p.index !== band.baselineIndex && (v > band.high || v < band.low);
    out.push(`<circle class="point" data-visit="${p.index}" data-value="${v}" data-beyond="${beyond}" cx="${n2(x(i))}" cy="${n2(y(v))}" r="${p.index === spec.selectedIndex ? 5.5 : 4.5}" fill="${beyond ? LINE : '#ffffff'}" stroke-width="2"/>`);
    out.push(`<text x="${n2(x(i) + 8)}" y="${n2(y(v) - 7)}" font-size="11" fill="${INK}" stroke="none">${formatNumber(v, spec.decimals)}</text>`);
  }
  for (const { i, p } of spec.points.map((p, i) => ({ p, i })).filter(({ p }) => p.value === null)) {
    out.push(`<text x="${n2(x(i))}" y="${n2(plot.top + plot.height - 6)}" text-anchor="middle" font-size="10" fill="#555555" stroke="none" data-visit="${p.index}">not computable</text>`);
  }
  out.push('</g>');

  // Key, right of the plot.
  const kx = plot.left + plot.width + 14;
  out.push(`<g class="key" font-size="10.5" fill="${INK}">`);
  let ky = plot.top + 8;
  if (band) {
    out.push(`<rect x="${kx}" y="${ky - 8}" width="16" height="10" fill="${BAND}" stroke="${BAND_EDGE}" stroke-dasharray="3 2"/>`);
    out.push(`<text x="${kx + 22}" y="${ky + 1}">noise band around V${band.baselineIndex}</text>`);
    out.push(`<text x="${kx + 22}" y="${ky + 14}">(least significant change,</text>`);
    out.push(`<text x="${kx + 22}" y="${ky + 27}">×/÷ ${formatNumber(Math.exp(spec.lsc?.logLimit ?? 0), 2)})</text>`);
    ky += 46;
    out.push(`<circle cx="${kx + 8}" cy="${ky - 4}" r="4.5" fill="${LINE}" stroke="${LINE}" stroke-width="2"/><text x="${kx + 22}" y="${ky}">beyond the band</text>`);
    ky += 17;
    out.push(`<circle cx="${kx + 8}" cy="${ky - 4}" r="4.5" fill="#ffffff" stroke="${LINE}" stroke-width="2"/><text x="${kx + 22}" y="${ky}">within the band</text>`);
    ky += 17;
  }
  if (spec.points.some((p) => p.interval95)) {
    out.push(`<line x1="${kx + 8}" y1="${ky - 10}" x2="${kx + 8}" y2="${ky + 2}" stroke="${LINE}" stroke-width="1.4"/><text x="${kx + 22}" y="${ky}">95 % interval (inputs)</text>`);
    ky += 17;
  }
  if (spec.reference) {
    out.push(`<line x1="${kx}" y1="${ky - 4}" x2="${kx + 16}" y2="${ky - 4}" stroke="${REFERENCE}" stroke-width="1.4" stroke-dasharray="2 3"/><text x="${kx + 22}" y="${ky}">${esc(spec.reference.label)}</text>`);
  }
  out.push('</g>');
  out.push('</svg>');
  return out.join('\n');
}

function describe(spec: TrendChartSpec, band: ReturnType<typeof trendBand>): string {
  const values = spec.points.map((p) => `V${p.index} ${p.date}: ${p.value === null ? 'not computable' : formatNumber(p.value, spec.decimals)}`).join('; ');
  const bandText = band ? ` Noise band ${formatNumber(band.low, spec.decimals)} to ${formatNumber(band.high, spec.decimals)} around V${band.baselineIndex}.` : '';
  return `${spec.title}: ${values}.${bandText}`;
}
