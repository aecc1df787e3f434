/**
 * Files the CLI writes (SVG diagrams, HTML and Markdown reports): the path is
 * checked first, so a bad one is an InputError (exit 2) naming the option,
 * and every file is written atomically (write-file-atomic: temporary file,
 * fsync, rename), so a crash never leaves half a file behind.
 */
import { statSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, extname, resolve } from 'node:path';
import { InputError, showValue } from '../errors.js';
import { FILE_MODE } from '../records/file-mode.js';

export interface OutputPathRule {
  /** The option as the user typed it, e.g. `--svg` or `--out`. */
  option: string;
  /** Accepted file-name endings, lower case with the dot, e.g. ['.svg']; empty accepts any name. */
  extensions: readonly string[];
  /** Paths that must not be overwritten (e.g. the subject file being read). */
  protect?: readonly string[];
}

/** Check an output path; returns it resolved. Throws InputError naming the option. */
export function checkOutputPath(raw: unknown, rule: OutputPathRule): string {
  const accepted = rule.extensions.length ? `a file path ending in ${rule.extensions.join(' or ')}, in an existing folder` : 'a file path in an existing folder';
  if (typeof raw !== 'string' || raw.trim() === '') throw new InputError({ field: rule.option, value: showValue(raw), accepted });
  const path = resolve(raw);
  if (rule.extensions.length && !rule.extensions.includes(extname(path).toLowerCase())) {
    throw new InputError({ field: rule.option, value: showValue(raw), reason: 'wrong file type', accepted });
  }
  if (rule.protect?.some((p) => resolve(p) === path)) {
    throw new InputError({ field: rule.option, value: showValue(raw), reason: 'this is an input file and would be overwritten', accepted });
  }
  const folder = statOrNull(dirname(path));
  if (!folder || !folder.isDirectory()) {
    throw new InputError({ field: rule.option, value: showValue(raw), reason: `folder ${showValue(dirname(raw) || '.')} does not exist`, accepted });
  }
  const existing = statOrNull(path);
  if (existing && !existing.isFile()) {
    throw new InputError({ field: rule.option, value: showValue(raw), reason: 'exists and is not a regular file', accepted });
  }
  return path;
}

function statOrNull(path: string) {
  try {
    return statSync(path);
  } catch {
    return null;
  }
}

/**
 * Write text atomically with write-file-atomic (temporary file in the same
 * folder, fsync, rename): the target is always either the old file or the
 * whole new one. Loaded through createRequire, not import(): it is CommonJS
 * reading `__filename`, which the single-file ES module bundle lacks, so it is
 * resolved from node_modules at run time (as src/records/store.ts does).
 * Any failure is an InputError naming the option.
 */
export async function writeTextAtomically(path: string, text: string, option: string): Promise<void> {
  const writeFileAtomic = createRequire(import.meta.url)('write-file-atomic') as typeof import('write-file-atomic');
  try {
    // Reports and diagrams carry a subject's data: readable by the owner only, like subject files.
    await writeFileAtomic(path, text, { encoding: 'utf8', fsync: true, mode: FILE_MODE });
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code ?? (err instanceof Error ? err.message : String(err));
    throw new InputError({ field: option, value: showValue(path), reason: `could not write the file (${code})`, accepted: 'a writable file path in an existing folder' });
  }
}
