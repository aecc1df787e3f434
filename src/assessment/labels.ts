/**
 * The one map from internal tokens to the trade's words. Tokens
 * (`atrial-fibrillation`, `sbp90`, `mitral-regurgitation`) stay in JSON, CSV
 * and flags; every prose view (terminal report, recheck view, referral note,
 * comparison, case-conference report) says them through this file. Pure data.
 */
import { COUPLING_CUTOFF } from '../physiology/coupling.js';
import type { StrokeVolumeSource } from './graph/index.js';
import type { ErrorInputKey } from './error-model.js';
import type { PesMethod, Rhythm } from './fields.js';
import type { Flag } from './result.js';

/** Short names of the inputs, as a reader of an echo report says them. */
export const INPUT_SHORT_NAMES: Record<ErrorInputKey, string> = {
  sbp: 'SBP', dbp: 'DBP', hr: 'heart rate', edv: 'EDV', esv: 'ESV', ef: 'reported EF', sv: 'Doppler SV',
  lvotDiameter: 'LVOT diameter', lvotVti: 'LVOT VTI', pep: 'PEP', et: 'ET', pesMeasured: 'measured Pes',
  height: 'height', weight: 'weight', tapse: 'TAPSE', trVelocity: 'TR velocity', rap: 'right-atrial pressure',
  ivc: 'IVC diameter', ivcCollapse: 'IVC collapse',
};

export const RHYTHM_WORDS: Record<Rhythm, string> = {
  sinus: 'sinus rhythm',
  'atrial-fibrillation': 'atrial fibrillation',
  other: 'a rhythm other than sinus',
};

/** Short names of the end-systolic pressure estimates, as a table or a sentence says them. */
export const PES_METHOD_WORDS: Record<PesMethod, string> = {
  sbp90: '0.9 × SBP',
  weighted: '(2·SBP + DBP)/3',
  measured: 'measured Pes',
};

export const STROKE_VOLUME_SOURCE_WORDS: Record<StrokeVolumeSource | 'none', string> = {
  doppler: 'Doppler',
  volumetric: 'EDV − ESV',
  none: 'none',
};

/** Each flag code as a few plain words (the flag's message says the rest). */
export const FLAG_WORDS: Record<string, string> = {
  rhythm: 'a rhythm other than sinus',
  'aortic-stenosis': 'aortic stenosis',
  'aortic-regurgitation': 'aortic regurgitation',
  'mitral-regurgitation': 'mitral regurgitation',
  'outflow-obstruction': 'outflow-tract obstruction',
  'tnd-window': 'tNd outside the usual adult range',
  'ees-not-computable': 'Ees not computable',
  'ees-range': 'Ees outside the validated range',
  'v0-negative': 'strongly negative end-systolic volume intercept',
  'ef-gap': 'reported EF and EF from volumes disagree',
  'sv-gap': 'Doppler and volumetric stroke volumes disagree',
  amplification: 'brachial amplification in the young',
  coupling: 'Ea/Ees above 1.2',
  'ef-low': 'EF below the normal range',
  'bp-severe': 'severely elevated blood pressure',
  bradycardia: 'marked bradycardia',
  tachycardia: 'tachycardia',
  'no-tr-jet': 'no measurable tricuspid regurgitant jet',
  'pasp-limits': 'limits of PASP from the TR jet',
  'rap-estimated': 'right-atrial pressure estimated from the IVC',
  'tr-velocity-high': 'TR velocity above 2.8 m/s',
  'tapse-pasp-low': 'TAPSE/PASP below 0.31 mm/mmHg',
};

/** The plain words for one flag; the rhythm flag names the rhythm itself when it is known. */
export function flagWords(code: string, rhythm?: Rhythm): string {
  if (code === 'rhythm' && rhythm !== undefined && rhythm !== 'sinus') return RHYTHM_WORDS[rhythm];
  return FLAG_WORDS[code] ?? code.replace(/-/g, ' ');
}

/** The method limits (caution flags) of one or more visits as one plain list, each named once. */
export function methodLimitWords(visits: readonly { flags: readonly Flag[]; rhythm: Rhythm }[]): string[] {
  const words = visits.flatMap((v) => v.flags.filter((f) => f.level === 'caution').map((f) => flagWords(f.code, v.rhythm)));
  return [...new Set(words)];
}

/** "a, b and c" */
export function listInWords(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/** The two volumes at zero pressure, named apart everywhere they are shown. */
export const V0_END_SYSTOLIC = 'V0(ES), end-systolic intercept';
export const V0_DIASTOLIC = 'V0(ED), diastolic curve at zero pressure';
/** Ea from resistance and heart period, as the literature names it (Kelly 1992: the R/T estimate). */
export const EA_RT_LABEL = 'R/T estimate of Ea';
/** The two normalized elastances of the single-beat method, in plain words beside the notation. */
export const END_AVG_LABEL = 'ENd(avg), group average';
export const END_EST_LABEL = 'ENd(est), this subject';
/** ENd(est) in a few words, where a table has room for little more. */
export const END_EST_WORDS = "ENd(est) = this subject's normalized elastance";
export const END_NOTE =
  'Normalized elastance ENd is elastance at the onset of ejection divided by Ees; ENd(avg) is the group-average curve of Chen 2001 read at this tNd, ENd(est) the estimate for this subject from EF, DBP/Pes and ENd(avg).';
/** The invasive Ees that the published calibration predicts from the single-beat estimate (Chen 2001). */
export const CALIBRATED_EES_LABEL = 'Invasive-equivalent Ees';
/** What the published calibration does to a probability, in one line. */
export const CALIBRATION_SHIFT_NOTE =
  'The published calibration (0.86·Ees + 0.40, Chen 2001) moves the centre, not only the spread.';

/** The coupling ratio against the 1.2 cut-off, as every view says it (terminal, record show, report). */
export function couplingNote(eaEes: number | null): string {
  if (eaEes === null) return '';
  return eaEes > COUPLING_CUTOFF ? `above the ${COUPLING_CUTOFF} cut-off (Cheng 2008)` : `at or below the ${COUPLING_CUTOFF} cut-off (Cheng 2008)`;
}

/** A source text as a case conference reads it: a value recalled "(from memory)" becomes an assumption with the doc that gives its exact provenance. */
export function sourceForReaders(text: string, doc: string): string {
  return text.replace(/\(from memory\)/g, `(assumed; see ${doc})`);
}

/** How an input's provenance is shown to readers: "[from memory]" becomes words a case conference understands. */
export function provenanceWords(provenance: string): string {
  return provenance === 'from memory' ? 'assumed default; see docs/uncertainty.md' : provenance;
}
