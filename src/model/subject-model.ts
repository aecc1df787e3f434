/**
 * One subject's model from plain numbers: the single-beat Ees and V0, the
 * measured EDV, stroke volume, cuff pressures, heart rate, PEP and ET, and the
 * diastolic curve. Pure; the numbers come today from `assess()` (see
 * numbersFromAssessment) and can come from any evaluator of the same
 * quantities.
 *
 * Choices (docs/model.md):
 * - Emax = the single-beat Ees; V0 as estimated (ESV − Pes/Ees).
 * - Time to peak elastance, counted from the onset of contraction:
 *   Tpeak = PEP + ET − EMD, i.e. peak elastance at the measured aortic valve
 *   closure (end-systole ≈ time of Emax; Suga & Sagawa 1974).
 * - The passive curve: the subject's Klotz curve when the assessment has one
 *   (EDP entered or estimated from E/e′); otherwise the Klotz curve through
 *   (EDV, 10 mmHg), an assumed normal EDP, said so in the output.
 * - Targets of the fit: EDV, the stroke volume the assessment uses (Doppler
 *   when given, else EDV − ESV), and the cuff SBP and DBP taken as the model's
 *   aortic pressures (brachial amplification is not modelled).
 */
import { endDiastolicCurveFromOnePoint } from '../physiology/end-diastolic-pressure-volume.js';
import { meanArterialPressure } from '../physiology/mean-arterial-pressure.js';
import type { Assessment } from '../assessment/assess.js';
import { ELECTROMECHANICAL_DELAY_MS, type HeartModel } from './beat.js';
import { DEFAULT_ELASTANCE_SHAPE, type ElastanceShape } from './double-hill.js';
import type { FitTargets } from './fit.js';
import { INFLOW_RESISTANCE } from './valves.js';
import type { PassiveCurve } from './ventricle.js';
import { windkesselStart } from './windkessel.js';

/** EDP assumed when none is entered or estimated (a typical normal value; common practice). */
export const ASSUMED_EDP_MMHG = 10;

export interface SubjectNumbers {
  ees: number | null;
  /** why Ees is missing */
  eesReason?: string;
  /** V0 of the end-systolic line through (EDV − SV, Pes): the model's V0 */
  v0: number | null;
  /** the assessment's V0 (ESV − Pes/Ees), for the note when the two differ */
  assessedV0?: number | null;
  edv: number;
  esv: number;
  sv: number;
  sbp: number;
  dbp: number;
  hr: number | null;
  pep: number;
  et: number;
  sex: 'male' | 'female' | null;
  /** EDP the diastolic curve passes through (null: none known) */
  edp: number | null;
  edpSource: 'entered' | 'estimated' | 'assumed' | 'none';
}

export interface SubjectSetup {
  ok: true;
  model: HeartModel;
  targets: FitTargets;
  passive: PassiveCurve;
  edp: number;
  edpSource: 'entered' | 'estimated' | 'assumed';
  notes: string[];
}
export type SubjectSetupOutcome = SubjectSetup | { ok: false; reason: string };

export function numbersFromAssessment(a: Assessment): SubjectNumbers {
  const { inputs, results, mechanics } = a;
  const curve = mechanics?.diastolic.curve ?? null;
  const sv = results.sv.value ?? inputs.edv - inputs.esv;
  const ees = results.ees.value;
  const pes = results.pes.value;
  const n: SubjectNumbers = {
    ees,
    // The end-systolic line through the end-systolic point of the single-beat method itself:
    // Chen 2001 takes end-systole at EDV − SV with the SV it is given, so V0 = EDV − SV − Pes/Ees.
    // With a volumetric SV this is the assessment's V0 (ESV − Pes/Ees) exactly.
    v0: ees !== null && pes !== null && ees > 0 ? inputs.edv - sv - pes / ees : null,
    assessedV0: results.v0.value,
    edv: inputs.edv,
    esv: inputs.esv,
    sv,
    sbp: inputs.sbp,
    dbp: inputs.dbp,
    hr: inputs.hr,
    pep: inputs.pep,
    et: inputs.et,
    sex: inputs.sex,
    edp: curve ? curve.edp : null,
    edpSource: curve ? (mechanics!.diastolic.edpSource === 'entered' ? 'entered' : 'estimated') : 'none',
  };
  if (results.ees.reason) n.eesReason = results.ees.reason;
  return n;
}

