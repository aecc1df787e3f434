/** Volumes and flow: stroke volume (volumetric, Doppler, the one used), EF, cardiac output and index, BSA, resistance, compliance. */
import { arterialCompliance } from '../../../physiology/arterial-compliance.js';
import { bodySurfaceAreaDuBois, bodySurfaceAreaMosteller } from '../../../physiology/body-surface-area.js';
import { cardiacIndex, cardiacOutput } from '../../../physiology/cardiac-output.js';
import { ejectionFractionFromVolumes } from '../../../physiology/ejection-fraction.js';
import { totalPeripheralResistance, woodUnitsToDyn } from '../../../physiology/peripheral-resistance.js';
import { strokeVolumeDoppler, strokeVolumeFromVolumes } from '../../../physiology/stroke-volume.js';
import { defineNodes, passThrough } from '../types.js';

const FEEDS = '; feeds Ea and Ees';

export const FLOW_NODES = defineNodes([
  {
    key: 'svUsed',
    unit: 'mL',
    rules: [
      // Doppler SV when chosen and given (as in Chen 2001); otherwise the volumes.
      { when: { strokeVolumeSource: 'doppler' }, from: ['svDoppler'], compute: passThrough, method: (methodOf) => `${methodOf('svDoppler')}${FEEDS}` },
      { from: ['svVolumetric'], compute: passThrough, method: (methodOf) => `${methodOf('svVolumetric')}${FEEDS}` },
    ],
  },
  { key: 'svVolumetric', unit: 'mL', rules: [{ from: ['edv', 'esv'], compute: strokeVolumeFromVolumes, method: 'volumetric: EDV − ESV' }] },
  {
    key: 'svDoppler',
    unit: 'mL',
    rules: [
      { from: ['sv'], compute: passThrough, method: 'Doppler, as entered' },
      { from: ['lvotDiameter', 'lvotVti'], compute: strokeVolumeDoppler, method: 'Doppler: LVOT VTI × π(D/2)²' },
    ],
    missing: 'no Doppler stroke volume or LVOT diameter and VTI given',
  },
  {
    key: 'efUsed',
    unit: '%',
    rules: [
      { from: ['ef'], compute: passThrough, method: 'reported' },
      { from: ['efVolumes'], compute: passThrough, method: 'from volumes (none reported)' },
    ],
  },
  { key: 'efVolumes', unit: '%', rules: [{ from: ['edv', 'esv'], compute: ejectionFractionFromVolumes, method: '(EDV − ESV)/EDV' }] },
  { key: 'co', unit: 'L/min', rules: [{ from: ['svUsed', 'hr'], compute: cardiacOutput, method: 'SV × HR' }] },
  { key: 'ci', unit: 'L/min/m²', rules: [{ from: ['co', 'bsa'], compute: cardiacIndex, method: 'CO / BSA' }] },
  {
    key: 'bsa',
    unit: 'm²',
    rules: [
      { when: { bsaMethod: 'dubois' }, from: ['height', 'weight'], compute: bodySurfaceAreaDuBois, method: 'DuBois 1916' },
      { when: { bsaMethod: 'mosteller' }, from: ['height', 'weight'], compute: bodySurfaceAreaMosteller, method: 'Mosteller 1987' },
    ],
  },
  { key: 'tpr', unit: 'WU', rules: [{ from: ['map', 'co'], compute: totalPeripheralResistance, method: 'MAP / CO (right-atrial pressure neglected)' }] },
  { key: 'tprDyn', unit: 'dyn·s·cm⁻⁵', rules: [{ from: ['tpr'], compute: woodUnitsToDyn, method: 'MAP / CO × 79.99' }] },
  { key: 'compliance', unit: 'mL/mmHg', rules: [{ from: ['svUsed', 'sbp', 'dbp'], compute: arterialCompliance, method: 'SV / pulse pressure' }] },
]);
