/**
 * The subject file keeps its locked read-modify-write update, and is refused
 * when it is a symbolic link, a special file or read-only (issue 8, items 1,
 * 4 and 6): checked from the mode bits, so the refusal holds for root too.
 * The lock folder is its owner's alone whatever the umask, and a writer that
 * waits more than a second for another's lock says so on stderr.
 */
import { spawn, spawnSync } from 'node:child_process';
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { caseFolders } from './fixtures/case-folders.js';
import { ROOT, STACK_FRAME, ok, requireBuild, runCli } from '../cli/fixtures/run-cli.js';

const ADD = ['--date', '2025-01-01', '--sbp', '120', '--dbp', '80', '--hr', '60', '--edv', '120', '--esv', '50', '--pep', '90', '--et', '290', '--no-input'];
const WRITER = join(ROOT, 'test', 'records', 'fixtures', 'writer.mjs');

const here = caseFolders('subject');
let dir: string;
let subject: string;
let original: Buffer;
beforeEach(() => ({ dir, subject, original } = here));

describe('a subject file that must not be changed', () => {
  it('read-only (mode 0444) in a writable folder: record add is refused with exit 3, even for root; the file unchanged', async () => {
    chmodSync(subject, 0o444);
    const run = await runCli(['record', 'add', subject, ...ADD]);
    expect(run.code, run.stderr).toBe(3);
    expect(run.stderr).toMatch(/s\.json.*read-only \(mode 0444\)/);
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(readFileSync(subject)).toEqual(original);
    expect(statSync(subject).mode & 0o777).toBe(0o444);
    expect(readdirSync(dir)).toEqual(['s.json']);
  });

  it('read-only: record edit and record remove leave no backup behind', async () => {
    chmodSync(subject, 0o444);
    for (const args of [['edit', subject, '1', '--note', 'changed', '--yes'], ['remove', subject, '1', '--yes']]) {
      const run = await runCli(['record', ...args]);
      expect(run.code, run.stderr).toBe(3);
      expect(readFileSync(subject)).toEqual(original);
      expect(readdirSync(dir)).toEqual(['s.json']);
    }
  });

  it('a symbolic link: record add is refused (exit 2, naming the link); the file it points at is unchanged', async () => {
    symlinkSync('s.json', join(dir, 'link.json'));
    const run = await runCli(['record', 'add', join(dir, 'link.json'), ...ADD]);
    expect(run.code, run.stderr).toBe(2);
    expect(run.stderr).toMatch(/link\.json.*is a symbolic link/);
    expect(readFileSync(subject)).toEqual(original);
  });

  it('a FIFO: record add is refused at once (exit 2), never waiting for a writer', async () => {
    const fifo = join(dir, 'pipe.json');
    expect(spawnSync('mkfifo', [fifo]).status).toBe(0);
    const run = await runCli(['record', 'add', fifo, ...ADD], { timeoutMs: 10_000 });
    expect(run.timedOut).toBe(false);
    expect(run.code, run.stderr).toBe(2);
    expect(run.stderr).toMatch(/pipe\.json.*named pipe/);
  });

  it('a writable regular file is still changed in place of the old one, with a complete backup on edit (held on main too)', async () => {
    ok(await runCli(['record', 'edit', subject, '1', '--note', 'changed', '--yes']));
    const backups = readdirSync(dir).filter((f) => f.endsWith('.bak'));
    expect(backups).toHaveLength(1);
    expect(readFileSync(join(dir, backups[0]!))).toEqual(original);
    expect(readFileSync(subject, 'utf8')).toMatch(/"note": "changed"/);
    expect(readdirSync(dir).filter((f) => f.includes('elastimate-tmp'))).toEqual([]);
  });
});

describe('the lock', () => {
  it('its folder is owner-only (0700) even under umask 000', async () => {
    const holder = spawn('sh', ['-c', `umask 000; exec "${process.execPath}" "${WRITER}" hold "${subject}" 5000`], { stdio: ['ignore', 'pipe', 'pipe'] });
    try {
      await new Promise<void>((resolve, reject) => {
        let out = '';
        holder.stdout.setEncoding('utf8').on('data', (d: string) => {
          out += d;
          if (out.includes('holding')) resolve();
        });
        holder.on('exit', (code) => reject(new Error(`the holder stopped (exit ${code})`)));
        setTimeout(() => reject(new Error('the holder never took the lock')), 15_000);
      });
      expect(statSync(`${subject}.lock`).mode & 0o777).toBe(0o700);
    } finally {
      holder.kill('SIGKILL');
    }
  });

  it('a writer that waits more than a second for a lock says so on stderr, then writes; one that does not wait says nothing', async () => {
    const quick = ok(await runCli(['record', 'add', subject, ...ADD]));
    expect(quick.stderr).not.toMatch(/waiting/);
    // Another process's fresh lock, let go as soon as the waiting writer has said so (proper-lockfile would
    // take it over as stale after 5 s, so a writer that never said so finishes without the line).
    mkdirSync(`${subject}.lock`);
    let said = '';
    const run = ok(
      await runCli(['record', 'add', subject, ...ADD.map((a) => (a === '2025-01-01' ? '2025-02-01' : a))], {
        onSpawn: (child) =>
          child.stderr?.on('data', (d: Buffer) => {
            said += d.toString();
            if (said.includes('waiting')) rmSync(`${subject}.lock`, { recursive: true, force: true });
          }),
      }),
    );
    expect(run.stderr).toMatch(/^elastimate: waiting for another elastimate process to finish changing .*s\.json/m);
    expect(existsSync(`${subject}.lock`)).toBe(false);
    expect(JSON.parse(readFileSync(subject, 'utf8')).visits.map((v: { date: string }) => v.date)).toContain('2025-02-01');
  });
});
