/**
 * Registration of `record` (add, show, compare, edit, remove), `export` and
 * `batch`. Light on purpose: handlers load inside each action.
 */
import type { Command } from 'commander';
import { addMeasurementOptions } from './measurement-options.js';
import { addExamples } from './help-examples.js';
import { addSrOption } from './sr-option.js';

/** The flag that says a second visit on a date that already has one is intended. */
export const SAME_DATE_FLAG = '--same-date';

function collect(value: string, previous: string[] | undefined): string[] {
  return [...(previous ?? []), value];
}

export function registerRecordCommands(program: Command, inputFileOf: (cmd: Command) => string | undefined): void {
  const record = program
    .command('record')
    .description('follow-up series of one subject in a subject file (docs/subject-file.md)');
  addExamples(record, [
    'elastimate record add co203.json --subject CO-203 --date 2024-09-02 --input cases/cardio-oncology.visit.json',
    'elastimate record show cases/cardio-oncology.subject.json',
    'elastimate record compare cases/cardio-oncology.subject.json 1 3',
  ]);

  const add = record
    .command('add')
    .description('add a visit, creating the subject file with the first one')
    .argument('<file>', 'subject file, e.g. CO-203.subject.json')
    .option('--subject <id>', 'pseudonymous subject id, e.g. CO-203 (needed to create the file)')
    .option('--date <YYYY-MM-DD>', 'visit date (default: the study date of --sr)');
  addMeasurementOptions(add);
  addSrOption(add);
  add
    .option('--birth-year <year>', 'subject\'s birth year (stored with the subject; age at each visit follows from it)')
    .option('--note <text>', 'free-text note for this visit (no names)')
    .option('--input <file>', 'visit file in JSON (docs/visit-file.md), or - for standard input; flags override it')
    .option('--no-input', 'never prompt: missing inputs are an error')
    .option(`${SAME_DATE_FLAG}`, 'a second visit on a date that already has one is intended (asked on a terminal, refused elsewhere without this flag)')
    .action(async (file: string, opts: Record<string, unknown>, cmd: Command) => {
      const { runRecordAdd } = await import('./record-add-command.js');
      await runRecordAdd(file, opts, inputFileOf(cmd));
    });
  addExamples(
    add,
    [
      'elastimate record add co203.json --subject CO-203 --date 2024-09-02 --input cases/cardio-oncology.visit.json --note "after cycle 4"',
      'elastimate record add co203.json --date 2024-12-02 --sbp 128 --dbp 76 --hr 70 --edv 112 --esv 50 --pep 98 --et 286',
      'elastimate record add co203.json --date 2025-03-03',
    ],
    '--sex and --birth-year describe the subject and are stored once; other flags\nbelong to this visit. The visit date may not be after today. On a terminal,\nmissing inputs are asked for (the last example).',
  );

  const show = record
    .command('show')
    .description('the series as a table with the change from the previous visit')
    .argument('<file>', 'subject file')
    .option('--json', 'print one JSON object (docs/subject-file.md)')
    .option('--uncertainty', 'add each visit\'s 95 % intervals and the noise of each change (docs/uncertainty.md)')
    .action(async (file: string, opts: Record<string, unknown>) => {
      const { runRecordShow } = await import('./record-show-command.js');
      await runRecordShow(file, opts);
    });
  addExamples(show, [
    'elastimate record show cases/cardio-oncology.subject.json',
    'elastimate record show cases/cardio-oncology.subject.json --uncertainty',
    'elastimate record show cases/cardio-oncology.subject.json --json',
  ]);

  const compare = record
    .command('compare')
    .description('the change between two visits, explained and judged against measurement noise')
    .argument('<file>', 'subject file')
    .argument('<from>', 'visit number (as record show prints it) or date')
    .argument('<to>', 'visit number or date')
    .option('--json', 'print one JSON object (docs/subject-file.md)')
    .action(async (file: string, from: string, to: string, opts: Record<string, unknown>) => {
      const { runRecordCompare } = await import('./record-show-command.js');
      await runRecordCompare(file, from, to, opts);
    });
  addExamples(compare, [
    'elastimate record compare cases/cardio-oncology.subject.json 1 3',
    'elastimate record compare cases/cardio-oncology.subject.json 2023-09-04 3 --json',
  ]);

  const edit = record
    .command('edit')
    .description('change one visit (asks first; keeps a backup of the file as it was)')
    .argument('<file>', 'subject file')
    .argument('<visit>', 'visit number or date');
  addMeasurementOptions(edit);
  edit
    .option('--date <YYYY-MM-DD>', 'new visit date')
    .option('--note <text>', 'new note (an empty text removes it)')
    .option('--unset <input>', 'remove an input from the visit, e.g. --unset sv (repeatable)', collect)
    .option('--birth-year <year>', 'subject\'s birth year')
    .option('--input <file>', 'visit file in JSON (or - for standard input) whose values replace the visit\'s; flags override it')
    .option(`${SAME_DATE_FLAG}`, 'moving the visit to a date that already has one is intended')
    .option('--yes', 'do not ask for confirmation')
    .action(async (file: string, visit: string, opts: Record<string, unknown>, cmd: Command) => {
      const { runRecordEdit } = await import('./record-edit-command.js');
      await runRecordEdit(file, visit, opts, inputFileOf(cmd));
    });
  addExamples(edit, [
    'elastimate record edit co203.json 2024-09-02 --hr 70',
    'elastimate record edit co203.json 2 --unset sv --note "Doppler not reliable" --yes',
  ]);

  const remove = record
    .command('remove')
    .description('remove one visit (asks first; keeps a backup of the file as it was)')
    .argument('<file>', 'subject file')
    .argument('<visit>', 'visit number or date')
    .option('--yes', 'do not ask for confirmation')
    .action(async (file: string, visit: string, opts: Record<string, unknown>) => {
      const { runRecordRemove } = await import('./record-edit-command.js');
      await runRecordRemove(file, visit, opts);
    });
  addExamples(remove, ['elastimate record remove co203.json 3', 'elastimate record remove co203.json 2024-12-02 --yes']);

  const exportCommand = program
    .command('export')
    .description('every visit of the subject files as a tidy CSV table (docs/csv-export.md)')
    .argument('<files...>', 'subject files')
    .option('--out <file>', 'write to this file (atomically, owner-readable only) instead of standard output')
    .option('--json', 'the same rows as JSON, with a column dictionary')
    .action(async (files: string[], opts: Record<string, unknown>) => {
      const { runExport } = await import('./export-command.js');
      await runExport(files, opts);
    });
  addExamples(exportCommand, [
    'elastimate export cases/cardio-oncology.subject.json',
    'elastimate export cases/*.subject.json --out cohort.csv',
    'elastimate export cases/*.subject.json --json',
  ]);

  const srCohort = program
    .command('sr-cohort')
    .description('a folder of DICOM SR files of echo studies as a cohort CSV for batch, one row per study (docs/sr-import.md)')
    .argument('<folder>', 'folder of SR files (one or more per study)')
    .option('--ids <file>', 'your CSV mapping SR file names to pseudonymous ids (columns file, subject); without it the subject column is left for you to fill')
    .option('--out <file>', 'write to this CSV file (atomically) instead of standard output')
    .action(async (folder: string, opts: Record<string, unknown>) => {
      const { runSrCohort } = await import('./sr-cohort-command.js');
      await runSrCohort(folder, opts);
    });
  addExamples(srCohort, ['elastimate sr-cohort cases/sr', 'elastimate sr-cohort cases/sr --ids ids.csv --out sr-cohort.csv']);

  const batch = program
    .command('batch')
    .description('results for every row of a cohort CSV, streamed (docs/batch.md)')
    .argument('<in.csv>', 'CSV with a header row, or - for standard input; columns named like the flags (sbp, dbp, hr, edv, esv, ef, sv, pep, et, …)')
    .option('--out <file>', 'write to this file (replaced only when the run completes) instead of standard output')
    .action(async (file: string, opts: Record<string, unknown>) => {
      const { runBatch } = await import('./batch-command.js');
      await runBatch(file, opts);
    });
  addExamples(batch, ['elastimate batch cases/hypertension-cohort.csv', 'elastimate batch cases/hypertension-cohort.csv --out results.csv']);
}
