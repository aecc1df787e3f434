/**
 * The core numbers of one visit under one choice of methods: a pure function
 * composed from one-formula modules. `assess` calls it once for the report
 * and again for each method variant of the recheck view.
 */
import { arterialCompliance } from '../physiology/arterial-compliance.js';
import { arterialElastance, arterialElastanceFromResistance, indexedToBodySurface } from '../physiology/arterial-elastance.js';
import { bodySurfaceAreaDuBois, bodySurfaceAreaMosteller } from '../physiology/body-surface-area.js';
import { cardiacIndex, cardiacOutput } from '../physiology/cardiac-output.js';
import { couplingRatio, couplingRatioFromEjectionFraction } from '../physiology/coupling.js';
import { ejectionFractionFromVolumes } from '../physiology/ejection-fraction.js';
import { endSystolicPressureFromSystolic, endSystolicPressureWeighted } from '../physiology/end-systolic-pressure.js';
import { meanArterialPressure, meanArterialPressureMeaney } from '../physiology/mean-arterial-pressure.js';
import { normalizedElastanceAverage, normalizedElastanceEstimate } from '../physiology/normalized-elastance.js';
import { normalizedEjectionOnset } from '../physiology/normalized-time.js';
import { totalPeripheralResistance, woodUnitsToDyn } from '../physiology/peripheral-resistance.js';
import { endSystolicElastanceNoIntercept, endSystolicElastanceSingleBeat } from '../physiology/single-beat-elastance.js';
import { strokeVolumeDoppler, strokeVolumeFromVolumes } from '../physiology/stroke-volume.js';
import { volumeIntercept } from '../physiology/volume-intercept.js';
import type { PesMethod } from './fields.js';
import type { VisitInputs } from './inputs.js';
import { quantity, type Quantity } from './result.js';

export type StrokeVolumeSource = 'doppler' | 'volumetric';

export interface MethodChoice {
  pesMethod: PesMethod;
  strokeVolumeSource: StrokeVolumeSource;
}

export const RESULT_KEYS = [
  'pes', 'map', 'pp', 'sv', 'svVolumetric', 'svDoppler', 'ef', 'efVolumes', 'co', 'ci', 'bsa',
  'tpr', 'tprDyn', 'compliance', 'ea', 'eaIndexed', 'eaResistance', 'tNd', 'endAvg', 'endEst',
  'ees', 'eesIndexed', 'eaEes', 'eaEesFromEf', 'v0', 'eesNoIntercept',
] as const;
export type ResultKey = (typeof RESULT_KEYS)[number];
export type Results = Record<ResultKey, Quantity>;

export const PES_METHOD_LABEL: Record<PesMethod, string> = {
  sbp90: '0.9 × brachial SBP (Kelly 1992)',
  weighted: '(2·SBP + DBP)/3 (literature estimate, source unverified)',
  measured: 'measured value, passed through',
};

export function endSystolicPressure(inputs: VisitInputs, method: PesMethod): number | null {
  switch (method) {
    case 'sbp90':
      return endSystolicPressureFromSystolic(inputs.sbp);
    case 'weighted':
      return endSystolicPressureWeighted(inputs.sbp, inputs.dbp);
    case 'measured':
      return inputs.pesMeasured;
  }
}

export function dopplerStrokeVolume(inputs: VisitInputs): { value: number; method: string } | null {
  if (inputs.sv !== null) return { value: inputs.sv, method: 'Doppler, as entered' };
  if (inputs.lvotDiameter !== null && inputs.lvotVti !== null) {
    return { value: strokeVolumeDoppler(inputs.lvotDiameter, inputs.lvotVti), method: 'Doppler: LVOT VTI × π(D/2)²' };
  }
  return null;
}

/** Default method choice: the inputs' Pes method, Doppler SV when given (as in Chen 2001). */
export function defaultChoice(inputs: VisitInputs): MethodChoice {
  return { pesMethod: inputs.pesMethod, strokeVolumeSource: dopplerStrokeVolume(inputs) ? 'doppler' : 'volumetric' };
}

