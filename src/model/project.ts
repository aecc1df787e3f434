/**
 * Projections: the fitted model of one subject with one or more parameters
 * changed, run to a new steady state.
 *
 * - `toHr`: the heart rate; PEP and ET move along the Weissler slopes
 *   (systolic-intervals.ts) and the time to peak elastance follows
 *   (Tpeak = PEP + ET − EMD). Resistance, compliance and Zc are unchanged.
 * - `resistance`, `compliance`: signed percentages applied to R and C (Zc
 *   unchanged).
 * - `contractility`: a signed percentage applied to Emax (= Ees); V0 kept.
 * - `toEdv`: the filling (source) pressure is re-tuned so the projected beat
 *   has this EDV; without it the source pressure is kept (filling pressure
 *   unchanged, so EDV may move, e.g. with a shorter diastole).
 * Everything else is as fitted. No reflex, drug or valve effect is modelled.
 */
import { couplingRatio } from '../physiology/coupling.js';
import { potentialEnergy, pressureVolumeArea, strokeWork, mechanicalEfficiency } from '../physiology/energetics.js';
import { simulateToSteadyState, timeToPeakElastance, type HeartModel, type ModelState, type SimulatedBeat } from './beat.js';
import { systolicIntervalsAtHeartRate } from './systolic-intervals.js';

export interface ScenarioChanges {
  /** bpm */
  toHr?: number;
  /** signed % change of peripheral resistance */
  resistance?: number;
  /** signed % change of arterial compliance */
  compliance?: number;
  /** signed % change of Emax (Ees) */
  contractility?: number;
  /** mL */
  toEdv?: number;
}

export const SCENARIO_KEYS = ['sv', 'ef', 'edv', 'esv', 'sbp', 'dbp', 'pes', 'ea', 'ees', 'eaEes', 'co', 'sw', 'swPva', 'hr'] as const;
export type ScenarioKey = (typeof SCENARIO_KEYS)[number];
export type ScenarioValues = Record<ScenarioKey, number | null>;

export const SCENARIO_UNITS: Readonly<Record<ScenarioKey, string>> = {
  sv: 'mL', ef: '%', edv: 'mL', esv: 'mL', sbp: 'mmHg', dbp: 'mmHg', pes: 'mmHg', ea: 'mmHg/mL', ees: 'mmHg/mL',
  eaEes: '', co: 'L/min', sw: 'mmHg·mL', swPva: '', hr: 'bpm',
};

/** Stroke work and SW/PVA as the assessment defines them (src/physiology/energetics.ts): one definition for measured and modelled beats. */
export function energeticsOf(pes: number | null, sv: number | null, esv: number | null, v0: number | null): { sw: number | null; swPva: number | null } {
  if (pes === null || sv === null) return { sw: null, swPva: null };
  const sw = strokeWork(pes, sv);
  if (esv === null || v0 === null) return { sw, swPva: null };
  const pe = potentialEnergy(pes, esv, v0);
  if (pe.value === null) return { sw, swPva: null };
  return { sw, swPva: mechanicalEfficiency(sw, pressureVolumeArea(sw, pe.value)).value };
}

/** The values of a simulated beat under the scenario keys. */
export function beatValues(beat: SimulatedBeat, model: HeartModel): ScenarioValues {
  const { ees, v0 } = model.ventricle;
  const e = energeticsOf(beat.pes, beat.sv, beat.esv, v0);
  return {
    sv: beat.sv, ef: beat.ef, edv: beat.edv, esv: beat.esv, sbp: beat.sbp, dbp: beat.dbp, pes: beat.pes,
    ea: beat.ea, ees, eaEes: couplingRatio(beat.ea, ees), co: beat.co, sw: e.sw, swPva: e.swPva, hr: model.heartRate,
  };
}

export interface MeasuredTiming {
  /** the subject's measured PEP and ET (ms) and heart rate (bpm) */
  pep: number;
  et: number;
  hr: number;
  sex: 'male' | 'female' | null;
}

