/**
 * The scenario's Monte Carlo draws are the assessment's: the same error model
 * (with its overrides) and the same draw machinery of the graph, so an
 * input's error enters a projection exactly as it enters `assess
 * --uncertainty`.
 */
import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { parseInputs, type RawInputs } from '../../src/assessment/inputs.js';
import { assessUncertainty } from '../../src/assessment/uncertainty.js';
import { interval95 } from '../../src/assessment/monte-carlo.js';
import { runScenario } from '../../src/model/scenario.js';
import { baselineFitState, chunksOf, drawnSubjectNumbers, mergeChunks, scenarioChunk, type ScenarioIntervals } from '../../src/model/scenario-intervals.js';
import { numbersFromAssessment, subjectSetup, visitExtras } from '../../src/model/subject-model.js';
import { createRequire } from 'node:module';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

// Invented visit (demo data): a hypertensive adult with Doppler SV.
const VISIT: RawInputs = { sbp: 150, dbp: 93, hr: 68, edv: 118, esv: 46, ef: 61, lvotDiameter: 2.1, lvotVti: 21, pep: 95, et: 285, sex: 'male', eOverEPrime: 11 };

function intervals(raw: RawInputs, draws: number, seed: number): ScenarioIntervals {
  const a = assess(parseInputs(raw));
  const changes = { resistance: -20 };
  const s = runScenario(a, changes);
  if (!s.fitted) throw new Error(s.fit.reason);
  const warm = baselineFitState(s.fitted);
  const extras = visitExtras(a);
  const chunks = chunksOf(draws).map(({ chunk, draws: n }) => scenarioChunk({ inputs: a.inputs, choice: a.choice, extras, changes, shape: 'hill-b', warm, seed, chunk, draws: n }));
  return mergeChunks(chunks, draws, seed);
}

describe('scenario intervals draw their inputs as assess --uncertainty does', () => {
  it('the single-beat Ees of the first 1000 scenario draws has exactly the 95 % interval of assess --uncertainty with 1000 draws and the same seed (the same draws, not merely similar ones)', () => {
    const a = assess(parseInputs(VISIT));
    const seed = 7;
    const drawn = drawnSubjectNumbers(a.inputs, a.choice, visitExtras(a), seed, 0, 1000);
    // Drawn in two pieces (as chunks are): the same numbers as one long read.
    const pieces = [...drawnSubjectNumbers(a.inputs, a.choice, visitExtras(a), seed, 0, 400), ...drawnSubjectNumbers(a.inputs, a.choice, visitExtras(a), seed, 400, 600)];
    expect(pieces.map((d) => d.numbers.ees)).toEqual(drawn.map((d) => d.numbers.ees));
    const ees = Float64Array.from(drawn.map((d) => d.numbers.ees).filter((x): x is number => x !== null));
    const mine = interval95(ees, ees.length);
    const theirs = assessUncertainty(a.inputs, { draws: 1000, seed, sensitivity: false }, a.choice, a.results).outputs.ees!.interval95;
    // The assessment stores draws in single precision: agreement to about 7 significant digits.
    expect(mine[0]).toBeCloseTo(theirs[0], 5);
    expect(mine[1]).toBeCloseTo(theirs[1], 5);
    // And the computable share matches the assessment's.
    expect(ees.length / 1000).toBeCloseTo(assessUncertainty(a.inputs, { draws: 1000, seed, sensitivity: false }, a.choice, a.results).outputs.ees!.computableFraction, 10);
  });

  it('an input whose error is switched off (--error dbp=0) is held at its value in every draw, and the projected DBP interval narrows: the projection sees each input\'s error', () => {
    const a = assess(parseInputs({ ...VISIT, errors: { dbp: 0 } }));
    const held = drawnSubjectNumbers(a.inputs, a.choice, visitExtras(a), 3, 0, 40);
    for (const d of held) expect(d.numbers.dbp).toBe(93);
    const withError = intervals(VISIT, 40, 3).interval95.dbp!;
    const without = intervals({ ...VISIT, errors: { dbp: 0 } }, 40, 3).interval95.dbp!;
    expect(without).not.toEqual(withError);
    expect(without[1] - without[0]).toBeLessThan(0.6 * (withError[1] - withError[0]));
  });
});

describe('wiring (values held against the graph\'s own results: a check of the mapping, not of a formula)', () => {
  it('the model starts from the graph\'s Ees, stroke volume used, TPR (converted by mathjs to mmHg·s/mL) and SV/PP compliance, and its V0 is the end-systolic line through EDV − SV at Pes', () => {
    const a = assess(parseInputs(VISIT));
    const setup = subjectSetup(numbersFromAssessment(a), 'hill-b');
    if (!setup.ok) throw new Error(setup.reason);
    const r = a.results;
    expect(setup.model.ventricle.ees).toBe(r.ees.value);
    expect(setup.targets.sv).toBe(r.svUsed.value);
    expect(setup.model.arteries.resistance).toBeCloseTo(r.tpr.value! * math.unit('1 mmHg minute / L').toNumber('mmHg s / mL'), 12);
    expect(setup.model.arteries.compliance).toBe(r.compliance.value);
    expect(setup.model.ventricle.v0).toBeCloseTo(118 - r.svUsed.value! - r.pes.value! / r.ees.value!, 10);
  });
});
