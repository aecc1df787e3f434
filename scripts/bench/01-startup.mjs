// Start-up: `--version` within 1.5× and a full `assess --json` within 2.5× of bare `node -e 0`.
// The main row uses values in their default units (bare numbers, the common case); the second gives
// every value with one of the trade's common units (kPa, Hz, L, s, mm, lb…), converted by the table in
// src/units/common-units.ts without mathjs, also within 2.5×; the third, informational, gives a unit
// outside the table, which loads mathjs (cached V8 code, see src/units/mathjs-loader.ts).
import { join } from 'node:path';

export async function run({ root, bin, compare }) {
  const version = compare([bin, '--version']);
  const visit = join(root, 'cases', 'heart-failure-reduced-ef.visit.json');
  const assessJson = compare([bin, 'assess', '--input', visit, '--json']);
  const assessUnits = compare([bin, 'assess', '--sbp', '17.3kPa', '--dbp', '11kPa', '--hr', '1.1Hz', '--edv', '0.12 L', '--esv', '50 mL', '--pep', '0.09 s', '--et', '290ms', '--height', '1.72 m', '--weight', '176 lb', '--json']);
  const assessMathjs = compare([bin, 'assess', '--sbp', '17.3kPa', '--dbp', '11kPa', '--hr', '66', '--edv', '120', '--esv', '50', '--pep', '90', '--et', '290', '--height', '68 inch', '--weight', '80', '--json']);
  return [
    { name: 'elastimate --version vs node -e 0', ratio: version.ratio, limit: 1.5, detail: `${version.ms.toFixed(0)} ms vs ${version.refMs.toFixed(0)} ms` },
    { name: 'assess --input visit --json (default units) vs node -e 0', ratio: assessJson.ratio, limit: 2.5, detail: `${assessJson.ms.toFixed(0)} ms vs ${assessJson.refMs.toFixed(0)} ms` },
    { name: 'assess, every value with a common unit (table), --json', ratio: assessUnits.ratio, limit: 2.5, detail: `${assessUnits.ms.toFixed(0)} ms vs ${assessUnits.refMs.toFixed(0)} ms` },
    // Informational: a unit outside the table costs mathjs's start-up on top (about 0.05–0.1 s even
    // with the code cache), shown here so it stays visible.
    { name: 'assess, one unit outside the table (mathjs), --json', ratio: assessMathjs.ratio, limit: 2.5, informational: true, detail: `${assessMathjs.ms.toFixed(0)} ms vs ${assessMathjs.refMs.toFixed(0)} ms` },
  ];
}