/** The fitted model with the changes applied (filling not yet re-tuned for toEdv). */
export function changedModel(fitted: HeartModel, timing: MeasuredTiming, c: ScenarioChanges): HeartModel {
  let m: HeartModel = fitted;
  if (c.toHr !== undefined) {
    const iv = systolicIntervalsAtHeartRate({ pep: timing.pep, et: timing.et }, timing.hr, c.toHr, timing.sex);
    m = { ...m, heartRate: c.toHr, timeToPeak: timeToPeakElastance(iv.pep, iv.et, m.electromechanicalDelay) };
  }
  if (c.resistance !== undefined || c.compliance !== undefined) {
    m = {
      ...m,
      arteries: {
        ...m.arteries,
        resistance: m.arteries.resistance * (1 + (c.resistance ?? 0) / 100),
        compliance: m.arteries.compliance * (1 + (c.compliance ?? 0) / 100),
      },
    };
  }
  if (c.contractility !== undefined) m = { ...m, ventricle: { ...m.ventricle, ees: m.ventricle.ees * (1 + c.contractility / 100) } };
  return m;
}

export type ProjectionOutcome = { ok: true; model: HeartModel; beat: SimulatedBeat } | { ok: false; reason: string };

/** EDV re-tuning: relative tolerance and iteration cap of the secant search on the source pressure. */
export const EDV_TOLERANCE = 0.005;

/** Run the changed model to steady state, re-tuning filling for toEdv. */
export function projectBeat(fitted: HeartModel, timing: MeasuredTiming, changes: ScenarioChanges, start?: ModelState, keepLoop = false): ProjectionOutcome {
  let model = changedModel(fitted, timing, changes);
  if (60_000 / model.heartRate <= model.timeToPeak + model.electromechanicalDelay) {
    return { ok: false, reason: `at ${model.heartRate} bpm the projected systole (${(model.timeToPeak + model.electromechanicalDelay).toFixed(0)} ms) fills the whole beat` };
  }
  if (!(model.timeToPeak > 50)) return { ok: false, reason: `at ${model.heartRate} bpm the projected systole is too short (time to peak elastance ${model.timeToPeak.toFixed(0)} ms)` };
  const run = (m: HeartModel, s?: ModelState) => simulateToSteadyState(m, { ...(s ? { start: s } : {}), keepLoop });
  let out = run(model, start);
  if (!out.ok) return { ok: false, reason: out.reason };
  if (changes.toEdv !== undefined) {
    const target = changes.toEdv;
    // Secant on ln(source pressure) against ln(EDV): the passive curve is a power law, so this is nearly linear.
    let x0 = Math.log(model.sourcePressure);
    let f0 = Math.log(out.beat.edv / target);
    let x1 = x0 + (f0 > 0 ? -0.2 : 0.2);
    for (let i = 0; i < 30 && Math.abs(f0) > EDV_TOLERANCE / 2; i++) {
      const m1: HeartModel = { ...model, sourcePressure: Math.exp(Math.min(Math.log(80), Math.max(Math.log(0.2), x1))) };
      const o1 = run(m1, out.beat.endState);
      if (!o1.ok) return { ok: false, reason: `no filling pressure gives EDV ${target} mL: ${o1.reason}` };
      const f1 = Math.log(o1.beat.edv / target);
      const slope = (f1 - f0) / (x1 - x0);
      x0 = x1;
      f0 = f1;
      model = m1;
      out = o1;
      if (!(Math.abs(slope) > 1e-6)) break;
      x1 = x0 - f0 / slope;
    }
    if (Math.abs(out.beat.edv / target - 1) > EDV_TOLERANCE) {
      return { ok: false, reason: `no filling pressure between 0.2 and 80 mmHg gives EDV ${target} mL (closest ${out.beat.edv.toFixed(0)} mL)` };
    }
  }
  return { ok: true, model, beat: out.beat };
}
