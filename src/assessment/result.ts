/** The shapes every view renders: a result is data, never NaN. */
export interface Quantity {
  value: number | null;
  unit: string;
  method?: string;
  reason?: string;
  ci95?: [number, number];
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
  const q: Quantity = { value: value !== null && Number.isFinite(value) ? value : null, unit };
  if (method) q.method = method;
  if (q.value === null) q.reason = reason ?? (value === null ? 'not computable' : 'not a finite number');
  return q;
}
