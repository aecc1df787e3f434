/**
 * Monte Carlo uncertainty: the compiled draws against computeResults, the spread of
 * Ea = Pes/SV against first-order (delta-method) propagation, seeds, variance
 * shares, the not-computable fraction near the method's validity edges, the
 * method's own error (Chen 2001 abstract) and the noise of a change between
 * two visits.
 */
import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { compileDraws } from '../../src/assessment/graph/draws.js';
import { RESULT_KEYS, computeResults, visitPlan } from '../../src/assessment/graph/index.js';
import { GRAPH_INPUT_KEYS } from '../../src/assessment/graph/inputs.js';
import { evaluatePlan, inputVector } from '../../src/assessment/graph/plan.js';
import { parseInputs, type VisitInputs } from '../../src/assessment/inputs.js';
import { fillNormals, interval95, quantileInPlace, randomStreams, summarize } from '../../src/assessment/monte-carlo.js';
import { CHEN_CALIBRATION, DRAWS_RANGE, assessUncertainty, changeUncertainty, parseDraws, parseSeed, withIntervals, type Share } from '../../src/assessment/uncertainty.js';
import { InputError } from '../../src/errors.js';

/** An invented subject with every optional input (pseudonymous case "CO-203"-like numbers). */
const FULL = { sbp: [152, 148, 150], dbp: [94, 92, 93], hr: 68, edv: 118, esv: 46, ef: 61, lvotDiameter: 2.1, lvotVti: 21, pep: 95, et: 285, height: 174, weight: 88 };
/** The worked example of the method notes §4 (SBP 120, DBP 80, EF 60 %, SV 70 mL, PEP 90, ET 290). */
const WORKED = { sbp: 120, dbp: 80, hr: 60, edv: 130, esv: 55, ef: 60, sv: 70, pep: 90, et: 290 };

function inputsOf(raw: Record<string, unknown>): VisitInputs {
  return parseInputs(raw);
}

/** Every input exact except the ones named. */
function onlyErrors(raw: Record<string, unknown>, errors: Record<string, string | number>): VisitInputs {
  const zero = Object.fromEntries(['sbp', 'dbp', 'hr', 'edv', 'esv', 'ef', 'sv', 'lvotDiameter', 'lvotVti', 'pep', 'et', 'pesMeasured', 'height', 'weight'].map((k) => [k, 0]));
  return inputsOf({ ...raw, errors: { ...zero, ...errors } });
}

describe('the graph compiled for draws, fed the visit\'s own inputs, gives computeResults exactly (a check of the compiled form against the one-visit form of the same graph)', () => {
  const variants: [string, Record<string, unknown>][] = [
    ['all optional inputs, LVOT Doppler', FULL],
    ['Doppler SV entered, no height', WORKED],
    ['volumetric SV, no heart rate', { sbp: 130, dbp: 85, edv: 140, esv: 70, pep: 100, et: 280 }],
    ['weighted Pes, Meaney MAP, DuBois BSA', { ...FULL, pesMethod: 'weighted', mapMethod: 'meaney', bsaMethod: 'dubois' }],
    ['measured Pes', { ...WORKED, pesMeasured: 104 }],
    ['tNd outside the window', { ...WORKED, pep: 22, et: 480 }],
    ['Ees not positive', { sbp: 140, dbp: 52, edv: 200, esv: 160, pep: 150, et: 150 }],
  ];
  for (const [name, raw] of variants) {
    it(name, () => {
      const inputs = inputsOf(raw);
      const results = computeResults(inputs);
      const plan = visitPlan(inputs);
      // Every input drawn (its column holding the visit's value), so every node is computed draw by draw.
      const present = GRAPH_INPUT_KEYS.filter((k) => inputs[k] !== null);
      const nominal = inputVector(inputs);
      evaluatePlan(plan, nominal, []);
      const program = compileDraws(plan, nominal, present, RESULT_KEYS, 2);
      for (const k of present) program.input(k).fill(inputs[k]!);
      program.run(2);
      for (const key of RESULT_KEYS) {
        const v = program.output(key)[1]!;
        expect(Number.isFinite(v) ? v : null, key).toBe(results[key].value);
      }
    });
  }
});

