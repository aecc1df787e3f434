/**
 * The visit inputs that nodes of the graph read, in a fixed order (the order
 * of the error model and of the Monte Carlo random streams: append new inputs
 * at the end so earlier streams keep their numbers). Each names what a result
 * "needs" when it is absent and the physical domain of a drawn value.
 */
import type { GraphInput } from './types.js';

export const GRAPH_INPUTS = [
  { key: 'sbp', needs: 'brachial systolic pressure' },
  // A draw with DBP ≥ SBP is not a blood pressure: both values are lost.
  { key: 'dbp', needs: 'brachial diastolic pressure', relation: { lessThan: 'sbp', losesBoth: true } },
  { key: 'hr', needs: 'heart rate' },
  // A draw with ESV ≥ EDV loses EDV (so volumetric SV and EF), not ESV.
  { key: 'edv', needs: 'LV end-diastolic volume', relation: { greaterThan: 'esv', losesBoth: false } },
  { key: 'esv', needs: 'LV end-systolic volume' },
  { key: 'ef', needs: 'a reported ejection fraction', below: 100 },
  { key: 'sv', needs: 'a Doppler stroke volume' },
  { key: 'lvotDiameter', needs: 'LVOT diameter' },
  { key: 'lvotVti', needs: 'LVOT VTI' },
  { key: 'pep', needs: 'pre-ejection period' },
  { key: 'et', needs: 'ejection time' },
  { key: 'pesMeasured', needs: 'a measured end-systolic pressure' },
  { key: 'height', needs: 'height' },
  { key: 'weight', needs: 'weight' },
] as const satisfies readonly GraphInput[];

export type GraphInputKey = (typeof GRAPH_INPUTS)[number]['key'];
export const GRAPH_INPUT_KEYS: readonly GraphInputKey[] = GRAPH_INPUTS.map((i) => i.key);
