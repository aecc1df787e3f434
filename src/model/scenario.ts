/**
 * A what-if projection for one visit, pure: the assessment in, the measured
 * values, the fitted model's baseline beat and the projected beat out, with
 * the fit's residuals, or the reason no projection is made.
 */
import type { Assessment } from '../assessment/assess.js';
import type { PressureVolumePoint, SimulatedBeat } from './beat.js';
import { DEFAULT_ELASTANCE_SHAPE, DOUBLE_HILL_SETS, type ElastanceShape } from './double-hill.js';
import { FIT_TOLERANCE, fitHeartModel, type FitSuccess, type FitTargetKey } from './fit.js';
import { beatValues, projectBeat, SCENARIO_KEYS, type MeasuredTiming, type ScenarioChanges, type ScenarioValues } from './project.js';
import { numbersFromAssessment, subjectSetup, type SubjectNumbers } from './subject-model.js';

export interface ScenarioFit {
  ok: boolean;
  /** relative error of each fitted target: (model − measured)/measured */
  residuals?: Record<FitTargetKey, number>;
  tolerance: number;
  reason?: string;
  iterations?: number;
  shape: ElastanceShape;
  shapeLabel: string;
  /** fitted parameters, in the units of docs/model.md */
  parameters?: { sourcePressure: number; resistance: number; compliance: number; characteristicImpedance: number; ees: number; v0: number; timeToPeak: number };
  /** how the model's own valve events compare with the measured intervals (not fitted) */
  timing?: { pep: number; et: number };
}

export interface ScenarioResult {
  measured: ScenarioValues;
  fit: ScenarioFit;
  baseline: ScenarioValues | null;
  projected: ScenarioValues | null;
  /** why there is no projection although the fit succeeded */
  projectionReason?: string;
  changes: ScenarioChanges;
  notes: string[];
  loops: { baseline: PressureVolumePoint[]; projected: PressureVolumePoint[] } | null;
  /** kept for warm-started refits (intervals) */
  fitted?: FitSuccess;
  timing?: MeasuredTiming;
}

export function measuredValues(a: Assessment): ScenarioValues {
  const r = a.results;
  const e = a.mechanics?.energetics;
  return {
    sv: r.svUsed.value, ef: r.efUsed.value, edv: a.inputs.edv, esv: a.inputs.esv, sbp: a.inputs.sbp, dbp: a.inputs.dbp,
    pes: r.pes.value, ea: r.ea.value, ees: r.ees.value, eaEes: r.eaEes.value, co: r.co.value,
    sw: e?.strokeWork.value ?? null, swPva: e?.efficiency.value ?? null, hr: a.inputs.hr,
  };
}

export function timingOf(n: SubjectNumbers): MeasuredTiming | null {
  return n.hr === null ? null : { pep: n.pep, et: n.et, hr: n.hr, sex: n.sex };
}

function emptyValues(): ScenarioValues {
  return Object.fromEntries(SCENARIO_KEYS.map((k) => [k, null])) as ScenarioValues;
}

/** Fit the subject's model and project the changes. */
export function runScenario(a: Assessment, changes: ScenarioChanges, shape: ElastanceShape = DEFAULT_ELASTANCE_SHAPE): ScenarioResult {
  const measured = measuredValues(a);
  const numbers = numbersFromAssessment(a);
  const base = { measured, changes, baseline: null, projected: null, loops: null };
  const fitInfo = { tolerance: FIT_TOLERANCE, shape, shapeLabel: DOUBLE_HILL_SETS[shape].label };
  const setup = subjectSetup(numbers, shape);
  if (!setup.ok) return { ...base, fit: { ok: false, reason: setup.reason, ...fitInfo }, notes: [] };
  const fit = fitHeartModel(setup.model, setup.targets);
  if (!fit.ok) {
    const f: ScenarioFit = { ok: false, reason: fit.reason, ...fitInfo };
    if (fit.residuals) f.residuals = fit.residuals;
    return { ...base, fit: f, notes: setup.notes };
  }
  const timing = timingOf(numbers)!;
  const m = fit.model;
  const scenarioFit: ScenarioFit = {
    ok: true, residuals: fit.residuals, iterations: fit.iterations, ...fitInfo,
    parameters: {
      sourcePressure: m.sourcePressure, resistance: m.arteries.resistance, compliance: m.arteries.compliance,
      characteristicImpedance: m.arteries.characteristicImpedance, ees: m.ventricle.ees, v0: m.ventricle.v0, timeToPeak: m.timeToPeak,
    },
    timing: { pep: fit.beat.pep, et: fit.beat.et },
  };
  const baselineRun = projectBeat(m, timing, {}, fit.state, true);
  const projectedRun = projectBeat(m, timing, changes, fit.state, true);
  const baseline = baselineRun.ok ? beatValues(baselineRun.beat, baselineRun.model) : beatValues(fit.beat, m);
  const notes = [
    ...setup.notes,
    'Measured Pes is the cuff estimate the assessment uses; the model\'s Pes is its aortic pressure at aortic valve closure, so the two need not agree even when SBP and DBP are fitted.',
  ];
  const result: ScenarioResult = {
    ...base, fit: scenarioFit, baseline, projected: null, notes, fitted: fit, timing,
  };
  if (!projectedRun.ok) {
    result.projectionReason = projectedRun.reason;
    result.projected = emptyValues();
    return result;
  }
  result.projected = beatValues(projectedRun.beat, projectedRun.model);
  if (baselineRun.ok) result.loops = { baseline: loopOf(baselineRun.beat), projected: loopOf(projectedRun.beat) };
  return result;
}

function loopOf(b: SimulatedBeat): PressureVolumePoint[] {
  return b.loop ?? [];
}

/** Printed with every projection, in every view. */
export const SCENARIO_CAUTIONS: readonly string[] = [
  'A model projection under stated assumptions (docs/model.md), not a prediction of what a treatment will do.',
  'Reflexes, drugs that act on several parameters at once and valve disease are not modelled; everything not changed is held as fitted.',
  'The model inherits the single-beat Ees and V0 and their error; its aortic pressures are fitted to the cuff values (brachial amplification is not modelled).',
  'Defer to clinical judgement, local protocols and licensed clinical practice for any decision about care.',
];

export const SCENARIO_LABELS: Readonly<Record<import('./project.js').ScenarioKey, string>> = {
  sv: 'Stroke volume (SV)', ef: 'Ejection fraction (EF)', edv: 'End-diastolic volume (EDV)', esv: 'End-systolic volume (ESV)',
  sbp: 'Systolic pressure (SBP)', dbp: 'Diastolic pressure (DBP)', pes: 'End-systolic pressure (Pes)', ea: 'Arterial elastance (Ea)',
  ees: 'End-systolic elastance (Ees)', eaEes: 'Ea/Ees', co: 'Cardiac output (CO)', sw: 'Stroke work (Pes × SV)', swPva: 'Efficiency (SW/PVA)', hr: 'Heart rate',
};