describe('quantiles (Hyndman–Fan type 7, the default of R and NumPy: common practice)', () => {
  it('match a full sort, on the bracketed and the plain path', () => {
    for (const n of [1, 2, 7, 1000, 25_000, 100_001]) {
      const a = fillNormals(randomStreams(7, 1)[0]!, new Float64Array(n));
      const sorted = Float64Array.from(a).sort();
      const q = (p: number) => {
        const h = (n - 1) * p;
        const lo = Math.floor(h);
        return lo + 1 < n ? sorted[lo]! + (h - lo) * (sorted[lo + 1]! - sorted[lo]!) : sorted[lo]!;
      };
      expect(interval95(Float64Array.from(a), n)).toEqual([q(0.025), q(0.975)]);
      expect(quantileInPlace(Float64Array.from(a), n, 0.5)).toBe(q(0.5));
    }
  });
  it('summarize: count, mean, SD and interval of the finite draws, NaN (not computable) skipped, on both paths', () => {
    for (const n of [500, 30_000, 120_000]) {
      const z = fillNormals(randomStreams(5, 1)[0]!, new Float64Array(n));
      const src = Float32Array.from(z, (v, i) => (i % 7 === 3 ? Number.NaN : 10 + 2 * v));
      const finite = Array.from(src).filter((v) => !Number.isNaN(v));
      const sorted = Float64Array.from(finite).sort();
      const q = (p: number) => {
        const h = (sorted.length - 1) * p;
        const lo = Math.floor(h);
        return sorted[lo]! + (h - lo) * (sorted[lo + 1]! - sorted[lo]!);
      };
      const mean = finite.reduce((a, b) => a + b, 0) / finite.length;
      const sd = Math.sqrt(finite.reduce((a, b) => a + (b - mean) ** 2, 0) / (finite.length - 1));
      const s = summarize(src, 10, new Float64Array(n))!;
      expect(s.n).toBe(finite.length);
      expect(s.low).toBe(q(0.025));
      expect(s.high).toBe(q(0.975));
      expect(s.mean).toBeCloseTo(mean, 10);
      expect(s.sd).toBeCloseTo(sd, 10);
    }
    expect(summarize(new Float32Array(50).fill(Number.NaN), 0, new Float64Array(50))).toBeNull();
  });
  it('the normal deviates have the standard normal 2.5 % and 97.5 % points, ±1.95996 (statistical tables)', () => {
    const z = fillNormals(randomStreams(3, 1)[0]!, new Float64Array(200_000));
    const [low, high] = interval95(z, z.length);
    expect(low).toBeCloseTo(-1.95996, 1);
    expect(high).toBeCloseTo(1.95996, 1);
  });
});

