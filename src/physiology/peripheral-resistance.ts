/**
 * Total peripheral resistance: TPR = MAP / CO  (mmHg / (L/min) = Wood units).
 * Right-atrial pressure is neglected, as is usual when it is not measured (common practice).
 * Worked example: MAP 93.33 mmHg, CO 4.2 L/min → 22.22 WU.
 */
export function totalPeripheralResistance(meanPressure: number, cardiacOutputLPerMin: number): number {
  return meanPressure / cardiacOutputLPerMin;
}

/**
 * Wood units to dyn·s·cm⁻⁵: × 79.9 (1 mmHg = 1333.22 dyn/cm², 1 L/min = 1000/60 cm³/s),
 * usually rounded to 80 (common practice). We use the exact factor 1333.22 × 60 / 1000.
 * Worked example: 1 WU → 79.99 dyn·s·cm⁻⁵.
 */
export const WOOD_TO_DYN = (1333.224 * 60) / 1000;
export function woodUnitsToDyn(woodUnits: number): number {
  return woodUnits * WOOD_TO_DYN;
}

/**
 * Wood units (mmHg·min/L) to mmHg·s/mL: × 60/1000 (60 s per min, 1000 mL per L; common practice).
 * Worked example: 22.22 WU → 1.3333 mmHg·s/mL.
 */
export function woodUnitsToMmHgSecondPerMl(woodUnits: number): number {
  return (woodUnits * 60) / 1000;
}
