/** `elastimate demo` (what `npm start` runs): an invented subject, the full report, no prompts. */
import { join } from 'node:path';
import { assess } from '../assessment/assess.js';
import { parseInputs } from '../assessment/inputs.js';
import { printAssessment, terminalStyle } from './output.js';
import { PACKAGE_ROOT } from './package-info.js';
import { readVisitFile } from './visit-file.js';

export const DEMO_VISIT = join(PACKAGE_ROOT, 'cases', 'hypertension-trial.visit.json');

export async function runDemo(opts: Record<string, unknown>): Promise<void> {
  const inputs = parseInputs(readVisitFile(DEMO_VISIT));
  const result = assess(inputs);
  const title = 'elastimate demo: invented subject HT-014, hypertension-trial baseline visit';
  if (opts.json === true) {
    await printAssessment(result, { json: true });
    return;
  }
  // The full single-visit report: 95 % ranges from the default error model, the recheck view and the sketch.
  const { assessUncertainty } = await import('../assessment/uncertainty.js');
  const { renderTerminalWithUncertainty } = await import('../render/uncertainty.js');
  const { printSketch } = await import('./diagram-options.js');
  const report = assessUncertainty(inputs, {}, result.choice, result.results);
  process.stdout.write(renderTerminalWithUncertainty(result, report, { style: await terminalStyle(), recheck: true, title }) + '\n');
  printSketch(result, false);
  await showDemoSeries();
}

export const DEMO_SUBJECT = join(PACKAGE_ROOT, 'cases', 'cardio-oncology.subject.json');

/** A follow-up series (invented subject CO-203) and the change from the first visit to the one with the lowest EF. */
async function showDemoSeries(): Promise<void> {
  const { readSubjectFile } = await import('../records/store.js');
  const { printComparison, printSeries } = await import('./record-common.js');
  const file = readSubjectFile(DEMO_SUBJECT);
  process.stdout.write('\n' + '─'.repeat(72) + '\nelastimate demo, part 2: a follow-up series, as `elastimate record show cases/cardio-oncology.subject.json` prints it\n\n');
  const entries = await printSeries(file, {});
  if (entries.length < 2) return;
  const lowest = entries.slice(1).reduce((low, e) => ((e.assessment.results.efUsed.value ?? Infinity) < (low.assessment.results.efUsed.value ?? Infinity) ? e : low));
  process.stdout.write('─'.repeat(72) + `\nelastimate demo, part 3: \`elastimate record compare cases/cardio-oncology.subject.json 1 ${lowest.index}\`\n\n`);
  await printComparison(file, '1', String(lowest.index), {});
}
