/**
 * Cardiac output: CO = SV × HR / 1000  (mL × beats/min → L/min). Common practice.
 * Worked example: 70 mL at 60 bpm → 4.2 L/min.
 */
export function cardiacOutput(strokeVolume: number, heartRate: number): number {
  return (strokeVolume * heartRate) / 1000;
}

/**
 * Cardiac index: CI = CO / BSA  (L/min/m²). Common practice.
 * Worked example: 4.2 L/min, 2.0 m² → 2.1 L/min/m².
 */
export function cardiacIndex(cardiacOutputLPerMin: number, bodySurfaceArea: number): number {
  return cardiacOutputLPerMin / bodySurfaceArea;
}
