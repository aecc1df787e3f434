#!/usr/bin/env node
// Writes docs/cli.md from the program's own help texts, so the reference cannot drift from the
// options the code defines. `node scripts/cli-reference.mjs --check` exits 1 when docs/cli.md is stale
// (a test runs the check).
import { readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const { buildProgram } = await import(join(root, 'dist', 'cli', 'main.js'));

function sections(cmd, path) {
  cmd.configureHelp({ helpWidth: 100 });
  const out = [`## \`${path}\``, '', '```text', cmd.helpInformation().trimEnd(), '```', ''];
  for (const sub of cmd.commands) if (sub.name() !== 'help') out.push(...sections(sub, `${path} ${sub.name()}`));
  return out;
}

const text = [
  '# Command-line reference',
  '',
  'Generated from the program\'s own help by `node scripts/cli-reference.mjs`; do not edit by hand.',
  'Examples are in README.md; file formats in the other pages of docs/.',
  '',
  'Exit codes: 0 success; 2 bad input (one message naming the field, the value and what is accepted);',
  '3 a file could not be written or changed (disk full, permission denied, read-only, immutable; nothing changed);',
  '130 left with Ctrl-C at a prompt; 1 an internal error (please report it). Table: docs/files.md.',
  '',
  ...sections(buildProgram(), 'elastimate'),
].join('\n');

const target = join(root, 'docs', 'cli.md');
if (process.argv.includes('--check')) {
  let current = '';
  try {
    current = readFileSync(target, 'utf8');
  } catch {
    /* missing counts as stale */
  }
  if (current !== text) {
    console.error('docs/cli.md is out of date: run `node scripts/cli-reference.mjs`');
    process.exit(1);
  }
} else {
  writeFileSync(target, text);
}
