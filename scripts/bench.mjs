#!/usr/bin/env node
// The benchmark: every target is a ratio against bare Node measured side by side in one run,
// so a shared, noisy machine slows both sides alike. Sections live in scripts/bench/*.mjs;
// each exports `run(ctx)` returning rows { name, ratio, limit, detail }.
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const bin = join(root, 'bin', 'elastimate.js');

function once(args, options = {}) {
  const start = process.hrtime.bigint();
  const r = spawnSync(process.execPath, args, { cwd: root, encoding: 'utf8', maxBuffer: 64 * 1024 * 1024, ...options });
  const ms = Number(process.hrtime.bigint() - start) / 1e6;
  if (r.status !== 0) throw new Error(`bench command failed (${r.status}): node ${args.join(' ')}\n${r.stderr}`);
  return ms;
}

function median(xs) {
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/**
 * Time `args` and a reference command alternately, `runs` times each after a warm-up,
 * and return medians and their ratio.
 */
function compare(args, referenceArgs = ['-e', '0'], runs = 15, options = {}) {
  once(referenceArgs, options);
  once(args, options);
  const a = [];
  const b = [];
  for (let i = 0; i < runs; i++) {
    b.push(once(referenceArgs, options));
    a.push(once(args, options));
  }
  const ms = median(a);
  const refMs = median(b);
  return { ms, refMs, ratio: ms / refMs };
}

const ctx = { root, bin, once, median, compare };

const sections = readdirSync(join(root, 'scripts', 'bench'))
  .filter((f) => f.endsWith('.mjs'))
  .sort();
const rows = [];
for (const file of sections) {
  const mod = await import(pathToFileURL(join(root, 'scripts', 'bench', file)).href);
  rows.push(...(await mod.run(ctx)));
}

let failed = 0;
console.log('target'.padEnd(58) + 'ratio'.padStart(8) + 'limit'.padStart(8) + '  result');
for (const r of rows) {
  const ok = r.ratio <= r.limit;
  // Informational rows are printed against a limit but are not targets of their own.
  if (!ok && !r.informational) failed++;
  const verdict = ok ? 'ok' : r.informational ? 'over (informational)' : 'OVER';
  console.log(r.name.padEnd(58) + r.ratio.toFixed(2).padStart(8) + r.limit.toFixed(2).padStart(8) + '  ' + verdict + (r.detail ? `  (${r.detail})` : ''));
}
console.log(`${rows.filter((r) => !r.informational).length - failed} within target, ${failed} over`);
process.exitCode = failed ? 1 : 0;