export function computeResults(inputs: VisitInputs, choice: MethodChoice = defaultChoice(inputs)): Results {
  const { sbp, dbp, hr, edv, esv } = inputs;
  const pesValue = endSystolicPressure(inputs, choice.pesMethod);
  const pes = quantity(pesValue, 'mmHg', PES_METHOD_LABEL[choice.pesMethod], 'no measured end-systolic pressure given');

  const mapValue = inputs.mapMethod === 'meaney' ? meanArterialPressureMeaney(sbp, dbp) : meanArterialPressure(sbp, dbp);
  const map = quantity(mapValue, 'mmHg', inputs.mapMethod === 'meaney' ? 'DBP + 0.412·PP (Meaney 2000)' : 'DBP + PP/3 (common practice)');
  const pp = quantity(sbp - dbp, 'mmHg', 'SBP − DBP');

  const svVolumetricValue = strokeVolumeFromVolumes(edv, esv);
  const svVolumetric = quantity(svVolumetricValue, 'mL', 'volumetric: EDV − ESV');
  const doppler = dopplerStrokeVolume(inputs);
  const svDoppler = doppler ? quantity(doppler.value, 'mL', doppler.method) : quantity(null, 'mL', undefined, 'no Doppler stroke volume or LVOT diameter and VTI given');
  const useDoppler = choice.strokeVolumeSource === 'doppler' && doppler !== null;
  const svValue = useDoppler ? doppler.value : svVolumetricValue;
  const sv = quantity(svValue, 'mL', useDoppler ? `${doppler.method}; feeds Ea and Ees` : 'volumetric: EDV − ESV; feeds Ea and Ees');

  const efVolumesValue = ejectionFractionFromVolumes(edv, esv);
  const efVolumes = quantity(efVolumesValue, '%', '(EDV − ESV)/EDV');
  const efValue = inputs.ef ?? efVolumesValue;
  const ef = quantity(efValue, '%', inputs.ef !== null ? 'reported' : 'from volumes (none reported)');

  const co = hr !== null ? quantity(cardiacOutput(svValue, hr), 'L/min', 'SV × HR') : quantity(null, 'L/min', undefined, 'needs heart rate');
  const bsaValue =
    inputs.height !== null && inputs.weight !== null
      ? inputs.bsaMethod === 'dubois'
        ? bodySurfaceAreaDuBois(inputs.height, inputs.weight)
        : bodySurfaceAreaMosteller(inputs.height, inputs.weight)
      : null;
  const bsa = quantity(bsaValue, 'm²', inputs.bsaMethod === 'dubois' ? 'DuBois 1916' : 'Mosteller 1987', 'needs height and weight');
  const ci = co.value !== null && bsaValue !== null ? quantity(cardiacIndex(co.value, bsaValue), 'L/min/m²', 'CO / BSA') : quantity(null, 'L/min/m²', undefined, co.value === null ? 'needs heart rate' : 'needs height and weight');

  const tprValue = co.value !== null ? totalPeripheralResistance(mapValue, co.value) : null;
  const tpr = quantity(tprValue, 'WU', 'MAP / CO (right-atrial pressure neglected)', 'needs heart rate');
  const tprDyn = quantity(tprValue !== null ? woodUnitsToDyn(tprValue) : null, 'dyn·s·cm⁻⁵', 'MAP / CO × 79.99', 'needs heart rate');
  const compliance = quantity(arterialCompliance(svValue, sbp, dbp), 'mL/mmHg', 'SV / pulse pressure');

  const eaValue = pesValue !== null ? arterialElastance(pesValue, svValue) : null;
  const ea = quantity(eaValue, 'mmHg/mL', 'Pes / SV (Sunagawa 1983; Kelly 1992)', pes.reason);
  const eaIndexed = quantity(eaValue !== null && bsaValue !== null ? indexedToBodySurface(eaValue, bsaValue) : null, 'mmHg·m²/mL', 'Ea × BSA (Pes / SV index)', bsaValue === null ? 'needs height and weight' : pes.reason);
  const eaResistance = quantity(tprValue !== null && hr !== null ? arterialElastanceFromResistance(tprValue, hr) : null, 'mmHg/mL', 'TPR × HR/60 (R/T estimate; Kelly 1992)', 'needs heart rate');

  const tNdValue = normalizedEjectionOnset(inputs.pep, inputs.et);
  const tNd = quantity(tNdValue, '', 'PEP / (PEP + ET) (Chen 2001)');
  const endAvgOutcome = normalizedElastanceAverage(tNdValue);
  const endAvg = quantity(endAvgOutcome.value, '', '7th-order polynomial in tNd (Chen 2001)', endAvgOutcome.reason);
  let endEst: Quantity;
  let ees: Quantity;
  if (endAvgOutcome.value === null) {
    endEst = quantity(null, '', undefined, endAvgOutcome.reason);
    ees = quantity(null, 'mmHg/mL', 'single-beat (Chen 2001)', endAvgOutcome.reason);
  } else if (pesValue === null) {
    endEst = quantity(null, '', undefined, pes.reason);
    ees = quantity(null, 'mmHg/mL', 'single-beat (Chen 2001)', pes.reason);
  } else {
    const endEstValue = normalizedElastanceEstimate(efValue / 100, dbp, pesValue, endAvgOutcome.value);
    endEst = quantity(endEstValue, '', '0.0275 − 0.165·EF + 0.3656·DBP/Pes + 0.515·ENd(avg) (Chen 2001)');
    const eesOutcome = endSystolicElastanceSingleBeat(dbp, pesValue, endEstValue, svValue);
    ees = quantity(eesOutcome.value, 'mmHg/mL', '[DBP − ENd(est)·Pes] / [ENd(est)·SV] (Chen 2001)', eesOutcome.reason);
  }
  const eesIndexed = quantity(ees.value !== null && bsaValue !== null ? indexedToBodySurface(ees.value, bsaValue) : null, 'mmHg·m²/mL', 'Ees × BSA', ees.value === null ? ees.reason : 'needs height and weight');
  const eaEes = quantity(eaValue !== null && ees.value !== null ? couplingRatio(eaValue, ees.value) : null, '', 'Ea / Ees', ees.reason ?? ea.reason);
  const eaEesFromEf = quantity(couplingRatioFromEjectionFraction(efValue / 100), '', '1/EF − 1 (V0(ES) = 0 identity; cross-check only)');
  const v0 = quantity(ees.value !== null && pesValue !== null ? volumeIntercept(esv, pesValue, ees.value) : null, 'mL', 'ESV − Pes / Ees', ees.reason);
  const eesNoIntercept = quantity(pesValue !== null ? endSystolicElastanceNoIntercept(pesValue, esv) : null, 'mmHg/mL', 'Pes / ESV (crude: assumes V0(ES) = 0)', pes.reason);

  return {
    pes, map, pp, sv, svVolumetric, svDoppler, ef, efVolumes, co, ci, bsa, tpr, tprDyn, compliance,
    ea, eaIndexed, eaResistance, tNd, endAvg, endEst, ees, eesIndexed, eaEes, eaEesFromEf, v0, eesNoIntercept,
  };
}
