/**
 * The measurement fields of one visit: the single source of truth for flags,
 * visit-file keys, prompts, ranges, units and error messages.
 * Ranges are wide physiological bounds (common practice): they reject typing
 * errors and impossible values, not unusual patients.
 */
import type { QuantityKind } from '../units/quantity.js';

export interface NumericField {
  key: NumericKey;
  /** Flag spelling, e.g. `lvot-diameter`. */
  flag: string;
  label: string;
  kind: QuantityKind;
  unit: string;
  min: number;
  max: number;
  required: boolean;
  /** Several readings may be given and are averaged. */
  multiple?: boolean;
  help: string;
}

export type NumericKey =
  | 'sbp' | 'dbp' | 'hr' | 'edv' | 'esv' | 'ef' | 'sv' | 'lvotDiameter' | 'lvotVti'
  | 'pep' | 'et' | 'height' | 'weight' | 'age' | 'pesMeasured'
  | 'edp' | 'eOverEPrime' | 'lvids' | 'pwts'
  | 'tapse' | 'trVelocity' | 'rap' | 'ivc' | 'ivcCollapse';

export const NUMERIC_FIELDS: readonly NumericField[] = [
  { key: 'sbp', flag: 'sbp', label: 'Brachial systolic pressure', kind: 'pressure', unit: 'mmHg', min: 60, max: 260, required: true, multiple: true, help: 'cuff SBP; several readings are averaged' },
  { key: 'dbp', flag: 'dbp', label: 'Brachial diastolic pressure', kind: 'pressure', unit: 'mmHg', min: 30, max: 160, required: true, multiple: true, help: 'cuff DBP; several readings are averaged' },
  { key: 'hr', flag: 'hr', label: 'Heart rate', kind: 'rate', unit: 'bpm', min: 25, max: 220, required: false, help: 'during the echo' },
  { key: 'edv', flag: 'edv', label: 'LV end-diastolic volume', kind: 'volume', unit: 'mL', min: 20, max: 600, required: true, help: 'biplane method of disks' },
  { key: 'esv', flag: 'esv', label: 'LV end-systolic volume', kind: 'volume', unit: 'mL', min: 5, max: 500, required: true, help: 'biplane method of disks' },
  { key: 'ef', flag: 'ef', label: 'Reported ejection fraction', kind: 'percent', unit: '%', min: 5, max: 95, required: false, help: 'as reported; defaults to the EF the volumes imply' },
  { key: 'sv', flag: 'sv', label: 'Doppler stroke volume', kind: 'volume', unit: 'mL', min: 10, max: 250, required: false, help: 'LVOT Doppler; or give LVOT diameter and VTI' },
  { key: 'lvotDiameter', flag: 'lvot-diameter', label: 'LVOT diameter', kind: 'length', unit: 'cm', min: 1.2, max: 3.5, required: false, help: 'for Doppler stroke volume' },
  { key: 'lvotVti', flag: 'lvot-vti', label: 'LVOT velocity–time integral', kind: 'length', unit: 'cm', min: 5, max: 50, required: false, help: 'for Doppler stroke volume' },
  { key: 'pep', flag: 'pep', label: 'Pre-ejection period', kind: 'time', unit: 'ms', min: 20, max: 250, required: true, help: 'QRS onset to onset of aortic flow' },
  { key: 'et', flag: 'et', label: 'Ejection time', kind: 'time', unit: 'ms', min: 100, max: 500, required: true, help: 'duration of aortic flow' },
  { key: 'height', flag: 'height', label: 'Height', kind: 'length', unit: 'cm', min: 100, max: 230, required: false, help: 'for body surface area' },
  { key: 'weight', flag: 'weight', label: 'Weight', kind: 'mass', unit: 'kg', min: 25, max: 300, required: false, help: 'for body surface area' },
  { key: 'age', flag: 'age', label: 'Age', kind: 'ratio', unit: 'years', min: 18, max: 110, required: false, help: 'adults; used for cautions only' },
  { key: 'pesMeasured', flag: 'pes-measured', label: 'Measured end-systolic pressure', kind: 'pressure', unit: 'mmHg', min: 40, max: 260, required: false, help: 'e.g. calibrated carotid tonometry at the dicrotic notch' },
  { key: 'edp', flag: 'edp', label: 'LV end-diastolic pressure', kind: 'pressure', unit: 'mmHg', min: 2, max: 45, required: false, help: 'measured; or give E/e′ for an estimate' },
  { key: 'eOverEPrime', flag: 'e-over-e-prime', label: 'E/e′ ratio', kind: 'ratio', unit: '', min: 3, max: 40, required: false, help: 'E/e′ with lateral e′ (as Nagueh 1997 derived it), for estimated filling pressure' },
  { key: 'lvids', flag: 'lvids', label: 'LV end-systolic dimension LVIDs', kind: 'length', unit: 'cm', min: 1.5, max: 8, required: false, help: 'for wall stress' },
  { key: 'pwts', flag: 'pwts', label: 'Posterior wall at end-systole', kind: 'length', unit: 'cm', min: 0.5, max: 3, required: false, help: 'for wall stress' },
  // Right heart (Rudski 2010 guideline measurements), for TAPSE/PASP.
  { key: 'tapse', flag: 'tapse', label: 'TAPSE', kind: 'excursion', unit: 'mm', min: 3, max: 40, required: false, help: 'tricuspid annular plane systolic excursion, M-mode' },
  { key: 'trVelocity', flag: 'tr-velocity', label: 'Peak tricuspid regurgitant velocity', kind: 'velocity', unit: 'm/s', min: 0.5, max: 7, required: false, help: 'continuous-wave Doppler; leave out when no TR jet is measurable' },
  { key: 'rap', flag: 'rap', label: 'Right-atrial pressure', kind: 'pressure', unit: 'mmHg', min: 0, max: 40, required: false, help: 'measured; or give IVC diameter and collapse for an estimate' },
  { key: 'ivc', flag: 'ivc', label: 'Inferior vena cava diameter', kind: 'length', unit: 'cm', min: 0.3, max: 4.5, required: false, help: 'subcostal, near the right atrium, for estimated RAP' },
  { key: 'ivcCollapse', flag: 'ivc-collapse', label: 'IVC collapse with a sniff', kind: 'percent', unit: '%', min: 0, max: 100, required: false, help: 'percent fall in diameter with a sniff, for estimated RAP' },
];

