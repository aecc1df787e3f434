/**
 * Right-atrial pressure estimated from the inferior vena cava (IVC) diameter and its collapse
 * with a sniff, by the three-band scheme of the ASE right-heart guideline (Rudski LG et al.,
 * J Am Soc Echocardiogr 2010;23:685):
 *   diameter ≤ 2.1 cm and collapse > 50 %  → 3 mmHg  (normal, range 0–5)
 *   diameter > 2.1 cm and collapse < 50 %  → 15 mmHg (high, range 10–20)
 *   every other combination                → 8 mmHg  (intermediate, range 5–10)
 * Exactly 50 % collapse fits neither the normal nor the high band, so it is intermediate.
 * Only an estimate: a measured right-atrial pressure wins, and the scheme does not hold in
 * ventilated subjects (common practice).
 * Worked example: 1.8 cm collapsing 60 % → 3 mmHg; 2.4 cm collapsing 30 % → 15 mmHg.
 */
export type RightAtrialPressureBand = 'normal' | 'intermediate' | 'high';

export interface RightAtrialPressureEstimate {
  /** mmHg */
  value: number;
  band: RightAtrialPressureBand;
}

/** Diameter above which the IVC counts as dilated (cm), Rudski 2010. */
export const IVC_DILATED_ABOVE_CM = 2.1;
/** Sniff collapse (percent) above which the IVC counts as collapsing normally, Rudski 2010. */
export const IVC_COLLAPSE_NORMAL_ABOVE_PERCENT = 50;

export function rightAtrialPressureFromVenaCava(diameterCm: number, collapsePercent: number): RightAtrialPressureEstimate {
  const dilated = diameterCm > IVC_DILATED_ABOVE_CM;
  if (!dilated && collapsePercent > IVC_COLLAPSE_NORMAL_ABOVE_PERCENT) return { value: 3, band: 'normal' };
  if (dilated && collapsePercent < IVC_COLLAPSE_NORMAL_ABOVE_PERCENT) return { value: 15, band: 'high' };
  return { value: 8, band: 'intermediate' };
}
