/** `elastimate demo` (what `npm start` runs): an invented subject, the full report, no prompts. */
import { join } from 'node:path';
import { assess } from '../assessment/assess.js';
import { parseInputs } from '../assessment/inputs.js';
import { printAssessment } from './output.js';
import { PACKAGE_ROOT } from './package-info.js';
import { readVisitFile } from './visit-file.js';

export const DEMO_VISIT = join(PACKAGE_ROOT, 'cases', 'hypertension-trial.visit.json');

export async function runDemo(opts: Record<string, unknown>): Promise<void> {
  const inputs = parseInputs(readVisitFile(DEMO_VISIT));
  const result = assess(inputs);
  await printAssessment(result, {
    json: opts.json === true,
    recheck: true,
    title: 'elastimate demo: invented subject HT-014, hypertension-trial baseline visit',
  });
}
