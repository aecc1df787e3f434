/**
 * Interrupted runs clean up (issue 8, item 6). `batch --out` on a large file
 * is stopped while its temporary file exists: SIGINT and SIGTERM remove it and
 * leave the earlier output as it was; SIGKILL cannot be caught, so the
 * temporary file stays, named after the target and the writer's pid with the
 * project's marker, and the next successful write to the same target removes it.
 */
import type { ChildProcess } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { ROOT, ok, requireBuild, runCli, type CliRun } from '../cli/fixtures/run-cli.js';

const ROWS = 150_000;
let scratch: string;
let big: string;
let dir: string;
let n = 0;

beforeAll(() => {
  requireBuild();
  scratch = mkdtempSync(join(tmpdir(), 'elastimate-interrupt-'));
  big = join(scratch, 'cohort.csv');
  // Invented rows, one repeated: enough work that the run lasts well beyond the moment it is stopped.
  const row = 'HT-015,2024-02-06,164,98,74,126,52,,68,104,284,171,92,invented\n';
  writeFileSync(big, 'participant,visit_date,sbp,dbp,hr,edv,esv,ef,sv,pep,et,height,weight,comment\n' + row.repeat(ROWS));
});

afterAll(() => {
  rmSync(scratch, { recursive: true, force: true });
});

beforeEach(() => {
  dir = join(scratch, `case-${++n}`);
  mkdirSync(dir);
});

/** Files of the batch output's own besides the target: temporary files, whatever their naming. */
function leftovers(): string[] {
  return readdirSync(dir).filter((f) => f.startsWith('.results.csv.'));
}

/** Start `batch big --out results.csv`, wait until its temporary file exists, send `signal`, and return the run and the child. */
async function stopMidway(signal: NodeJS.Signals): Promise<{ run: CliRun; child: ChildProcess; seen: string[] }> {
  let child: ChildProcess | undefined;
  let finished = false;
  const running = runCli(['batch', big, '--out', join(dir, 'results.csv')], { onSpawn: (c) => (child = c), timeoutMs: 60_000 }).finally(() => (finished = true));
  let seen: string[] = [];
  while (!finished && seen.length === 0) {
    await new Promise((r) => setTimeout(r, 5));
    seen = leftovers();
  }
  if (finished || !child) throw new Error('the batch run ended before its temporary file was seen: make the input larger');
  child.kill(signal);
  return { run: await running, child, seen };
}

describe('batch --out stopped while writing', () => {
  for (const signal of ['SIGINT', 'SIGTERM'] as const) {
    it(`${signal}: the temporary file is removed and the earlier output kept`, async () => {
      writeFileSync(join(dir, 'results.csv'), 'earlier results\n');
      const { run } = await stopMidway(signal);
      expect(run.code).not.toBe(0);
      expect(leftovers()).toEqual([]);
      expect(readFileSync(join(dir, 'results.csv'), 'utf8')).toBe('earlier results\n');
    });
  }

  it('SIGKILL: the temporary file is recognisably the tool\'s (target, pid, marker) and the next write removes it', async () => {
    const { child, seen } = await stopMidway('SIGKILL');
    expect(seen).toEqual([`.results.csv.${child.pid}.elastimate-tmp`]);
    expect(leftovers()).toEqual(seen);
    ok(await runCli(['batch', join(ROOT, 'cases', 'hypertension-cohort.csv'), '--out', join(dir, 'results.csv')]));
    expect(leftovers()).toEqual([]);
    expect(readFileSync(join(dir, 'results.csv'), 'utf8')).toMatch(/^participant,/);
  });
});
