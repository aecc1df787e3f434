/**
 * `elastimate synthetic` spawned as a user runs it (needs `npm run build`).
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { STACK_FRAME, ok, requireBuild, runCli } from './fixtures/run-cli.js';

let scratch: string;
beforeAll(() => {
  requireBuild();
  scratch = mkdtempSync(join(tmpdir(), 'elastimate-synthetic-'));
});
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

interface CohortJson {
  subjects: { id: number; shape: string; trueEes: number; occlusionEes: number | null; estimatedEes: number | null; tNd: number | null; ea: number | null; eaEes: number | null }[];
  summary: { n: number; computable: number; bias: number | null; loa: [number, number] | null; r: number | null; byShape: Record<string, unknown> };
  note: string;
}

describe('elastimate synthetic (known truth for the single-beat method; Bland & Altman 1986)', () => {
  it('the same seed gives the same output; both shapes by default; the contract keys; the SVG is written', async () => {
    const svg = join(scratch, 'ba.svg');
    const args = ['synthetic', '--n', '20', '--seed', '5', '--json'];
    const a = ok(await runCli([...args, '--svg', svg], { timeoutMs: 120_000 }));
    const b = ok(await runCli(args, { timeoutMs: 120_000 }));
    expect(b.stdout).toBe(a.stdout);
    const j = JSON.parse(a.stdout) as CohortJson;
    expect(j.subjects).toHaveLength(40);
    expect(new Set(j.subjects.map((s) => s.shape))).toEqual(new Set(['hill-a', 'hill-b']));
    for (const k of ['trueEes', 'occlusionEes', 'estimatedEes', 'tNd', 'ea', 'eaEes']) expect(j.subjects[0]).toHaveProperty(k);
    expect(j.summary.n).toBe(20);
    expect(Object.keys(j.summary.byShape).sort()).toEqual(['hill-a', 'hill-b']);
    expect(j.note).toMatch(/agreement within the model/);
    expect(readFileSync(svg, 'utf8')).toMatch(/^<svg[\s\S]*Bland–Altman[\s\S]*<\/svg>\n$/);
  }, 300_000);

  it('--csv: one row per adult and shape, the summary in words on stderr', async () => {
    const run = await runCli(['synthetic', '--n', '10', '--shape', 'hill-a', '--csv'], { timeoutMs: 120_000 });
    expect(run.code).toBe(0);
    const lines = run.stdout.trim().split('\r\n');
    expect(lines[0]).toMatch(/^id,shape,true_ees,occlusion_ees,estimated_ees,tnd/);
    expect(lines).toHaveLength(11);
    expect(run.stderr).toMatch(/limits of\s+agreement|too few to compare/);
  }, 300_000);

  it.each([
    ['--n', '3'],
    ['--n', 'many'],
    ['--shape', 'hill-z'],
    ['--seed', 'x'],
    ['--near', 'no-such-visit.json'],
  ])('bad input %s %s: one message, exit 2', async (flag, value) => {
    const run = await runCli(['synthetic', flag, value]);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(new RegExp(`^elastimate: [^:]+: got "${value}"; `));
    expect(run.stderr).toContain('accepted: ');
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(run.stdout).toBe('');
  });
});
