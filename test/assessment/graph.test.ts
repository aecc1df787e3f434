/**
 * The graph of quantities: soundness of the registry, "needs …" reasons from
 * its edges, and the Monte Carlo propagation of each input's error through
 * it, held against first-order (delta-method) propagation worked from the
 * published formulas (common practice), and against the edges themselves
 * (every input that reaches an output shows in that output's sensitivity split).
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { ERROR_INPUT_KEYS, type ErrorInputKey } from '../../src/assessment/error-model.js';
import { RESULT_KEYS, computeResults, computeResultsInto, scratchResults, visitPlan, type ResultKey } from '../../src/assessment/graph/index.js';
import { GRAPH_INPUT_KEYS } from '../../src/assessment/graph/inputs.js';
import { inputsOf, keyOfSlot, slotOf, type Plan } from '../../src/assessment/graph/plan.js';
import { NODES, graphProblems } from '../../src/assessment/graph/registry.js';
import { passThrough } from '../../src/assessment/graph/types.js';
import { parseInputs, type VisitInputs } from '../../src/assessment/inputs.js';
import { SENSITIVITY_KEYS, assessUncertainty } from '../../src/assessment/uncertainty.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

/** Invented visits (demo numbers): cuff pressures, volumes, timing, body size; one with LVOT Doppler, one with a measured Pes. */
const BASE = { sbp: 150, dbp: 90, hr: 70, edv: 120, esv: 50, ef: 60, pep: 95, et: 285, height: 172, weight: 80 };
const WITH_SV = { ...BASE, sv: 75 };
const WITH_LVOT = { ...BASE, lvotDiameter: 2.1, lvotVti: 21 };
const MEASURED_PES = { ...BASE, pesMeasured: 128, pesMethod: 'measured' };
const RIGHT_HEART = { ...BASE, tapse: 18, trVelocity: 2.6, rap: 8 };
/** IVC 2.0 cm (not dilated) collapsing 40 %: the intermediate band, 0.5 SD below the 2.1 cm edge. */
const IVC_NEAR_DIAMETER_EDGE = { ...BASE, trVelocity: 2.6, ivc: 2.0, ivcCollapse: 40 };
/** IVC 2.4 cm (dilated) collapsing 45 %: the high band, 0.5 SD below the 50 % edge. */
const IVC_NEAR_COLLAPSE_EDGE = { ...BASE, trVelocity: 2.6, ivc: 2.4, ivcCollapse: 45 };

/** Standard normal distribution function, from mathjs's erf (a reference library). */
function normalCdf(z: number): number {
  return 0.5 * (1 + math.erf(z / Math.SQRT2));
}

/**
 * The SD of a quantity that takes value `low` or `high` (a band of a step rule) with the
 * probability of crossing the edge: (high − low)·√(p(1 − p)), exact for a two-point variable.
 */
function twoPointSd(low: number, high: number, p: number): number {
  return (high - low) * Math.sqrt(p * (1 - p));
}

/** The visit with only `input`'s error switched on (every other SD 0, an allowed override). */
function onlyError(raw: Record<string, unknown>, input: ErrorInputKey): VisitInputs {
  const errors = Object.fromEntries(ERROR_INPUT_KEYS.filter((k) => k !== input).map((k) => [k, 0]));
  return parseInputs({ ...raw, errors });
}

interface Linear {
  visit: Record<string, unknown>;
  output: ResultKey;
  /** d output / d input at the visit's values, from the published formula. */
  slope?: (x: VisitInputs) => number;
  /** For a step rule (no slope): the exact SD of the output given the input's SD. */
  exactSd?: (x: VisitInputs, sd: number) => number;
  why: string;
}

