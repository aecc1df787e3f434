/**
 * 95 % intervals for a projection by Monte Carlo over the subject's input
 * uncertainty, drawn exactly as `assess --uncertainty` draws them: the
 * visit's error model (src/assessment/error-model.ts, with its overrides)
 * and the graph's draw machinery (uncertainty.ts drawVisitInputs, graph/
 * draws.ts), so draw d here is draw d of the assessment's Monte Carlo with
 * the same seed, an input drawn outside its physical domain is lost exactly
 * as there, and an input's error enters the projection exactly as it enters
 * the assessment. For each draw the graph computes the model's numbers
 * (single-beat Ees, Pes, SV used, resistance, compliance; subject-model.ts
 * MODEL_GRAPH_KEYS), the model is refitted warm-started from the baseline fit
 * (its fitted parameters, steady state and Jacobian), the same changes are
 * applied, and the projected values are kept. Draws whose inputs leave their
 * physical domain, whose Ees is not computable, whose fit fails or whose
 * projection fails are counted, by reason, and left out of the intervals.
 *
 * Draws are split into chunks of CHUNK_DRAWS (even, as the streams are read
 * in even-sized pieces); the result does not depend on which thread computed
 * which chunk. Pure: seed in, numbers out.
 */
import { compileDraws } from '../assessment/graph/draws.js';
import type { MethodChoice } from '../assessment/graph/index.js';
import type { VisitInputs } from '../assessment/inputs.js';
import { interval95 } from '../assessment/monte-carlo.js';
import { drawVisitInputs, runPlanFor } from '../assessment/uncertainty.js';
import type { ElastanceShape } from './double-hill.js';
import { fitHeartModel, type FitSuccess } from './fit.js';
import { beatValues, projectBeat, SCENARIO_KEYS, type ScenarioChanges, type ScenarioKey } from './project.js';
import { MODEL_NODE_KEYS, subjectNumbers, subjectSetup, type GraphReader, type SubjectNumbers, type VisitExtras } from './subject-model.js';
import { timingOf } from './scenario.js';

export const INTERVAL_DRAWS = { default: 200, min: 200, max: 5000 } as const;
/** Draws per chunk: the unit of work a thread takes. */
export const CHUNK_DRAWS = 20;

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
  /** the visit's method choice (Pes estimate, SV source), as assessed */
  choice: MethodChoice;
  extras: VisitExtras;
  changes: ScenarioChanges;
  shape: ElastanceShape;
  warm: BaselineFitState;
  seed: number;
  chunk: number;
  draws: number;
}

/** The model's numbers in one draw, and whether an input of the draw fell outside its domain. */
export interface DrawnNumbers {
  numbers: SubjectNumbers;
  outOfDomain: boolean;
}

/**
 * The model's numbers in draws start … start + n − 1 of a visit's Monte Carlo
 * (the draws of `assess --uncertainty` with this seed): the visit's error
 * model and the graph's draw program, read through the model's one mapping.
 */
export function drawnSubjectNumbers(inputs: VisitInputs, choice: MethodChoice, extras: VisitExtras, seed: number, start: number, n: number): DrawnNumbers[] {
  const plan = runPlanFor(inputs, choice);
  const program = compileDraws(plan.graph, plan.nominal, plan.active.map((a) => a.input), MODEL_NODE_KEYS, n);
  drawVisitInputs(plan, program, seed, start, n);
  program.run(n);
  // An input drawn outside its domain (≤ 0, DBP ≥ SBP, ESV ≥ EDV, …) is NaN in its column (graph/draws.ts).
  const drawnColumns = plan.active.map((a) => program.output(a.input));
  const out: DrawnNumbers[] = [];
  for (let d = 0; d < n; d++) {
    const read: GraphReader = (key) => program.output(key)[d]!;
    out.push({ numbers: subjectNumbers(read, extras), outOfDomain: drawnColumns.some((c) => Number.isNaN(c[d]!)) });
  }
  return out;
}

/** One chunk of draws: draws chunk·CHUNK_DRAWS … of the visit's Monte Carlo. */
export function scenarioChunk(req: ChunkRequest): ChunkResult {
  const { changes, shape, warm } = req;
  const values = Object.fromEntries(SCENARIO_KEYS.map((k) => [k, [] as number[]])) as Record<ScenarioKey, number[]>;
  const failures = Object.fromEntries(FAILURE_KINDS.map((k) => [k, 0])) as Record<FailureKind, number>;
  const fail = (kind: FailureKind) => {
    failures[kind]++;
    for (const k of SCENARIO_KEYS) values[k].push(Number.NaN);
  };
  for (const { numbers, outOfDomain } of drawnSubjectNumbers(req.inputs, req.choice, req.extras, req.seed, req.chunk * CHUNK_DRAWS, req.draws)) {
    if (numbers.ees === null) {
      fail(outOfDomain ? 'inputsOutOfRange' : 'eesNotComputable');
      continue;
    }
    const setup = subjectSetup(numbers, shape);
    if (!setup.ok) {
      fail(outOfDomain ? 'inputsOutOfRange' : 'fitFailed');
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

/** 2.5th and 97.5th percentiles (Hyndman–Fan type 7, as for the assessment's intervals: monte-carlo.ts) of the chunks merged in chunk order. */
export function mergeChunks(results: ChunkResult[], draws: number, seed: number): ScenarioIntervals {
  const failures = Object.fromEntries(FAILURE_KINDS.map((k) => [k, 0])) as Record<FailureKind, number>;
  for (const r of results) for (const k of FAILURE_KINDS) failures[k] += r.failures[k];
  const intervals: ScenarioIntervals['interval95'] = {};
  let succeeded = 0;
  for (const key of SCENARIO_KEYS) {
    const all = results.flatMap((r) => r.values[key]).filter(Number.isFinite);
    if (key === 'sv') succeeded = all.length;
    if (all.length < 2) continue;
    intervals[key] = interval95(Float64Array.from(all), all.length);
  }
  return { draws, seed, succeeded, failures, interval95: intervals };
}
