import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { DOMParser, type Document, type Element } from '@xmldom/xmldom';
import { describe, expect, it } from 'vitest';
import { buildReportModel } from '../../src/cli/report-command.js';
import { compareVisits } from '../../src/records/compare.js';
import { SubjectFileSchema } from '../../src/records/subject-schema.js';
import { decimalsFor, formatNumber } from '../../src/render/format.js';
import { renderReportHtml } from '../../src/render/report-html.js';
import { renderReportMarkdown } from '../../src/render/report-markdown.js';
import { elements, parseSvg } from './svg-helpers.js';

const FIXTURE = join(import.meta.dirname, '..', 'report', 'fixtures', 'HT-014.subject.json');
const file = SubjectFileSchema.parse(JSON.parse(readFileSync(FIXTURE, 'utf8')));
const options = { generated: '2024-08-01', toolVersion: '0.0.0-test', draws: 2000, seed: 7 };

function parseHtml(html: string): Document {
  const problems: string[] = [];
  const doc = new DOMParser({ onError: (level, msg) => problems.push(`${level}: ${msg}`) }).parseFromString(html, 'text/html');
  expect(problems).toEqual([]);
  return doc;
}
const byClass = (doc: Document | Element, tag: string, cls: string) => elements(doc, tag).filter((e) => (e.getAttribute('class') ?? '').split(' ').includes(cls));
const text = (e: Element) => (e.textContent ?? '').replace(/\s+/g, ' ').trim();