describe('Ea = Pes/SV: Monte Carlo spread vs first-order (delta-method) propagation (common practice)', () => {
  // Delta method: for Ea = 0.9·SBP / SV with independent errors,
  // (SD_Ea / Ea)² ≈ (SD_SBP / SBP)² + (SD_SV / SV)².
  it('small errors: agrees within 2 % (second-order terms ~ cv² are negligible; MC error of an SD at 100,000 draws ≈ 0.2 %)', () => {
    const inputs = onlyErrors(WORKED, { sbp: 3, sv: '3%' });
    const report = assessUncertainty(inputs, { draws: 100_000, seed: 11, sensitivity: false });
    const ea = 0.9 * 120 / 70;
    const delta = ea * Math.sqrt((3 / 120) ** 2 + 0.03 ** 2);
    expect(report.outputs.ea!.value).toBe(ea);
    expect(report.outputs.ea!.sd / delta).toBeGreaterThan(0.98);
    expect(report.outputs.ea!.sd / delta).toBeLessThan(1.02);
  });
  it('volumetric SV = EDV − ESV with the default volume errors: agrees within 8 % (1/SV adds about 4·cv² ≈ +4 % at cv ≈ 10 %)', () => {
    const raw = { sbp: 130, dbp: 80, edv: 150, esv: 60, pep: 90, et: 290 };
    const inputs = onlyErrors(raw, { sbp: 4, edv: '5%', esv: '8%' });
    const report = assessUncertainty(inputs, { draws: 100_000, seed: 5, sensitivity: false });
    const sv = 90;
    const sdSv = Math.hypot(0.05 * 150, 0.08 * 60);
    const ea = (0.9 * 130) / sv;
    const delta = ea * Math.hypot(4 / 130, sdSv / sv);
    const ratio = report.outputs.ea!.sd / delta;
    expect(ratio).toBeGreaterThan(1.0);
    expect(ratio).toBeLessThan(1.08);
  });
  it('SV = EDV − ESV itself has the SD √(SD_EDV² + SD_ESV²) of a difference of independent errors (common practice), within 2 %', () => {
    const inputs = onlyErrors({ sbp: 130, dbp: 80, edv: 150, esv: 60, pep: 90, et: 290 }, { edv: 9, esv: 6 });
    const report = assessUncertainty(inputs, { draws: 100_000, seed: 2, sensitivity: false });
    expect(report.outputs.svUsed!.sd / Math.hypot(9, 6)).toBeCloseTo(1, 1);
    expect(Math.abs(report.outputs.svUsed!.sd / Math.hypot(9, 6) - 1)).toBeLessThan(0.02);
  });
});

describe('reproducible and honest', () => {
  it('the same seed gives the same report; another seed gives different draws of the same distribution', () => {
    const inputs = inputsOf(FULL);
    const a = assessUncertainty(inputs, { draws: 5000, seed: 42 });
    const b = assessUncertainty(inputs, { draws: 5000, seed: 42 });
    const c = assessUncertainty(inputs, { draws: 5000, seed: 43 });
    expect(b).toEqual(a);
    expect(c.outputs.ees!.interval95).not.toEqual(a.outputs.ees!.interval95);
    expect(Math.abs(c.outputs.ees!.sd / a.outputs.ees!.sd - 1)).toBeLessThan(0.1);
  });
  it('the main results stay identical to assess(); intervals are only attached', () => {
    const inputs = inputsOf(FULL);
    const a = assess(inputs);
    const report = assessUncertainty(inputs, { draws: 5000, seed: 1 }, a.choice, a.results);
    const withCi = withIntervals(a.results, report);
    for (const key of RESULT_KEYS) {
      expect(withCi[key].value, key).toBe(a.results[key].value);
      if (report.outputs[key]) expect(report.outputs[key].value, key).toBe(a.results[key].value);
    }
    for (const key of ['pes', 'ea', 'ees', 'eaEes', 'v0'] as const) {
      const [low, high] = withCi[key].interval95!;
      expect(low).toBeLessThan(high);
      expect(low).toBeLessThanOrEqual(a.results[key].value!);
      expect(high).toBeGreaterThanOrEqual(a.results[key].value!);
    }
    expect(a.results.ea.interval95).toBeUndefined();
  });
  it('no number in the report is NaN or infinite', () => {
    const text = JSON.stringify(assessUncertainty(inputsOf({ sbp: 140, dbp: 60, edv: 200, esv: 160, pep: 150, et: 150 }), { draws: 3000 }));
    expect(text).not.toMatch(/NaN|Infinity|null,null/);
  });
});

