/**
 * Body surface area, Mosteller: BSA = √(height cm × weight kg / 3600)  (m²).
 * Mosteller RD, N Engl J Med 1987;317:1098.
 * Worked example: 180 cm, 80 kg → 2.00 m².
 */
export function bodySurfaceAreaMosteller(heightCm: number, weightKg: number): number {
  return Math.sqrt((heightCm * weightKg) / 3600);
}

/**
 * Body surface area, DuBois: BSA = 0.007184 × W^0.425 × H^0.725  (kg, cm → m²).
 * DuBois D, DuBois EF, Arch Intern Med 1916;17:863.
 * Worked example: 180 cm, 80 kg → 1.996 m².
 */
export function bodySurfaceAreaDuBois(heightCm: number, weightKg: number): number {
  return 0.007184 * weightKg ** 0.425 * heightCm ** 0.725;
}
