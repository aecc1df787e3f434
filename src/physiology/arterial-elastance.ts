import { woodUnitsToMmHgSecondPerMl } from './peripheral-resistance.js';

/**
 * Effective arterial elastance: Ea = Pes / SV  (mmHg / mL).
 * Sunagawa K et al., Am J Physiol 1983;245:H773; Kelly RP et al., Circulation 1992;86:513.
 * Worked example: Pes 108 mmHg, SV 70 mL → 1.543 mmHg/mL.
 */
export function arterialElastance(endSystolicPressure: number, strokeVolume: number): number {
  return endSystolicPressure / strokeVolume;
}

/**
 * The resistance-and-heart-rate view of the same load: Ea ≈ R / T = TPR × HR / 60,
 * with TPR in mmHg·s/mL (Wood units × 60 / 1000) and HR in beats/min.
 * Sunagawa 1983; Kelly 1992. The gap to Pes/SV is the pulsatile part of the load.
 * Worked example: 22.22 WU (1.3333 mmHg·s/mL) at 60 bpm → 1.333 mmHg/mL.
 */
export function arterialElastanceFromResistance(resistanceWoodUnits: number, heartRate: number): number {
  return (woodUnitsToMmHgSecondPerMl(resistanceWoodUnits) * heartRate) / 60;
}

/**
 * Indexed to body size: EaI = Pes / SVI = Ea × BSA  (mmHg·m²/mL). Common practice.
 */
export function indexedToBodySurface(elastance: number, bodySurfaceArea: number): number {
  return elastance * bodySurfaceArea;
}
