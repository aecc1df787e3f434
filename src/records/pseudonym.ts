/**
 * Subject ids must be pseudonymous. These checks catch the common slips (a
 * personal name, a date of birth) and produce warnings, never refusals: an
 * id is the researcher's key and only they know what it encodes. Pure.
 */

/** Two or more words of letters, e.g. "Maria Keller", "keller, maria", "J. Smith". */
const NAME_LIKE = /^\p{L}[\p{L}'’.-]*(?:[\s,]+\p{L}[\p{L}'’.-]*)+$/u;
/** One capitalised word followed by another, anywhere: "patient Anna Berg 3". */
const CAPITALISED_PAIR = /\p{Lu}\p{Ll}+[\s,]+\p{Lu}\p{Ll}+/u;

/** Full dates in the usual orders: 1978-04-12, 19780412, 12.04.1978, 12/04/78, 04-12-1978. */
const DATE_PATTERNS: readonly RegExp[] = [
  /(?:^|\D)(?:19|20)\d{2}[-./ ]?(?:0[1-9]|1[0-2])[-./ ]?(?:0[1-9]|[12]\d|3[01])(?:\D|$)/,
  /(?:^|\D)(?:0?[1-9]|[12]\d|3[01])[-./ ](?:0?[1-9]|1[0-2])[-./ ](?:\d{2}|(?:19|20)\d{2})(?:\D|$)/,
  /(?:^|\D)(?:0?[1-9]|1[0-2])[-./ ](?:0?[1-9]|[12]\d|3[01])[-./ ](?:19|20)\d{2}(?:\D|$)/,
];

/** Warnings for an id that may identify a person; empty when it looks pseudonymous. */
export function pseudonymWarnings(id: string): string[] {
  const warnings: string[] = [];
  const text = id.trim();
  if (NAME_LIKE.test(text) || CAPITALISED_PAIR.test(text)) {
    warnings.push(`subject id "${id}" looks like a personal name; use a pseudonymous code such as CO-203 and keep the key to it elsewhere`);
  }
  if (DATE_PATTERNS.some((re) => re.test(text))) {
    warnings.push(`subject id "${id}" contains what looks like a full date (a date of birth?); use a pseudonymous code such as CO-203`);
  }
  return warnings;
}
