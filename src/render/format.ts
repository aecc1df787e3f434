/**
 * The one number formatter. Never prints NaN, Infinity or undefined: a
 * missing value becomes "—" (or the reason, where the caller shows one).
 */
import type { Quantity } from '../assessment/result.js';

/** Significant decimals per unit, so every view rounds the same way. */
const DECIMALS: Record<string, number> = {
  mmHg: 0, mL: 0, '%': 0, bpm: 0, ms: 0, 'L/min': 2, 'L/min/m²': 2, 'm²': 2, WU: 1, 'dyn·s·cm⁻⁵': 0,
  'mL/mmHg': 2, 'mmHg/mL': 2, 'mmHg·m²/mL': 2, '': 3, cm: 1, kg: 0, years: 0, J: 3, 'mmHg·mL': 0,
  '10³ dyn/cm²': 0, 'kdyn/cm²': 0,
};

export function decimalsFor(unit: string): number {
  return DECIMALS[unit] ?? 2;
}

export function formatNumber(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const fixed = value.toFixed(decimals);
  // Avoid "-0" after rounding.
  return /^-0(\.0+)?$/.test(fixed) ? fixed.slice(1) : fixed;
}

export function formatValue(value: number | null | undefined, unit: string, decimals = decimalsFor(unit)): string {
  const n = formatNumber(value, decimals);
  if (n === '—') return n;
  return unit ? `${n} ${unit}` : n;
}

export function formatQuantity(q: Quantity): string {
  if (q.value === null) return `not computable${q.reason ? ` (${q.reason})` : ''}`;
  const base = formatValue(q.value, q.unit);
  if (q.interval95) {
    const d = decimalsFor(q.unit);
    return `${base}  (95% range ${formatNumber(q.interval95[0], d)} to ${formatNumber(q.interval95[1], d)})`;
  }
  return base;
}

/** Pad to a width for aligned columns, counting characters not bytes. */
export function pad(text: string, width: number): string {
  const len = [...text].length;
  return len >= width ? text : text + ' '.repeat(width - len);
}
export function padLeft(text: string, width: number): string {
  const len = [...text].length;
  return len >= width ? text : ' '.repeat(width - len) + text;
}
