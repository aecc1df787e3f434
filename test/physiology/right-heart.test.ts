import { describe, expect, it } from 'vitest';
import { pulmonaryArterySystolicPressure } from '../../src/physiology/pulmonary-artery-systolic-pressure.js';
import { rightAtrialPressureFromVenaCava } from '../../src/physiology/right-atrial-pressure.js';
import { TAPSE_PASP_CUT_OFFS, tapseToPulmonarySystolicPressure } from '../../src/physiology/right-ventricular-coupling.js';

describe('pulmonary artery systolic pressure (simplified Bernoulli)', () => {
  it('v 2.8 m/s with RAP 8 mmHg gives 39.36 mmHg (4·v² + RAP; Rudski 2010, worked value from the issue text)', () => {
    expect(pulmonaryArterySystolicPressure(2.8, 8)).toBeCloseTo(39.36, 10);
  });

  it('the 2015 ESC/ERS table pairs TR velocity 2.8 m/s with PASP about 36 mmHg and 3.4 m/s with about 50 mmHg, at RAP 5 mmHg (guideline table as quoted by a secondary summary)', () => {
    expect(Math.round(pulmonaryArterySystolicPressure(2.8, 5))).toBe(36);
    expect(Math.abs(pulmonaryArterySystolicPressure(3.4, 5) - 50)).toBeLessThan(1.5);
  });
});

describe('right-atrial pressure from the inferior vena cava (Rudski LG et al., J Am Soc Echocardiogr 2010)', () => {
  // Each band edge as the guideline states it: ≤ 2.1 cm with > 50 % collapse → 3 mmHg; > 2.1 cm with
  // < 50 % collapse → 15 mmHg; every other combination, exactly 50 % included → 8 mmHg.
  const cases: Array<[number, number, number, string]> = [
    [2.1, 51, 3, 'normal'],
    [2.1, 50, 8, 'intermediate'],
    [1.5, 100, 3, 'normal'],
    [2.11, 49, 15, 'high'],
    [2.11, 50, 8, 'intermediate'],
    [2.11, 51, 8, 'intermediate'],
    [2.1, 49, 8, 'intermediate'],
    [3.0, 0, 15, 'high'],
  ];
  for (const [diameter, collapse, rap, band] of cases) {
    it(`${diameter} cm collapsing ${collapse} % → ${rap} mmHg (${band})`, () => {
      expect(rightAtrialPressureFromVenaCava(diameter, collapse)).toEqual({ value: rap, band });
    });
  }
});

describe('TAPSE/PASP', () => {
  it('TAPSE 20 mm over PASP 40 mmHg is 0.5 mm/mmHg (definition, Guazzi 2013)', () => {
    expect(tapseToPulmonarySystolicPressure(20, 40)).toBeCloseTo(0.5, 12);
  });

  it('cut-offs as published, each with its population: 0.31 (Tello 2019, PAH), 0.36 (Guazzi 2013, HF), 0.38 (EHJ-CI 2021, HFrEF) (PubMed 31500448, 23997100; doi 10.1093/ehjci/jeaa285)', () => {
    expect(TAPSE_PASP_CUT_OFFS.map((c) => c.below)).toEqual([0.31, 0.36, 0.38]);
    expect(TAPSE_PASP_CUT_OFFS[0]!.population).toMatch(/pulmonary arterial hypertension/);
    expect(TAPSE_PASP_CUT_OFFS[1]!.population).toMatch(/heart failure/);
  });
});
