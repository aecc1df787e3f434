/**
 * Pulmonary artery systolic pressure from the peak tricuspid regurgitant velocity, by the
 * simplified Bernoulli equation:  PASP = 4·v² + RAP   (mmHg; v in m/s, RAP in mmHg).
 *
 * 4·v² is the systolic pressure drop from right ventricle to right atrium; adding right-atrial
 * pressure gives right ventricular systolic pressure, taken as PASP when there is no pulmonary
 * stenosis or right ventricular outflow obstruction (Rudski LG et al., J Am Soc Echocardiogr
 * 2010;23:685; common practice).
 * Worked example: v 2.8 m/s, RAP 8 mmHg → 4 × 7.84 + 8 = 39.36 mmHg.
 */
export function pulmonaryArterySystolicPressure(trVelocity: number, rightAtrialPressure: number): number {
  return 4 * trVelocity * trVelocity + rightAtrialPressure;
}
