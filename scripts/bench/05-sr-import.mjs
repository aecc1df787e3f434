// DICOM SR import (`assess --sr`): informational. dcmjs loads only when an SR is given, so this
// row shows its cost on top of an assessment; the start-up rows above must not move. The report
// is the invented demo SR of cases/sr/ (scripts/demo-sr.mjs).
import { join } from 'node:path';

export async function run({ root, bin, compare }) {
  const sr = join(root, 'cases', 'sr', 'hypertension-trial.sr.dcm');
  const r = compare([bin, 'assess', '--sr', sr, '--age', '58', '--json']);
  return [{ name: 'assess --sr (dcmjs loads), --json', ratio: r.ratio, limit: 3.5, informational: true, detail: `${r.ms.toFixed(0)} ms vs ${r.refMs.toFixed(0)} ms` }];
}
