/**
 * Quantities at the boundary. A value may arrive as a bare number (taken in the
 * field's default unit) or as text with a unit ("16.5kPa", "0.14 L", "0.3s").
 * Bare numbers never touch mathjs; text with a unit loads mathjs's single-file
 * bundle on first use (about 0.05 s) rather than its module tree (about 0.6 s).
 */
import { InputError, showValue } from '../errors.js';
import { commonUnitFactor } from './common-units.js';
import { loadMathjs } from './mathjs-loader.js';

export type QuantityKind = 'pressure' | 'volume' | 'time' | 'rate' | 'percent' | 'length' | 'excursion' | 'velocity' | 'mass' | 'ratio';

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
  // Annular excursion (TAPSE) is reported in millimetres.
  excursion: { unit: 'mm', examples: 'mm (default), cm' },
  velocity: { unit: 'm/s', examples: 'm/s (default), cm/s' },
  mass: { unit: 'kg', examples: 'kg (default), g, lb' },
  ratio: { unit: '', examples: 'a plain number' },
};

/** Powers of ten, each exact as a double. */
const POW10 = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15];

/**
 * The value of a bare decimal number, NaN for any other text. Bare numbers are
 * what the pattern /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/ matches ("120",
 * "-0.5", ".5", "5.", "1e3"); the value is Number(text). This runs for every
 * number cell of a batch, so the text is read once, character by character:
 * with at most 15 digits and no exponent, the digits as a whole number m and
 * the k digits after the point give m / 10^k, one correctly rounded division
 * of two exact doubles, which is Number(text) exactly (Clinger's fast path);
 * anything longer goes to Number itself. With `start` and `end`, the text
 * read is text.slice(start, end), without making that string.
 */
export function bareNumber(text: string, start = 0, end = text.length): number {
  const n = end;
  let i = start;
  let c = i < n ? text.charCodeAt(i) : 0;
  const negative = c === 45;
  if (c === 43 || c === 45) c = ++i < n ? text.charCodeAt(i) : 0; // + or -
  let digits = 0;
  let decimals = 0;
  let m = 0;
  while (c >= 48 && c <= 57) {
    m = m * 10 + (c - 48);
    digits++;
    c = ++i < n ? text.charCodeAt(i) : 0;
  }
  if (c === 46) {
    // a decimal point, then digits
    c = ++i < n ? text.charCodeAt(i) : 0;
    while (c >= 48 && c <= 57) {
      m = m * 10 + (c - 48);
      digits++;
      decimals++;
      c = ++i < n ? text.charCodeAt(i) : 0;
    }
  }
  if (digits === 0) return NaN;
  if (c === 101 || c === 69) {
    // e or E, an optional sign, then at least one digit
    c = ++i < n ? text.charCodeAt(i) : 0;
    if (c === 43 || c === 45) c = ++i < n ? text.charCodeAt(i) : 0;
    const exponent = i;
    while (c >= 48 && c <= 57) c = ++i < n ? text.charCodeAt(i) : 0;
    return i === exponent || i !== n ? NaN : Number(start === 0 && n === text.length ? text : text.slice(start, n));
  }
  if (i !== n) return NaN;
  if (digits > 15) return Number(start === 0 && n === text.length ? text : text.slice(start, n));
  const value = decimals === 0 ? m : m / POW10[decimals]!;
  return negative ? -value : value;
}

interface MathUnit {
  equalBase(other: MathUnit): boolean;
  toNumber(unit: string): number;
}
interface MathBundle {
  unit(text: string): MathUnit;
}

let bundle: MathBundle | undefined;
/** Whether mathjs has been loaded in this process (a test checks the common units never load it). */
export function mathjsLoaded(): boolean {
  return bundle !== undefined;
}
/** mathjs, loaded once and only when a value carries a unit outside the common-units table. */
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
    const value = bareNumber(raw.trim());
    if (value === value) return value; // not NaN: a bare number
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
    const value = m && m[1] !== undefined ? bareNumber(m[1].trim()) : NaN;
    if (value === value) return value;
    throw new InputError({ field, value: showValue(raw), accepted });
  }
  if (kind === 'ratio') throw new InputError({ field, value: showValue(raw), accepted });
  // A unit alone ("Hz", "dL") would read as one of that unit: a number must come first.
  if (!/^[+-]?(\d|\.\d)/.test(text)) {
    throw new InputError({ field, value: showValue(raw), reason: 'a number must come before the unit', accepted });
  }

  // The trade's common units (src/units/common-units.ts): a table, not mathjs.
  const common = /^([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(\S(?:.*\S)?)$/.exec(text);
  if (common) {
    const factor = commonUnitFactor(common[2]!, kind);
    if (factor !== undefined) return roundedConversion(bareNumber(common[1]!) * factor, field, raw, accepted);
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
  return roundedConversion(unit.toNumber(target), field, raw, accepted);
}

/**
 * A converted value, rounded to twelve significant digits. Unit conversion leaves binary noise
 * ("230 cm" → 230.00000000000003 cm), which would push a value typed at the edge of its range
 * outside it; twelve digits are far beyond any measurement's precision, and they make the table's
 * product and mathjs's conversion the same number. Bare numbers never get here, so they are never
 * rounded.
 */
function roundedConversion(converted: number, field: string, raw: unknown, accepted: string): number {
  const value = Number(converted.toPrecision(12));
  if (!Number.isFinite(value)) throw new InputError({ field, value: showValue(raw), accepted });
  return value;
}

/**
 * A measured value in one unit, in another unit of the same dimension (mathjs
 * spellings, e.g. "mm" → "cm", "L" → "mL", "s" → "ms", "cm/s" → "m/s",
 * "min^-1" → "min^-1"); null when the units are unknown to mathjs or of
 * different dimensions. Rounded to twelve significant digits, as toInternalUnit
 * rounds. Used for values that arrive with a coded unit (DICOM SR import).
 */
export function convertMeasured(value: number, from: string, to: string): number | null {
  if (!Number.isFinite(value)) return null;
  if (from === to) return value;
  const math = mathjs();
  let unit: MathUnit;
  let target: MathUnit;
  try {
    unit = math.unit(`${value} ${from}`);
    target = math.unit(`1 ${to}`);
  } catch {
    return null;
  }
  if (!unit.equalBase(target)) return null;
  const converted = Number(unit.toNumber(to).toPrecision(12));
  return Number.isFinite(converted) ? converted : null;
}
