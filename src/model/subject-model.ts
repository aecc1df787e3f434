/**
 * One subject's model from the graph of quantities (src/assessment/graph):
 * the single-beat Ees, Pes, the stroke volume used, EDV, ESV, the cuff
 * pressures, heart rate, PEP, ET, the peripheral resistance and the SV/PP
 * compliance are read by their graph keys through one mapping
 * (MODEL_GRAPH_KEYS, subjectNumbers), for the visit from its results and for
 * each Monte Carlo draw from the graph's draw program (scenario-intervals.ts),
 * so no formula of the graph is computed again here. The diastolic curve's
 * EDP is not a graph quantity (entered or estimated from E/e′ in
 * src/assessment/mechanics.ts, with no error in the error model): it is read
 * once from the visit and held in every draw, the curve passing through each
 * draw's EDV.
 *
 * Choices (docs/model.md):
 * - Emax = the single-beat Ees; V0 of the end-systolic line through
 *   (EDV − SV, Pes), the end-systolic point the single-beat method assumes.
 * - Time to peak elastance, counted from the onset of contraction:
 *   Tpeak = PEP + ET − EMD, i.e. peak elastance at the measured aortic valve
 *   closure (end-systole ≈ time of Emax; Suga & Sagawa 1974).
 * - The passive curve: the Klotz curve through (EDV, EDP) with the visit's
 *   EDP (entered or estimated from E/e′); otherwise through (EDV, 10 mmHg),
 *   an assumed normal EDP, said so in the output.
 * - Targets of the fit: EDV, the stroke volume the assessment uses (Doppler
 *   when given, else EDV − ESV), and the cuff SBP and DBP taken as the model's
 *   aortic pressures (brachial amplification is not modelled).
 */
import { endDiastolicCurveFromOnePoint } from '../physiology/end-diastolic-pressure-volume.js';
import { volumeIntercept } from '../physiology/volume-intercept.js';
import type { Assessment } from '../assessment/assess.js';
import type { GraphInputKey } from '../assessment/graph/inputs.js';
import type { ResultKey } from '../assessment/graph/registry.js';
import { ELECTROMECHANICAL_DELAY_MS, timeToPeakElastance, type HeartModel } from './beat.js';
import { DEFAULT_ELASTANCE_SHAPE, type ElastanceShape } from './double-hill.js';
import type { FitTargets } from './fit.js';
import { INFLOW_RESISTANCE } from './valves.js';
import type { PassiveCurve } from './ventricle.js';
import { windkesselStart, type WindkesselParameters } from './windkessel.js';

/** EDP assumed when none is entered or estimated (a typical normal value; common practice). */
export const ASSUMED_EDP_MMHG = 10;

/** The graph quantity (input or node key) behind each number the model takes: the one mapping. */
export const MODEL_GRAPH_KEYS = {
  ees: 'ees',
  pes: 'pes',
  sv: 'svUsed',
  edv: 'edv',
  esv: 'esv',
  sbp: 'sbp',
  dbp: 'dbp',
  hr: 'hr',
  pep: 'pep',
  et: 'et',
  tpr: 'tpr',
  compliance: 'compliance',
  assessedV0: 'v0',
} as const satisfies Record<string, GraphInputKey | ResultKey>;
export type ModelQuantity = keyof typeof MODEL_GRAPH_KEYS;
/** The graph nodes among them (what a draw program must compute). */
export const MODEL_NODE_KEYS: readonly ResultKey[] = ['ees', 'pes', 'svUsed', 'tpr', 'compliance', 'v0'];

/** What the model takes from the visit beyond the graph: sex (for the heart-rate regressions) and the diastolic curve's EDP. */
export interface VisitExtras {
  sex: 'male' | 'female' | null;
  /** EDP the diastolic curve passes through (null: none known) */
  edp: number | null;
  edpSource: 'entered' | 'estimated' | 'none';
}

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
  /** total peripheral resistance, WU (the graph's MAP/CO) */
  tpr: number | null;
  /** SV/PP, mL/mmHg (the graph's compliance) */
  compliance: number | null;
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

/** A graph value by key: a number, or NaN (or null) when not computable. */
export type GraphReader = (key: GraphInputKey | ResultKey) => number | null;

function finite(x: number | null): number | null {
  return x !== null && x - x === 0 ? x : null;
}

/**
 * The model's numbers from graph values: the one mapping, used for the visit
 * (graphReaderOf) and for every Monte Carlo draw. Absent values stay NaN in
 * the required fields, which subjectSetup refuses.
 */
