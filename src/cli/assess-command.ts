/** `elastimate assess`: flags, then a visit file, then prompts on a terminal. */
import { assess, type Assessment } from '../assessment/assess.js';
import type { UncertaintyReport } from '../assessment/uncertainty.js';
import { missingRequired, parseInputs, type RawInputs } from '../assessment/inputs.js';
import { NUMERIC_FIELDS, describeRange } from '../assessment/fields.js';
import { InputError, type InputProblem } from '../errors.js';
import { mergeRaw, rawFromOptions } from './measurement-options.js';
import { printAssessment } from './output.js';
import { readVisitFile } from './visit-file.js';

export function canPrompt(opts: Record<string, unknown>): boolean {
  return opts.input !== false && Boolean(process.stdin.isTTY) && Boolean(process.stdout.isTTY);
}

/** Raw inputs from `--input` and flags (flags win). */
export function gatherRaw(opts: Record<string, unknown>, inputFile: string | undefined): RawInputs {
  // `--input ""` is a bad path, not an absent option: readVisitFile refuses it.
  const fromFile = inputFile !== undefined ? readVisitFile(inputFile) : {};
  return mergeRaw(fromFile, rawFromOptions(opts));
}

export function missingError(missing: string[], raw?: RawInputs): InputError {
  const problems: InputProblem[] = missing.map((flag) => {
    const f = NUMERIC_FIELDS.find((x) => x.flag === flag)!;
    return { field: flag, value: '', reason: 'required (prompts are off: not a terminal, or --no-input)', accepted: `--${flag} <${f.label}, ${describeRange(f)}>` };
  });
  // Values that were given but are refused belong in the same one message.
  if (raw) {
    try {
      parseInputs(raw);
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      problems.push(...err.problems.filter((p) => !missing.includes(p.field)));
    }
  }
  return new InputError(problems);
}

/** Complete the raw inputs: prompts when allowed, else one error listing what is missing. */
export async function completeRaw(raw: RawInputs, opts: Record<string, unknown>): Promise<RawInputs> {
  const missing = missingRequired(raw);
  if (missing.length === 0) return raw;
  if (!canPrompt(opts)) throw missingError(missing, raw);
  const { collectInteractively } = await import('./prompts.js');
  return collectInteractively(raw);
}

export async function runAssess(opts: Record<string, unknown>, inputFile: string | undefined): Promise<void> {
  const diagrams = opts.svg !== undefined || opts.sketch === true || opts.modelLoop === true ? await import('./diagram-options.js') : null;
  diagrams?.checkModelLoopOption(opts);
  // Files this run reads (a visit file, SR files): an output may never be one of them.
  const inputPaths = [...(inputFile ? [inputFile] : []), ...(Array.isArray(opts.sr) ? opts.sr.map(String) : [])];
  const svgPath = diagrams && opts.svg !== undefined ? diagrams.checkSvgOption(opts.svg, inputPaths) : null;
  const wantsUncertainty = opts.uncertainty === true || opts.draws !== undefined || opts.seed !== undefined;
  const uncertainty = wantsUncertainty ? await import('../assessment/uncertainty.js') : null;
  const draws = uncertainty && opts.draws !== undefined ? uncertainty.parseDraws(opts.draws) : undefined;
  const seed = uncertainty && opts.seed !== undefined ? uncertainty.parseSeed(opts.seed) : undefined;
  const sr = opts.sr !== undefined ? await import('./sr-input.js') : null;
  const imported = sr ? sr.underGiven(await sr.gatherSr(opts), gatherRaw(opts, inputFile)) : null;
  const raw = await completeRaw(imported ? imported.raw : gatherRaw(opts, inputFile), opts);
  const inputSources = sr && imported ? sr.sourceTexts(imported.sources) : undefined;
  const inputs = parseInputs(raw);
  if (!uncertainty && Object.keys(inputs.errors).length > 0) (await import('../assessment/error-model.js')).validateErrorOverrides(inputs.errors);
  const result = assess(inputs);
  const modelLoop = diagrams ? await diagrams.modelLoopOption(opts, result) : undefined;
  if (diagrams && svgPath) await diagrams.writeVisitSvg(result, svgPath, inputPaths, modelLoop);
  if (uncertainty) await printWithUncertainty(result, uncertainty.assessUncertainty(inputs, { draws, seed }, result.choice, result.results), opts, inputSources);
  else await printAssessment(result, { json: opts.json === true, recheck: opts.recheck === true, ...(inputSources ? { inputSources } : {}) });
  if (diagrams && opts.sketch === true) diagrams.printSketch(result, opts.json === true, modelLoop);
}

/** The report with 95 % ranges, variance shares and the method's own error (docs/uncertainty.md). */
async function printWithUncertainty(result: Assessment, report: UncertaintyReport, opts: Record<string, unknown>, inputSources?: Record<string, string>): Promise<void> {
  const view = await import('../render/uncertainty.js');
  if (opts.json === true) {
    const { stringifySafe } = await import('../render/json.js');
    const { toolVersion } = await import('./package-info.js');
    const json = view.assessmentToJsonWithUncertainty(result, report, toolVersion());
    process.stdout.write(stringifySafe(inputSources ? { ...json, inputSources } : json) + '\n');
    return;
  }
  const { terminalStyle } = await import('./output.js');
  process.stdout.write(view.renderTerminalWithUncertainty(result, report, { style: await terminalStyle(), recheck: opts.recheck === true, ...(inputSources ? { inputSources } : {}) }) + '\n');
}
