/**
 * Quantities at the boundary. A value may arrive as a bare number (taken in the
 * field's default unit) or as text with a unit ("16.5kPa", "0.14 L", "0.3s").
 * Bare numbers never touch mathjs; text with a unit loads mathjs's single-file
 * bundle on first use (about 0.05 s) rather than its module tree (about 0.6 s).
 */
import { InputError, showValue } from '../errors.js';
import { loadMathjs } from './mathjs-loader.js';

export type QuantityKind = 'pressure' | 'volume' | 'time' | 'rate' | 'percent' | 'length' | 'mass' | 'ratio';

interface KindInfo {
  /** Internal unit, as mathjs spells it (or our own for rate and percent). */
  unit: string;
  /** Words for error messages. */
  examples: string;
}

export const KINDS: Record<QuantityKind, KindInfo> = {
  pressure: { unit: 'mmHg', examples: 'mmHg (default), kPa, Pa' },
  volume: { unit: 'mL', examples: 'mL (default), L, cm^3' },
  time: { unit: 'ms', examples: 'ms (default), s' },
  rate: { unit: 'bpm', examples: 'bpm (default), /min, Hz' },
  percent: { unit: '%', examples: '% (default)' },
  length: { unit: 'cm', examples: 'cm (default), mm, m, inch' },
  mass: { unit: 'kg', examples: 'kg (default), g, lb' },
  ratio: { unit: '', examples: 'a plain number' },
};

const BARE_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

interface MathUnit {
  equalBase(other: MathUnit): boolean;
  toNumber(unit: string): number;
}
interface MathBundle {
  unit(text: string): MathUnit;
}

let bundle: MathBundle | undefined;
/** mathjs, loaded once and only when a value carries a unit. */
export function mathjs(): MathBundle {
  if (!bundle) {
    bundle = loadMathjs<MathBundle>();
  }
  return bundle;
}

/**
 * Convert a value as entered into the internal unit of its kind.
 * Throws InputError naming the field for non-numbers, non-finite values,
 * unknown units and units of the wrong kind.
 */
export function toInternalUnit(field: string, raw: unknown, kind: QuantityKind): number {
  // Fast path (every cell of a batch): a bare number, taken in the default unit.
  if (typeof raw === 'number') {
    if (Number.isFinite(raw)) return raw;
  } else if (typeof raw === 'string') {
    const text = raw.trim();
    if (BARE_NUMBER.test(text)) return Number(text);
  }
  return withUnit(field, raw, kind);
}

/** toInternalUnit for everything but a bare number: text with a unit, or a refusal naming the field. */
function withUnit(field: string, raw: unknown, kind: QuantityKind): number {
  const info = KINDS[kind];
  const accepted = `a finite number, optionally with a unit: ${info.examples}`;
  if (typeof raw === 'number' || typeof raw !== 'string') throw new InputError({ field, value: showValue(raw), accepted });
  const text = raw.trim();
  if (text === '') throw new InputError({ field, value: '', accepted });

  if (kind === 'percent') {
    const m = /^(.*?)\s*%$/.exec(text);
    if (m && m[1] !== undefined && BARE_NUMBER.test(m[1].trim())) return Number(m[1].trim());
    throw new InputError({ field, value: showValue(raw), accepted });
  }
  if (kind === 'ratio') throw new InputError({ field, value: showValue(raw), accepted });
  // A unit alone ("Hz", "dL") would read as one of that unit: a number must come first.
  if (!/^[+-]?(\d|\.\d)/.test(text)) {
    throw new InputError({ field, value: showValue(raw), reason: 'a number must come before the unit', accepted });
  }

  // Heart rate: "bpm" and "/min" are the trade's spellings; mathjs writes a count per minute as min^-1.
  const normalised = kind === 'rate' ? text.replace(/\s*(bpm|\/\s*min)$/i, ' min^-1') : text;
  const math = mathjs();
  let unit: MathUnit;
  try {
    unit = math.unit(normalised);
  } catch {
    throw new InputError({ field, value: showValue(raw), reason: 'unknown number or unit', accepted });
  }
  const target = kind === 'rate' ? 'min^-1' : info.unit;
  if (!unit.equalBase(math.unit(`1 ${target}`))) {
    throw new InputError({ field, value: showValue(raw), reason: `not a ${kind} unit`, accepted });
  }
  // Unit conversion leaves binary noise ("230 cm" → 230.00000000000003 cm), which would push a
  // value typed at the edge of its range outside it; twelve significant digits are far beyond any
  // measurement's precision. Bare numbers never get here, so they are never rounded.
  const value = Number(unit.toNumber(target).toPrecision(12));
  if (!Number.isFinite(value)) throw new InputError({ field, value: showValue(raw), accepted });
  return value;
}
