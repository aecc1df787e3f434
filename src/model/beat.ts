/**
 * One heart beat of the model, and beats run to a steady state.
 *
 * State: left-ventricular volume V (mL) and the Windkessel's compliance
 * pressure Pc (mmHg). Equations (see ventricle.ts, valves.ts, windkessel.ts):
 *
 *   Plv   = a(t)·Ees·(V − V0) + (1 − a(t))·α·V^β
 *   Qin   = max(0, Psource − Plv) / Rin             (mitral inflow)
 *   Qout  = max(0, Plv − Pc) / Zc                   (aortic outflow)
 *   dV/dt = Qin − Qout
 *   dPc/dt = (Qout − Pc/R) / C,      Pao = Pc + Zc·Qout
 *
 * a(t) = En((t − EMD)/Tpeak) + En((t + T − EMD)/Tpeak), capped at 1: the
 * double Hill curve (double-hill.ts) starting an electromechanical delay EMD
 * after the QRS onset (t = 0), plus the tail of the previous beat when the
 * heart is fast enough for relaxation to run into the next beat. T = 60/HR.
 *
 * Definitions used everywhere (docs/model.md):
 * - End-diastole: the largest volume of the beat (EDV); EDP the ventricular
 *   pressure there.
 * - End-systole: aortic valve closure, the first step after ejection began at
 *   which Plv ≤ Pc (where the echo reads ESV and where Pes is taken); Pes is
 *   the aortic pressure there. ESV is the volume there.
 * - SBP, DBP, MAP: the maximum, minimum and time average of the aortic
 *   pressure Pao over the beat (central pressures: brachial amplification is
 *   not modelled).
 * - PEP: QRS onset to aortic valve opening (includes EMD); ET: opening to
 *   closure.
 * - Steady state: the relative beat-to-beat change of EDV, ESV, SBP and DBP
 *   all below a tolerance (default 1e−5), within a cap on beats (default 120).
 * Integration: fixed-step RK4, 0.5 ms (integrate.ts). Nothing here returns
 * NaN: a non-finite or absurd state ends the run with a reason.
 */
import { arterialElastance } from '../physiology/arterial-elastance.js';
import { cardiacOutput } from '../physiology/cardiac-output.js';
import { ejectionFractionFromVolumes } from '../physiology/ejection-fraction.js';
import { normalizedElastance, type ElastanceShape } from './double-hill.js';
import { MODEL_STEP_MS, rk4Scratch, rk4Step, type Rk4Scratch } from './integrate.js';
import { valveFlow } from './valves.js';
import { ventricularPressure, type VentricleProperties } from './ventricle.js';
import type { WindkesselParameters } from './windkessel.js';

/**
 * QRS onset to the start of the ventricle's pressure rise, ms. The interval
 * is commonly put at 20–40 ms (from memory; common practice in systolic time
 * interval work, where PEP = electromechanical delay + isovolumic
 * contraction); the low end is used.
 */
export const ELECTROMECHANICAL_DELAY_MS = 20;

/** Time to peak elastance from the onset of contraction: peak at aortic valve closure, Tpeak = PEP + ET − EMD (docs/model.md). */
export function timeToPeakElastance(pep: number, et: number, electromechanicalDelay = ELECTROMECHANICAL_DELAY_MS): number {
  return pep + et - electromechanicalDelay;
}

export interface HeartModel {
  ventricle: VentricleProperties;
  /** bpm */
  heartRate: number;
  /** time from the onset of contraction to peak elastance, ms */
  timeToPeak: number;
  /** ms */
  electromechanicalDelay: number;
  shape: ElastanceShape;
  arteries: WindkesselParameters;
  /** constant filling (source) pressure, mmHg */
  sourcePressure: number;
  /** mmHg·s/mL */
  inflowResistance: number;
}

export interface ModelState {
  /** mL, at QRS onset */
  volume: number;
  /** mmHg, at QRS onset */
  compliancePressure: number;
}

export interface PressureVolumePoint {
  volume: number;
  pressure: number;
}

export interface SimulatedBeat {
  edv: number;
  esv: number;
  sv: number;
  /** % */
  ef: number;
  edp: number;
  sbp: number;
  dbp: number;
  map: number;
  pes: number;
  /** Pes / SV, mmHg/mL */
  ea: number;
  /** L/min */
  co: number;
  /** ms */
  pep: number;
  et: number;
  /** ventricular pressure and volume at aortic valve closure */
  endSystole: PressureVolumePoint;
  /** the point at peak activation (a = 1 exactly when the grid hits it) */
  peakElastance: PressureVolumePoint & { activation: number };
  /** ∮ P dV over the beat, mmHg·mL */
  loopArea: number;
  /** the loop every 2 ms, when asked for */
  loop?: PressureVolumePoint[];
  /** state at the end of the beat (= start of the next) */
  endState: ModelState;
}