/** One output per input that depends on it (nearly) linearly, with the slope of its formula. */
const LINEAR: Record<ErrorInputKey, Linear> = {
  sbp: { visit: BASE, output: 'pes', slope: () => 0.9, why: 'Pes = 0.9·SBP (Kelly 1992)' },
  dbp: { visit: BASE, output: 'pp', slope: () => -1, why: 'PP = SBP − DBP (common practice)' },
  hr: { visit: BASE, output: 'co', slope: (x) => (x.edv - x.esv) / 1000, why: 'CO = SV·HR/1000 (common practice)' },
  edv: { visit: BASE, output: 'svVolumetric', slope: () => 1, why: 'SV = EDV − ESV (common practice)' },
  esv: { visit: BASE, output: 'svVolumetric', slope: () => -1, why: 'SV = EDV − ESV (common practice)' },
  ef: { visit: BASE, output: 'efUsed', slope: () => 1, why: 'the reported EF is the EF used' },
  sv: { visit: WITH_SV, output: 'svUsed', slope: () => 1, why: 'the Doppler SV entered is the SV used' },
  lvotDiameter: { visit: WITH_LVOT, output: 'svDoppler', slope: (x) => (Math.PI / 2) * x.lvotDiameter! * x.lvotVti!, why: 'SV = VTI·π(D/2)², d/dD = π·D·VTI/2 (continuity, common practice)' },
  lvotVti: { visit: WITH_LVOT, output: 'svDoppler', slope: (x) => Math.PI * (x.lvotDiameter! / 2) ** 2, why: 'SV = VTI·π(D/2)², d/dVTI = π(D/2)²' },
  pep: { visit: BASE, output: 'tNd', slope: (x) => x.et / (x.pep + x.et) ** 2, why: 'tNd = PEP/(PEP + ET) (Chen 2001), d/dPEP = ET/(PEP + ET)²' },
  et: { visit: BASE, output: 'tNd', slope: (x) => -x.pep / (x.pep + x.et) ** 2, why: 'tNd = PEP/(PEP + ET), d/dET = −PEP/(PEP + ET)²' },
  pesMeasured: { visit: MEASURED_PES, output: 'pes', slope: () => 1, why: 'a measured Pes is passed through' },
  height: { visit: BASE, output: 'bsa', slope: (x) => Math.sqrt((x.height! * x.weight!) / 3600) / (2 * x.height!), why: 'BSA = √(H·W/3600) (Mosteller 1987), d/dH = BSA/(2H)' },
  weight: { visit: BASE, output: 'bsa', slope: (x) => Math.sqrt((x.height! * x.weight!) / 3600) / (2 * x.weight!), why: 'BSA = √(H·W/3600), d/dW = BSA/(2W)' },
  tapse: { visit: RIGHT_HEART, output: 'tapsePasp', slope: (x) => 1 / (4 * x.trVelocity! ** 2 + x.rap!), why: 'TAPSE/PASP (Guazzi 2013), d/dTAPSE = 1/PASP' },
  trVelocity: { visit: RIGHT_HEART, output: 'pasp', slope: (x) => 8 * x.trVelocity!, why: 'PASP = 4·v² + RAP (simplified Bernoulli), d/dv = 8·v' },
  rap: { visit: RIGHT_HEART, output: 'pasp', slope: () => 1, why: 'PASP = 4·v² + RAP, d/dRAP = 1' },
  ivc: {
    visit: IVC_NEAR_DIAMETER_EDGE,
    output: 'rapUsed',
    exactSd: (x, sd) => twoPointSd(8, 15, 1 - normalCdf((2.1 - x.ivc!) / sd)),
    why: 'RAP bands of Rudski 2010: above 2.1 cm with < 50 % collapse → 15 mmHg, else 8; SD of the two-point outcome',
  },
  ivcCollapse: {
    visit: IVC_NEAR_COLLAPSE_EDGE,
    output: 'rapUsed',
    exactSd: (x, sd) => twoPointSd(8, 15, 1 - normalCdf((50 - x.ivcCollapse!) / sd)),
    why: 'RAP bands of Rudski 2010: a dilated IVC collapsing < 50 % → 15 mmHg, 50 % or more → 8; SD of the two-point outcome',
  },
};

/**
 * Tolerance: 3 % of the first-order SD. With 20,000 draws the sample SD has a
 * relative standard error of 1/√(2·20,000) ≈ 0.5 %, so 3 % is six standard
 * errors; the curvature of the non-linear cases (LVOT diameter squared, tNd,
 * BSA) at these SDs changes the SD by well under 1 % (second-order term,
 * worked from the same formulas).
 */
const TOLERANCE = 0.03;

