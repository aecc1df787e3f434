/**
 * `elastimate scenario`: the visit (flags, --input, or --subject with --visit)
 * is assessed, the subject's model is fitted, the changes are projected, and
 * the result is shown side by side (src/render/scenario.ts). Thin: parsing
 * and threads here, the model in src/model.
 */
import { assess, type Assessment } from '../assessment/assess.js';
import { parseInputs } from '../assessment/inputs.js';
import { parseSeed } from '../assessment/uncertainty.js';
import { InputError, showValue, type InputProblem } from '../errors.js';
import { ELASTANCE_SHAPES, DEFAULT_ELASTANCE_SHAPE, type ElastanceShape } from '../model/double-hill.js';
import type { ScenarioChanges } from '../model/project.js';
import { runScenario } from '../model/scenario.js';
import { visitExtras } from '../model/subject-model.js';
import {
  baselineFitState, chunksOf, INTERVAL_DRAWS, mergeChunks, scenarioChunk,
  type ChunkRequest, type ChunkResult, type ScenarioIntervals,
} from '../model/scenario-intervals.js';
import { bareNumber, toInternalUnit } from '../units/quantity.js';
import { completeRaw, gatherRaw } from './assess-command.js';

/** Accepted ranges of the changes. */
export const CHANGE_RANGES = {
  toHr: { min: 30, max: 180, unit: 'bpm' },
  toEdv: { min: 20, max: 600, unit: 'mL' },
  percent: { min: -80, max: 300 },
} as const;

const PERCENT_FLAGS = [
  ['resistance', '--resistance'],
  ['compliance', '--compliance'],
  ['contractility', '--contractility'],
] as const;

/** A signed percentage as typed: "-20", "+15", "15%", "−10 %". NaN when it is not one. */
export function parseSignedPercent(raw: string): number {
  const text = raw.trim().replace(/^\u2212/, '-').replace(/\s*%$/, '');
  return bareNumber(text);
}

/** The changes from the options, every problem in one message. */
export function changesFromOptions(opts: Record<string, unknown>): ScenarioChanges {
  const problems: InputProblem[] = [];
  const changes: ScenarioChanges = {};
  const target = (key: 'toHr' | 'toEdv', flag: string, kind: 'rate' | 'volume') => {
    const raw = opts[key];
    if (raw === undefined) return;
    const r = CHANGE_RANGES[key];
    const accepted = `${r.min}–${r.max} ${r.unit}, optionally with a unit`;
    try {
      const v = toInternalUnit(flag, raw, kind);
      if (v < r.min || v > r.max) problems.push({ field: flag, value: showValue(raw), accepted });
      else changes[key] = v;
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      problems.push({ field: flag, value: showValue(raw), accepted });
    }
  };
  target('toHr', '--to-hr', 'rate');
  target('toEdv', '--to-edv', 'volume');
  for (const [key, flag] of PERCENT_FLAGS) {
    const raw = opts[key];
    if (raw === undefined) continue;
    const v = typeof raw === 'string' ? parseSignedPercent(raw) : Number.NaN;
    const { min, max } = CHANGE_RANGES.percent;
    if (!(v >= min && v <= max)) problems.push({ field: flag, value: showValue(raw), accepted: `a signed percentage from ${min} to +${max}, e.g. -20 or +15%` });
    else changes[key] = v;
  }
  if (problems.length) throw new InputError(problems);
  return changes;
}

export function shapeFromOption(raw: unknown): ElastanceShape {
  if (raw === undefined) return DEFAULT_ELASTANCE_SHAPE;
  if (typeof raw === 'string' && (ELASTANCE_SHAPES as readonly string[]).includes(raw)) return raw as ElastanceShape;
  throw new InputError({ field: '--shape', value: showValue(raw), accepted: ELASTANCE_SHAPES.join(' or ') });
}

export function drawsFromOption(raw: unknown): number {
  const { min, max } = INTERVAL_DRAWS;
  const v = typeof raw === 'string' && /^\d+$/.test(raw.trim()) ? Number(raw) : Number.NaN;
  if (!(v >= min && v <= max)) throw new InputError({ field: '--draws', value: showValue(raw), accepted: `a whole number of draws, ${min}–${max}` });
  return v;
}

/** `--seed`: the seed of the assessment's Monte Carlo (uncertainty.ts parseSeed: same range), named as the flag. */
export function seedFromOption(raw: unknown): number {
  try {
    return parseSeed(raw);
  } catch (err) {
    if (err instanceof InputError) throw new InputError(err.problems.map((p) => ({ ...p, field: '--seed' })));
    throw err;
  }
}

