/**
 * Volumetric stroke volume: SV = EDV − ESV (mL).
 * Volumes by the biplane method of disks: Lang RM et al., J Am Soc Echocardiogr 2015;28:1–39.
 * Worked example: 120 − 50 → 70 mL.
 */
export function strokeVolumeFromVolumes(endDiastolicVolume: number, endSystolicVolume: number): number {
  return endDiastolicVolume - endSystolicVolume;
}

/**
 * Doppler stroke volume: SV = LVOT VTI × π × (LVOT diameter / 2)²  (cm × cm² = mL).
 * Common practice (continuity principle; circular outflow tract assumed).
 * Worked example: diameter 2.0 cm, VTI 20 cm → 62.83 mL.
 */
export function strokeVolumeDoppler(outflowDiameterCm: number, velocityTimeIntegralCm: number): number {
  return velocityTimeIntegralCm * Math.PI * (outflowDiameterCm / 2) ** 2;
}
