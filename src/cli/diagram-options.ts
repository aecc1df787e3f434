/**
 * `assess --svg <file>` and `assess --sketch`: the estimated pressure–volume
 * diagram of the visit as an SVG file (written by io/safe-write.ts) and as a compact
 * text drawing. Loaded only when one of the two options is given.
 */
import type { Assessment } from '../assessment/assess.js';
import { InputError } from '../errors.js';
import { renderPvDiagram, type ModelLoopOverlay } from '../render/pv-diagram.js';
import { screenWidth } from '../render/style.js';
import { renderPvSketch } from '../render/terminal-plot.js';
import { checkOutputPath, writeFileSafely } from '../io/safe-write.js';

/** Check `--svg` before any prompting or computing. */
export function checkSvgOption(raw: unknown, protect: readonly string[] = []): string {
  return checkOutputPath(raw, { option: '--svg', extensions: ['.svg'], inputs: protect });
}

/**
 * `--model-loop`: the simulated loop of the model fitted to the visit, for the
 * diagram (src/model/model-loop.ts, loaded only when asked); it needs a
 * diagram to go on.
 */
export async function modelLoopOption(opts: Record<string, unknown>, a: Assessment): Promise<ModelLoopOverlay | undefined> {
  if (opts.modelLoop !== true) return undefined;
  const { modelLoopOverlay } = await import('../model/model-loop.js');
  return modelLoopOverlay(a);
}

/** `--model-loop` without a diagram: one message, before any work. */
export function checkModelLoopOption(opts: Record<string, unknown>): void {
  if (opts.modelLoop === true && opts.svg === undefined && opts.sketch !== true) {
    throw new InputError({ field: '--model-loop', value: 'true', reason: 'there is no diagram to draw it on', accepted: 'together with --svg <file> or --sketch' });
  }
}

export async function writeVisitSvg(a: Assessment, path: string, inputs: readonly string[] = [], modelLoop?: ModelLoopOverlay): Promise<void> {
  if (!a.mechanics) return;
  const svg = renderPvDiagram([{ label: 'This visit', loop: a.mechanics.loop }], { title: 'Estimated pressure–volume diagram', ...(modelLoop ? { modelLoop } : {}) });
  writeFileSafely(path, svg + '\n', { option: '--svg', inputs });
}

/** The text drawing after the report; with --json it goes to stderr so stdout stays one JSON object. */
export function printSketch(a: Assessment, json: boolean, modelLoop?: ModelLoopOverlay): void {
  if (!a.mechanics) return;
  const stream = json ? process.stderr : process.stdout;
  const text = ['', 'Pressure–volume sketch (estimated)', ...renderPvSketch([{ label: 'this visit', loop: a.mechanics.loop }], { width: screenWidth(stream), ...(modelLoop ? { modelLoop } : {}) }), ''].join('\n');
  (json ? process.stderr : process.stdout).write(text + '\n');
}
