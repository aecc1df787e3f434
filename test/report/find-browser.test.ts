/**
 * A fresh machine: the browser test finds a browser or says what to install.
 * Fake browsers are small shell scripts; the skip-or-fail rule is checked by
 * running vitest itself on test/report/browser.test.ts with a PATH that holds
 * node and nothing else.
 */
import { spawnSync } from 'node:child_process';
import { chmodSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BROWSER_ENV, findBrowser } from './find-browser.js';

let dir: string;
let fake: string;
let broken: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'elastimate-find-browser-'));
  fake = join(dir, 'fake-browser');
  writeFileSync(fake, '#!/bin/sh\necho "Fake Browser 1.2.3"\n');
  chmodSync(fake, 0o755);
  broken = join(dir, 'broken-browser');
  writeFileSync(broken, '#!/bin/sh\necho "cannot start: no display"\nexit 1\n');
  chmodSync(broken, 0o755);
  symlinkSync(process.execPath, join(dir, 'node'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('findBrowser', () => {
  it(`takes the command named by ${BROWSER_ENV} when its --version runs`, () => {
    expect(findBrowser({ [BROWSER_ENV]: fake }, [])).toMatchObject({ command: fake, version: 'Fake Browser 1.2.3' });
  });

  it(`reports a named command that does not run as a mistake, without trying others`, () => {
    const found = findBrowser({ [BROWSER_ENV]: broken }, [fake]);
    expect(found).toMatchObject({ command: null, namedButBroken: true });
    expect(found.problem).toContain(`${BROWSER_ENV}=${broken} does not run`);
  });

  it('otherwise tries the command names in turn, passing over missing and failing ones', () => {
    expect(findBrowser({}, ['elastimate-no-such-browser', broken, fake]).command).toBe(fake);
    const none = findBrowser({}, ['elastimate-no-such-browser', broken]);
    expect(none).toMatchObject({ command: null, namedButBroken: false });
    expect(none.problem).toBe(`no browser found (tried elastimate-no-such-browser, ${broken} with --version)`);
  });
});

describe('browser.test.ts on a machine without a browser', () => {
  const vitest = (ci: boolean) =>
    spawnSync(process.execPath, [join('node_modules', 'vitest', 'vitest.mjs'), 'run', 'test/report/browser.test.ts'], {
      cwd: join(import.meta.dirname, '..', '..'),
      env: { PATH: dir, HOME: process.env.HOME ?? dir, ...(ci ? { CI: 'true' } : {}) },
      encoding: 'utf8',
      timeout: 120_000,
    });

  it('is skipped with one line saying what to install', () => {
    const run = vitest(false);
    expect(run.status, run.stdout + run.stderr).toBe(0);
    expect(run.stdout + run.stderr).toMatch(/browser\.test\.ts skipped: no browser found \(tried chromium, .*\); install Chromium or Chrome \(Debian or Ubuntu: apt-get install chromium\)/);
    expect(run.stdout).toMatch(/2 skipped/);
  }, 130_000);

  it('fails when CI=true', () => {
    const run = vitest(true);
    expect(run.status).not.toBe(0);
    expect(run.stdout + run.stderr).toMatch(/no browser found .*install Chromium or Chrome.*CI=true/s);
  }, 130_000);
});
