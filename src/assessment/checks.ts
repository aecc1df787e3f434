/**
 * Validity and consistency checks, and findings that warrant clinical
 * attention under common thresholds. Pure: inputs and results in, flags out.
 */
import { COUPLING_CUTOFF } from '../physiology/coupling.js';
import { TND_TYPICAL } from '../physiology/normalized-elastance.js';
import { TAPSE_PASP_CUT_OFFS, TR_VELOCITY_SUSPICION_ABOVE } from '../physiology/right-ventricular-coupling.js';
import { rightAtrialPressureFromVenaCava } from '../physiology/right-atrial-pressure.js';
import type { Results } from './graph/index.js';
import type { VisitInputs } from './inputs.js';
import { RHYTHM_WORDS } from './labels.js';
import type { Flag, FlagLevel } from './result.js';

/** Thresholds, each with its provenance. */
export const THRESHOLDS = {
  /** Reported EF vs EF from volumes: points of difference that merit a look (this project's choice, common practice). */
  efGapPoints: 5,
  /** Doppler vs volumetric SV: relative difference that merits a look (common practice). */
  svGapFraction: 0.15,
  /** LVEF lower normal limit, Lang RM et al. JASE 2015 (from memory): men 52 %, women 54 %. */
  efLowerNormal: { male: 52, female: 54, unknown: 52 },
  /** Severe blood pressure elevation: above 180 systolic or above 120 diastolic, ACC/AHA 2017 guideline (secondary sources seen; see docs/methods-verification.md). */
  severeSystolic: 180,
  severeDiastolic: 120,
  /** Marked bradycardia and tachycardia (common practice). */
  bradycardia: 50,
  tachycardia: 100,
  /** Invasive Ees range of the validation cohort, Chen 2001 abstract. */
  eesValidated: { low: 0.4, high: 8.4 },
  /** Below this age brachial amplification makes 0.9 × SBP overstate central Pes (common practice). */
  amplificationAge: 40,
} as const;

/** Whether a visit carries any right-heart measurement (the right-heart checks and views apply). */
export function hasRightHeartMeasurements(inputs: VisitInputs): boolean {
  return inputs.tapse !== null || inputs.trVelocity !== null || inputs.rap !== null || inputs.ivc !== null;
}

/** Where the flags of a visit go, one by one in their fixed order (visitChecks). */
export interface FlagSink {
  add(code: string, level: FlagLevel, message: string): void;
}

/** The flags of one visit, in a fixed order (visitChecks, every message written). */
export function checkVisit(inputs: VisitInputs, r: Results): Flag[] {
  const flags: Flag[] = [];
  visitChecks(inputs, r, true, { add: (code, level, message) => flags.push({ code, level, message }) });
  return flags;
}

/**
 * The one place the checks of a visit are decided: each flag that applies,
 * in a fixed order, goes to `sink`. With `messages` false (a batch, which
 * writes only the codes, render/csv.ts FlagCodes) every message is empty,
 * saving the number formatting of each.
 */
