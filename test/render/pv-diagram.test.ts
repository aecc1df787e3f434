import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { assess, type Assessment } from '../../src/assessment/assess.js';
import { parseInputs, type RawInputs } from '../../src/assessment/inputs.js';
import { pressureOnEndDiastolicCurve } from '../../src/physiology/end-diastolic-pressure-volume.js';
import { SERIES_DASH, VISIT_STYLES, renderPvDiagram } from '../../src/render/pv-diagram.js';
import { allText, axisScale, elements, num, parseSvg, points, series } from './svg-helpers.js';

// An invented subject (volumetric SV, so Ea = Pes/(EDV − ESV) is also the Ea line's slope).
const HT: RawInputs = { sbp: 150, dbp: 92, hr: 68, edv: 118, esv: 46, ef: 61, pep: 95, et: 285, edp: 14 };
const visit = (raw: RawInputs): Assessment => assess(parseInputs(raw));
const loopOf = (a: Assessment) => a.mechanics!.loop;

function draw(...visits: Assessment[]) {
  const svg = renderPvDiagram(visits.map((a, i) => ({ label: `Visit ${i + 1}`, loop: loopOf(a) })), { title: 'test diagram' });
  const doc = parseSvg(svg);
  const vol = axisScale(doc, 'volume', 'x');
  const pres = axisScale(doc, 'pressure', 'y');
  const toData = ([x, y]: [number, number]): [number, number] => [vol.invert(x), pres.invert(y)];
  return { svg, doc, toData };
}

function lineEnds(el: ReturnType<typeof series>[number], toData: (p: [number, number]) => [number, number]) {
  return [toData([num(el, 'x1'), num(el, 'y1')]), toData([num(el, 'x2'), num(el, 'y2')])] as const;
}

