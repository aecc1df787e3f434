/**
 * Loads mathjs's single-file bundle (about 0.05 s, against about 0.6 s for its
 * module tree) and, when the build left one, with a V8 code cache so the
 * bundle is not compiled again on every run. The cache is only a speed-up: if
 * it is missing or V8 rejects it (another Node version), the bundle loads as usual.
 */
import { readFileSync, writeFileSync, mkdirSync, renameSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import vm from 'node:vm';

const require = createRequire(import.meta.url);
/** dist/cache beside dist/units and dist/bundle (and beside src/ when run from source). */
const CACHE_FILE = fileURLToPath(new URL('../../dist/cache/mathjs.v8cache', import.meta.url));

function bundlePath(): string {
  return require.resolve('mathjs/lib/browser/math.js');
}

function compile(source: string, filename: string, cachedData?: Buffer): vm.Script {
  // The same wrapper at build and at run time, or V8 rejects the cache.
  const wrapped = `(function (exports, require, module, __filename, __dirname) {${source}\n})`;
  return new vm.Script(wrapped, { filename, ...(cachedData ? { cachedData } : {}) });
}

function run<T>(script: vm.Script, filename: string): T {
  const fn = script.runInThisContext() as (e: object, r: NodeRequire, m: { exports: object }, f: string, d: string) => void;
  const mod = { exports: {} };
  fn(mod.exports, require, mod, filename, dirname(filename));
  return mod.exports as T;
}

export function loadMathjs<T>(): T {
  let cachedData: Buffer | undefined;
  try {
    cachedData = readFileSync(CACHE_FILE);
  } catch {
    return require('mathjs/lib/browser/math.js') as T;
  }
  try {
    const filename = bundlePath();
    const script = compile(readFileSync(filename, 'utf8'), filename, cachedData);
    if (script.cachedDataRejected) return require('mathjs/lib/browser/math.js') as T;
    return run<T>(script, filename);
  } catch {
    return require('mathjs/lib/browser/math.js') as T;
  }
}

/** Build step: run the bundle once (so lazily compiled functions are included) and save the cache. */
export function writeMathjsCodeCache(): string {
  const filename = bundlePath();
  const script = compile(readFileSync(filename, 'utf8'), filename);
  const math = run<{ unit(text: string): { toNumber(u: string): number; equalBase(o: unknown): boolean } }>(script, filename);
  math.unit('16.5 kPa').equalBase(math.unit('1 mmHg'));
  math.unit('0.14 L').toNumber('mL');
  mkdirSync(dirname(CACHE_FILE), { recursive: true });
  const tmp = `${CACHE_FILE}.${process.pid}.tmp`;
  writeFileSync(tmp, script.createCachedData());
  renameSync(tmp, CACHE_FILE);
  return CACHE_FILE;
}