export function visitChecks(inputs: VisitInputs, r: Results, messages: boolean, sink: FlagSink): void {
  const m = messages;

  // Assumptions of the single-beat method (Chen 2001; common practice).
  if (inputs.rhythm !== 'sinus') {
    sink.add('rhythm', 'caution', m ? `Rhythm is ${RHYTHM_WORDS[inputs.rhythm]}: the single-beat method assumes regular sinus rhythm; beat-to-beat variation makes one-beat intervals and volumes unreliable (average several beats at least).` : '');
  }
  if (inputs.aorticStenosis) {
    sink.add('aortic-stenosis', 'caution', m ? 'Significant aortic stenosis: cuff pressure understates LV systolic pressure, so Pes, Ea and Ees are underestimated.' : '');
  }
  if (inputs.aorticRegurgitation) {
    sink.add('aortic-regurgitation', 'caution', m ? 'Significant aortic regurgitation: total and forward stroke volume differ; Ea from total SV understates the arterial load and Ees is unreliable.' : '');
  }
  if (inputs.mitralRegurgitation) {
    sink.add('mitral-regurgitation', 'caution', m ? 'Significant mitral regurgitation: volumetric SV includes the regurgitant volume; prefer Doppler SV, and read Ees with caution.' : '');
  }
  if (inputs.outflowObstruction) {
    sink.add('outflow-obstruction', 'caution', m ? 'LV outflow-tract obstruction: LV pressure exceeds aortic pressure, so a cuff-based Pes understates LV end-systolic pressure.' : '');
  }

  const tNd = r.tNd.value;
  if (tNd !== null && r.normalizedElastanceAvg.value !== null && (tNd < TND_TYPICAL.low || tNd > TND_TYPICAL.high)) {
    sink.add('tnd-window', 'caution', m ? `tNd ${tNd.toFixed(3)} lies outside ${TND_TYPICAL.low}–${TND_TYPICAL.high}, the usual adult range; check PEP and ET before trusting Ees.` : '');
  }
  if (r.ees.value === null) {
    sink.add('ees-not-computable', 'caution', m ? `Ees not computable: ${r.ees.reason ?? 'see inputs'}.` : '');
  } else if (r.ees.value < THRESHOLDS.eesValidated.low || r.ees.value > THRESHOLDS.eesValidated.high) {
    sink.add('ees-range', 'caution', m ? `Ees ${r.ees.value.toFixed(2)} mmHg/mL is outside ${THRESHOLDS.eesValidated.low}–${THRESHOLDS.eesValidated.high} mmHg/mL, the invasive range in which the method was validated.` : '');
  }
  if (r.v0.value !== null && r.v0.value < -50) {
    sink.add('v0-negative', 'note', m ? `The end-systolic line's intercept V0(ES) ${r.v0.value.toFixed(0)} mL is strongly negative, as the single-beat intercept often is in normal hearts; the ESPVR is a linear approximation far from the volume axis.` : '');
  }

  // Consistency between measurements.
  if (inputs.ef !== null && r.efVolumes.value !== null) {
    const gap = Math.abs(inputs.ef - r.efVolumes.value);
    if (gap > THRESHOLDS.efGapPoints) {
      sink.add('ef-gap', 'caution', m ? `Reported EF ${inputs.ef.toFixed(0)} % and EF from the volumes ${r.efVolumes.value.toFixed(0)} % differ by ${gap.toFixed(0)} points (more than ${THRESHOLDS.efGapPoints}); check the volumes or the report.` : '');
    }
  }
  if (r.svDoppler.value !== null && r.svVolumetric.value !== null) {
    const gap = Math.abs(r.svDoppler.value - r.svVolumetric.value) / r.svVolumetric.value;
    if (gap > THRESHOLDS.svGapFraction) {
      sink.add('sv-gap', 'caution', m ? `Doppler SV ${r.svDoppler.value.toFixed(0)} mL and volumetric SV ${r.svVolumetric.value.toFixed(0)} mL differ by ${(gap * 100).toFixed(0)} % (more than ${THRESHOLDS.svGapFraction * 100} %); Ea and Ees use the Doppler value.` : '');
    }
  }
  if (inputs.age !== null && inputs.age < THRESHOLDS.amplificationAge && inputs.pesMethod === 'sbp90') {
    sink.add('amplification', 'note', m ? `Age ${inputs.age.toFixed(0)}: brachial amplification is larger in the young, so 0.9 × brachial SBP may overstate central Pes.` : '');
  }
  if (r.eaEes.value !== null && r.eaEes.value > COUPLING_CUTOFF) {
    sink.add('coupling', 'note', m ? `Ea/Ees ${r.eaEes.value.toFixed(2)} is above ${COUPLING_CUTOFF}, the cut-off taken as abnormal coupling in a heart-failure echo study.` : '');
  }

  // Right heart: what the TR-derived numbers can and cannot say (common practice; Rudski 2010).
  if (hasRightHeartMeasurements(inputs) && inputs.trVelocity === null) {
    sink.add('no-tr-jet', 'note', m ? 'No tricuspid regurgitant velocity given: without a measurable TR jet there is no PASP and no TAPSE/PASP index.' : '');
  }
  if (r.pasp.value !== null) {
    sink.add('pasp-limits', 'note', m ? 'PASP from the TR jet is underestimated in severe tricuspid regurgitation, and differs from right ventricular systolic pressure with pulmonary stenosis or right ventricular outflow obstruction.' : '');
  }
  if (inputs.rap === null && inputs.ivc !== null && inputs.ivcCollapse !== null && r.rapUsed.value !== null) {
    const band = rightAtrialPressureFromVenaCava(inputs.ivc, inputs.ivcCollapse).band;
    sink.add('rap-estimated', 'note', m ? `Right-atrial pressure ${r.rapUsed.value.toFixed(0)} mmHg is estimated from the IVC (${inputs.ivc.toFixed(1)} cm, ${inputs.ivcCollapse.toFixed(0)} % collapse with a sniff: the ${band} band of Rudski 2010); the estimate does not hold in ventilated subjects.` : '');
  }

  // Findings that warrant clinical attention under common thresholds.
  const efLimit = THRESHOLDS.efLowerNormal[inputs.sex ?? 'unknown'];
  if (r.efUsed.value !== null && r.efUsed.value < efLimit) {
    sink.add('ef-low', 'attention', m ? `EF ${r.efUsed.value.toFixed(0)} % is below the normal range (lower limit about ${efLimit} %${inputs.sex ? ' for ' + (inputs.sex === 'male' ? 'men' : 'women') : ''}, ASE/EACVI 2015).` : '');
  }
  if (inputs.sbp > THRESHOLDS.severeSystolic || inputs.dbp > THRESHOLDS.severeDiastolic) {
    sink.add('bp-severe', 'attention', m ? `Blood pressure ${inputs.sbp.toFixed(0)}/${inputs.dbp.toFixed(0)} mmHg is severely elevated (above ${THRESHOLDS.severeSystolic} systolic or above ${THRESHOLDS.severeDiastolic} diastolic, ACC/AHA 2017).` : '');
  }
  if (inputs.hr !== null && inputs.hr < THRESHOLDS.bradycardia) {
    sink.add('bradycardia', 'attention', m ? `Heart rate ${inputs.hr.toFixed(0)} bpm is below ${THRESHOLDS.bradycardia} bpm (marked bradycardia).` : '');
  }
  if (inputs.hr !== null && inputs.hr > THRESHOLDS.tachycardia) {
    sink.add('tachycardia', 'attention', m ? `Heart rate ${inputs.hr.toFixed(0)} bpm is above ${THRESHOLDS.tachycardia} bpm (tachycardia).` : '');
  }
  if (inputs.trVelocity !== null && inputs.trVelocity > TR_VELOCITY_SUSPICION_ABOVE) {
    sink.add('tr-velocity-high', 'attention', m ? `Peak tricuspid regurgitant velocity ${inputs.trVelocity.toFixed(1)} m/s is above ${TR_VELOCITY_SUSPICION_ABOVE} m/s, the echo threshold for suspecting pulmonary hypertension in adults (ESC/ERS 2022 guideline).` : '');
  }
  const uncoupled = TAPSE_PASP_CUT_OFFS[0]!;
  if (r.tapsePasp.value !== null && r.tapsePasp.value < uncoupled.below) {
    sink.add('tapse-pasp-low', 'attention', m ? `TAPSE/PASP ${r.tapsePasp.value.toFixed(2)} mm/mmHg is below ${uncoupled.below} mm/mmHg, which marked right ventricle–pulmonary artery uncoupling in ${uncoupled.population} (${uncoupled.source}).` : '');
  }
}