describe('each input alone: Monte Carlo SD of an output linear in it = first-order propagation (within 3 %)', () => {
  for (const input of ERROR_INPUT_KEYS) {
    const c = LINEAR[input];
    it(`${input} → ${c.output}: ${c.why}`, () => {
      const inputs = onlyError(c.visit, input);
      const report = assessUncertainty(inputs, { draws: 20_000, sensitivity: false });
      const spec = report.errorModel.find((e) => e.input === input);
      expect(spec, `${input} is in the error model of this visit`).toBeDefined();
      expect(spec!.sd).toBeGreaterThan(0);
      const expected = c.exactSd ? c.exactSd(inputs, spec!.sd) : Math.abs(c.slope!(inputs)) * spec!.sd;
      const got = report.outputs[c.output]!.sd;
      expect(Math.abs(got / expected - 1), `${c.output}: SD ${got} vs first-order ${expected}`).toBeLessThan(TOLERANCE);
      // With only this input drawn, nothing that does not depend on it moves.
      const plan = visitPlan(inputs);
      for (const key of RESULT_KEYS) {
        const spread = report.outputs[key];
        // (zero up to the single precision the draws are stored in)
        if (spread && !inputsOf(plan, key).includes(input)) expect(spread.sd, `${key} does not depend on ${input}`).toBeLessThan(1e-9 * Math.max(1, Math.abs(spread.value)));
      }
    });
  }
});

/** The inputs an output reaches other than through `through` (walking the plan's edges). */
function reachingWithout(plan: Plan, key: ResultKey, through: ResultKey): Set<string> {
  const seen = new Set<number>();
  const walk = (slot: number): void => {
    if (seen.has(slot) || slot === slotOf(through)) return;
    seen.add(slot);
    const node = plan.nodes.find((p) => p.slot === slot);
    if (node) for (const a of node.args) walk(a);
  };
  walk(slotOf(key));
  return new Set([...seen].map(keyOfSlot));
}

describe('every input with an error shows in the sensitivity split of every output whose graph depends on it', () => {
  for (const [name, visit] of [['volumetric SV, reported EF', BASE], ['LVOT Doppler SV', WITH_LVOT], ['measured Pes', MEASURED_PES], ['EF from the volumes', { ...BASE, ef: undefined }], ['right heart, measured RAP', RIGHT_HEART], ['right heart, RAP from the IVC', IVC_NEAR_DIAMETER_EDGE]] as const) {
    it(name, () => {
      const inputs = parseInputs(visit);
      const plan = visitPlan(inputs);
      const report = assessUncertainty(inputs, { draws: 5_000 });
      for (const key of SENSITIVITY_KEYS) {
        const split = report.sensitivity[key].map((s) => s.input);
        for (const spec of report.errorModel) {
          if (!(spec.sd > 0) || !inputsOf(plan, key).includes(spec.input)) continue;
          // Ea/Ees = Pes·ENd(est)/(DBP − ENd(est)·Pes) from Chen 2001's formulas: SV cancels exactly, so an
          // input that reaches Ea/Ees only through the SV used has no share (the report drops a zero share).
          if (key === 'eaEes' && !reachingWithout(plan, 'eaEes', 'svUsed').has(spec.input)) {
            expect(split, `${spec.input} reaches Ea/Ees only through SV, which cancels`).not.toContain(spec.input);
            continue;
          }
          expect(split, `${spec.input} in the split of ${key}`).toContain(spec.input);
        }
        // And nothing the output does not depend on.
        for (const input of split) expect(inputsOf(plan, key), `${input} in the split of ${key}`).toContain(input);
      }
    });
  }
});

describe('the registry of nodes', () => {
  it('is sound: unique keys, none equal to an input key, every edge to an input or a node, no cycle, arity as named', () => {
    expect(graphProblems(NODES, GRAPH_INPUT_KEYS)).toEqual([]);
  });
  it('finds each kind of fault (shown on deliberately broken graphs)', () => {
    const one = (key: string, from: string[]) => ({ key, unit: '', rules: [{ from, compute: from.length === 1 ? passThrough : (a: number, b: number) => a + b, method: 'test' }] });
    expect(graphProblems([one('sv', ['edv'])], GRAPH_INPUT_KEYS).join()).toMatch(/node sv has the key of an input/);
    expect(graphProblems([one('a', ['nowhere'])], GRAPH_INPUT_KEYS).join()).toMatch(/neither an input nor a node/);
    expect(graphProblems([one('a', ['b']), one('b', ['a'])], GRAPH_INPUT_KEYS).join()).toMatch(/cycle: a → b → a/);
    expect(graphProblems([one('a', ['sbp', 'dbp']), one('a', ['sbp', 'dbp'])], GRAPH_INPUT_KEYS).join()).toMatch(/defined twice/);
    expect(graphProblems([{ ...one('a', ['sbp', 'dbp']), rules: [{ from: ['sbp'], compute: (a: number, b: number) => a + b, method: 'x' }] }], GRAPH_INPUT_KEYS).join()).toMatch(/takes 2 arguments/);
  });
  it('no result key equals an input key (JSON and CSV keep them apart: svUsed beside sv)', () => {
    for (const key of RESULT_KEYS) expect(GRAPH_INPUT_KEYS as readonly string[]).not.toContain(key);
  });
});

