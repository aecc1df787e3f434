/**
 * Reading a visit file (`--input visit.json`): a JSON object with the same
 * keys as the flags (camelCase), documented in docs/visit-file.md.
 */
import { readFileSync } from 'node:fs';
import { InputError, showValue } from '../errors.js';
import { checkRawShape, type RawInputs } from '../assessment/inputs.js';

export const VISIT_FORMAT = 'elastimate-visit';

export function readVisitFile(path: string): RawInputs {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'file not found' : code === 'EISDIR' ? 'is a folder' : 'cannot be read';
    throw new InputError({ field: 'input', value: showValue(path), reason, accepted: 'a readable visit file in JSON (see docs/visit-file.md)' });
  }
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (err) {
    throw new InputError({ field: 'input', value: showValue(path), reason: `not valid JSON (${(err as Error).message})`, accepted: 'a visit file in JSON (see docs/visit-file.md)' });
  }
  if (typeof data !== 'object' || data === null || Array.isArray(data)) {
    throw new InputError({ field: 'input', value: showValue(path), reason: 'not a JSON object', accepted: 'a JSON object of measurement keys (see docs/visit-file.md)' });
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
