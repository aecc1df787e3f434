/**
 * `--model-loop` on `assess --svg/--sketch` and on `report`: the simulated
 * loop of the model fitted to the visit, overlaid on the estimated diagram,
 * labelled as a model loop, with the model's cautions (needs `npm run build`).
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FORBIDDEN_WORDS, ROOT, expectRefusal, ok, requireBuild, runCli } from './fixtures/run-cli.js';
import { allText, axisScale, parseSvg, points } from '../render/svg-helpers.js';

const VISIT = join(ROOT, 'cases', 'hypertension-trial.visit.json');
const SUBJECT = join(ROOT, 'test', 'report', 'fixtures', 'HT-014.subject.json');
let dir = '';

beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-model-loop-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function modelLoopPolygons(svg: string) {
  const doc = parseSvg(svg);
  const polys = Array.from(doc.getElementsByTagName('polygon')).filter((p) => p.getAttribute('data-series') === 'model-loop');
  return { doc, polys };
}

describe('assess --model-loop', () => {
  it('overlays the simulated loop on the estimated diagram, on the same axes: its largest volume is the measured EDV and its smallest EDV − SV used, within the fit tolerance of 2 % (docs/model.md); labelled as a model loop with the cautions', async () => {
    const svgPath = join(dir, 'visit.svg');
    ok(await runCli(['assess', '--input', VISIT, '--svg', svgPath, '--model-loop']));
    const assessed = JSON.parse(ok(await runCli(['assess', '--input', VISIT, '--json'])).stdout) as { results: Record<string, { value: number }> };
    const svg = readFileSync(svgPath, 'utf8');
    const { doc, polys } = modelLoopPolygons(svg);
    expect(polys).toHaveLength(1);
    // Undo the drawing's scale from its own tick labels (not the renderer's code).
    const vx = axisScale(doc, 'volume', 'x');
    const volumes = points(polys[0]!).map(([x]) => vx.invert(x));
    const edv = 118;
    const sv = assessed.results.svUsed!.value;
    expect(Math.abs(Math.max(...volumes) - edv)).toBeLessThanOrEqual(0.02 * edv);
    expect(Math.abs(Math.min(...volumes) - (edv - sv))).toBeLessThanOrEqual(0.02 * sv + 1);
    const text = allText(doc);
    expect(text).toContain('Model loop (simulated by the model fitted to this visit)');
    expect(text).toMatch(/not a measured loop/);
    expect(text).toMatch(/Defer to clinical judgement/);
    expect(svg).not.toMatch(FORBIDDEN_WORDS);
  });

  it('without the option the diagram has no model loop', async () => {
    const svgPath = join(dir, 'plain.svg');
    ok(await runCli(['assess', '--input', VISIT, '--svg', svgPath]));
    const svg = readFileSync(svgPath, 'utf8');
    expect(modelLoopPolygons(svg).polys).toHaveLength(0);
    expect(svg).not.toMatch(/Model loop/);
  });

  it('--sketch draws it with its own glyph and legend; when no model can be fitted it says why and draws none', async () => {
    const run = ok(await runCli(['assess', '--input', VISIT, '--sketch', '--model-loop']));
    expect(run.stdout).toMatch(/^\* Model loop \(simulated/m);
    expect(run.stdout).toMatch(/Defer to clinical judgement/);
    const failing = ok(await runCli(['assess', '--sbp', '120', '--dbp', '80', '--hr', '70', '--edv', '120', '--esv', '50', '--pep', '20', '--et', '400', '--sketch', '--model-loop', '--no-input']));
    expect(failing.stdout).toMatch(/No model loop: Ees is not computable/);
    expect(failing.stdout).not.toMatch(/^\* Model loop/m);
  });

  it('--model-loop without a diagram: one message naming the option, exit 2', async () => {
    const run = await runCli(['assess', '--input', VISIT, '--model-loop']);
    expectRefusal(run, '--model-loop', 'accepted: together with --svg <file> or --sketch');
  });
});

describe('report --model-loop', () => {
  it('the case-conference report overlays the model loop of the reported visit, with its caption and cautions; without the option it does not', async () => {
    const out = join(dir, 'with.html');
    ok(await runCli(['report', SUBJECT, '--out', out, '--draws', '1000', '--model-loop'], { timeoutMs: 60_000 }));
    const html = readFileSync(out, 'utf8');
    expect(html).toContain('data-series="model-loop"');
    expect(html).toMatch(/The dashed green loop is a model loop/);
    expect(html).toMatch(/not a measured loop/);
    const plain = join(dir, 'without.html');
    ok(await runCli(['report', SUBJECT, '--out', plain, '--draws', '1000'], { timeoutMs: 60_000 }));
    expect(readFileSync(plain, 'utf8')).not.toContain('model-loop');
  });
});
