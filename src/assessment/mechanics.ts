/**
 * Mechanics of one visit beyond coupling: end-systolic wall stress (the load
 * the muscle feels) beside Pes and Ea, elastance-model energetics, the
 * single-beat diastolic curve and the geometry of the estimated
 * pressure–volume loop. Pure: inputs and the core results in, data out; the
 * SVG, terminal, HTML and JSON views all draw this object.
 */
import { endDiastolicCurveFromOnePoint, pressureOnEndDiastolicCurve, type EndDiastolicCurve } from '../physiology/end-diastolic-pressure-volume.js';
import {
  mechanicalEfficiency, mmHgMlToJoules, potentialEnergy, pressureVolumeArea, strokeWork,
} from '../physiology/energetics.js';
import { FILLING_PRESSURE_METHOD, fillingPressureFromEOverEPrime } from '../physiology/filling-pressure.js';
import { wallStressMeridional, wallStressThinWall } from '../physiology/wall-stress.js';
import type { Results } from './graph/index.js';
import type { VisitInputs } from './inputs.js';
import { quantity, type Quantity } from './result.js';

export const WALL_STRESS_UNIT = '10³ dyn/cm²';

export type EdpSource = 'entered' | 'estimated' | 'none';

export interface WallStress {
  /** The pressure both forms use: mean brachial cuff SBP, as Reichek 1982 validated. */
  pressure: Quantity;
  thinWall: Quantity;
  meridional: Quantity;
}

export interface Energetics {
  strokeWork: Quantity;
  potentialEnergy: Quantity;
  pressureVolumeArea: Quantity;
  strokeWorkJoules: Quantity;
  potentialEnergyJoules: Quantity;
  pressureVolumeAreaJoules: Quantity;
  efficiency: Quantity;
}

export interface Diastolic {
  /** The EDP the curve is built from: entered, or estimated from E/e′. */
  edp: Quantity;
  edpSource: EdpSource;
  /** The Nagueh estimate whenever E/e′ is given (beside an entered EDP too). */
  edpFromEOverEPrime: Quantity;
  curve: EndDiastolicCurve | null;
  /** Why there is no curve, when there is none. */
  reason?: string;
}

/** The numbers the pressure–volume diagram is drawn from. */
export interface LoopGeometry {
  edv: number;
  esv: number;
  /** End-diastolic pressure (entered or estimated); null: no diastolic side. */
  edp: number | null;
  edpSource: EdpSource;
  /** Pressure at aortic valve opening: brachial DBP (common practice). */
  ejectionOnsetPressure: number;
  /** Peak of the schematic ejection limb: brachial SBP (LV systolic ≈ cuff SBP, common practice). */
  peakPressure: number;
  pes: number | null;
  ees: number | null;
  /** Volume intercept of the end-systolic line (may be negative). */
  v0: number | null;
  /** Slope of the line from (EDV, 0) to (ESV, Pes): Pes / (EDV − ESV). */
  eaLineSlope: number | null;
  /** The reported Ea (Pes / the SV that feeds Ea; differs from the slope when Doppler SV is used). */
  ea: number | null;
  diastolicCurve: EndDiastolicCurve | null;
}

export interface Mechanics {
  wallStress: WallStress;
  energetics: Energetics;
  diastolic: Diastolic;
  loop: LoopGeometry;
  /** Two or three plain sentences on wall stress versus Pes versus Ea. */
  afterloadNote: string;
}

export const AFTERLOAD_NOTE =
  'Wall stress is the load the muscle itself bears: it rises with pressure and cavity size and falls with wall thickness. ' +
  'Pes depends on everything that sets the stroke volume, preload and contractility included, not on the arteries alone. ' +
  'Ea = Pes/SV follows mainly peripheral resistance and heart rate (Ea ≈ TPR × HR/60): it describes the arterial system, not the stress in the wall.';