describe('variance shares (one input at a time)', () => {
  const check = (shares: Share[]) => {
    expect(shares.length).toBeGreaterThan(0);
    for (const s of shares) expect(s.share).toBeGreaterThanOrEqual(0);
    expect(shares.reduce((a, s) => a + s.share, 0)).toBeCloseTo(1, 12);
    for (let i = 1; i < shares.length; i++) expect(shares[i - 1]!.share).toBeGreaterThanOrEqual(shares[i]!.share);
  };
  it('are non-negative, sum to 1 and come largest first, for ees and eaEes', () => {
    const report = assessUncertainty(inputsOf(FULL), { draws: 10_000 });
    check(report.sensitivity.ees);
    check(report.sensitivity.eaEes);
    check(report.sensitivity.ea);
  });
  it('an input given a very large error dominates', () => {
    // ET moves tNd about a third as much per ms as PEP does (∂tNd/∂ET = −PEP/(PEP+ET)²), so "very large" is 150 ms.
    const report = assessUncertainty(inputsOf({ ...FULL, errors: { et: 150 } }), { draws: 10_000 });
    expect(report.sensitivity.ees[0]!.input).toBe('et');
    expect(report.sensitivity.ees[0]!.share).toBeGreaterThan(0.75);
    expect(report.sensitivity.eaEes[0]!.input).toBe('et');
    expect(report.driver?.input).toBe('et');
    const sbp = assessUncertainty(inputsOf({ ...WORKED, errors: { sbp: 40 } }), { draws: 10_000 });
    expect(sbp.sensitivity.ea[0]!.input).toBe('sbp');
    // First order: (40/120)² / ((40/120)² + 0.10²) = 0.92 of Ea's variance (SV's default 10 %); the draws give a little less.
    expect(sbp.sensitivity.ea[0]!.share).toBeGreaterThan(0.8);
  });
  it('SV cancels from Ea/Ees (Ea/Ees = ENd·Pes / (DBP − ENd·Pes)): Doppler SV gets no share of it', () => {
    const report = assessUncertainty(inputsOf(WORKED), { draws: 10_000 });
    expect(report.sensitivity.eaEes.map((s) => s.input)).not.toContain('sv');
    expect(report.sensitivity.ees.map((s) => s.input)).toContain('sv');
  });
  it('an input with no error gets no share', () => {
    const report = assessUncertainty(inputsOf({ ...FULL, errors: { pep: 0 } }), { draws: 5000 });
    expect(report.sensitivity.ees.map((s) => s.input)).not.toContain('pep');
  });
});