describe('reasons come from the edges', () => {
  it('"needs …" names the missing inputs of the rule, and a result computed from a missing one carries its reason', () => {
    const r = computeResults(parseInputs({ sbp: 120, dbp: 80, edv: 120, esv: 50, pep: 90, et: 290, height: 170 }));
    expect(r.co.reason).toBe('needs heart rate');
    expect(r.bsa.reason).toBe('needs weight');
    expect(r.ci.reason).toBe('needs heart rate'); // CO / BSA: the first missing argument's reason
    expect(r.tprDyn.reason).toBe('needs heart rate');
    expect(r.svDoppler.reason).toBe('no Doppler stroke volume or LVOT diameter and VTI given');
    expect(r.svUsed.method).toBe('volumetric: EDV − ESV; feeds Ea and Ees');
    const measured = computeResults(parseInputs({ sbp: 120, dbp: 80, edv: 120, esv: 50, pep: 90, et: 290 }), { pesMethod: 'measured', strokeVolumeSource: 'volumetric' });
    expect(measured.pes.reason).toBe('needs a measured end-systolic pressure');
    expect(measured.ea.reason).toBe('needs a measured end-systolic pressure');
  });
  it('a method choice selects a rule: the Pes estimate, the SV source, the MAP and BSA formulas', () => {
    const inputs = parseInputs({ ...WITH_SV, mapMethod: 'meaney', bsaMethod: 'dubois' });
    const doppler = computeResults(inputs, { pesMethod: 'weighted', strokeVolumeSource: 'doppler' });
    expect(doppler.pes.value).toBeCloseTo((2 * 150 + 90) / 3, 10); // (2·SBP + DBP)/3
    expect(doppler.svUsed.value).toBe(75);
    expect(doppler.map.value).toBeCloseTo(90 + 0.412 * 60, 10); // Meaney 2000
    expect(doppler.bsa.value).toBeCloseTo(0.007184 * 80 ** 0.425 * 172 ** 0.725, 10); // DuBois 1916
    const volumetric = computeResults(inputs, { pesMethod: 'sbp90', strokeVolumeSource: 'volumetric' });
    expect(volumetric.svUsed.value).toBe(70);
    expect(volumetric.pes.value).toBeCloseTo(135, 10);
  });
});

describe('one results object rewritten per visit (a batch row) against a new one per visit (self-consistency of two packagings of one evaluation)', () => {
  it('gives the same value, unit, method and reason for every result, visit after visit, whatever was computed before', () => {
    const visits = [BASE, WITH_SV, WITH_LVOT, MEASURED_PES, RIGHT_HEART, IVC_NEAR_DIAMETER_EDGE, IVC_NEAR_COLLAPSE_EDGE, { sbp: 120, dbp: 80, edv: 120, esv: 50, pep: 90, et: 290 }];
    const target = scratchResults();
    // Every visit after every other, so that a field left over from the visit before would show.
    for (const before of visits) for (const visit of visits) {
      computeResultsInto(target, parseInputs(before));
      const inputs = parseInputs(visit);
      const into = computeResultsInto(target, inputs);
      const fresh = computeResults(inputs);
      expect(Object.keys(into)).toEqual(RESULT_KEYS);
      for (const key of RESULT_KEYS) {
        const { value, unit, method, reason } = into[key];
        expect({ value, unit, method, reason }, key).toEqual({ value: fresh[key].value, unit: fresh[key].unit, method: fresh[key].method, reason: fresh[key].reason });
      }
    }
  });
});

