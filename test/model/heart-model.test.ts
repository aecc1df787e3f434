import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { parseInputs, type RawInputs } from '../../src/assessment/inputs.js';
import { simulateToSteadyState, type HeartModel } from '../../src/model/beat.js';
import { FIT_TOLERANCE, fitHeartModel } from '../../src/model/fit.js';
import { numbersFromAssessment, subjectSetup } from '../../src/model/subject-model.js';
import { runScenario } from '../../src/model/scenario.js';
import { ELASTANCE_SHAPES } from '../../src/model/double-hill.js';

// Invented visit (demo data): a hypertensive adult with Doppler SV.
const VISIT: RawInputs = { sbp: 150, dbp: 93, hr: 68, edv: 118, esv: 46, ef: 61, lvotDiameter: 2.1, lvotVti: 21, pep: 95, et: 285, sex: 'male', eOverEPrime: 11 };
const assessment = assess(parseInputs(VISIT));

function fitted(shape: (typeof ELASTANCE_SHAPES)[number]) {
  const setup = subjectSetup(numbersFromAssessment(assessment), shape);
  if (!setup.ok) throw new Error(setup.reason);
  const fit = fitHeartModel(setup.model, setup.targets);
  if (!fit.ok) throw new Error(fit.reason);
  return fit;
}

describe('the model beat: consistency checks of the integration (they hold by construction in a linear elastance model when the code is right)', () => {
  it.each(ELASTANCE_SHAPES)('%s: at peak elastance the point lies on the end-systolic line, and SV there = (EDV − V0)/(1 + Ea/Ees) (Sunagawa 1983 coupling), both within 0.1 %', (shape) => {
    const { beat, model } = fitted(shape);
    const { ees, v0 } = model.ventricle;
    const p = beat.peakElastance;
    expect(p.activation).toBeGreaterThan(0.9999);
    expect(Math.abs(p.pressure / (ees * (p.volume - v0)) - 1)).toBeLessThan(1e-3);
    const ejected = beat.edv - p.volume;
    const ea = p.pressure / ejected;
    expect(Math.abs(ejected / ((beat.edv - v0) / (1 + ea / ees)) - 1)).toBeLessThan(1e-3);
  });
  it.each(ELASTANCE_SHAPES)('%s: at aortic valve closure (the echo\'s end-systole) the point lies at or up to 12 percent below the line: closure lags peak elastance by a few ms (docs/model.md)', (shape) => {
    const { beat, model } = fitted(shape);
    const { ees, v0 } = model.ventricle;
    const ratio = beat.endSystole.pressure / (ees * (beat.endSystole.volume - v0));
    expect(ratio).toBeLessThanOrEqual(1 + 1e-6);
    expect(ratio).toBeGreaterThan(0.88);
    const predicted = (beat.edv - v0) / (1 + beat.ea / ees);
    expect(Math.abs(beat.sv / predicted - 1)).toBeLessThan(0.12);
  });
  it('conservation of mass: the mean outflow through R equals CO at steady state (Westerhof 2009: R = mean pressure / CO)', () => {
    const { beat, model } = fitted('hill-b');
    // MAP = mean(Pc) + Zc·mean(Q) and mean(Q) = CO at steady state, so MAP = CO·(R + Zc).
    const coMlPerS = (beat.co * 1000) / 60;
    expect(beat.map / (coMlPerS * (model.arteries.resistance + model.arteries.characteristicImpedance))).toBeCloseTo(1, 2);
  });
});

describe('the fit (no change: the baseline reproduces the measured values)', () => {
  it.each(ELASTANCE_SHAPES)('%s: EDV, SV, SBP and DBP within the fit tolerance', (shape) => {
    const fit = fitted(shape);
    for (const r of Object.values(fit.residuals)) expect(Math.abs(r)).toBeLessThanOrEqual(FIT_TOLERANCE);
    expect(fit.beat.sv).toBeCloseTo(assessment.results.svUsed.value!, 0);
  });
  it('a visit without a computable Ees gets a reason and no projection', () => {
    const a = assess(parseInputs({ ...VISIT, pep: 20, et: 400 }));
    const s = runScenario(a, { resistance: -10 });
    expect(s.fit.ok).toBe(false);
    expect(s.fit.reason).toMatch(/Ees is not computable/);
    expect(s.projected).toBeNull();
  });
  it('targets no parameter set reaches: the fit fails with residuals and a reason', () => {
    const setup = subjectSetup(numbersFromAssessment(assessment), 'hill-b');
    if (!setup.ok) throw new Error(setup.reason);
    const fit = fitHeartModel(setup.model, { ...setup.targets, sbp: 400, dbp: 20 }, { maxIterations: 6 });
    expect(fit.ok).toBe(false);
    if (!fit.ok) {
      expect(fit.reason).toMatch(/SBP|DBP/);
      expect(fit.residuals).toBeDefined();
    }
  });
});

describe('the simulation never returns NaN', () => {
  const base = (): HeartModel => {
    const s = subjectSetup(numbersFromAssessment(assessment), 'hill-b');
    if (!s.ok) throw new Error(s.reason);
    return s.model;
  };
  it('absurd parameters end with a reason', () => {
    const m = base();
    const out = simulateToSteadyState({ ...m, arteries: { ...m.arteries, compliance: 1e-9 } });
    expect(out.ok).toBe(false);
    const out2 = simulateToSteadyState({ ...m, ventricle: { ...m.ventricle, ees: Number.NaN } });
    expect(out2.ok).toBe(false);
  });
  it('the cap on beats is honoured with a reason', () => {
    const out = simulateToSteadyState(base(), { maxBeats: 2 });
    expect(out.ok).toBe(false);
    if (!out.ok) expect(out.reason).toMatch(/no steady state within 2 beats/);
  });
});

describe('projections: directions (physiology of the elastance–Windkessel model; Sunagawa 1983, Burkhoff & Sagawa 1986)', () => {
  const baseline = runScenario(assessment, {});
  it('no change: the projected beat equals the baseline', () => {
    expect(baseline.projected!.sv).toBeCloseTo(baseline.baseline!.sv!, 6);
  });
  it('lower resistance → higher SV and lower Pes', () => {
    const s = runScenario(assessment, { resistance: -20 });
    expect(s.projected!.sv!).toBeGreaterThan(s.baseline!.sv!);
    expect(s.projected!.pes!).toBeLessThan(s.baseline!.pes!);
  });
  it('higher contractility → lower ESV and higher SV', () => {
    const s = runScenario(assessment, { contractility: 20 });
    expect(s.projected!.esv!).toBeLessThan(s.baseline!.esv!);
    expect(s.projected!.sv!).toBeGreaterThan(s.baseline!.sv!);
  });
  it('a faster heart at unchanged resistance → higher Ea (Ea ≈ R·HR/60)', () => {
    const s = runScenario(assessment, { toHr: 90 });
    expect(s.projected!.ea!).toBeGreaterThan(s.baseline!.ea!);
  });
  it('--to-edv reaches the target EDV within 0.5 %', () => {
    const s = runScenario(assessment, { toEdv: 140 });
    expect(Math.abs(s.projected!.edv! / 140 - 1)).toBeLessThan(0.005);
  });
});
