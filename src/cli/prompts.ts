/**
 * Interactive collection of missing inputs (first version: asks each missing
 * required field with validation). To be expanded: echo-report order,
 * implied EF, review screen.
 */
import type { RawInputs } from '../assessment/inputs.js';
import { NUMERIC_FIELDS, describeRange } from '../assessment/fields.js';
import { InputError } from '../errors.js';
import { toInternalUnit } from '../units/quantity.js';

export async function collectInteractively(partial: RawInputs): Promise<RawInputs> {
  const { input } = await import('@inquirer/prompts');
  const raw: Record<string, unknown> = { ...partial };
  for (const f of NUMERIC_FIELDS) {
    if (!f.required || raw[f.key] !== undefined) continue;
    raw[f.key] = await input({
      message: `${f.label} (${f.unit}, ${describeRange(f)})`,
      validate: (answer: string) => {
        try {
          const v = toInternalUnit(f.flag, answer, f.kind);
          return v >= f.min && v <= f.max ? true : `outside ${describeRange(f)}`;
        } catch (err) {
          return err instanceof InputError ? err.message : String(err);
        }
      },
    });
  }
  return raw as RawInputs;
}
