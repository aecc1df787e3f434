/** Pressures from the cuff: end-systolic pressure (three estimates), mean and pulse pressure. */
import { endSystolicPressureFromSystolic, endSystolicPressureWeighted } from '../../../physiology/end-systolic-pressure.js';
import { meanArterialPressure, meanArterialPressureMeaney } from '../../../physiology/mean-arterial-pressure.js';
import { pulsePressure } from '../../../physiology/pulse-pressure.js';
import { defineNodes, passThrough } from '../types.js';

export const PRESSURE_NODES = defineNodes([
  {
    key: 'pes',
    unit: 'mmHg',
    rules: [
      { when: { pesMethod: 'sbp90' }, from: ['sbp'], compute: endSystolicPressureFromSystolic, method: '0.9 × brachial SBP', source: 'Kelly 1992' },
      { when: { pesMethod: 'weighted' }, from: ['sbp', 'dbp'], compute: endSystolicPressureWeighted, method: '(2·SBP + DBP)/3', source: 'literature estimate, source unverified' },
      { when: { pesMethod: 'measured' }, from: ['pesMeasured'], compute: passThrough, method: 'measured value, passed through' },
    ],
  },
  {
    key: 'map',
    unit: 'mmHg',
    rules: [
      { when: { mapMethod: 'meaney' }, from: ['sbp', 'dbp'], compute: meanArterialPressureMeaney, method: 'DBP + 0.412·PP', source: 'Meaney 2000' },
      { when: { mapMethod: 'third' }, from: ['sbp', 'dbp'], compute: meanArterialPressure, method: 'DBP + PP/3', source: 'common practice' },
    ],
  },
  { key: 'pp', unit: 'mmHg', rules: [{ from: ['sbp', 'dbp'], compute: pulsePressure, method: 'SBP − DBP' }] },
]);