describe('draws in which Ees is not computable are counted, never dropped silently', () => {
  it('DBP close to ENd(est)·Pes: a non-zero fraction, split by reason', () => {
    // SBP 140 → Pes 126; tNd 0.5; EF 20 %: Ees > 0 needs DBP/Pes above about 0.46, and DBP 60 gives 0.476.
    const inputs = inputsOf({ sbp: 140, dbp: 60, edv: 200, esv: 160, pep: 150, et: 150 });
    expect(computeResults(inputs).ees.value).not.toBeNull();
    const report = assessUncertainty(inputs, { draws: 20_000 });
    const e = report.ees;
    expect(e.eesNotPositive).toBeGreaterThan(0.05);
    expect(e.notComputableFraction).toBeCloseTo(e.inadmissibleInputs + e.tNdOutsideWindow + e.eesNotPositive, 12);
    expect(report.outputs.ees!.computableFraction).toBeCloseTo(1 - e.notComputableFraction, 12);
    expect(report.coupling.computableDraws).toBe(Math.round(20_000 * (1 - e.notComputableFraction)));
  });
  it('tNd near the lower edge of its window: draws outside it are counted', () => {
    const inputs = inputsOf({ ...WORKED, pep: 24, et: 250 });
    expect(computeResults(inputs).tNd.value).toBeCloseTo(24 / 274, 10);
    const report = assessUncertainty(inputs, { draws: 20_000 });
    expect(report.ees.tNdOutsideWindow).toBeGreaterThan(0.2);
    expect(report.ees.notComputableFraction).toBeGreaterThan(report.ees.tNdOutsideWindow - 1e-12);
  });
  it('an input outside its domain costs only the results that depend on it (ESV ≥ EDV loses volumetric SV, not Pes)', () => {
    // Doppler SV and a reported EF: Ees does not depend on the volumes at all.
    const inputs = inputsOf({ sbp: 108, dbp: 68, edv: 210, esv: 150, ef: 29, sv: 55, pep: 130, et: 240, errors: { edv: '20%', esv: '25%', sbp: 3, dbp: 3 } });
    const report = assessUncertainty(inputs, { draws: 20_000, sensitivity: false });
    expect(report.outputs.svVolumetric!.computableFraction).toBeLessThan(0.95);
    expect(report.outputs.efVolumes!.computableFraction).toBe(report.outputs.svVolumetric!.computableFraction);
    expect(report.outputs.pes!.computableFraction).toBe(1);
    expect(report.outputs.ees!.computableFraction).toBeCloseTo(1 - report.ees.notComputableFraction, 12);
    expect(report.ees.inadmissibleInputs).toBe(0);
    // With volumetric SV the same draws do cost Ees, and are counted as inadmissible inputs.
    const volumetric = assessUncertainty(inputsOf({ sbp: 108, dbp: 68, edv: 210, esv: 150, ef: 29, pep: 130, et: 240, errors: { edv: '20%', esv: '25%' } }), { draws: 20_000, sensitivity: false });
    expect(volumetric.ees.inadmissibleInputs).toBeGreaterThan(0.05);
  });
  it('results that are the same draws under another name share their spread (SV used = Doppler SV; TPR in two units)', () => {
    const report = assessUncertainty(inputsOf(FULL), { draws: 5000, sensitivity: false });
    expect(report.outputs.svDoppler!.interval95).toEqual(report.outputs.svUsed!.interval95);
    expect(report.outputs.tprDyn!.interval95[0]).toBeCloseTo(report.outputs.tpr!.interval95[0] * (1333.224 * 60) / 1000, 3);
    expect(report.outputs.tprDyn!.value).toBe(computeResults(inputsOf(FULL)).tprDyn.value);
  });
  it('a comfortable subject: every draw computable', () => {
    expect(assessUncertainty(inputsOf(FULL), { draws: 5000 }).ees.notComputableFraction).toBe(0);
  });
});

describe('the probability that Ea/Ees exceeds the published 1.2 cut-off (PubMed 19004668)', () => {
  it('is consistent with the interval and with the main value', () => {
    const low = assessUncertainty(inputsOf({ ...WORKED, errors: { pep: 3, et: 3, sbp: 2, dbp: 2, ef: 1 } }), { draws: 20_000 });
    expect(low.outputs.eaEes!.interval95[1]).toBeLessThan(1.2);
    expect(low.coupling.probabilityAbove).toBeLessThan(0.025);
    const high = inputsOf({ sbp: 110, dbp: 70, edv: 220, esv: 160, ef: 27, pep: 135, et: 220, errors: { pep: 3, et: 3, sbp: 2, dbp: 2, ef: 1 } });
    const r = assessUncertainty(high, { draws: 20_000 });
    expect(computeResults(high).eaEes.value).toBeGreaterThan(1.2);
    expect(r.outputs.eaEes!.interval95[0]).toBeGreaterThan(1.2);
    expect(r.coupling.probabilityAbove).toBeGreaterThan(0.975);
  });
});

