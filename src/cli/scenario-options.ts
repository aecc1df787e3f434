/** The options of `elastimate scenario`; the handler is loaded only when the command runs. */
import type { Command } from 'commander';
import { addExamples } from './help-examples.js';
import { addMeasurementOptions } from './measurement-options.js';

export function registerScenarioCommand(program: Command, inputFileOf: (cmd: Command) => string | undefined): void {
  const scenario = program
    .command('scenario')
    .description('what-if projections from a model of the subject\'s ventricle and arteries fitted to one visit (docs/model.md)');
  addMeasurementOptions(scenario);
  scenario
    .option('--input <file>', 'visit file in JSON (docs/visit-file.md); flags override it')
    .option('--no-input', 'never prompt: missing inputs are an error')
    .option('--subject <file>', 'take the visit from a subject file instead (docs/subject-file.md)')
    .option('--visit <visit>', 'with --subject: visit number (as record show prints it) or date; default the last visit')
    .option('--to-hr <bpm>', 'project to this heart rate, 30–180 bpm (PEP and ET follow published slopes)')
    .option('--resistance <percent>', 'change peripheral resistance by a signed percentage, -80 to +300 (e.g. -20)')
    .option('--compliance <percent>', 'change arterial compliance by a signed percentage, -80 to +300')
    .option('--contractility <percent>', 'change Emax (Ees) by a signed percentage, -80 to +300')
    .option('--to-edv <mL>', 'adjust filling so the projected EDV is this, 20–600 mL')
    .option('--shape <set>', 'normalized elastance shape: hill-a or hill-b (default hill-b; docs/model.md)')
    .option('--intervals', 'add 95 % intervals for the projection by Monte Carlo over the input uncertainty (200 draws)')
    .option('--draws <n>', 'Monte Carlo draws for the intervals, 200–5000 (default 200); implies --intervals')
    .option('--seed <n>', 'seed of the draws, 0–4294967295 (default 1); implies --intervals')
    .option('--json', 'print one JSON object (docs/model.md)')
    .option('--svg <file>', 'also write the simulated baseline and projected loops as SVG')
    .option('--sketch', 'also print a compact text drawing of the simulated loops')
    .option('--report <file>', 'also write the projection as one self-contained HTML page (table, loops, cautions)')
    .action(async (opts: Record<string, unknown>, cmd: Command) => {
      const { runScenarioCommand } = await import('./scenario-command.js');
      await runScenarioCommand(opts, inputFileOf(cmd));
    });
  addExamples(scenario, [
    'elastimate scenario --input cases/hypertension-trial.visit.json --resistance -20',
    'elastimate scenario --subject cases/cardio-oncology.subject.json --to-hr 60 --contractility 15 --intervals',
    'elastimate scenario --input cases/heart-failure-reduced-ef.visit.json --to-edv 150 --sketch',
  ]);
}

export function registerSyntheticCommand(program: Command): void {
  const synthetic = program
    .command('synthetic')
    .description('known-truth check of the single-beat method: a seeded virtual cohort with known Ees (docs/model.md)')
    .option('--n <count>', 'virtual adults, 10–5000 (default 200)')
    .option('--seed <n>', 'seed of the cohort, 0–4294967295 (default 1)')
    .option('--shape <set>', 'normalized elastance shape: hill-a, hill-b or both (default both)')
    .option('--csv', 'print one row per virtual adult and shape as CSV (the summary goes to stderr)')
    .option('--json', 'print one JSON object: subjects and summary (docs/model.md)')
    .option('--svg <file>', 'also write the Bland–Altman plot as SVG')
    .option('--near <file>', 'keep only hearts whose simulated observations are near this visit (a visit file, or a subject file)')
    .option('--visit <visit>', 'with --near and a subject file: visit number or date; default the last visit')
    .action(async (opts: Record<string, unknown>) => {
      const { runSynthetic } = await import('./synthetic-command.js');
      await runSynthetic(opts);
    });
  addExamples(synthetic, [
    'elastimate synthetic --n 500 --seed 7',
    'elastimate synthetic --n 2000 --near cases/hypertension-trial.visit.json --json',
    'elastimate synthetic --shape hill-b --csv --svg bland-altman.svg',
  ]);
}