/** The model's fixed parts and first guess, or why no model can be built. */
export function subjectSetup(n: SubjectNumbers, shape: ElastanceShape = DEFAULT_ELASTANCE_SHAPE): SubjectSetupOutcome {
  if (n.ees === null || n.v0 === null) return { ok: false, reason: `Ees is not computable for this visit (${n.eesReason ?? 'no single-beat Ees'}), so the ventricle has no end-systolic line` };
  if (!(n.ees > 0)) return { ok: false, reason: 'Ees is not positive' };
  if (n.hr === null) return { ok: false, reason: 'the model needs the heart rate (--hr)' };
  if (!(n.sv > 0 && n.sv < n.edv)) return { ok: false, reason: `the stroke volume ${n.sv.toFixed(0)} mL is not between 0 and EDV ${n.edv.toFixed(0)} mL` };
  if (!(n.edv - n.sv > n.v0)) {
    return { ok: false, reason: `V0 ${n.v0.toFixed(0)} mL lies above the end-systolic volume the fit needs (EDV − SV = ${(n.edv - n.sv).toFixed(0)} mL): no positive end-systolic pressure` };
  }
  const timeToPeak = n.pep + n.et - ELECTROMECHANICAL_DELAY_MS;
  if (!(timeToPeak > 50)) return { ok: false, reason: 'PEP + ET is too short for a contraction' };
  if (!(n.pep + n.et < 60_000 / n.hr)) return { ok: false, reason: 'PEP + ET is longer than the heart period' };
  const notes: string[] = [];
  if (n.assessedV0 !== undefined && n.assessedV0 !== null && Math.abs(n.assessedV0 - n.v0) >= 1) {
    notes.push(`V0 of the model is ${n.v0.toFixed(0)} mL, the end-systolic line through EDV − SV (the Doppler stroke volume) at Pes; the assessment's V0 through the echo ESV is ${n.assessedV0.toFixed(0)} mL.`);
  }
  let edp = n.edp;
  let edpSource: SubjectSetup['edpSource'];
  if (edp === null || n.edpSource === 'none') {
    edp = ASSUMED_EDP_MMHG;
    edpSource = 'assumed';
    notes.push(`No EDP entered or estimated: the passive filling curve goes through EDV at an assumed ${ASSUMED_EDP_MMHG} mmHg.`);
  } else {
    edpSource = n.edpSource === 'entered' ? 'entered' : 'estimated';
  }
  const curve = endDiastolicCurveFromOnePoint(n.edv, edp);
  if (curve.curve === null) return { ok: false, reason: `no diastolic filling curve: ${curve.reason}` };
  const passive = { alpha: curve.curve.alpha, beta: curve.curve.beta };
  const map = meanArterialPressure(n.sbp, n.dbp);
  const co = (n.sv * n.hr) / 1000;
  const model: HeartModel = {
    ventricle: { ees: n.ees, v0: n.v0, passive },
    heartRate: n.hr,
    timeToPeak,
    electromechanicalDelay: ELECTROMECHANICAL_DELAY_MS,
    shape,
    arteries: windkesselStart(map, co, n.sv, n.sbp - n.dbp),
    sourcePressure: edp,
    inflowResistance: INFLOW_RESISTANCE,
  };
  return { ok: true, model, targets: { edv: n.edv, sv: n.sv, sbp: n.sbp, dbp: n.dbp }, passive, edp, edpSource, notes };
}
