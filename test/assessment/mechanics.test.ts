import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { parseInputs, type RawInputs } from '../../src/assessment/inputs.js';
import { loopOutline } from '../../src/assessment/mechanics.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

const BASE: RawInputs = { sbp: [152, 148], dbp: [94, 92], hr: 68, edv: 118, esv: 46, ef: 61, pep: 95, et: 285 };
const run = (extra: RawInputs = {}) => assess(parseInputs({ ...BASE, ...extra }));

describe('mechanics of a visit: wall stress, energetics, diastolic side, loop', () => {
  it('wall stress uses the mean cuff SBP: Reichek 1982 meridional form and thin-wall Laplace with r = LVIDs/2', () => {
    const m = run({ lvids: 3.0, pwts: 1.3 }).mechanics!;
    expect(m.wallStress.pressure.value).toBe(150);
    // 0.334·P·D/[h(1 + h/D)] (Reichek 1982 abstract), computed here.
    expect(m.wallStress.meridional.value).toBeCloseTo((0.334 * 150 * 3.0) / (1.3 * (1 + 1.3 / 3.0)), 9);
    // σ = P·r/(2h), mmHg → 10³ dyn/cm² with mathjs.
    const thin = math.unit((150 * 1.5) / (2 * 1.3), 'mmHg').toNumber('dyn/cm^2') / 1000;
    expect(Math.abs(m.wallStress.thinWall.value! / thin - 1)).toBeLessThan(1e-5);
    expect(m.afterloadNote).toMatch(/resistance and heart rate/);
  });

  it('without LVIDs and PWTs wall stress is not computable and says what it needs', () => {
    const m = run().mechanics!;
    expect(m.wallStress.meridional.value).toBeNull();
    expect(m.wallStress.meridional.reason).toMatch(/--lvids.*--pwts/);
  });

  it('energetics follow the linear elastance model: SW = Pes·SV, PE = Pes²/(2·Ees), SW/PVA = 1/(1 + Ea/(2·Ees)) (Suga; Burkhoff & Sagawa 1986)', () => {
    const a = run();
    const { pes, svUsed: sv, ees, ea } = a.results;
    const e = a.mechanics!.energetics;
    expect(e.strokeWork.value).toBeCloseTo(pes.value! * sv.value!, 9);
    expect(e.potentialEnergy.value).toBeCloseTo(pes.value! ** 2 / (2 * ees.value!), 6);
    expect(e.efficiency.value).toBeCloseTo(1 / (1 + ea.value! / (2 * ees.value!)), 9);
    // 1 mmHg·mL in joules from mathjs's unit definitions.
    const joule = math.unit(e.pressureVolumeArea.value!, 'mmHg mL').toNumber('J');
    expect(Math.abs(e.pressureVolumeAreaJoules.value! / joule - 1)).toBeLessThan(1e-5);
  });

  it('EDP: an entered value wins over the E/e′ estimate, which is kept beside it; with neither there is no curve and a reason', () => {
    const both = run({ edp: 12, eOverEPrime: 10 }).mechanics!.diastolic;
    expect(both.edpSource).toBe('entered');
    expect(both.edp.value).toBe(12);
    expect(both.edpFromEOverEPrime.value).toBeCloseTo(14.3, 9); // Nagueh 1997: 1.24·10 + 1.9
    const estimated = run({ eOverEPrime: 10 }).mechanics!.diastolic;
    expect(estimated.edpSource).toBe('estimated');
    expect(estimated.edp.method).toMatch(/estimate/);
    const none = run().mechanics!.diastolic;
    expect(none.curve).toBeNull();
    expect(none.reason).toMatch(/needs .*--edp.* or E\/e′/);
  });

  it('the loop is closed and continuous: each phase starts where the previous ended, in the order of the cardiac cycle', () => {
    const loop = run({ edp: 12 }).mechanics!.loop;
    const segments = loopOutline(loop, 200);
    expect(segments.map((s) => s.phase)).toEqual(['isovolumic contraction', 'ejection', 'isovolumic relaxation', 'filling']);
    for (let i = 1; i < segments.length; i++) {
      const end = segments[i - 1]!.points.at(-1)!;
      const start = segments[i]!.points[0]!;
      expect(start[0]).toBeCloseTo(end[0], 9);
      expect(start[1]).toBeCloseTo(end[1], 9);
    }
    const last = segments.at(-1)!.points.at(-1)!;
    expect(last).toEqual(segments[0]!.points[0]);
    const ejection = segments[1]!.points;
    expect(ejection[0]).toEqual([118, 93]); // EDV, mean DBP
    expect(ejection.at(-1)![1]).toBeCloseTo(135, 9); // 0.9 × 150
    expect(Math.max(...ejection.map((p) => p[1]))).toBeCloseTo(150, 1); // peaks at the mean cuff SBP
  });
});
