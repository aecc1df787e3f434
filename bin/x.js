#!/usr/bin/env node
// Tiny shim: runs the compiled CLI built by `npm install` (prepare: tsc, then the bundle).
// The single-file bundle starts faster; it is used only when it is at least as new as tsc's output.
import { statSync } from 'node:fs';
import { setFlagsFromString } from 'node:v8';
for (const f of (process.env.V8F ?? '').split(' ').filter(Boolean)) setFlagsFromString(f);

const compiled = new URL('../dist/cli/main.js', import.meta.url);
const bundled = new URL('../dist/bundle/main.js', import.meta.url);

function mtime(url) {
  try {
    return statSync(url).mtimeMs;
  } catch {
    return -1;
  }
}

const entry = mtime(bundled) >= mtime(compiled) ? bundled : compiled;
const { main } = await import(entry.href);
process.exitCode = await main(process.argv);
