import { describe, expect, it } from 'vitest';
import { renderTrendChart, type TrendChartSpec } from '../../src/render/trend-chart.js';
import { allText, axisScale, elements, num, parseSvg } from './svg-helpers.js';

// Least significant change on the log scale: 2.77 × CV (Bland–Altman repeatability 1.96·√2 ≈ 2.77, rounded as
// usually quoted) with the single-beat Ees repeat CV of 20.3 % (Chen 2001 abstract): L = 0.5623.
const L = 2.77 * 0.203;

const SPEC: TrendChartSpec = {
  key: 'ees',
  title: 'End-systolic elastance Ees',
  unit: 'mmHg/mL',
  decimals: 2,
  selectedIndex: 3,
  lsc: { logLimit: L, source: 'Chen 2001, CV 20.3 %' },
  points: [
    { index: 1, date: '2024-01-15', value: 1.5, interval95: [1.1, 1.95] },
    { index: 2, date: '2024-04-15', value: 0.8, interval95: [0.55, 1.1] },
    { index: 3, date: '2024-07-15', value: 1.2 },
    { index: 4, date: '2024-10-15', value: null, reason: 'tNd outside the validity window' },
  ],
};

describe('trend chart with the least-significant-change band (SVG, parsed with @xmldom/xmldom)', () => {
  const svg = renderTrendChart(SPEC);
  const doc = parseSvg(svg);
  const y = axisScale(doc, 'value', 'y');

  it('the band spans baseline·e^−L to baseline·e^+L around the first visit', () => {
    const band = elements(doc, 'g').find((g) => g.getAttribute('class') === 'lsc-band')!;
    const rect = elements(band, 'rect')[0]!;
    const top = y.invert(num(rect, 'y'));
    const bottom = y.invert(num(rect, 'y') + num(rect, 'height'));
    expect(top).toBeCloseTo(1.5 * Math.exp(L), 2);
    expect(bottom).toBeCloseTo(1.5 * Math.exp(-L), 2);
  });

  it('marks visits beyond the band as filled and visits within as open (readable in greyscale)', () => {
    const pts = elements(doc, 'circle').filter((c) => c.getAttribute('class') === 'point');
    const byVisit = new Map(pts.map((c) => [c.getAttribute('data-visit'), c]));
    // ln(0.8/1.5) = −0.629: beyond 0.562. ln(1.2/1.5) = −0.223: within.
    expect(byVisit.get('2')!.getAttribute('data-beyond')).toBe('true');
    expect(byVisit.get('2')!.getAttribute('fill')).not.toBe('#ffffff');
    expect(byVisit.get('3')!.getAttribute('data-beyond')).toBe('false');
    expect(byVisit.get('3')!.getAttribute('fill')).toBe('#ffffff');
    for (const [visit, value] of [['1', 1.5], ['2', 0.8], ['3', 1.2]] as const) {
      expect(y.invert(num(byVisit.get(visit)!, 'cy'))).toBeCloseTo(value, 2);
    }
  });

  it('draws each 95 % interval where it belongs and says when a visit is not computable', () => {
    const whisker = elements(doc, 'g').find((g) => g.getAttribute('class') === 'interval' && g.getAttribute('data-visit') === '1')!;
    const stem = elements(whisker, 'line')[0]!;
    expect(y.invert(num(stem, 'y1'))).toBeCloseTo(1.1, 2);
    expect(y.invert(num(stem, 'y2'))).toBeCloseTo(1.95, 2);
    expect(allText(doc)).toMatch(/not computable/);
    expect(svg).not.toMatch(/NaN|Infinity|undefined/);
  });

  it('draws a reference line where asked (the Ea/Ees cut-off of 1.2)', () => {
    const d = parseSvg(renderTrendChart({ ...SPEC, key: 'eaEes', unit: '', reference: { value: 1.2, label: 'cut-off 1.2' } }));
    const ref = elements(d, 'line').find((l) => l.getAttribute('class') === 'reference')!;
    expect(axisScale(d, 'value', 'y').invert(num(ref, 'y1'))).toBeCloseTo(1.2, 2);
  });

  it('without a baseline value there is no band', () => {
    const d = parseSvg(renderTrendChart({ ...SPEC, points: [{ index: 1, date: '2024-01-15', value: null }] }));
    expect(elements(d, 'g').some((g) => g.getAttribute('class') === 'lsc-band')).toBe(false);
  });
});
