/** The shapes every view renders: a result is data, never NaN. */
export interface Quantity {
  value: number | null;
  unit: string;
  method?: string;
  reason?: string;
  /** 95 % interval from the Monte Carlo propagation, when it was run. */
  interval95?: [number, number];
}

export type FlagLevel = 'note' | 'caution' | 'attention';
export interface Flag {
  code: string;
  level: FlagLevel;
  message: string;
}

/** Version of the methods that produced a result; bump when any formula or default changes. */
export const METHODS_VERSION = 'elastimate-methods/1';

export function quantity(value: number | null, unit: string, method?: string, reason?: string): Quantity {
  // Each shape written as one literal (value, unit, then method and reason when present): a
  // batch makes millions of these, and a literal is cheaper than adding keys one by one.
  if (value !== null && Number.isFinite(value)) return method ? { value, unit, method } : { value, unit };
  const why = reason ?? (value === null ? 'not computable' : 'not a finite number');
  return method ? { value: null, unit, method, reason: why } : { value: null, unit, reason: why };
}