export const RHYTHMS = ['sinus', 'atrial-fibrillation', 'other'] as const;
export type Rhythm = (typeof RHYTHMS)[number];

export const VALVE_FLAGS = [
  { key: 'aorticStenosis', flag: 'aortic-stenosis', label: 'Significant aortic stenosis' },
  { key: 'aorticRegurgitation', flag: 'aortic-regurgitation', label: 'Significant aortic regurgitation' },
  { key: 'mitralRegurgitation', flag: 'mitral-regurgitation', label: 'Significant mitral regurgitation' },
  { key: 'outflowObstruction', flag: 'outflow-obstruction', label: 'LV outflow-tract obstruction' },
] as const;
export type ValveKey = (typeof VALVE_FLAGS)[number]['key'];

export const PES_METHODS = ['sbp90', 'weighted', 'measured'] as const;
export type PesMethod = (typeof PES_METHODS)[number];
export const MAP_METHODS = ['third', 'meaney'] as const;
export type MapMethod = (typeof MAP_METHODS)[number];
export const BSA_METHODS = ['mosteller', 'dubois'] as const;
export type BsaMethod = (typeof BSA_METHODS)[number];
export const SEXES = ['female', 'male'] as const;
export type Sex = (typeof SEXES)[number];

export function fieldByKey(key: NumericKey): NumericField {
  const f = NUMERIC_FIELDS.find((x) => x.key === key);
  if (!f) throw new Error(`unknown field ${key}`);
  return f;
}

/** "60–260 mmHg" */
export function describeRange(f: NumericField): string {
  return `${f.min}–${f.max}${f.unit ? ' ' + f.unit : ''}`;
}
