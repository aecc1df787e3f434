/**
 * The report rendered by a real browser, headless: the command named by
 * ELASTIMATE_BROWSER, else the usual Chromium or Chrome command (find-browser.ts;
 * .ci/run installs Debian's chromium when missing). Without a working browser
 * this file is skipped with one line saying what to install, except when
 * CI=true (as .ci/run sets), where a missing browser fails the run.
 * Checks that the page rendered (a screenshot decoded with pngjs has ink,
 * including the diagram's colours) and that printing gives one page per
 * report sheet on both Letter (Chromium's default paper) and A4.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { PNG } from 'pngjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildReportModel } from '../../src/cli/report-command.js';
import { SubjectFileSchema } from '../../src/records/subject-schema.js';
import { renderReportHtml } from '../../src/render/report-html.js';
import { INSTALL_HINT, findBrowser } from './find-browser.js';

const BROWSER = findBrowser();
const IN_CI = process.env.CI === 'true';
/** Skip only on a developer's machine without any browser; in CI, or with a named browser that does not run, fail. */
const SKIP = BROWSER.command === null && !IN_CI && !BROWSER.namedButBroken;
if (SKIP) console.warn(`test/report/browser.test.ts skipped: ${BROWSER.problem}; ${INSTALL_HINT}`);
const FIXTURE = join(import.meta.dirname, 'fixtures', 'HT-014.subject.json');

let work: string;
let reportPath: string;
let html: string;

/** Run Chromium headless with a fresh profile; resolves when it exits (killed after 90 s). */
function chromium(args: string[]): Promise<{ code: number | null; stderr: string }> {
  const profile = mkdtempSync(join(tmpdir(), 'elastimate-chromium-'));
  const flags = [
    '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
    '--disable-component-update', '--disable-sync', '--hide-scrollbars', `--user-data-dir=${profile}`,
  ];
  return new Promise((resolve, reject) => {
    const child = spawn(BROWSER.command!, [...flags, ...args], { stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.setEncoding('utf8').on('data', (d: string) => (stderr += d));
    const timer = setTimeout(() => child.kill('SIGKILL'), 90_000);
    child.on('error', (err) => {
      clearTimeout(timer);
      reject(err);
    });
    child.on('close', (code) => {
      clearTimeout(timer);
      rmSync(profile, { recursive: true, force: true });
      resolve({ code, stderr });
    });
  });
}

/** Page objects of a PDF: `/Type /Page` dictionaries (not `/Pages`). */
function pdfPageCount(path: string): number {
  const text = readFileSync(path).toString('latin1');
  expect(text.startsWith('%PDF-')).toBe(true);
  return (text.match(/\/Type\s*\/Page(?![A-Za-z])/g) ?? []).length;
}

describe.skipIf(SKIP)('the report in headless Chromium', () => {
  beforeAll(async () => {
    if (BROWSER.command === null) {
      throw new Error(`${BROWSER.problem}: ${INSTALL_HINT}${IN_CI ? ' (CI=true: the browser test never skips in CI)' : ''}`);
    }
    work = mkdtempSync(join(tmpdir(), 'elastimate-browser-'));
    const file = SubjectFileSchema.parse(JSON.parse(readFileSync(FIXTURE, 'utf8')));
    html = renderReportHtml(await buildReportModel(file, { generated: '2024-08-01', toolVersion: '0.0.0-test', draws: 2000, seed: 3 }));
    reportPath = join(work, 'report.html');
    writeFileSync(reportPath, html);
  }, 60_000);

  afterAll(() => {
    if (work) rmSync(work, { recursive: true, force: true });
  });

  it('renders to a PNG with ink on the page, the diagram\'s blue and orange among it', async () => {
    const png = join(work, 'report.png');
    const run = await chromium([`--screenshot=${png}`, '--window-size=1000,2400', pathToFileURL(reportPath).href]);
    expect(existsSync(png), `no screenshot; chromium exited ${run.code}: ${run.stderr.slice(-400)}`).toBe(true);
    const image = PNG.sync.read(readFileSync(png));
    expect(image.width).toBe(1000);
    let ink = 0;
    let blue = 0;
    let orange = 0;
    const near = (r: number, g: number, b: number, [R, G, B]: number[]) => Math.abs(r - R!) + Math.abs(g - G!) + Math.abs(b - B!) < 60;
    for (let i = 0; i < image.data.length; i += 4) {
      const [r, g, b] = [image.data[i]!, image.data[i + 1]!, image.data[i + 2]!];
      if (r < 200 || g < 200 || b < 200) ink++;
      if (near(r, g, b, [0x00, 0x72, 0xb2])) blue++;
      if (near(r, g, b, [0xe6, 0x9f, 0x00])) orange++;
    }
    const share = ink / (image.width * image.height);
    expect(share).toBeGreaterThan(0.02); // text, tables and drawings
    expect(share).toBeLessThan(0.6); // not a solid block
    expect(blue).toBeGreaterThan(500); // the selected visit's lines (Okabe–Ito blue)
    expect(orange).toBeGreaterThan(200); // the compared visit overlaid (Okabe–Ito orange)
  }, 120_000);

  it('prints one page per report sheet on Letter (Chromium\'s default) and on A4', async () => {
    const sheets = (html.match(/<section class="sheet"/g) ?? []).length;
    expect(sheets).toBe(4);
    const a4Path = join(work, 'report-a4.html');
    writeFileSync(a4Path, html.replace('</style>', '@page { size: A4; }</style>'));
    for (const [name, page, size] of [['letter', reportPath, /\/MediaBox\s*\[\s*0 0 612 792\s*\]/], ['a4', a4Path, /\/MediaBox\s*\[\s*0 0 59[45](\.\d+)? 84[12](\.\d+)?\s*\]/]] as const) {
      const pdf = join(work, `report-${name}.pdf`);
      const run = await chromium(['--no-pdf-header-footer', `--print-to-pdf=${pdf}`, pathToFileURL(page).href]);
      expect(existsSync(pdf), `no PDF; chromium exited ${run.code}: ${run.stderr.slice(-400)}`).toBe(true);
      expect(pdfPageCount(pdf), `${name}: pages`).toBe(sheets);
      expect(readFileSync(pdf).toString('latin1')).toMatch(size);
    }
  }, 180_000);
});
