import { describe, expect, it } from 'vitest';
import { systolicIntervalsAtHeartRate } from '../../src/model/systolic-intervals.js';

// Weissler AM et al., Circulation 1968: ET = 413 − 1.7·HR, PEP = 131 − 0.4·HR (men); 418 − 1.6·HR, 133 − 0.4·HR (women). From memory.
const weisslerMen = (hr: number) => ({ et: 413 - 1.7 * hr, pep: 131 - 0.4 * hr });
const weisslerWomen = (hr: number) => ({ et: 418 - 1.6 * hr, pep: 133 - 0.4 * hr });

describe('systolic intervals against heart rate (Weissler 1968 regressions, from memory)', () => {
  it('a man on the normal regression line at 70 bpm stays on it at 95 bpm', () => {
    const r = systolicIntervalsAtHeartRate(weisslerMen(70), 70, 95, 'male');
    expect(r.et).toBeCloseTo(weisslerMen(95).et, 9);
    expect(r.pep).toBeCloseTo(weisslerMen(95).pep, 9);
  });
  it('a woman on her line at 60 bpm stays on it at 100 bpm', () => {
    const r = systolicIntervalsAtHeartRate(weisslerWomen(60), 60, 100, 'female');
    expect(r.et).toBeCloseTo(weisslerWomen(100).et, 9);
    expect(r.pep).toBeCloseTo(weisslerWomen(100).pep, 9);
  });
  it('the worked example of the doc block: ET 290, PEP 90 at 70 → 90 bpm gives 256 and 82 ms', () => {
    const r = systolicIntervalsAtHeartRate({ pep: 90, et: 290 }, 70, 90, null);
    expect(r.et).toBeCloseTo(256, 9);
    expect(r.pep).toBeCloseTo(82, 9);
  });
});
