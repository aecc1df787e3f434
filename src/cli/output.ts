/** Writing results: JSON or the terminal report, with colour only on a terminal. */
import type { Assessment } from '../assessment/assess.js';
import { assessmentToJson, stringifySafe } from '../render/json.js';
import { colourStyle, plainStyle, wantsColour, type Style } from '../render/style.js';
import { renderTerminal, type TerminalOptions } from '../render/terminal.js';
import { toolVersion } from './package-info.js';

export async function terminalStyle(stream: { isTTY?: boolean } = process.stdout): Promise<Style> {
  return wantsColour(stream, process.env) ? colourStyle() : plainStyle;
}

export async function printAssessment(a: Assessment, opts: { json?: boolean } & TerminalOptions): Promise<void> {
  if (opts.json) {
    const json = assessmentToJson(a, toolVersion());
    // Where each input came from, when some came from a DICOM SR (docs/sr-import.md).
    process.stdout.write(stringifySafe(opts.inputSources ? { ...json, inputSources: opts.inputSources } : json) + '\n');
    return;
  }
  const style = opts.style ?? (await terminalStyle());
  process.stdout.write(renderTerminal(a, { ...opts, style }) + '\n');
}
