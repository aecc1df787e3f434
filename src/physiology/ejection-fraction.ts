/**
 * Ejection fraction from volumes: EF = (EDV − ESV) / EDV × 100  (%).
 * Lang RM et al., J Am Soc Echocardiogr 2015;28:1–39.
 * Worked example: 120 and 50 mL → 58.33 %.
 */
export function ejectionFractionFromVolumes(endDiastolicVolume: number, endSystolicVolume: number): number {
  return ((endDiastolicVolume - endSystolicVolume) / endDiastolicVolume) * 100;
}
