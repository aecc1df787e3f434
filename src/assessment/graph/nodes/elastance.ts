/** Elastances and coupling: Ea (three views), the single-beat Ees of Chen 2001 and its steps, Ea/Ees, V0. */
import { arterialElastance, arterialElastanceFromResistance, indexedToBodySurface } from '../../../physiology/arterial-elastance.js';
import { couplingRatio, couplingRatioFromEjectionFraction } from '../../../physiology/coupling.js';
import { normalizedElastanceAverage, normalizedElastanceEstimate } from '../../../physiology/normalized-elastance.js';
import { normalizedEjectionOnset } from '../../../physiology/normalized-time.js';
import { endSystolicElastanceNoIntercept, endSystolicElastanceSingleBeat } from '../../../physiology/single-beat-elastance.js';
import { volumeIntercept } from '../../../physiology/volume-intercept.js';
import { defineNodes } from '../types.js';

export const ELASTANCE_NODES = defineNodes([
  { key: 'ea', unit: 'mmHg/mL', rules: [{ from: ['pes', 'svUsed'], compute: arterialElastance, method: 'Pes / SV', source: 'Sunagawa 1983; Kelly 1992' }] },
  { key: 'eaIndexed', unit: 'mmHg·m²/mL', rules: [{ from: ['ea', 'bsa'], compute: indexedToBodySurface, method: 'Ea × BSA (Pes / SV index)' }] },
  { key: 'eaResistance', unit: 'mmHg/mL', rules: [{ from: ['tpr', 'hr'], compute: arterialElastanceFromResistance, method: 'TPR × HR / 60 (resistance view)' }] },
  { key: 'tNd', unit: '', rules: [{ from: ['pep', 'et'], compute: normalizedEjectionOnset, method: 'PEP / (PEP + ET)', source: 'Chen 2001' }] },
  {
    key: 'normalizedElastanceAvg',
    unit: '',
    rules: [{ from: ['tNd'], compute: normalizedElastanceAverage, method: '7th-order polynomial in tNd', source: 'Chen 2001' }],
  },
  {
    key: 'normalizedElastanceEst',
    unit: '',
    rules: [
      {
        from: ['efUsed', 'dbp', 'pes', 'normalizedElastanceAvg'],
        // EF enters the published formula as a fraction.
        compute: (ef: number, dbp: number, pes: number, average: number) => normalizedElastanceEstimate(ef / 100, dbp, pes, average),
        method: '0.0275 − 0.165·EF + 0.3656·DBP/Pes + 0.515·ENd(avg)',
        source: 'Chen 2001',
      },
    ],
  },
  {
    key: 'ees',
    unit: 'mmHg/mL',
    rules: [{ from: ['dbp', 'pes', 'normalizedElastanceEst', 'svUsed'], compute: endSystolicElastanceSingleBeat, method: '[DBP − ENd(est)·Pes] / [ENd(est)·SV]', source: 'Chen 2001' }],
  },
  { key: 'eesIndexed', unit: 'mmHg·m²/mL', rules: [{ from: ['ees', 'bsa'], compute: indexedToBodySurface, method: 'Ees × BSA' }] },
  { key: 'eaEes', unit: '', rules: [{ from: ['ea', 'ees'], compute: couplingRatio, method: 'Ea / Ees' }] },
  {
    key: 'eaEesFromEf',
    unit: '',
    rules: [{ from: ['efUsed'], compute: (ef: number) => couplingRatioFromEjectionFraction(ef / 100), method: '1/EF − 1 (V0 = 0 identity; cross-check only)' }],
  },
  { key: 'v0', unit: 'mL', rules: [{ from: ['esv', 'pes', 'ees'], compute: volumeIntercept, method: 'ESV − Pes / Ees' }] },
  { key: 'eesNoIntercept', unit: 'mmHg/mL', rules: [{ from: ['pes', 'esv'], compute: endSystolicElastanceNoIntercept, method: 'Pes / ESV (crude: assumes V0 = 0)' }] },
]);
