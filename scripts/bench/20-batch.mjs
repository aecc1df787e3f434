// Cohort batch: `elastimate batch` on 100,000 generated visits within 4× the time of a bare Node
// read-and-split of the same file, and its peak memory (maximum resident set size of the process
// running the batch) at most 200 MiB.
//
// The reference reads the whole file and splits it into lines and cells (readFileSync, split on
// "\n" and ","): the least any CSV tool must do. The batch does that and more: RFC 4180 reading
// (the record splitter, then d3-dsv or the line-by-line reader for text without quotes), checking
// and converting every input, the full computation and checks per row, and writing the inputs as
// used and 40-odd result cells per row to a file, fsynced and renamed into place.
// Memory: the batch runs inside a small wrapper process that imports bin/elastimate.js and prints
// process.resourceUsage().maxRSS (kilobytes on Linux) when it exits; the row's ratio is MiB / 200.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';

const ROWS = 100_000;
const MEMORY_LIMIT_MIB = 200;

/** Deterministic invented cohort: a small linear congruential generator, fixed seed. */
function generate(path) {
  let state = 20240601;
  const next = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 4294967296;
  };
  const between = (lo, hi, digits = 0) => (lo + (hi - lo) * next()).toFixed(digits);
  const lines = ['id,visit_date,sbp,dbp,hr,edv,esv,ef,sv,pep,et,height,weight,site'];
  for (let i = 0; i < ROWS; i++) {
    const edv = 90 + 80 * next();
    const esv = edv * (0.3 + 0.25 * next());
    const sbp = Number(between(100, 170));
    const dbp = Number(between(55, Math.min(100, sbp - 25)));
    lines.push([
      `BX-${String(i).padStart(6, '0')}`,
      `2024-${String(1 + (i % 12)).padStart(2, '0')}-${String(1 + (i % 28)).padStart(2, '0')}`,
      sbp, dbp, between(50, 100), edv.toFixed(0), esv.toFixed(0),
      i % 3 === 0 ? '' : (100 * (1 - esv / edv)).toFixed(0),
      i % 2 === 0 ? '' : between(45, 95),
      between(70, 120), between(240, 330), between(150, 195), between(50, 110), `site ${1 + (i % 7)}`,
    ].join(','));
  }
  writeFileSync(path, lines.join('\n') + '\n');
}

export async function run({ root, bin, compare, once }) {
  const dir = mkdtempSync(join(tmpdir(), 'elastimate-bench-'));
  try {
    const input = join(dir, 'cohort.csv');
    const output = join(dir, 'results.csv');
    generate(input);
    const reference = ['-e', `const t=require('fs').readFileSync(${JSON.stringify(input)},'utf8').split('\\n');let n=0;for(const l of t)n+=l.split(',').length;if(n<${ROWS})process.exit(1)`];
    const timing = compare([bin, 'batch', input, '--out', output], reference, 3);

    const wrapper = [
      '--input-type=module',
      '-e',
      `process.on('exit', () => process.stderr.write('maxrss-kb ' + process.resourceUsage().maxRSS + '\\n'));` +
        `process.argv = [process.execPath, ${JSON.stringify(bin)}, 'batch', ${JSON.stringify(input)}, '--out', ${JSON.stringify(output)}];` +
        `await import(${JSON.stringify(pathToFileURL(bin).href)});`,
    ];
    once(wrapper); // warm the file cache like the timed runs
    const r = spawnSync(process.execPath, wrapper, { cwd: root, encoding: 'utf8' });
    const m = /maxrss-kb (\d+)/.exec(r.stderr ?? '');
    if (r.status !== 0 || !m) throw new Error(`batch memory run failed (${r.status}): ${r.stderr}`);
    const mib = Number(m[1]) / 1024;
    return [
      { name: `batch, ${ROWS.toLocaleString('en')} visits vs bare read-and-split`, ratio: timing.ratio, limit: 4, detail: `${timing.ms.toFixed(0)} ms vs ${timing.refMs.toFixed(0)} ms` },
      { name: `batch peak memory (MiB / ${MEMORY_LIMIT_MIB} MiB)`, ratio: mib / MEMORY_LIMIT_MIB, limit: 1, detail: `max RSS ${mib.toFixed(0)} MiB of the process running the batch` },
    ];
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
