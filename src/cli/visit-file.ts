/**
 * Reading a visit file (`--input visit.json`): a JSON object with the same
 * keys as the flags (camelCase), documented in docs/visit-file.md.
 */
import { InputError, showValue } from '../errors.js';
import { checkRawShape, type RawInputs } from '../assessment/inputs.js';
import { VISIT_FILE, readInputFile, shownPath } from '../io/read-input.js';
import { parseJsonText } from '../io/read-json.js';

export const VISIT_FORMAT = 'elastimate-visit';

/** Read and check a visit file (`-` for standard input): the one input reader and the one JSON reader. */
export function readVisitFile(path: string): RawInputs {
  const text = readInputFile(path, VISIT_FILE).toString('utf8');
  const data = parseJsonText(text, {
    field: VISIT_FILE.field,
    value: shownPath(path),
    accepted: 'a visit file in JSON (see docs/visit-file.md)',
  });
  if (typeof data !== 'object' || data === null || Array.isArray(data)) {
    throw new InputError({ field: 'input', value: shownPath(path), reason: 'not a JSON object', accepted: 'a JSON object of measurement keys (see docs/visit-file.md)' });
  }
  const { format, schemaVersion, ...rest } = data as Record<string, unknown>;
  if (format !== undefined && format !== VISIT_FORMAT) {
    throw new InputError({ field: 'format', value: showValue(format), accepted: `"${VISIT_FORMAT}" or absent` });
  }
  if (schemaVersion !== undefined && schemaVersion !== 1) {
    throw new InputError({ field: 'schemaVersion', value: showValue(schemaVersion), accepted: '1 or absent' });
  }
  return checkRawShape(rest, 'input');
}