export function visitMechanics(inputs: VisitInputs, results: Results): Mechanics {
  const diastolic = diastolicSide(inputs);
  return {
    wallStress: wallStress(inputs),
    energetics: energetics(results, inputs.esv),
    diastolic,
    loop: {
      edv: inputs.edv,
      esv: inputs.esv,
      edp: diastolic.curve ? diastolic.curve.edp : null,
      edpSource: diastolic.curve ? diastolic.edpSource : 'none',
      ejectionOnsetPressure: inputs.dbp,
      peakPressure: inputs.sbp,
      pes: results.pes.value,
      ees: results.ees.value,
      v0: results.v0.value,
      eaLineSlope: results.pes.value !== null ? results.pes.value / (inputs.edv - inputs.esv) : null,
      ea: results.ea.value,
      diastolicCurve: diastolic.curve,
    },
    afterloadNote: AFTERLOAD_NOTE,
  };
}

function wallStress(inputs: VisitInputs): WallStress {
  const pressure = quantity(inputs.sbp, 'mmHg', 'mean brachial cuff SBP (the pressure Reichek 1982 validated)');
  const { lvids, pwts } = inputs;
  if (lvids === null || pwts === null) {
    const reason = 'needs LV end-systolic dimension (--lvids) and posterior wall thickness (--pwts)';
    return {
      pressure,
      thinWall: quantity(null, WALL_STRESS_UNIT, undefined, reason),
      meridional: quantity(null, WALL_STRESS_UNIT, undefined, reason),
    };
  }
  return {
    pressure,
    thinWall: quantity(wallStressThinWall(inputs.sbp, lvids / 2, pwts), WALL_STRESS_UNIT, 'Laplace, thin wall: SBP·(LVIDs/2) / (2·PWTs)'),
    meridional: quantity(wallStressMeridional(inputs.sbp, lvids, pwts), WALL_STRESS_UNIT, 'meridional, thick wall: 0.334·SBP·LVIDs / [PWTs·(1 + PWTs/LVIDs)] (Reichek 1982)'),
  };
}

function energetics(r: Results, esv: number): Energetics {
  const pes = r.pes.value;
  const sv = r.svUsed.value;
  const v0 = r.v0.value;
  const swValue = pes !== null && sv !== null ? strokeWork(pes, sv) : null;
  const sw = quantity(swValue, 'mmHg·mL', 'Pes × SV (elastance model, rectangle)', r.pes.reason ?? 'needs Pes and SV');
  const peOutcome = pes !== null && v0 !== null ? potentialEnergy(pes, esv, v0) : null;
  const pe = peOutcome
    ? quantity(peOutcome.value, 'mmHg·mL', 'Pes·(ESV − V0)/2 (Suga; triangle under the end-systolic line)', peOutcome.reason)
    : quantity(null, 'mmHg·mL', undefined, r.v0.reason ?? 'needs Ees');
  const pvaValue = swValue !== null && pe.value !== null ? pressureVolumeArea(swValue, pe.value) : null;
  const pva = quantity(pvaValue, 'mmHg·mL', 'SW + PE (Suga 1990)', pe.reason ?? sw.reason);
  const eff = pvaValue !== null && swValue !== null ? mechanicalEfficiency(swValue, pvaValue) : null;
  const efficiency = eff
    ? quantity(eff.value, '', 'SW / PVA (= 1/(1 + Ea/(2·Ees)) in the linear model)', eff.reason)
    : quantity(null, '', undefined, pva.reason);
  const joules = (q: Quantity, method: string) => quantity(q.value !== null ? mmHgMlToJoules(q.value) : null, 'J', method, q.reason);
  return {
    strokeWork: sw,
    potentialEnergy: pe,
    pressureVolumeArea: pva,
    strokeWorkJoules: joules(sw, 'SW × 1.33322 × 10⁻⁴ J per mmHg·mL'),
    potentialEnergyJoules: joules(pe, 'PE × 1.33322 × 10⁻⁴ J per mmHg·mL'),
    pressureVolumeAreaJoules: joules(pva, 'PVA × 1.33322 × 10⁻⁴ J per mmHg·mL'),
    efficiency,
  };
}

