/**
 * Right ventricle–pulmonary artery coupling index TAPSE/PASP (mm/mmHg): tricuspid annular plane
 * systolic excursion over pulmonary artery systolic pressure, a noninvasive surrogate of the
 * right ventricle's Ees/Ea (Guazzi M et al., Am J Physiol Heart Circ Physiol 2013;305:H1373;
 * Tello K et al., Circ Cardiovasc Imaging 2019;12:e009047).
 * Worked example: TAPSE 20 mm, PASP 40 mmHg → 0.50 mm/mmHg.
 */
export function tapseToPulmonarySystolicPressure(tapseMm: number, paspMmHg: number): number {
  return tapseMm / paspMmHg;
}

export interface RightHeartCutOff {
  /** mm/mmHg; below it the index counts as uncoupled or adverse in that population. */
  below: number;
  population: string;
  finding: string;
  source: string;
}

/**
 * Published TAPSE/PASP cut-offs, each for its own population (not interchangeable). The first is
 * the one the referral note names.
 */
export const TAPSE_PASP_CUT_OFFS: readonly RightHeartCutOff[] = [
  {
    below: 0.31,
    population: 'pulmonary arterial hypertension',
    finding: 'right ventricle–pulmonary artery uncoupling by invasive pressure–volume loops (Ees/Ea)',
    source: 'Tello K et al., Circ Cardiovasc Imaging 2019',
  },
  {
    below: 0.36,
    population: 'heart failure',
    finding: 'worse survival',
    source: 'Guazzi M et al., Am J Physiol Heart Circ Physiol 2013',
  },
  {
    below: 0.38,
    population: 'heart failure with reduced ejection fraction',
    finding: 'uncoupling against pressure–volume loops',
    source: 'Eur Heart J Cardiovasc Imaging 2021, doi 10.1093/ehjci/jeaa285',
  },
];

/**
 * Peak tricuspid regurgitant velocity (m/s) above which the echo raises the suspicion of pulmonary
 * hypertension: 2.8 m/s in the 2015 ESC/ERS guideline (Galiè N et al., Eur Heart J 2016;37:67),
 * kept unchanged in the 2022 ESC/ERS guideline (Humbert M et al., Eur Heart J 2022;43:3618), as
 * later work on the new haemodynamic definition notes (Diagnostics 2023;13:2619).
 */
export const TR_VELOCITY_SUSPICION_ABOVE = 2.8;