async function visitAssessment(opts: Record<string, unknown>, inputFile: string | undefined): Promise<Assessment> {
  if (opts.subject !== undefined) {
    if (inputFile !== undefined) throw new InputError({ field: '--subject', value: showValue(opts.subject), reason: 'given together with --input', accepted: 'one source of the visit: --subject (with --visit) or --input and flags' });
    const [{ readSubjectFile }, { assessSeries, findVisit }] = await Promise.all([import('../records/store.js'), import('../records/series.js')]);
    const file = readSubjectFile(String(opts.subject));
    const series = assessSeries(file);
    if (series.length === 0) throw new InputError({ field: '--subject', value: showValue(opts.subject), reason: 'has no visits yet', accepted: 'a subject file with at least one visit' });
    const index = opts.visit !== undefined ? findVisit(file, String(opts.visit)).index : series[series.length - 1]!.index;
    return series.find((e) => e.index === index)!.assessment;
  }
  if (opts.visit !== undefined) throw new InputError({ field: '--visit', value: showValue(opts.visit), reason: 'needs --subject', accepted: 'a visit number or date of the subject file given with --subject' });
  const raw = await completeRaw(gatherRaw(opts, inputFile), opts);
  return assess(parseInputs(raw));
}

export async function runScenarioCommand(opts: Record<string, unknown>, inputFile: string | undefined): Promise<void> {
  const changes = changesFromOptions(opts);
  const shape = shapeFromOption(opts.shape);
  const wantsIntervals = opts.intervals === true || opts.draws !== undefined || opts.seed !== undefined;
  const draws = opts.draws !== undefined ? drawsFromOption(opts.draws) : INTERVAL_DRAWS.default;
  const seed = opts.seed !== undefined ? seedFromOption(opts.seed) : 1;
  const files = opts.svg !== undefined || opts.report !== undefined ? await import('../io/safe-write.js') : null;
  const protect = [inputFile, opts.subject].filter((p): p is string => typeof p === 'string');
  const svgPath = files && opts.svg !== undefined ? files.checkOutputPath(opts.svg, { option: '--svg', extensions: ['.svg'], inputs: protect }) : null;
  const reportPath = files && opts.report !== undefined ? files.checkOutputPath(opts.report, { option: '--report', extensions: ['.html'], inputs: svgPath ? [...protect, svgPath] : protect }) : null;
  const a = await visitAssessment(opts, inputFile);
  const result = runScenario(a, changes, shape);
  const loops = result.loops && result.fit.parameters && result.projected?.ees != null
    ? {
        baseline: result.loops.baseline,
        projected: result.loops.projected,
        baselineLine: { ees: result.fit.parameters.ees, v0: result.fit.parameters.v0 },
        projectedLine: { ees: result.projected.ees, v0: result.fit.parameters.v0 },
      }
    : null;
  const drawing = loops && (svgPath || reportPath || opts.sketch === true) ? await import('../render/model-loops.js') : null;
  if (files && svgPath && drawing && loops) files.writeFileSafely(svgPath, drawing.renderModelLoopsSvg(loops), { option: '--svg', inputs: protect });
  let intervals: ScenarioIntervals | undefined;
  if (wantsIntervals && result.fitted && result.projected && !result.projectionReason) {
    const warm = baselineFitState(result.fitted);
    const extras = visitExtras(a);
    const requests = chunksOf(draws).map(({ chunk, draws: n }) => ({ inputs: a.inputs, choice: a.choice, extras, changes, shape, warm, seed, chunk, draws: n }));
    const { splitOverThreads } = await import('./threads.js');
    const results = await splitOverThreads<ChunkRequest, ChunkResult>('scenario', requests, scenarioChunk);
    intervals = mergeChunks(results, draws, seed);
  }
  const view = await import('../render/scenario.js');
  if (files && reportPath) {
    const { toolVersion } = await import('./package-info.js');
    const html = view.scenarioHtml(result, { ...(intervals ? { intervals } : {}), loopsSvg: drawing && loops ? drawing.renderModelLoopsSvg(loops) : null, generated: new Date().toISOString().slice(0, 10), toolVersion: toolVersion() });
    files.writeFileSafely(reportPath, html, { option: '--report', inputs: protect });
  }
  if (opts.json === true) {
    const [{ stringifySafe }, { toolVersion }] = await Promise.all([import('../render/json.js'), import('./package-info.js')]);
    process.stdout.write(stringifySafe(view.scenarioToJson(result, toolVersion(), intervals)) + '\n');
  } else {
    const { terminalStyle } = await import('./output.js');
    process.stdout.write(view.renderScenario(result, { style: await terminalStyle(), ...(intervals ? { intervals } : {}), width: process.stdout.columns ?? 100 }) + '\n');
  }
  if (opts.sketch === true) {
    const text = drawing && loops ? ['', 'Simulated pressure–volume loops (model)', ...drawing.renderModelLoopsSketch(loops), ''] : ['', 'No simulated loops to draw: no fitted model or no projection.', ''];
    (opts.json === true ? process.stderr : process.stdout).write(text.join('\n') + '\n');
  }
}