describe("the method's own error: Chen 2001 abstract, Ees = 0.86·Ees(sb) + 0.40, SEE 0.64 mmHg/mL", () => {
  it('the method-only interval is 0.86·Ees + 0.40 ± 1.96 × 0.64 (normal 95 % point from statistical tables)', () => {
    const inputs = inputsOf(WORKED);
    const report = assessUncertainty(inputs, { draws: 100_000 });
    const ees = computeResults(inputs).ees.value!;
    expect(ees).toBeCloseTo(1.5258, 4); // the worked example, method notes §4
    const centre = 0.86 * ees + 0.4;
    expect(report.methodError.calibratedEes).toBeCloseTo(centre, 12);
    expect(CHEN_CALIBRATION.see).toBe(0.64);
    expect(report.methodError.eesMethodOnly![0]).toBeCloseTo(centre - 1.96 * 0.64, 1);
    expect(report.methodError.eesMethodOnly![1]).toBeCloseTo(centre + 1.96 * 0.64, 1);
  });
  it('combined is wider than either part alone', () => {
    const report = assessUncertainty(inputsOf(FULL), { draws: 20_000 });
    const width = (p: [number, number] | null) => p![1] - p![0];
    expect(width(report.methodError.eesCombined)).toBeGreaterThan(width(report.methodError.eesMethodOnly));
    expect(width(report.methodError.eesCombined)).toBeGreaterThan(width(report.outputs.ees!.interval95));
    expect(report.coupling.probabilityAboveWithMethodError).not.toBeNull();
  });
  it('is absent, not invented, when Ees is not computable', () => {
    const report = assessUncertainty(inputsOf({ ...WORKED, pep: 22, et: 480 }), { draws: 2000 });
    expect(report.methodError.calibratedEes).toBeNull();
    expect(report.methodError.eesMethodOnly).toBeNull();
    expect(report.outputs.ees).toBeUndefined();
    expect(report.coupling.probabilityAbove).toBeNull();
    expect(report.driver).toBeNull();
    expect(report.ees.tNdOutsideWindow).toBeGreaterThan(0.5);
  });
});

describe('change between two visits', () => {
  it('the same visit twice: no change, inside the noise; the noise of a difference is √2 × one visit (independent errors, common practice)', () => {
    const inputs = inputsOf(FULL);
    const change = changeUncertainty(inputs, inputs, { draws: 50_000, seed: 9 });
    const single = assessUncertainty(inputs, { draws: 50_000, seed: 9, sensitivity: false });
    for (const key of ['ea', 'ees', 'eaEes'] as const) {
      const c = change.changes[key];
      expect(c.observed).toBe(0);
      expect(c.exceeds).toBe(false);
      const noiseWidth = c.noise95![1] - c.noise95![0];
      const singleWidth = single.outputs[key]!.interval95[1] - single.outputs[key]!.interval95[0];
      expect(noiseWidth / singleWidth).toBeGreaterThan(Math.SQRT2 * 0.9);
      expect(noiseWidth / singleWidth).toBeLessThan(Math.SQRT2 * 1.1);
    }
  });
  it('a large pressure rise exceeds the noise for Ea; its interval brackets the observed change', () => {
    const before = inputsOf({ ...WORKED, sbp: 110, dbp: 70 });
    const after = inputsOf({ ...WORKED, sbp: 175, dbp: 100 });
    const change = changeUncertainty(before, after, { draws: 20_000 });
    const ea = change.changes.ea;
    expect(ea.observed).toBeCloseTo((0.9 * 175 - 0.9 * 110) / 70, 12);
    expect(ea.exceeds).toBe(true);
    expect(ea.interval95![0]).toBeGreaterThan(0);
    expect(ea.interval95![0]).toBeLessThan(ea.observed!);
    expect(ea.interval95![1]).toBeGreaterThan(ea.observed!);
    expect(ea.source).toMatch(/measurement error only/);
  });
});

describe('options are checked, naming the field', () => {
  it('draws and seed', () => {
    expect(parseDraws('20000')).toBe(20_000);
    expect(parseDraws('1e5')).toBe(100_000);
    expect(parseSeed('0')).toBe(0);
    for (const bad of ['10', 'abc', '1.5', '-5', String(DRAWS_RANGE.max + 1), '']) {
      expect(() => parseDraws(bad), bad).toThrow(InputError);
      try {
        parseDraws(bad);
      } catch (err) {
        expect((err as InputError).field).toBe('draws');
      }
    }
    for (const bad of ['-1', '4294967296', 'x', '2.5']) {
      expect(() => parseSeed(bad), bad).toThrow(/^seed: /);
    }
    expect(() => assessUncertainty(inputsOf(WORKED), { draws: 5 })).toThrow(/^draws: /);
  });
});
