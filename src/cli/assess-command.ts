/** `elastimate assess`: flags, then a visit file, then prompts on a terminal. */
import { assess } from '../assessment/assess.js';
import { missingRequired, parseInputs, type RawInputs } from '../assessment/inputs.js';
import { NUMERIC_FIELDS, describeRange } from '../assessment/fields.js';
import { InputError } from '../errors.js';
import { mergeRaw, rawFromOptions } from './measurement-options.js';
import { printAssessment } from './output.js';
import { readVisitFile } from './visit-file.js';

export function canPrompt(opts: Record<string, unknown>): boolean {
  return opts.input !== false && Boolean(process.stdin.isTTY) && Boolean(process.stdout.isTTY);
}

/** Raw inputs from `--input` and flags (flags win). */
export function gatherRaw(opts: Record<string, unknown>, inputFile: string | undefined): RawInputs {
  const fromFile = inputFile ? readVisitFile(inputFile) : {};
  return mergeRaw(fromFile, rawFromOptions(opts));
}

export function missingError(missing: string[]): InputError {
  return new InputError(
    missing.map((flag) => {
      const f = NUMERIC_FIELDS.find((x) => x.flag === flag)!;
      return { field: flag, value: '', reason: 'required (prompts are off: not a terminal, or --no-input)', accepted: `--${flag} <${f.label}, ${describeRange(f)}>` };
    }),
  );
}

/** Complete the raw inputs: prompts when allowed, else one error listing what is missing. */
export async function completeRaw(raw: RawInputs, opts: Record<string, unknown>): Promise<RawInputs> {
  const missing = missingRequired(raw);
  if (missing.length === 0) return raw;
  if (!canPrompt(opts)) throw missingError(missing);
  const { collectInteractively } = await import('./prompts.js');
  return collectInteractively(raw);
}

export async function runAssess(opts: Record<string, unknown>, inputFile: string | undefined): Promise<void> {
  const raw = await completeRaw(gatherRaw(opts, inputFile), opts);
  const inputs = parseInputs(raw);
  const result = assess(inputs);
  await printAssessment(result, { json: opts.json === true, recheck: opts.recheck === true });
}
