/** `--sr <file>` (repeatable) for `assess` and `record add`: light, so registering it loads nothing. */
import type { Command } from 'commander';

function collectFiles(value: string, previous: string[] | undefined): string[] {
  return [...(previous ?? []), value];
}

export function addSrOption(cmd: Command): Command {
  return cmd.option('--sr <file>', 'DICOM structured report (SR) of the echo study; repeatable for several files of one study; flags override its values (docs/sr-import.md)', collectFiles);
}
