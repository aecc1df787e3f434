/**
 * Finding a browser for test/report/browser.test.ts on any machine: the
 * command named by ELASTIMATE_BROWSER, else the usual Chromium and Chrome
 * command names, each accepted only if `<command> --version` runs and says
 * something (exit 0 with output), so a stale link or a wrapper without a
 * browser behind it is passed over.
 */
import { spawnSync } from 'node:child_process';

/** The environment variable that names a browser command (a path or a name on PATH). */
export const BROWSER_ENV = 'ELASTIMATE_BROWSER';

/** Command names tried in turn when ELASTIMATE_BROWSER is not set (Debian, Ubuntu/Fedora, Google's packages). */
export const BROWSER_COMMANDS = ['chromium', 'chromium-browser', 'google-chrome', 'google-chrome-stable', 'chrome'] as const;

/** What to install, in one line. */
export const INSTALL_HINT = `install Chromium or Chrome (Debian or Ubuntu: apt-get install chromium) or set ${BROWSER_ENV} to a browser command`;

export interface BrowserSearch {
  /** The command to run, or null when none works. */
  command: string | null;
  /** Its first line of `--version`, e.g. "Chromium 126.0.6478.126 built on Debian…". */
  version: string;
  /** Why none was found, or why the named one was refused. */
  problem: string;
  /** True when ELASTIMATE_BROWSER named a command that does not run: a mistake to report, never a reason to skip. */
  namedButBroken: boolean;
}

/** The first line `command --version` prints, or null when it does not run, fails or prints nothing. */
export function browserVersion(command: string, env: NodeJS.ProcessEnv = process.env): string | null {
  const run = spawnSync(command, ['--version'], { env, encoding: 'utf8', timeout: 30_000, stdio: ['ignore', 'pipe', 'ignore'] });
  if (run.error || run.status !== 0) return null;
  const line = run.stdout.trim().split('\n')[0]?.trim() ?? '';
  return line === '' ? null : line;
}

export function findBrowser(env: NodeJS.ProcessEnv = process.env, commands: readonly string[] = BROWSER_COMMANDS): BrowserSearch {
  const named = env[BROWSER_ENV];
  if (named !== undefined && named !== '') {
    const version = browserVersion(named, env);
    if (version !== null) return { command: named, version, problem: '', namedButBroken: false };
    return { command: null, version: '', problem: `${BROWSER_ENV}=${named} does not run (\`${named} --version\` failed)`, namedButBroken: true };
  }
  for (const command of commands) {
    const version = browserVersion(command, env);
    if (version !== null) return { command, version, problem: '', namedButBroken: false };
  }
  return { command: null, version: '', problem: `no browser found (tried ${commands.join(', ')} with --version)`, namedButBroken: false };
}
