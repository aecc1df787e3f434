/**
 * The end of each command's `--help`: an optional note, then two or three examples. Kept here so
 * docs/cli.md (scripts/cli-reference.mjs) prints exactly what `--help` prints.
 */
import type { Command } from 'commander';

const footers = new WeakMap<Command, string>();

/** Help is read on an 80-column terminal at the least. */
const WIDTH = 80;

/**
 * One example as shell lines within WIDTH: broken between words with a trailing backslash, so the
 * lines still paste as one command; never inside quotes, between an option and its value, or
 * inside a trailing comment.
 */
export function exampleLines(command: string): string[] {
  const tokens = command.match(/#.*$|(?:"[^"]*"|\S)+/g) ?? [];
  const words: string[] = [];
  for (let i = 0; i < tokens.length; i++) {
    const next = tokens[i + 1];
    if (tokens[i]!.startsWith('--') && next !== undefined && !next.startsWith('-') && !next.startsWith('#')) {
      words.push(`${tokens[i]} ${next}`);
      i++;
    } else words.push(tokens[i]!);
  }
  const lines: string[] = [];
  let line = '  $';
  for (const word of words) {
    const indent = lines.length === 0 ? '  $' : '     ';
    if (line !== indent && line.length + 1 + word.length + 2 > WIDTH) {
      lines.push(`${line} \\`);
      line = '     ';
    }
    line = `${line} ${word}`;
  }
  lines.push(line);
  return lines;
}

/** End `cmd`'s help with `examples` (whole command lines), after `note` when given. */
export function addExamples(cmd: Command, examples: readonly string[], note?: string): Command {
  const text = `${note ? `\n${note}\n` : ''}\nExamples:\n${examples.flatMap(exampleLines).join('\n')}`;
  footers.set(cmd, text);
  return cmd.addHelpText('after', text);
}

/** What addExamples put after `cmd`'s help ('' when nothing). */
export function helpFooter(cmd: Command): string {
  return footers.get(cmd) ?? '';
}
