/**
 * A formula's answer: a finite number, or null with the reason it cannot be
 * computed. Formulas never return NaN or Infinity and never throw for
 * physiological edge cases.
 */
export type Outcome = { value: number; reason?: undefined } | { value: null; reason: string };

export function computed(value: number, guard = 'the result is not a finite number'): Outcome {
  return Number.isFinite(value) ? { value } : { value: null, reason: guard };
}

export function notComputable(reason: string): Outcome {
  return { value: null, reason };
}
