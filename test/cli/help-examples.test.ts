/**
 * Every command's --help ends with two or three examples that name only the command's own options,
 * and README.md mentions every command. In-process, through the program definition itself.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Command } from 'commander';
import { describe, expect, it } from 'vitest';
import { buildProgram } from '../../src/cli/main.js';
import { ROOT } from './fixtures/run-cli.js';

/** Every command with its path, e.g. ['record', 'add'] (the root is []); commander's own `help` left out. */
function commands(cmd: Command, path: string[] = []): { cmd: Command; path: string[] }[] {
  return [{ cmd, path }, ...cmd.commands.filter((c) => c.name() !== 'help').flatMap((c) => commands(c, [...path, c.name()]))];
}

function helpOf(cmd: Command): string {
  let text = '';
  cmd.configureOutput({ writeOut: (s) => (text += s), writeErr: (s) => (text += s) });
  cmd.outputHelp();
  return text;
}

/** Words of a command line, quotes removed, a trailing "# comment" dropped. */
function words(line: string): string[] {
  const out: string[] = [];
  for (const m of line.replace(/\s+#.*$/, '').matchAll(/"([^"]*)"|(\S+)/g)) out.push(m[1] ?? m[2]!);
  return out;
}

const all = commands(buildProgram());

/** The command an example line runs: the longest command path its words start with. */
function commandOf(w: string[]): { cmd: Command; path: string[] } {
  let best = all[0]!;
  for (const c of all) if (c.path.length > best.path.length && c.path.every((p, i) => w[1 + i] === p)) best = c;
  return best;
}

describe('--help ends with examples', () => {
  it('covers every command of the program', () => {
    expect(all.map((c) => c.path.join(' '))).toEqual(
      expect.arrayContaining(['', 'assess', 'demo', 'record', 'record add', 'record show', 'record compare', 'record edit', 'record remove', 'export', 'batch', 'report']),
    );
  });

  for (const { cmd, path } of all) {
    const name = ['elastimate', ...path].join(' ');
    it(`${name}: two or three examples, last in the help, each using only options the command has`, () => {
      const help = helpOf(cmd);
      const m = /\nExamples:\n((?: {2}\$ .*\n(?: {6}.*\n)*)+)$/.exec(help);
      expect(m, help.slice(-400)).not.toBeNull();
      // Each example within 80 columns; a long one continues on the next line after a backslash.
      for (const l of m![1]!.trimEnd().split('\n')) expect(l.length, l).toBeLessThanOrEqual(80);
      const lines = m![1]!.trimEnd().replace(/ \\\n {6}/g, ' ').split('\n').map((l) => l.replace(/^ {2}\$ /, ''));
      expect(lines.length).toBeGreaterThanOrEqual(2);
      expect(lines.length).toBeLessThanOrEqual(3);
      for (const line of lines) {
        const w = words(line);
        expect(w[0]).toBe('elastimate');
        // Each example runs a command: this one, or (for the program and the `record` group) one of theirs.
        const target = commandOf(w);
        if (cmd.commands.length === 0) expect(target.cmd, line).toBe(cmd);
        else expect(target.path.slice(0, path.length), line).toEqual(path);
        expect(target.cmd.commands.length, `"${line}" runs a command`).toBe(0);
        const known = new Set(target.cmd.options.map((o) => o.long));
        for (const flag of w.filter((x) => x.startsWith('--'))) expect(known.has(flag), `${flag} in "${line}"`).toBe(true);
      }
    });
  }
});

describe('README.md', () => {
  it('mentions every command as it is typed', () => {
    const readme = readFileSync(join(ROOT, 'README.md'), 'utf8');
    for (const { cmd, path } of all) {
      if (path.length === 0 || cmd.commands.length > 0) continue; // the program and the `record` group
      expect(readme, path.join(' ')).toMatch(new RegExp(`elastimate ${path.join(' ')}\\b`));
    }
  });
});