export type BeatOutcome = { ok: true; beat: SimulatedBeat } | { ok: false; reason: string };

/** The activation a(t) tabulated on the half-step grid of one beat. */
export interface BeatGrid {
  steps: number;
  /** s */
  h: number;
  activation: Float64Array;
  /** step index nearest peak activation */
  peakStep: number;
}

export function beatGrid(m: Pick<HeartModel, 'heartRate' | 'timeToPeak' | 'electromechanicalDelay' | 'shape'>, stepMs = MODEL_STEP_MS): BeatGrid {
  const periodMs = 60_000 / m.heartRate;
  const steps = Math.max(1, Math.round(periodMs / stepMs));
  const activation = new Float64Array(2 * steps + 1);
  const T = steps * stepMs;
  for (let j = 0; j <= 2 * steps; j++) {
    const t = (j * stepMs) / 2;
    const a = normalizedElastance((t - m.electromechanicalDelay) / m.timeToPeak, m.shape) + normalizedElastance((t + T - m.electromechanicalDelay) / m.timeToPeak, m.shape);
    activation[j] = a > 1 ? 1 : a;
  }
  const peakStep = Math.min(steps, Math.round((m.electromechanicalDelay + m.timeToPeak) / stepMs));
  return { steps, h: stepMs / 1000, activation, peakStep };
}

const VOLUME_LIMIT = 3000;

/** Simulate one beat from `start`. Pure apart from the scratch buffers. */
export function simulateBeat(m: HeartModel, grid: BeatGrid, start: ModelState, keepLoop = false, scratch: Rk4Scratch = rk4Scratch(2)): BeatOutcome {
  const { ventricle, arteries, sourcePressure, inflowResistance } = m;
  const { resistance: R, compliance: C, characteristicImpedance: Zc } = arteries;
  const act = grid.activation;
  const f = (j: number, y: Float64Array, dy: Float64Array): void => {
    const plv = ventricularPressure(ventricle, y[0]!, act[j]!);
    const qin = valveFlow(sourcePressure, plv, inflowResistance);
    const qout = valveFlow(plv, y[1]!, Zc);
    dy[0] = qin - qout;
    dy[1] = (qout - y[1]! / R) / C;
  };
  const y = new Float64Array([start.volume, start.compliancePressure]);
  let vMax = -Infinity;
  let pAtVMax = 0;
  let sbp = -Infinity;
  let dbp = Infinity;
  let paoSum = 0;
  let openStep = -1;
  let closeStep = -1;
  let es: PressureVolumePoint | null = null;
  let pes = 0;
  let peak: SimulatedBeat['peakElastance'] | null = null;
  let area = 0;
  const loop: PressureVolumePoint[] | undefined = keepLoop ? [] : undefined;
  let prevV = y[0]!;
  let prevP = ventricularPressure(ventricle, prevV, act[0]!);
  for (let k = 0; k <= grid.steps; k++) {
    if (k > 0) rk4Step(f, 2 * (k - 1), y, grid.h, scratch);
    const v = y[0]!;
    const pc = y[1]!;
    if (!(Number.isFinite(v) && Number.isFinite(pc)) || v > VOLUME_LIMIT || v < -VOLUME_LIMIT || Math.abs(pc) > 1000) {
      return { ok: false, reason: 'the integration left the physiological range (volume or pressure without bound)' };
    }
    if (v <= 0) return { ok: false, reason: 'the ventricle empties completely (its volume reaches zero): no such heart' };
    const a = act[2 * k]!;
    const plv = ventricularPressure(ventricle, v, a);
    const qout = valveFlow(plv, pc, Zc);
    const pao = pc + Zc * qout;
    if (k < grid.steps) {
      // the last grid point is the next beat's first: counted once
      paoSum += pao;
      if (pao > sbp) sbp = pao;
      if (pao < dbp) dbp = pao;
      if (v > vMax) {
        vMax = v;
        pAtVMax = plv;
      }
    }
    if (k > 0) area += -0.5 * (plv + prevP) * (v - prevV);
    prevV = v;
    prevP = plv;
    if (openStep < 0 && qout > 0) openStep = k;
    else if (openStep >= 0 && closeStep < 0 && qout === 0) {
      closeStep = k;
      es = { volume: v, pressure: plv };
      pes = pao;
    }
    if (k === grid.peakStep) peak = { volume: v, pressure: plv, activation: a };
    if (loop && k % 4 === 0) loop.push({ volume: v, pressure: plv });
  }
  if (openStep < 0) return { ok: false, reason: 'the ventricle does not open the aortic valve (its pressure never exceeds the aortic pressure)' };
  if (closeStep < 0 || es === null) return { ok: false, reason: 'ejection does not end within the beat (systole too long for this heart rate)' };
  const esv = es.volume;
  const sv = vMax - esv;
  if (!(sv > 0)) return { ok: false, reason: 'the simulated beat ejects nothing' };
  const stepMs = grid.h * 1000;
  const beat: SimulatedBeat = {
    edv: vMax,
    esv,
    sv,
    ef: ejectionFractionFromVolumes(vMax, esv),
    edp: pAtVMax,
    sbp,
    dbp,
    map: paoSum / grid.steps,
    pes,
    ea: arterialElastance(pes, sv),
    co: cardiacOutput(sv, m.heartRate),
    pep: openStep * stepMs,
    et: (closeStep - openStep) * stepMs,
    endSystole: es,
    peakElastance: peak ?? { volume: esv, pressure: es.pressure, activation: 0 },
    loopArea: area,
    endState: { volume: y[0]!, compliancePressure: y[1]! },
  };
  if (loop) beat.loop = loop;
  return { ok: true, beat };
}

