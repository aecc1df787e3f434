import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { arterialElastance, arterialElastanceFromResistance, indexedToBodySurface } from '../../src/physiology/arterial-elastance.js';

const math = createRequire(import.meta.url)('mathjs') as typeof import('mathjs');

describe('effective arterial elastance', () => {
  it('Ea = Pes / SV: 108 mmHg over 70 mL is 1.5429 mmHg/mL (definition, Sunagawa 1983; Kelly RP et al., Circulation 1992)', () => {
    expect(arterialElastance(108, 70)).toBeCloseTo(108 / 70, 12);
    expect(arterialElastance(108, 70)).toBeCloseTo(1.5429, 4);
  });

  it('R/T view: TPR × HR / 60 with TPR converted from Wood units to mmHg·s/mL by mathjs (Sunagawa 1983; Kelly 1992)', () => {
    // mathjs: 1 mmHg·min/L expressed in mmHg·s/mL (= 60/1000).
    const woodToMmHgSecondPerMl = math.unit('1 mmHg minute / L').toNumber('mmHg s / mL');
    expect(woodToMmHgSecondPerMl).toBeCloseTo(0.06, 12);
    for (const [wood, hr] of [[22.22, 60], [15, 72], [30, 100]] as const) {
      const resistance = wood * woodToMmHgSecondPerMl; // mmHg·s/mL
      const heartPeriodSeconds = 60 / hr; // T
      expect(arterialElastanceFromResistance(wood, hr)).toBeCloseTo(resistance / heartPeriodSeconds, 10);
    }
  });

  it('R/T equals Pes/SV when Pes equals MAP (pure resistance, no pulsatile load): MAP/CO × HR/60 = MAP/SV (algebra; Kelly 1992)', () => {
    const map = 93.33;
    const sv = 70;
    const hr = 64;
    const coLPerMin = (sv * hr) / 1000;
    expect(arterialElastanceFromResistance(map / coLPerMin, hr)).toBeCloseTo(map / sv, 10);
  });

  it('indexed Ea is Pes / SVI = Ea × BSA (common practice)', () => {
    const pes = 108;
    const sv = 70;
    const bsa = 2.0;
    expect(indexedToBodySurface(arterialElastance(pes, sv), bsa)).toBeCloseTo(pes / (sv / bsa), 12);
  });
});
