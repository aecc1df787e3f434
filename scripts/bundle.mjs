#!/usr/bin/env node
// Bundles the tsc output (dist/cli/main.js) into dist/bundle/: one ES module graph with zod and
// commander inlined loads in a fraction of the time of their many-file module trees. Heavy,
// rarely needed packages stay external and lazily imported (mathjs's own single-file bundle,
// inquirer, chalk, dcmjs for DICOM SR import). bin/elastimate.js uses the bundle only when it is newer than dist/cli.
import { build } from 'esbuild';
import { rmSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');

// Start clean: chunk names carry content hashes, so old ones would pile up.
rmSync(join(root, 'dist', 'bundle'), { recursive: true, force: true });

const shared = {
  bundle: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  minify: true,
  legalComments: 'linked',
  logLevel: 'warning',
  external: ['mathjs', 'inquirer', '@inquirer/*', 'chalk', 'dcmjs'],
  // commander is CommonJS: give the ES module bundle a require of its own.
  banner: { js: "import { createRequire as __elastimateRequire } from 'node:module'; const require = __elastimateRequire(import.meta.url);" },
};

await build({
  ...shared,
  // model-worker.js is the worker thread of `scenario --intervals` and `synthetic`: a second entry
  // point, so it lands beside main.js (dist/bundle/model-worker.js) where those commands look for it.
  entryPoints: [join(root, 'dist', 'cli', 'main.js'), join(root, 'dist', 'cli', 'model-worker.js')],
  outdir: join(root, 'dist', 'bundle'),
  splitting: true,
});

// batch-worker.js, the worker thread of `batch`, is one file of its own beside main.js (where the
// batch command looks for it): it needs a small part of the code, and one module starts sooner than
// the score of shared chunks it would otherwise load, while the main thread already computes rows.
await build({
  ...shared,
  entryPoints: [join(root, 'dist', 'cli', 'batch-worker.js')],
  outdir: join(root, 'dist', 'bundle'),
  splitting: false,
});

// A V8 code cache for mathjs's bundle, used when a value carries a unit (see src/units/mathjs-loader.ts).
const { writeMathjsCodeCache } = await import('../dist/units/mathjs-loader.js');
writeMathjsCodeCache();
