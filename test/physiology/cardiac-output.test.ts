import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { cardiacIndex, cardiacOutput } from '../../src/physiology/cardiac-output.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

describe('cardiac output and index', () => {
  it('CO = SV × HR: 70 mL at 60 beats/min is 4.2 L/min, unit conversion checked with mathjs (common practice)', () => {
    const viaMathjs = math.multiply(math.unit('70 mL'), math.unit('60 minute^-1')) as unknown as import('mathjs').Unit;
    expect(viaMathjs.toNumber('L / minute')).toBeCloseTo(4.2, 12);
    expect(cardiacOutput(70, 60)).toBeCloseTo(viaMathjs.toNumber('L / minute'), 12);
  });
  it('agrees with mathjs over a spread of SV and HR (common practice)', () => {
    for (const [sv, hr] of [[35, 110], [95, 48], [62.5, 73]] as const) {
      const expected = (math.multiply(math.unit(`${sv} mL`), math.unit(`${hr} minute^-1`)) as unknown as import('mathjs').Unit).toNumber('L / minute');
      expect(cardiacOutput(sv, hr)).toBeCloseTo(expected, 10);
    }
  });
  it('CI = CO / BSA: 4.2 L/min over 2.0 m² is 2.1 L/min/m² (common practice)', () => {
    expect(cardiacIndex(4.2, 2.0)).toBeCloseTo(2.1, 12);
  });
});
