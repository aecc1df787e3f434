/**
 * `assess --svg <file>` and `assess --sketch`: the estimated pressure–volume
 * diagram of the visit as an SVG file (written by io/safe-write.ts) and as a compact
 * text drawing. Loaded only when one of the two options is given.
 */
import type { Assessment } from '../assessment/assess.js';
import { renderPvDiagram } from '../render/pv-diagram.js';
import { screenWidth } from '../render/style.js';
import { renderPvSketch } from '../render/terminal-plot.js';
import { checkOutputPath, writeFileSafely } from '../io/safe-write.js';

/** Check `--svg` before any prompting or computing. */
export function checkSvgOption(raw: unknown, protect: readonly string[] = []): string {
  return checkOutputPath(raw, { option: '--svg', extensions: ['.svg'], inputs: protect });
}

export async function writeVisitSvg(a: Assessment, path: string, inputs: readonly string[] = []): Promise<void> {
  if (!a.mechanics) return;
  const svg = renderPvDiagram([{ label: 'This visit', loop: a.mechanics.loop }], { title: 'Estimated pressure–volume diagram' });
  writeFileSafely(path, svg + '\n', { option: '--svg', inputs });
}

/** The text drawing after the report; with --json it goes to stderr so stdout stays one JSON object. */
export function printSketch(a: Assessment, json: boolean): void {
  if (!a.mechanics) return;
  const stream = json ? process.stderr : process.stdout;
  const text = ['', 'Pressure–volume sketch (estimated)', ...renderPvSketch([{ label: 'this visit', loop: a.mechanics.loop }], { width: screenWidth(stream) }), ''].join('\n');
  (json ? process.stderr : process.stdout).write(text + '\n');
}
