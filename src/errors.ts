/**
 * The one error type for bad input. Every message names the field, the value
 * as given and what is accepted; the CLI prints it without a stack trace and
 * exits with code 2.
 */
export class InputError extends Error {
  readonly field: string;
  readonly value: string;
  readonly accepted: string;
  readonly problems: readonly InputProblem[];

  constructor(problems: InputProblem | readonly InputProblem[]) {
    const list = Array.isArray(problems) ? problems : [problems as InputProblem];
    super(list.map(describeProblem).join('\n'));
    this.name = 'InputError';
    this.problems = list;
    const first = list[0] ?? { field: 'input', value: '', accepted: '' };
    this.field = first.field;
    this.value = first.value;
    this.accepted = first.accepted;
  }
}

export interface InputProblem {
  /** The field as the user knows it, e.g. `sbp` or `visit file`. */
  field: string;
  /** The value as given, quoted for display; '' when the value is missing. */
  value: string;
  /** What would have been accepted. */
  accepted: string;
  /** Optional short reason placed before the accepted part. */
  reason?: string;
}

export function describeProblem(p: InputProblem): string {
  const shown = p.value === '' ? 'missing' : `got ${p.value}`;
  const why = p.reason ? `${p.reason}; ` : '';
  return `${p.field}: ${shown}; ${why}accepted: ${p.accepted}`;
}

/** Render any value for an error message without ever printing "undefined". */
export function showValue(v: unknown): string {
  if (v === undefined || v === null) return '';
  if (typeof v === 'string') return JSON.stringify(v);
  // A non-finite number never reaches the user as NaN or Infinity, not even in an error message
  // (a JSON file may hold 1e400, which parses as Infinity): it is described in words.
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : Number.isNaN(v) ? 'not a number' : 'a number too large to represent';
  try {
    return JSON.stringify(v) ?? String(v);
  } catch {
    return String(v);
  }
}