describe('estimated pressure–volume diagram (SVG, parsed with @xmldom/xmldom)', () => {
  const a = visit(HT);
  const r = a.results;
  const { doc, toData, svg } = draw(a);

  it('is well-formed SVG with a title, a description and no NaN, Infinity or undefined', () => {
    expect(elements(doc, 'title')[0]?.textContent).toBe('test diagram');
    expect(elements(doc, 'desc')[0]?.textContent).toMatch(/EDV 118 mL/);
    expect(svg).not.toMatch(/NaN|Infinity|undefined/);
  });

  it('the end-systolic line passes through (ESV, Pes) with slope Ees (inverting the axis ticks)', () => {
    const [line] = series(doc, 0, 'espvr');
    const [p, q] = lineEnds(line!, toData);
    const slope = (q[1] - p[1]) / (q[0] - p[0]);
    expect(slope).toBeCloseTo(r.ees.value!, 2);
    const atEsv = p[1] + slope * (46 - p[0]);
    expect(Math.abs(atEsv - r.pes.value!)).toBeLessThan(0.05);
    // …and meets P = 0 at V0 = ESV − Pes/Ees (extended, since V0 < 0 lies off the axis).
    expect(p[0] - p[1] / slope).toBeCloseTo(r.v0.value!, 0);
  });

  it('the diastolic curve passes through (EDV, EDP) and through 30 mmHg at V30 (Klotz 2006 and Nat Protoc 2007, as quoted by a secondary implementation)', () => {
    const [curve] = series(doc, 0, 'edpvr');
    const pts = points(curve!).map(toData);
    const atEdv = pts.find(([v]) => Math.abs(v - 118) < 0.05);
    expect(atEdv).toBeDefined();
    expect(Math.abs(atEdv![1] - 14)).toBeLessThan(0.05);
    // V30 from the published one-point construction, computed here.
    const v0 = 118 * (0.6 - 0.006 * 14);
    const v30 = v0 + (118 - v0) / (14 / 27.78) ** (1 / 2.76);
    const i = pts.findIndex(([v]) => v > v30);
    expect(i).toBeGreaterThan(0);
    const [a0, b0] = [pts[i - 1]!, pts[i]!];
    const p30 = a0[1] + ((b0[1] - a0[1]) * (v30 - a0[0])) / (b0[0] - a0[0]);
    expect(Math.abs(p30 - 30)).toBeLessThan(0.6); // chord between samples of a convex curve
  });

  it('the Ea line meets the volume axis at EDV and ends at (ESV, Pes); its slope is Ea', () => {
    const [line] = series(doc, 0, 'ea');
    const [p, q] = lineEnds(line!, toData);
    expect(Math.abs(p[0] - 118)).toBeLessThan(0.05);
    expect(Math.abs(p[1])).toBeLessThan(0.05);
    expect(Math.abs(q[0] - 46)).toBeLessThan(0.05);
    expect(Math.abs(q[1] - r.pes.value!)).toBeLessThan(0.05);
    expect(-(q[1] - p[1]) / (q[0] - p[0])).toBeCloseTo(r.ea.value!, 2);
  });

  it('the loop: isovolumic contraction at EDV from EDP to DBP, ejection to (ESV, Pes) peaking at SBP, relaxation down to the diastolic curve', () => {
    const [loop] = series(doc, 0, 'loop');
    expect(loop!.tagName).toBe('polygon');
    const pts = points(loop!).map(toData);
    const near = (v: number, p: number) => pts.some(([x, y]) => Math.abs(x - v) < 0.05 && Math.abs(y - p) < 0.05);
    expect(near(118, 14)).toBe(true);
    expect(near(118, 92)).toBe(true);
    expect(near(46, r.pes.value!)).toBe(true);
    const curve = a.mechanics!.diastolic.curve!;
    expect(near(46, pressureOnEndDiastolicCurve(curve, 46))).toBe(true);
    const peak = Math.max(...pts.map(([, y]) => y));
    expect(Math.abs(peak - 150)).toBeLessThan(1); // sampled peak of the schematic limb
  });

  it('marks end-systole and end-diastole where the numbers put them', () => {
    const markers = elements(doc, 'circle').filter((c) => c.getAttribute('data-marker') === 'end-systole' || c.getAttribute('data-marker') === 'end-diastole');
    const at = markers.map((c) => toData([num(c, 'cx'), num(c, 'cy')]));
    expect(at.some(([v, p]) => Math.abs(v - 46) < 0.05 && Math.abs(p - r.pes.value!) < 0.05)).toBe(true);
    expect(at.some(([v, p]) => Math.abs(v - 118) < 0.05 && Math.abs(p - 14) < 0.05)).toBe(true);
  });

  it('a second visit is overlaid in a distinct style: other colour, open squares, other line weight', () => {
    const b = visit({ ...HT, sbp: 132, dbp: 84, edv: 122, esv: 50, edp: 11 });
    const two = draw(a, b);
    const groups = elements(two.doc, 'g').filter((g) => g.getAttribute('class') === 'visit');
    expect(groups.map((g) => g.getAttribute('stroke'))).toEqual([VISIT_STYLES[1].colour, VISIT_STYLES[0].colour]);
    expect(elements(groups[0]!, 'rect').filter((e) => e.getAttribute('data-marker')).length).toBe(2);
    expect(elements(groups[1]!, 'circle').filter((e) => e.getAttribute('data-marker')).length).toBe(2);
    const [ea2] = series(two.doc, 1, 'ea');
    const [p] = lineEnds(ea2!, two.toData);
    expect(Math.abs(p[0] - 122)).toBeLessThan(0.05);
    expect(allText(two.doc)).toMatch(/Visit 2 \(compared\)/);
  });

  it('reads in greyscale: the two visit colours differ in relative luminance (WCAG 2 formula), and each kind of line has its own dash pattern', () => {
    // Relative luminance, WCAG 2.x definition (an open standard).
    const lum = (hex: string) => {
      const c = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((u) => (u <= 0.03928 ? u / 12.92 : ((u + 0.055) / 1.055) ** 2.4));
      return 0.2126 * c[0]! + 0.7152 * c[1]! + 0.0722 * c[2]!;
    };
    const [l1, l2] = [lum(VISIT_STYLES[0].colour), lum(VISIT_STYLES[1].colour)];
    expect((Math.max(l1, l2) + 0.05) / (Math.min(l1, l2) + 0.05)).toBeGreaterThan(2);
    expect(new Set(Object.values(SERIES_DASH)).size).toBe(4);
    for (const name of ['espvr', 'edpvr', 'ea'] as const) expect(series(doc, 0, name)[0]!.getAttribute('stroke-dasharray')).toBe(SERIES_DASH[name]);
  });

  it('without EDP or E/e′ it says the diastolic curve needs them and draws the ejection limb only', () => {
    const noEdp = visit({ ...HT, edp: undefined });
    const d = draw(noEdp);
    expect(series(d.doc, 0, 'edpvr')).toHaveLength(0);
    expect(series(d.doc, 0, 'loop')[0]!.tagName).toBe('polyline');
    expect(allText(d.doc)).toMatch(/diastolic curve needs EDP or E\/e′/);
  });

  it('an EDP estimated from E/e′ (Nagueh 1997: 1.24·11 + 1.9 = 15.54 mmHg) is drawn and labelled as an estimate', () => {
    const est = visit({ ...HT, edp: undefined, eOverEPrime: 11 });
    const d = draw(est);
    const pts = points(series(d.doc, 0, 'edpvr')[0]!).map(d.toData);
    const atEdv = pts.find(([v]) => Math.abs(v - 118) < 0.05)!;
    expect(Math.abs(atEdv[1] - 15.54)).toBeLessThan(0.05);
    expect(allText(d.doc)).toMatch(/ESTIMATED from E\/e′/);
  });

  it('property: any accepted visit gives well-formed SVG without NaN, Infinity or undefined', () => {
    fc.assert(
      fc.property(
        fc.record({
          sbp: fc.integer({ min: 90, max: 220 }),
          pulse: fc.integer({ min: 15, max: 90 }),
          edv: fc.integer({ min: 40, max: 400 }),
          efFrac: fc.double({ min: 0.1, max: 0.8, noNaN: true }),
          pep: fc.integer({ min: 40, max: 180 }),
          et: fc.integer({ min: 150, max: 400 }),
          edp: fc.option(fc.double({ min: 2, max: 45, noNaN: true }), { nil: undefined }),
        }),
        (x) => {
          const dbp = Math.min(160, Math.max(30, x.sbp - x.pulse));
          const esv = Math.max(5, Math.round(x.edv * (1 - x.efFrac)));
          fc.pre(esv < x.edv && dbp < x.sbp);
          const v = visit({ sbp: x.sbp, dbp, edv: x.edv, esv, pep: x.pep, et: x.et, edp: x.edp });
          const svg = renderPvDiagram([{ label: 'V', loop: loopOf(v) }, { label: 'W', loop: loopOf(visit(HT)) }]);
          expect(svg).not.toMatch(/NaN|Infinity|undefined/);
          parseSvg(svg);
        },
      ),
      { numRuns: 60 },
    );
  });
});
