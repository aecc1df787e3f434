/**
 * `elastimate batch` on a file large enough (over a megabyte) to be shared
 * with a worker thread (needs dist/: `npm run build`): the output must be,
 * byte for byte, what the rows give one by one in this process (batchRow,
 * written by csvText), whichever thread computed each piece and in whatever
 * order the pieces came back; read back by csv-parse (a general-purpose
 * RFC 4180 parser) it has one row per input row. Run from the bundle
 * (dist/bundle/batch-worker.js) and from tsc's output (dist/cli/batch-worker.js),
 * the latter under `node --input-type=module -e`, whose options a worker
 * must not inherit.
 */
import { spawn } from 'node:child_process';
import { parse } from 'csv-parse/sync';
import { stringify } from 'csv-stringify/sync';
import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { planBatch, batchRow } from '../../src/records/batch-row.js';
import { csvText } from '../../src/render/csv.js';
import { ROOT, STACK_FRAME, plainEnv, requireBuild, runCli } from './fixtures/run-cli.js';

const HEADER = ['participant', 'visit', 'sbp', 'dbp', 'hr', 'edv', 'esv', 'ef', 'sv', 'pep', 'et', 'height', 'weight', 'rhythm', 'comment'];
const ROWS = 20_000;

/** An invented cohort (a fixed linear congruential sequence): mostly plausible rows, some typing errors, units, quoted text. */
function cohort(): string[][] {
  let state = 7;
  const next = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 4294967296;
  };
  const rows: string[][] = [];
  for (let i = 0; i < ROWS; i++) {
    const sbp = 100 + 70 * next();
    const edv = 90 + 80 * next();
    const esv = edv * (0.3 + 0.25 * next());
    rows.push([
      `PX-${String(i).padStart(5, '0')}`,
      String(1 + (i % 4)),
      i % 997 === 0 ? '16kPa' : i % 11 === 0 ? `${sbp.toFixed(0)};${(sbp + 4).toFixed(0)}` : sbp.toFixed(0),
      i % 389 === 0 ? (sbp + 5).toFixed(0) : (sbp * (0.5 + 0.2 * next())).toFixed(0),
      i % 5 === 0 ? '' : (50 + 50 * next()).toFixed(0),
      edv.toFixed(0),
      esv.toFixed(0),
      i % 3 === 0 ? '' : (100 * (1 - esv / edv)).toFixed(0),
      i % 2 === 0 ? '' : (45 + 50 * next()).toFixed(1),
      i % 613 === 0 ? 'abc' : (70 + 50 * next()).toFixed(0),
      i % 211 === 0 ? '0.29 s' : (240 + 90 * next()).toFixed(0),
      (150 + 45 * next()).toFixed(0),
      (50 + 60 * next()).toFixed(0),
      i % 101 === 0 ? 'atrial-fibrillation' : '',
      i % 7 === 0 ? `visit ${i}, "fasting"\nsecond line é` : '',
    ]);
  }
  return rows;
}

let dir: string;
let input: string;
let expected: string;
beforeAll(() => {
  requireBuild();
  dir = mkdtempSync(join(tmpdir(), 'elastimate-batch-parallel-'));
  input = join(dir, 'cohort.csv');
  const rows = cohort();
  writeFileSync(input, stringify([HEADER, ...rows]));
  const layout = planBatch(HEADER);
  expected = csvText([layout.outputHeader, ...rows.map((r) => batchRow(layout, r))]);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function checkOutput(path: string): void {
  const written = readFileSync(path, 'utf8');
  expect(written === expected, 'output differs from the rows computed one by one').toBe(true);
  const rows = parse(written, { columns: true }) as Record<string, string>[];
  expect(rows).toHaveLength(ROWS);
  expect(rows.filter((r) => r.error !== '').length).toBeGreaterThan(10);
}

describe('batch on a file shared with worker threads', () => {
  it('is over the size at which workers start', () => {
    expect(statSync(input).size).toBeGreaterThan(1 << 20);
  });

  it('writes, from the bundle, exactly the rows computed one by one, in input order', async () => {
    const out = join(dir, 'bundle.csv');
    const run = await runCli(['batch', input, '--out', out], { timeoutMs: 60_000 });
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(run.code, run.stderr).toBe(0);
    expect(run.stderr).toMatch(new RegExp(`${ROWS} record\\(s\\) read, ${ROWS} written, \\d+ with an error`));
    checkOutput(out);
  });

  it('does the same from tsc output under node --input-type=module -e', async () => {
    const out = join(dir, 'tsc.csv');
    const main = pathToFileURL(join(ROOT, 'dist', 'cli', 'main.js')).href;
    const script = `const { main } = await import(${JSON.stringify(main)}); process.exitCode = await main(['node', 'elastimate', 'batch', ${JSON.stringify(input)}, '--out', ${JSON.stringify(out)}]);`;
    const code = await new Promise<{ code: number | null; stderr: string }>((resolve, reject) => {
      const child = spawn(process.execPath, ['--input-type=module', '-e', script], { cwd: ROOT, env: plainEnv(), stdio: ['ignore', 'ignore', 'pipe'] });
      let stderr = '';
      child.stderr.setEncoding('utf8').on('data', (d: string) => (stderr += d));
      child.on('error', reject);
      child.on('close', (c) => resolve({ code: c, stderr }));
    });
    expect(code.stderr).not.toMatch(STACK_FRAME);
    expect(code.code, code.stderr).toBe(0);
    checkOutput(out);
  });
});
