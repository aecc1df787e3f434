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
  return gatherRawWithOverrides(opts, inputFile).raw;
}

function shownRaw(value: unknown): string {
  return Array.isArray(value) ? value.map(String).join(', ') : String(value);
}

/**
 * Raw inputs from `--input` and flags, and the inputs where a flag overrode a
 * different value in the visit file, worded for the report:
 * "from --hr; the visit file had 68".
 */
export function gatherRawWithOverrides(opts: Record<string, unknown>, inputFile: string | undefined): { raw: RawInputs; overrides: Record<string, string> } {
  // `--input ""` is a bad path, not an absent option: readVisitFile refuses it.
  const fromFile: RawInputs = inputFile !== undefined ? readVisitFile(inputFile) : {};
  const fromFlags = rawFromOptions(opts);
  const overrides: Record<string, string> = {};
  for (const [key, value] of Object.entries(fromFlags)) {
    const before = (fromFile as Record<string, unknown>)[key];
    if (value === undefined || before === undefined || key === 'errors' || shownRaw(before) === shownRaw(value)) continue;
    const flag = NUMERIC_FIELDS.find((f) => f.key === key)?.flag ?? key.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`);
    overrides[key] = `from --${flag}; the visit file had ${shownRaw(before)}`;
  }
  return { raw: mergeRaw(fromFile, fromFlags), overrides };
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
  const gathered = gatherRawWithOverrides(opts, inputFile);
  const imported = sr ? sr.underGiven(await sr.gatherSr(opts), gathered.raw) : null;
  const raw = await completeRaw(imported ? imported.raw : gathered.raw, opts);
  // Where inputs came from when not simply typed: an SR import, or a flag that overrode the visit file.
  const sources: Record<string, string> = { ...(sr && imported ? sr.sourceTexts(imported.sources) : {}), ...gathered.overrides };
  const inputSources = Object.keys(sources).length > 0 ? sources : undefined;
  const inputs = parseInputs(raw);
  if (!uncertainty && Object.keys(inputs.errors).length > 0) (await import('../assessment/error-model.js')).validateErrorOverrides(inputs.errors);
  const result = assess(inputs);
  const modelLoop = diagrams ? await diagrams.modelLoopOption(opts, result) : undefined;
  if (diagrams && svgPath) await diagrams.writeVisitSvg(result, svgPath, inputPaths, modelLoop);
  if (uncertainty) await printWithUncertainty(result, uncertainty.assessUncertainty(inputs, { draws, seed }, result.choice, result.results), opts, inputSources);
  else await printAssessment(result, { json: opts.json === true, recheck: opts.recheck === true, ...(inputSources ? { inputSources } : {}) });
  if (diagrams && opts.sketch === true) diagrams.printSketch(result, opts.json === true, modelLoop);
}

/** The report with 95 % intervals, variance shares and the method's own error (docs/uncertainty.md). */
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
