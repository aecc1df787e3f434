/**
 * Ventricular energetics in the time-varying elastance model.
 *
 * The pressure–volume area (PVA) of one beat is the external stroke work (SW)
 * plus the elastic potential energy (PE) left in the ventricle at end-systole;
 * PVA is linear in myocardial oxygen use (Suga H, Physiol Rev 1990;70:247).
 * With a linear end-systolic pressure–volume line through V0 (slope Ees) and
 * Ea = Pes / SV, the model predicts stroke work greatest at Ea = Ees and
 * mechanical efficiency SW/PVA rising as Ea/Ees falls (Burkhoff D, Sagawa K,
 * "Ventricular efficiency predicted by an analytical model", Am J Physiol
 * 1986;250:R1021). In hearts the optima are broad and sit somewhat lower
 * (SW at Ea/Ees ≈ 0.8: De Tombe PP et al., Am J Physiol 1993;264:H1817), so
 * these are model values, not measurements.
 *
 * Internal units: pressure mmHg, volume mL, elastance mmHg/mL, work mmHg·mL.
 */
import { computed, notComputable, type Outcome } from './outcome.js';

/**
 * Stroke work, rectangular approximation of the pressure–volume loop:
 * SW ≈ Pes × SV  (mmHg × mL = mmHg·mL).
 * Source: elastance-model energetics (Suga; Burkhoff & Sagawa 1986), where the
 * loop is taken as a rectangle of height Pes and width SV.
 * Worked example: Pes 108 mmHg, SV 70 mL → 7560 mmHg·mL (≈ 1.008 J).
 */
export function strokeWork(endSystolicPressure: number, strokeVolume: number): number {
  return endSystolicPressure * strokeVolume;
}

/**
 * Elastic potential energy at end-systole: the triangle under the end-systolic
 * pressure–volume line between V0 and ESV,
 * PE = Pes × (ESV − V0) / 2  (mmHg·mL).
 * Source: Suga H, Physiol Rev 1990;70:247 (PVA = SW + PE); the triangle form is
 * derived from the linear elastance model (Pes = Ees·(ESV − V0), so PE = Pes²/(2·Ees)).
 * Not computable when ESV ≤ V0 (the end-systolic point would sit at or left of
 * the volume intercept, outside the model).
 * Worked example: Pes 108 mmHg, ESV 50 mL, V0 −20.78 mL → 3822 mmHg·mL.
 */
export function potentialEnergy(endSystolicPressure: number, endSystolicVolume: number, volumeIntercept: number): Outcome {
  const span = endSystolicVolume - volumeIntercept;
  if (!(span > 0)) {
    return notComputable(`ESV ${endSystolicVolume.toFixed(0)} mL is not above V0 ${volumeIntercept.toFixed(0)} mL, so the elastic potential energy is not defined`);
  }
  return computed((endSystolicPressure * span) / 2);
}

/**
 * Pressure–volume area: PVA = SW + PE  (mmHg·mL).
 * Suga H, Physiol Rev 1990;70:247.
 * Worked example: SW 7560 mmHg·mL, PE 3822 mmHg·mL → 11382 mmHg·mL.
 */
export function pressureVolumeArea(strokeWorkMmHgMl: number, potentialEnergyMmHgMl: number): number {
  return strokeWorkMmHgMl + potentialEnergyMmHgMl;
}

/**
 * Mechanical efficiency of the beat: SW / PVA  (dimensionless, 0–1).
 * Burkhoff & Sagawa, Am J Physiol 1986;250:R1021; Suga 1990.
 * Not computable when PVA ≤ 0.
 * Worked example: SW 7560, PVA 11382 mmHg·mL → 0.6642.
 */
export function mechanicalEfficiency(strokeWorkMmHgMl: number, pressureVolumeAreaMmHgMl: number): Outcome {
  if (!(pressureVolumeAreaMmHgMl > 0)) {
    return notComputable(`PVA ${pressureVolumeAreaMmHgMl.toFixed(0)} mmHg·mL is not positive, so SW/PVA is not defined`);
  }
  return computed(strokeWorkMmHgMl / pressureVolumeAreaMmHgMl);
}