export function subjectNumbers(read: GraphReader, extras: VisitExtras, eesReason?: string): SubjectNumbers {
  const get = (q: ModelQuantity): number | null => finite(read(MODEL_GRAPH_KEYS[q]));
  const need = (q: ModelQuantity): number => get(q) ?? Number.NaN;
  const ees = get('ees');
  const pes = get('pes');
  const sv = need('sv');
  const edv = need('edv');
  const n: SubjectNumbers = {
    ees,
    // The end-systolic line through the end-systolic point of the single-beat method itself:
    // Chen 2001 takes end-systole at EDV − SV with the SV it is given, so V0 = (EDV − SV) − Pes/Ees.
    // With a volumetric SV this is the assessment's V0 (ESV − Pes/Ees) exactly.
    v0: ees !== null && pes !== null && ees > 0 ? finite(volumeIntercept(edv - sv, pes, ees)) : null,
    assessedV0: get('assessedV0'),
    edv,
    esv: need('esv'),
    sv,
    sbp: need('sbp'),
    dbp: need('dbp'),
    hr: get('hr'),
    pep: need('pep'),
    et: need('et'),
    tpr: get('tpr'),
    compliance: get('compliance'),
    sex: extras.sex,
    edp: extras.edp,
    edpSource: extras.edpSource,
  };
  if (eesReason) n.eesReason = eesReason;
  return n;
}

/** Reads a visit's graph values: inputs as used, nodes from its results. */
export function graphReaderOf(a: Assessment): GraphReader {
  const inputs = a.inputs as unknown as Record<string, number | null>;
  const results = a.results as Record<string, { value: number | null }>;
  return (key) => (key in results ? results[key]!.value : (inputs[key] ?? null));
}

/** What the model takes from a visit beyond the graph. */
export function visitExtras(a: Assessment): VisitExtras {
  const curve = a.mechanics?.diastolic.curve ?? null;
  return {
    sex: a.inputs.sex,
    edp: curve ? curve.edp : null,
    edpSource: curve ? (a.mechanics!.diastolic.edpSource === 'entered' ? 'entered' : 'estimated') : 'none',
  };
}

export function numbersFromAssessment(a: Assessment): SubjectNumbers {
  return subjectNumbers(graphReaderOf(a), visitExtras(a), a.results.ees.reason);
}

/**
 * A heart model from its parts: the one place the fixed choices are applied
 * (the electromechanical delay, peak elastance at aortic valve closure, the
 * inflow valve's resistance, the Klotz passive curve through (EDV, EDP)). Used
 * for a visit's model and for every virtual heart of `synthetic`.
 */
export function heartModelFrom(p: {
  ees: number; v0: number; edv: number; edp: number; hr: number; pep: number; et: number;
  shape: ElastanceShape; arteries: WindkesselParameters; sourcePressure: number;
}): { ok: true; model: HeartModel } | { ok: false; reason: string } {
  const curve = endDiastolicCurveFromOnePoint(p.edv, p.edp);
  if (curve.curve === null) return { ok: false, reason: `no diastolic filling curve: ${curve.reason}` };
  return {
    ok: true,
    model: {
      ventricle: { ees: p.ees, v0: p.v0, passive: { alpha: curve.curve.alpha, beta: curve.curve.beta } },
      heartRate: p.hr,
      timeToPeak: timeToPeakElastance(p.pep, p.et),
      electromechanicalDelay: ELECTROMECHANICAL_DELAY_MS,
      shape: p.shape,
      arteries: p.arteries,
      sourcePressure: p.sourcePressure,
      inflowResistance: INFLOW_RESISTANCE,
    },
  };
}

/** The model's fixed parts and first guess, or why no model can be built. */
export function subjectSetup(n: SubjectNumbers, shape: ElastanceShape = DEFAULT_ELASTANCE_SHAPE): SubjectSetupOutcome {
  if (n.ees === null || n.v0 === null) return { ok: false, reason: `Ees is not computable for this visit (${n.eesReason ?? 'no single-beat Ees'}), so the ventricle has no end-systolic line` };
  if (!(n.ees > 0)) return { ok: false, reason: 'Ees is not positive' };
  if (n.hr === null) return { ok: false, reason: 'the model needs the heart rate (--hr)' };
  if (![n.edv, n.esv, n.sv, n.sbp, n.dbp, n.pep, n.et].every((x) => x - x === 0) || n.tpr === null || n.compliance === null) {
    return { ok: false, reason: 'the model needs EDV, ESV, the stroke volume, SBP, DBP, PEP, ET and the resistance and compliance computed from them' };
  }
  if (!(n.sv > 0 && n.sv < n.edv)) return { ok: false, reason: `the stroke volume ${n.sv.toFixed(0)} mL is not between 0 and EDV ${n.edv.toFixed(0)} mL` };
  if (!(n.edv - n.sv > n.v0)) {
    return { ok: false, reason: `V0 ${n.v0.toFixed(0)} mL lies above the end-systolic volume the fit needs (EDV − SV = ${(n.edv - n.sv).toFixed(0)} mL): no positive end-systolic pressure` };
  }
  if (!(timeToPeakElastance(n.pep, n.et) > 50)) return { ok: false, reason: 'PEP + ET is too short for a contraction' };
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
  const built = heartModelFrom({ ees: n.ees, v0: n.v0, edv: n.edv, edp, hr: n.hr, pep: n.pep, et: n.et, shape, arteries: windkesselStart(n.tpr, n.compliance), sourcePressure: edp });
  if (!built.ok) return built;
  const { model } = built;
  const passive = model.ventricle.passive;
  return { ok: true, model, targets: { edv: n.edv, sv: n.sv, sbp: n.sbp, dbp: n.dbp }, passive, edp, edpSource, notes };
}