function diastolicSide(inputs: VisitInputs): Diastolic {
  const estimate = inputs.eOverEPrime !== null ? fillingPressureFromEOverEPrime(inputs.eOverEPrime) : null;
  const edpFromEOverEPrime = quantity(estimate, 'mmHg', FILLING_PRESSURE_METHOD, 'needs E/e′ (--e-over-e-prime)');
  let edp: Quantity;
  let edpSource: EdpSource;
  if (inputs.edp !== null) {
    edp = quantity(inputs.edp, 'mmHg', 'entered');
    edpSource = 'entered';
  } else if (estimate !== null) {
    edp = edpFromEOverEPrime;
    edpSource = 'estimated';
  } else {
    const reason = 'the diastolic curve needs LV end-diastolic pressure (--edp) or E/e′ (--e-over-e-prime)';
    return { edp: quantity(null, 'mmHg', undefined, reason), edpSource: 'none', edpFromEOverEPrime, curve: null, reason };
  }
  const outcome = endDiastolicCurveFromOnePoint(inputs.edv, edp.value as number);
  if (outcome.curve === null) return { edp, edpSource, edpFromEOverEPrime, curve: null, reason: outcome.reason };
  return { edp, edpSource, edpFromEOverEPrime, curve: outcome.curve };
}

export type LoopPhase = 'isovolumic contraction' | 'ejection' | 'isovolumic relaxation' | 'filling';
export interface LoopSegment {
  phase: LoopPhase;
  /** [volume mL, pressure mmHg] points in drawing order. */
  points: [number, number][];
}

/**
 * The estimated loop, built from its pieces: isovolumic contraction at EDV
 * from EDP up to the ejection-onset pressure (DBP); ejection from EDV to
 * (ESV, Pes); isovolumic relaxation at ESV down to the diastolic curve;
 * filling along the diastolic curve back to EDV. Without a diastolic curve
 * only the ejection limb is returned.
 *
 * The ejection limb is schematic (no published shape is implied): with
 * s = (EDV − V)/(EDV − ESV) running 0 → 1,
 *   P(s) = DBP + (Pes − DBP)·s + k·s·(1 − s),
 * with k chosen so the peak equals SBP (k = 2A − d + 2√(A·(A − d)),
 * A = SBP − DBP, d = Pes − DBP; k = 0 when Pes ≥ SBP). It starts at DBP,
 * ends at Pes and peaks at SBP, which is all the inputs say about it.
 */
export function loopOutline(loop: LoopGeometry, samples = 24): LoopSegment[] {
  const segments: LoopSegment[] = [];
  const { edv, esv, pes } = loop;
  if (pes === null) return segments;
  const curve = loop.diastolicCurve;
  if (curve && loop.edp !== null) {
    segments.push({ phase: 'isovolumic contraction', points: [[edv, loop.edp], [edv, loop.ejectionOnsetPressure]] });
  }
  const onset = loop.ejectionOnsetPressure;
  const a = loop.peakPressure - onset;
  const d = pes - onset;
  const k = a - d > 0 ? 2 * a - d + 2 * Math.sqrt(a * (a - d)) : 0;
  const ejection: [number, number][] = [];
  for (let i = 0; i <= samples; i++) {
    const s = i / samples;
    ejection.push([edv - s * (edv - esv), onset + d * s + k * s * (1 - s)]);
  }
  segments.push({ phase: 'ejection', points: ejection });
  if (curve) {
    const endRelaxation = pressureOnEndDiastolicCurve(curve, esv);
    segments.push({ phase: 'isovolumic relaxation', points: [[esv, pes], [esv, endRelaxation]] });
    const filling: [number, number][] = [];
    for (let i = 0; i <= samples; i++) {
      const v = esv + (i / samples) * (edv - esv);
      filling.push([v, i === samples ? curve.edp : pressureOnEndDiastolicCurve(curve, v)]);
    }
    segments.push({ phase: 'filling', points: filling });
  }
  return segments;
}