export interface SteadyStateOptions {
  maxBeats?: number;
  tolerance?: number;
  start?: ModelState;
  keepLoop?: boolean;
}

export const STEADY_STATE_DEFAULTS = { maxBeats: 120, tolerance: 1e-5 } as const;

export type SteadyOutcome = { ok: true; beat: SimulatedBeat; beats: number } | { ok: false; reason: string };

/** A plausible starting state when none is given: full ventricle, diastolic-level arterial pressure. */
export function defaultStart(m: HeartModel): ModelState {
  return { volume: Math.max(10, m.ventricle.v0 + 60, 120), compliancePressure: 70 };
}

/**
 * Aitken's Δ² extrapolation of the beat-to-beat sequence of start states
 * (Aitken AC, Proc R Soc Edinb 1926;46:289; any numerical analysis text):
 * the approach to the steady state is nearly geometric, dominated by the
 * Windkessel's R·C decay, so from three successive states s0, s1, s2 with
 * ratio λ = (s2 − s1)/(s1 − s0) the limit is s2 + (s2 − s1)·λ/(1 − λ). Applied
 * per component, only where 0 < λ < 0.95 (a clean geometric approach); it
 * changes where the iteration starts, never the steady state it finds, which
 * is still confirmed by the beat-to-beat test.
 */
export function accelerate(s0: ModelState, s1: ModelState, s2: ModelState): ModelState {
  const one = (a: number, b: number, c: number): number => {
    const d1 = b - a;
    const d2 = c - b;
    if (!(Math.abs(d1) > 1e-12)) return c;
    const lambda = d2 / d1;
    return lambda > 0 && lambda < 0.95 ? c + (d2 * lambda) / (1 - lambda) : c;
  };
  return { volume: one(s0.volume, s1.volume, s2.volume), compliancePressure: one(s0.compliancePressure, s1.compliancePressure, s2.compliancePressure) };
}

function relChange(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(1e-9, Math.abs(b));
}

/** Beats until the beat-to-beat change is below the tolerance; a reason when the cap is reached. */
export function simulateToSteadyState(m: HeartModel, options: SteadyStateOptions = {}): SteadyOutcome {
  const maxBeats = options.maxBeats ?? STEADY_STATE_DEFAULTS.maxBeats;
  const tol = options.tolerance ?? STEADY_STATE_DEFAULTS.tolerance;
  const grid = beatGrid(m);
  const scratch = rk4Scratch(2);
  let state = options.start ?? defaultStart(m);
  let previous: SimulatedBeat | null = null;
  // Start states of the last beats, for Aitken's extrapolation (see accelerate).
  const starts: ModelState[] = [];
  for (let n = 1; n <= maxBeats; n++) {
    const out = simulateBeat(m, grid, state, false, scratch);
    if (!out.ok) {
      // Early beats from a poor start may fail to eject; only a persistent failure counts.
      if (n < maxBeats && previous === null && n <= 5) {
        state = { volume: state.volume + 20, compliancePressure: state.compliancePressure * 0.9 };
        continue;
      }
      return out;
    }
    const b = out.beat;
    if (previous && relChange(b.edv, previous.edv) < tol && relChange(b.esv, previous.esv) < tol && relChange(b.sbp, previous.sbp) < tol && relChange(b.dbp, previous.dbp) < tol) {
      if (!options.keepLoop) return { ok: true, beat: b, beats: n };
      const withLoop = simulateBeat(m, grid, state, true, scratch);
      return withLoop.ok ? { ok: true, beat: withLoop.beat, beats: n } : withLoop;
    }
    previous = b;
    state = b.endState;
    starts.push(state);
    if (starts.length === 3) {
      state = accelerate(starts[0]!, starts[1]!, starts[2]!);
      starts.length = 0;
    }
  }
  return { ok: false, reason: `no steady state within ${maxBeats} beats (beat-to-beat change stayed above ${tol})` };
}
