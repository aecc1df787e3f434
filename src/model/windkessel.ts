/**
 * The arterial load: a three-element Windkessel (Westerhof N, Elzinga G,
 * Sipkema P, "An artificial arterial system for pumping hearts", J Appl
 * Physiol 1971;31:776–781, from memory; review seen: Westerhof N, Lankhaar
 * JW, Westerhof BE, "The arterial Windkessel", Med Biol Eng Comput
 * 2009;47:131–141).
 * Characteristic impedance Zc in series with peripheral resistance R in
 * parallel with compliance C. With Q the flow out of the ventricle and Pc the
 * pressure across C:
 *
 *   dPc/dt = (Q − Pc/R) / C,     aortic pressure Pao = Pc + Zc·Q
 *
 * (venous pressure taken as 0, as in R = MAP/CO, the review's
 * R ≈ Pao,mean/CO). Units: pressure mmHg, flow mL/s, R and Zc mmHg·s/mL,
 * C mL/mmHg.
 *
 * Starting values from the visit's graph of quantities (crude, refined by the fit):
 *   R = the total peripheral resistance MAP/CO (node `tpr`, in WU =
 *   mmHg·min/L, × 60/1000 to mmHg·s/mL), C = SV/PP (node `compliance`, the
 *   stroke-volume-over-pulse-pressure estimate, known to overestimate C;
 *   method-notes §13, from memory), Zc = 0.05·R (Zc is about 5–10 % of R in
 *   adults; from memory).
 * Worked example: MAP 93.3 mmHg, CO 4.9 L/min → 19.04 WU → R = 1.143
 * mmHg·s/mL; SV 70 mL, PP 40 mmHg → C 1.75 mL/mmHg; Zc 0.057 mmHg·s/mL.
 */

import { woodUnitsToMmHgSecondPerMl } from '../physiology/peripheral-resistance.js';

export interface WindkesselParameters {
  /** peripheral resistance, mmHg·s/mL */
  resistance: number;
  /** total arterial compliance, mL/mmHg */
  compliance: number;
  /** characteristic impedance, mmHg·s/mL */
  characteristicImpedance: number;
}

/** Zc as a fraction of R for the starting guess (5 %, the low end of 5–10 %; from memory). */
export const ZC_FRACTION_START = 0.05;

/** dPc/dt in mmHg/s. */
export function compliancePressureRate(w: WindkesselParameters, compliancePressure: number, inflow: number): number {
  return (inflow - compliancePressure / w.resistance) / w.compliance;
}

/** Starting Windkessel from the peripheral resistance (WU) and the SV/PP compliance (mL/mmHg). */
export function windkesselStart(resistanceWoodUnits: number, compliance: number): WindkesselParameters {
  const resistance = woodUnitsToMmHgSecondPerMl(resistanceWoodUnits);
  return { resistance, compliance, characteristicImpedance: ZC_FRACTION_START * resistance };
}