/**
 * The same efficiency from the elastances alone, in the linear model:
 * SW / PVA = 1 / (1 + Ea / (2·Ees))  (dimensionless).
 * Derived (linear elastance model; Burkhoff & Sagawa 1986): SW = Pes²/Ea and
 * PE = Pes²/(2·Ees), so SW/PVA = (1/Ea) / (1/Ea + 1/(2·Ees)).
 * Not computable when Ees ≤ 0 or Ea < 0.
 * Worked example: Ea 1.5429, Ees 1.5258 mmHg/mL → 0.6642.
 */
export function mechanicalEfficiencyFromElastances(arterialElastance: number, endSystolicElastance: number): Outcome {
  if (!(endSystolicElastance > 0)) {
    return notComputable(`Ees ${endSystolicElastance.toFixed(2)} mmHg/mL is not positive`);
  }
  if (!(arterialElastance >= 0)) {
    return notComputable(`Ea ${arterialElastance.toFixed(2)} mmHg/mL is negative`);
  }
  return computed(1 / (1 + arterialElastance / (2 * endSystolicElastance)));
}

/**
 * Joules per mmHg·mL: 1 mmHg = 133.322 Pa (101325/760), 1 mL = 10⁻⁶ m³, so
 * 1 mmHg·mL = 1.33322 × 10⁻⁴ J (exact arithmetic on the unit definitions).
 */
export const JOULES_PER_MMHG_ML = (101325 / 760) * 1e-6;

/**
 * Work in mmHg·mL to joules: E(J) = E(mmHg·mL) × 1.33322 × 10⁻⁴.
 * Worked example: 7560 mmHg·mL → 1.0079 J.
 */
export function mmHgMlToJoules(workMmHgMl: number): number {
  return workMmHgMl * JOULES_PER_MMHG_ML;
}

/**
 * Stroke work as a function of the arterial load for a fixed ventricle, in the
 * elastance model (linear ESPVR through V0, fixed EDV, Ea = Pes / SV):
 *   Pes = Ees·Ea / (Ea + Ees) × (EDV − V0)      (mmHg)
 *   SV  = Ees / (Ea + Ees) × (EDV − V0)         (mL)
 *   SW  = Pes × SV = Ees²·Ea / (Ea + Ees)² × (EDV − V0)²   (mmHg·mL)
 * dSW/dEa = 0 at Ea = Ees, where SW = Ees·(EDV − V0)²/4: the matched-load
 * optimum of Burkhoff D, Sagawa K, Am J Physiol 1986;250:R1021.
 * Not computable when Ees ≤ 0, Ea < 0 or EDV ≤ V0.
 * Worked example: Ees 2, Ea 2 mmHg/mL, EDV 120 mL, V0 0 → Pes 120 mmHg,
 * SV 60 mL, SW 7200 mmHg·mL; at Ea 1 or Ea 4 it is 6400 mmHg·mL.
 */
export function strokeWorkInElastanceModel(
  arterialElastance: number,
  endSystolicElastance: number,
  endDiastolicVolume: number,
  volumeIntercept: number,
): Outcome {
  if (!(endSystolicElastance > 0)) {
    return notComputable(`Ees ${endSystolicElastance.toFixed(2)} mmHg/mL is not positive`);
  }
  if (!(arterialElastance >= 0)) {
    return notComputable(`Ea ${arterialElastance.toFixed(2)} mmHg/mL is negative`);
  }
  const filling = endDiastolicVolume - volumeIntercept;
  if (!(filling > 0)) {
    return notComputable(`EDV ${endDiastolicVolume.toFixed(0)} mL is not above V0 ${volumeIntercept.toFixed(0)} mL`);
  }
  const total = arterialElastance + endSystolicElastance;
  const pressure = ((endSystolicElastance * arterialElastance) / total) * filling;
  const volume = (endSystolicElastance / total) * filling;
  return computed(pressure * volume);
}
