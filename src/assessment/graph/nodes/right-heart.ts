/**
 * Right ventricle–pulmonary artery coupling from the same echo: right-atrial pressure as used
 * (measured, or estimated from the IVC), PASP by the simplified Bernoulli equation, and TAPSE/PASP.
 */
import { pulmonaryArterySystolicPressure } from '../../../physiology/pulmonary-artery-systolic-pressure.js';
import { rightAtrialPressureFromVenaCava } from '../../../physiology/right-atrial-pressure.js';
import { tapseToPulmonarySystolicPressure } from '../../../physiology/right-ventricular-coupling.js';
import { defineNodes, passThrough } from '../types.js';

export const RIGHT_HEART_NODES = defineNodes([
  {
    key: 'rapUsed',
    unit: 'mmHg',
    rules: [
      // A measured right-atrial pressure wins over the IVC estimate.
      { from: ['rap'], compute: passThrough, method: 'measured, as entered' },
      {
        from: ['ivc', 'ivcCollapse'],
        compute: (diameter: number, collapse: number) => rightAtrialPressureFromVenaCava(diameter, collapse).value,
        method: 'estimated from IVC diameter and sniff collapse: 3, 8 or 15 mmHg',
        source: 'Rudski 2010',
      },
    ],
    missing: 'needs a right-atrial pressure, or the IVC diameter and its collapse',
  },
  {
    key: 'pasp',
    unit: 'mmHg',
    rules: [{ from: ['trVelocity', 'rapUsed'], compute: pulmonaryArterySystolicPressure, method: '4·v² + RAP (simplified Bernoulli)', source: 'Rudski 2010' }],
  },
  {
    key: 'tapsePasp',
    unit: 'mm/mmHg',
    rules: [{ from: ['tapse', 'pasp'], compute: tapseToPulmonarySystolicPressure, method: 'TAPSE / PASP', source: 'Guazzi 2013; Tello 2019' }],
  },
]);
