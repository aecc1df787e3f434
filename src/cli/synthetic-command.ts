/**
 * `elastimate synthetic`: a seeded virtual cohort with known Ees, observed as
 * echo and cuff would observe it and estimated by the single-beat method
 * (src/model/synthetic.ts). Thin: options, threads and output here.
 */
import { InputError, showValue } from '../errors.js';
import { ELASTANCE_SHAPES, type ElastanceShape } from '../model/double-hill.js';
import { agreement, NEAR_WINDOWS, SYNTHETIC_CHUNK, type NearTarget, type SyntheticRow } from '../model/synthetic.js';
import type { CohortSummary } from '../render/synthetic.js';
import { runSyntheticRequest, type SyntheticRequest } from './model-worker.js';
import { seedFromOption } from './scenario-command.js';

export const COHORT_SIZE = { default: 200, min: 10, max: 5000 } as const;

function cohortSize(raw: unknown): number {
  const v = typeof raw === 'string' && /^\d+$/.test(raw.trim()) ? Number(raw) : Number.NaN;
  if (!(v >= COHORT_SIZE.min && v <= COHORT_SIZE.max)) throw new InputError({ field: '--n', value: showValue(raw), accepted: `a whole number of virtual adults, ${COHORT_SIZE.min}–${COHORT_SIZE.max}` });
  return v;
}

function shapesOf(raw: unknown): ElastanceShape[] {
  if (raw === undefined || raw === 'both') return [...ELASTANCE_SHAPES];
  if (typeof raw === 'string' && (ELASTANCE_SHAPES as readonly string[]).includes(raw)) return [raw as ElastanceShape];
  throw new InputError({ field: '--shape', value: showValue(raw), accepted: `${ELASTANCE_SHAPES.join(', ')} or both (default both)` });
}

export function cohortSummary(rows: readonly SyntheticRow[], n: number, seed: number, shapes: ElastanceShape[]): CohortSummary {
  const byShape: CohortSummary['byShape'] = {};
  for (const shape of shapes) {
    const mine = rows.filter((r) => r.shape === shape);
    byShape[shape] = { againstEmax: agreement(mine, 'trueEes'), againstOcclusion: agreement(mine, 'occlusionEes') };
  }
  return { seed, n, shapes, byShape };
}

/** The observations of the visit `--near` names: a visit file, or a subject file (its last visit, or --visit). */
async function nearTarget(path: unknown, visit: unknown): Promise<NearTarget> {
  if (typeof path !== 'string' || path === '') throw new InputError({ field: '--near', value: showValue(path), accepted: 'a visit file or a subject file' });
  const [{ assess }, { parseInputs }, { readVisitFile }] = await Promise.all([import('../assessment/assess.js'), import('../assessment/inputs.js'), import('./visit-file.js')]);
  let a;
  try {
    if (visit !== undefined) throw new InputError({ field: 'format', value: '"elastimate-subject"', accepted: '' });
    a = assess(parseInputs(readVisitFile(path)));
  } catch (err) {
    if (!(err instanceof InputError && err.field === 'format' && err.value === '"elastimate-subject"')) throw err;
    const [{ readSubjectFile }, { assessSeries, findVisit }] = await Promise.all([import('../records/store.js'), import('../records/series.js')]);
    const file = readSubjectFile(path);
    const series = assessSeries(file);
    if (series.length === 0) throw new InputError({ field: '--near', value: showValue(path), reason: 'has no visits yet', accepted: 'a subject file with at least one visit' });
    const index = visit !== undefined ? findVisit(file, String(visit)).index : series[series.length - 1]!.index;
    a = series.find((e) => e.index === index)!.assessment;
  }
  const { inputs, results } = a;
  if (inputs.hr === null || results.tNd.value === null || results.efUsed.value === null) {
    throw new InputError({ field: '--near', value: showValue(path), reason: 'the visit lacks heart rate or PEP and ET', accepted: 'a visit with heart rate, EF, PEP and ET' });
  }
  return { ef: results.efUsed.value, sbp: inputs.sbp, dbp: inputs.dbp, hr: inputs.hr, edv: inputs.edv, tNd: results.tNd.value };
}

export async function runSynthetic(opts: Record<string, unknown>): Promise<void> {
  const n = opts.n !== undefined ? cohortSize(opts.n) : COHORT_SIZE.default;
  const near = opts.near !== undefined ? await nearTarget(opts.near, opts.visit) : undefined;
  if (near === undefined && opts.visit !== undefined) throw new InputError({ field: '--visit', value: showValue(opts.visit), reason: 'needs --near with a subject file', accepted: 'a visit number or date of the subject file given with --near' });
  const seed = opts.seed !== undefined ? seedFromOption(opts.seed) : 1;
  const shapes = shapesOf(opts.shape);
  const diagrams = opts.svg !== undefined ? await import('../io/safe-write.js') : null;
  const inputs = typeof opts.near === 'string' ? [opts.near] : [];
  const svgPath = diagrams ? diagrams.checkOutputPath(opts.svg, { option: '--svg', extensions: ['.svg'], inputs }) : null;
  const requests: SyntheticRequest[] = [];
  for (let c = 0, left = n; left > 0; c++, left -= SYNTHETIC_CHUNK) requests.push({ seed, chunk: c, count: Math.min(SYNTHETIC_CHUNK, left), shapes, ...(near ? { near } : {}) });
  const { splitOverThreads } = await import('./threads.js');
  const rows = (await splitOverThreads<SyntheticRequest, SyntheticRow[]>('synthetic', requests, runSyntheticRequest)).flat();
  const summary = cohortSummary(rows, n, seed, shapes);
  if (near) summary.near = { target: near, windows: NEAR_WINDOWS, drawn: n };
  const view = await import('../render/synthetic.js');
  if (diagrams && svgPath) diagrams.writeFileSafely(svgPath, view.blandAltmanSvg(rows, summary), { option: '--svg', inputs });
  if (opts.json === true) {
    const [{ stringifySafe }, { toolVersion }] = await Promise.all([import('../render/json.js'), import('./package-info.js')]);
    process.stdout.write(stringifySafe(view.syntheticJson(rows, summary, toolVersion())) + '\n');
    return;
  }
  if (opts.csv === true) {
    process.stdout.write(view.syntheticCsv(rows));
    process.stderr.write(view.syntheticSummaryText(summary));
    return;
  }
  process.stdout.write(view.syntheticSummaryText(summary, process.stdout.columns ?? 100));
}
