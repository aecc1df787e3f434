/**
 * The end of each command's `--help`: an optional note, then two or three examples. Kept here so
 * docs/cli.md (scripts/cli-reference.mjs) prints exactly what `--help` prints.
 */
import type { Command } from 'commander';

const footers = new WeakMap<Command, string>();

/** End `cmd`'s help with `examples` (whole command lines), after `note` when given. */
export function addExamples(cmd: Command, examples: readonly string[], note?: string): Command {
  const text = `${note ? `\n${note}\n` : ''}\nExamples:\n${examples.map((e) => `  $ ${e}`).join('\n')}`;
  footers.set(cmd, text);
  return cmd.addHelpText('after', text);
}

/** What addExamples put after `cmd`'s help ('' when nothing). */
export function helpFooter(cmd: Command): string {
  return footers.get(cmd) ?? '';
}