describe('case-conference report, HTML (parsed with @xmldom/xmldom)', async () => {
  const model = await buildReportModel(file, options);
  const html = renderReportHtml(model);
  const doc = parseHtml(html);

  it('is self-contained: inline CSS and SVG, no script, no external reference of any kind', () => {
    expect(html).not.toMatch(/<script|<link|<iframe|<img|@import|url\(|\bsrc=/i);
    const addresses = html.match(/\b(?:https?|ftp):\/\/[^\s"'<>)]+/g) ?? [];
    expect(new Set(addresses)).toEqual(new Set(['http://www.w3.org/2000/svg'])); // the SVG namespace name, never fetched
    expect(html).toMatch(/@media print/);
    expect(html).toMatch(/@page/);
    expect(html).not.toMatch(/\b(NaN|Infinity|undefined)\b/);
  });

  it('has the subject, the reported visit (the last by default) and the visit table with every visit', () => {
    expect(text(elements(doc, 'h1')[0]!)).toMatch(/case-conference summary/);
    expect(html).toContain('Subject HT-014 · male · born 1966');
    expect(html).toContain('Visit reported: <strong>Visit 3 · 2024-07-15</strong>; compared with Visit 2 · 2024-04-15');
    const visitRows = byClass(doc, 'section', 'sheet')[1]!.getElementsByTagName('tbody')[1]!.getElementsByTagName('tr');
    expect(visitRows.length).toBe(3);
    expect(byClass(doc, 'tr', 'selected')).toHaveLength(1);
  });

  it('shows the key results with their 95 % intervals from the uncertainty module', () => {
    const ea = model.visits[2]!.assessment.results.ea;
    expect(ea.interval95).toBeDefined();
    const d = decimalsFor('mmHg/mL');
    expect(html).toContain(`${formatNumber(ea.interval95![0], d)} to ${formatNumber(ea.interval95![1], d)}`);
    expect(html).toMatch(/Probability Ea\/Ees &gt; 1\.2/);
    expect(html).toMatch(/2,000 draws, seed 7/);
  });

  it('inlines the pressure–volume diagram of the reported visit with the previous one overlaid, and three trend charts', () => {
    const svgs = elements(doc, 'svg');
    expect(byClass(doc, 'svg', 'pv-diagram')).toHaveLength(1);
    const pv = byClass(doc, 'svg', 'pv-diagram')[0]!;
    expect(byClass(pv, 'g', 'visit').map((g) => g.getAttribute('data-visit')).sort()).toEqual(['0', '1']);
    const trends = byClass(doc, 'svg', 'trend-chart');
    expect(trends.map((t) => t.getAttribute('data-key'))).toEqual(['ea', 'ees', 'eaEes']);
    for (const t of trends) expect(byClass(t, 'circle', 'point')).toHaveLength(3);
    expect(svgs).toHaveLength(4);
    // Every inline SVG is also well-formed XML on its own.
    for (const m of html.match(/<svg[\s\S]*?<\/svg>/g)!) parseSvg(m);
  });

  it('the trend band is the least significant change that record compare applies from the first visit', () => {
    const lsc = compareVisits(model.visits[0]!.assessment, model.visits[0]!.assessment).rows.find((r) => r.key === 'ees')!.lsc;
    const band = byClass(byClass(doc, 'svg', 'trend-chart')[1]!, 'g', 'lsc-band')[0]!;
    const baseline = model.visits[0]!.assessment.results.ees.value!;
    expect(Number(band.getAttribute('data-high'))).toBeCloseTo(baseline * Math.exp(lsc.logLimit), 9);
    expect(Number(band.getAttribute('data-low'))).toBeCloseTo(baseline * Math.exp(-lsc.logLimit), 9);
    expect(lsc.logLimit).toBeCloseTo(2.77 * 0.203, 9); // 2.77 × the repeat CV of 20.3 % (Chen 2001 abstract)
  });

  it('has afterload beside Ea, energetics, the change judged against noise, caveats and the referral note', () => {
    expect(html).toContain('Wall stress, meridional (Reichek 1982)');
    expect(html).toContain('Stroke work SW');
    expect(html).toMatch(/Change from Visit 2 · 2024-04-15 to Visit 3 · 2024-07-15/);
    expect(html).toMatch(/least significant change/);
    const sel = model.visits[2]!.assessment;
    const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
    expect(html).toContain(esc(sel.referral));
    for (const c of sel.caveats) expect(html).toContain(esc(c));
    expect(html).toMatch(/research use/i);
  });

  it('--visit picks another visit, and the first visit has nothing overlaid or compared', async () => {
    const first = await buildReportModel(file, { ...options, visit: '2024-01-15' });
    expect(first.selected).toBe(0);
    expect(first.compared).toBeNull();
    const h = renderReportHtml(first);
    expect(h).not.toMatch(/Change from/);
    expect(byClass(byClass(parseHtml(h), 'svg', 'pv-diagram')[0]!, 'g', 'visit')).toHaveLength(1);
  });
});

describe('case-conference report, Markdown with SVG files beside it', async () => {
  const model = await buildReportModel(file, options);
  const { markdown, files } = renderReportMarkdown(model, 'HT-014 report');

  it('links every picture it ships, by relative name, and ships every picture it links', () => {
    const links = [...markdown.matchAll(/!\[[^\]]*\]\(([^)]+)\)/g)].map((m) => decodeURI(m[1]!));
    expect(links.sort()).toEqual(files.map((f) => f.name).sort());
    expect(files.map((f) => f.name)).toEqual(['HT-014 report-pv.svg', 'HT-014 report-trend-ea.svg', 'HT-014 report-trend-ees.svg', 'HT-014 report-trend-eaEes.svg']);
    for (const f of files) parseSvg(f.content);
  });

  it('has the same content as the page: visit table, key results, change, caveats, referral note', () => {
    expect(markdown).toMatch(/^# Ventricular–arterial coupling: case-conference summary/);
    expect(markdown.split('\n').filter((l) => /^\| \d( \(reported\))? \| 2024-/.test(l))).toHaveLength(3);
    expect(markdown).toMatch(/## Key results/);
    expect(markdown).toMatch(/## Change from Visit 2/);
    expect(markdown).toMatch(/## Referral note/);
    expect(markdown).not.toMatch(/\b(NaN|Infinity|undefined)\b/);
  });
});
