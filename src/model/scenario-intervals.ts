/**
 * 95 % intervals for a projection by Monte Carlo over the subject's input
 * uncertainty: the existing error model (src/assessment/error-model.ts, one
 * SD per input with its provenance) draws the inputs; each draw is assessed
 * as a visit (single-beat Ees and V0 included), the model is refitted
 * warm-started from the baseline fit (its fitted parameters and steady
 * state), the same changes are applied, and the projected values are kept.
 * Draws whose inputs leave their physical range, whose Ees is not
 * computable, whose fit fails or whose projection fails are counted, by
 * reason, and left out of the intervals.
 *
 * The draws are split into chunks; chunk c uses random stream c of the seed
 * (monte-carlo.ts randomStreams), so the result does not depend on which
 * thread computed which chunk. Pure: seed in, numbers out.
 */
import { assess } from '../assessment/assess.js';
import { errorModelFor } from '../assessment/error-model.js';
import type { VisitInputs } from '../assessment/inputs.js';
import { fillNormals, randomStreams } from '../assessment/monte-carlo.js';
import type { ElastanceShape } from './double-hill.js';
import { fitHeartModel, type FitSuccess } from './fit.js';
import { beatValues, projectBeat, SCENARIO_KEYS, type ScenarioChanges, type ScenarioKey } from './project.js';
import { numbersFromAssessment, subjectSetup } from './subject-model.js';
import { timingOf } from './scenario.js';

export const INTERVAL_DRAWS = { default: 200, min: 200, max: 5000 } as const;
/** Draws per chunk: the unit of work a thread takes. */
export const CHUNK_DRAWS = 25;

export const FAILURE_KINDS = ['inputsOutOfRange', 'eesNotComputable', 'fitFailed', 'projectionFailed'] as const;
export type FailureKind = (typeof FAILURE_KINDS)[number];

export interface ChunkResult {
  /** projected values, one array per key, NaN for failed draws */
  values: Record<ScenarioKey, number[]>;
  failures: Record<FailureKind, number>;
}

export interface BaselineFitState {
  sourcePressure: number;
  resistance: number;
  compliance: number;
  characteristicImpedance: number;
  volume: number;
  compliancePressure: number;
  jacobian: number[][] | null;
}

export function baselineFitState(fit: FitSuccess): BaselineFitState {
  const { sourcePressure, arteries } = fit.model;
  return { sourcePressure, ...arteries, volume: fit.state.volume, compliancePressure: fit.state.compliancePressure, jacobian: fit.jacobian };
}

export interface ChunkRequest {
  inputs: VisitInputs;
  changes: ScenarioChanges;
  shape: ElastanceShape;
  warm: BaselineFitState;
  seed: number;
  chunk: number;
  draws: number;
}

function inRange(x: VisitInputs): boolean {
  const positive = [x.sbp, x.dbp, x.edv, x.esv, x.pep, x.et, x.hr ?? 1, x.sv ?? 1, x.lvotDiameter ?? 1, x.lvotVti ?? 1].every((v) => v > 0);
  return positive && x.dbp < x.sbp && x.esv < x.edv && (x.ef === null || (x.ef > 0 && x.ef < 100));
}

/** One chunk of draws (stream `chunk` of the seed). */
export function scenarioChunk(req: ChunkRequest): ChunkResult {
  const { inputs, changes, shape, warm } = req;
  const specs = errorModelFor(inputs).inputs.filter((s) => s.sd > 0);
  const rng = randomStreams(req.seed, 1, req.chunk)[0]!;
  const z = new Float64Array(specs.length * req.draws);
  fillNormals(rng, z);
  const values = Object.fromEntries(SCENARIO_KEYS.map((k) => [k, [] as number[]])) as Record<ScenarioKey, number[]>;
  const failures = Object.fromEntries(FAILURE_KINDS.map((k) => [k, 0])) as Record<FailureKind, number>;
  const fail = (kind: FailureKind) => {
    failures[kind]++;
    for (const k of SCENARIO_KEYS) values[k].push(Number.NaN);
  };
  for (let d = 0; d < req.draws; d++) {
    const drawn: VisitInputs = { ...inputs };
    specs.forEach((s, i) => {
      (drawn as unknown as Record<string, number>)[s.input] = s.value + s.sd * z[d * specs.length + i]!;
    });
    if (!inRange(drawn)) {
      fail('inputsOutOfRange');
      continue;
    }
    const numbers = numbersFromAssessment(assess(drawn));
    if (numbers.ees === null) {
      fail('eesNotComputable');
      continue;
    }
    const setup = subjectSetup(numbers, shape);
    if (!setup.ok) {
      fail(setup.reason.startsWith('Ees') ? 'eesNotComputable' : 'fitFailed');
      continue;
    }
    const start = {
      ...setup.model,
      sourcePressure: warm.sourcePressure,
      arteries: { resistance: warm.resistance, compliance: warm.compliance, characteristicImpedance: warm.characteristicImpedance },
    };
    const fit = fitHeartModel(start, setup.targets, { start: { volume: warm.volume, compliancePressure: warm.compliancePressure }, maxIterations: 12, ...(warm.jacobian ? { jacobian: warm.jacobian } : {}) });
    if (!fit.ok) {
      fail('fitFailed');
      continue;
    }
    const p = projectBeat(fit.model, timingOf(numbers)!, changes, fit.state);
    if (!p.ok) {
      fail('projectionFailed');
      continue;
    }
    const v = beatValues(p.beat, p.model);
    for (const k of SCENARIO_KEYS) values[k].push(v[k] ?? Number.NaN);
  }
  return { values, failures };
}

/** The chunks of a run: [chunk index, draws in it]. */
export function chunksOf(draws: number): { chunk: number; draws: number }[] {
  const out: { chunk: number; draws: number }[] = [];
  for (let c = 0, left = draws; left > 0; c++, left -= CHUNK_DRAWS) out.push({ chunk: c, draws: Math.min(CHUNK_DRAWS, left) });
  return out;
}

export interface ScenarioIntervals {
  draws: number;
  seed: number;
  succeeded: number;
  failures: Record<FailureKind, number>;
  interval95: Partial<Record<ScenarioKey, [number, number]>>;
}

/** 2.5th and 97.5th percentiles (Hyndman–Fan type 7, as monte-carlo.ts) of the chunks merged in chunk order. */
export function mergeChunks(results: ChunkResult[], draws: number, seed: number, quantile: (a: Float64Array, n: number, p: number) => number): ScenarioIntervals {
  const failures = Object.fromEntries(FAILURE_KINDS.map((k) => [k, 0])) as Record<FailureKind, number>;
  for (const r of results) for (const k of FAILURE_KINDS) failures[k] += r.failures[k];
  const interval95: ScenarioIntervals['interval95'] = {};
  let succeeded = 0;
  for (const key of SCENARIO_KEYS) {
    const all = results.flatMap((r) => r.values[key]).filter(Number.isFinite);
    if (key === 'sv') succeeded = all.length;
    if (all.length < 2) continue;
    const a = Float64Array.from(all);
    interval95[key] = [quantile(a, a.length, 0.025), quantile(a, a.length, 0.975)];
  }
  return { draws, seed, succeeded, failures, interval95 };
}
