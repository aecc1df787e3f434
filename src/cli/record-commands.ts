/**
 * Registration of `record` (add, show, compare, edit, remove), `export` and
 * `batch`. Light on purpose: handlers load inside each action.
 */
import type { Command } from 'commander';
import { addMeasurementOptions } from './measurement-options.js';
import { addSrOption } from './sr-option.js';

function collect(value: string, previous: string[] | undefined): string[] {
  return [...(previous ?? []), value];
}

export function registerRecordCommands(program: Command, inputFileOf: (cmd: Command) => string | undefined): void {
  const record = program
    .command('record')
    .description('follow-up series of one subject in a subject file (docs/subject-file.md)');

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
    .addHelpText('after', '\n--sex and --birth-year describe the subject and are stored once; other flags belong to this visit.')
    .action(async (file: string, opts: Record<string, unknown>, cmd: Command) => {
      const { runRecordAdd } = await import('./record-add-command.js');
      await runRecordAdd(file, opts, inputFileOf(cmd));
    });

  record
    .command('show')
    .description('the series as a table with the change from the previous visit')
    .argument('<file>', 'subject file')
    .option('--json', 'print one JSON object (docs/subject-file.md)')
    .option('--uncertainty', 'add each visit\'s 95 % ranges and the noise of each change (docs/uncertainty.md)')
    .action(async (file: string, opts: Record<string, unknown>) => {
      const { runRecordShow } = await import('./record-show-command.js');
      await runRecordShow(file, opts);
    });

  record
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
    .option('--yes', 'do not ask for confirmation')
    .action(async (file: string, visit: string, opts: Record<string, unknown>, cmd: Command) => {
      const { runRecordEdit } = await import('./record-edit-command.js');
      await runRecordEdit(file, visit, opts, inputFileOf(cmd));
    });

  record
    .command('remove')
    .description('remove one visit (asks first; keeps a backup of the file as it was)')
    .argument('<file>', 'subject file')
    .argument('<visit>', 'visit number or date')
    .option('--yes', 'do not ask for confirmation')
    .action(async (file: string, visit: string, opts: Record<string, unknown>) => {
      const { runRecordRemove } = await import('./record-edit-command.js');
      await runRecordRemove(file, visit, opts);
    });

  program
    .command('export')
    .description('every visit of the subject files as a tidy CSV table (docs/csv-export.md)')
    .argument('<files...>', 'subject files')
    .option('--out <file>', 'write to this file (atomically, owner-readable only) instead of standard output')
    .option('--json', 'the same rows as JSON, with a column dictionary')
    .action(async (files: string[], opts: Record<string, unknown>) => {
      const { runExport } = await import('./export-command.js');
      await runExport(files, opts);
    });

  program
    .command('sr-cohort')
    .description('a folder of DICOM SR files of echo studies as a cohort CSV for batch, one row per study (docs/sr-import.md)')
    .argument('<folder>', 'folder of SR files (one or more per study)')
    .option('--ids <file>', 'your CSV mapping SR file names to pseudonymous ids (columns file, subject); without it the subject column is left for you to fill')
    .option('--out <file>', 'write to this CSV file (atomically) instead of standard output')
    .action(async (folder: string, opts: Record<string, unknown>) => {
      const { runSrCohort } = await import('./sr-cohort-command.js');
      await runSrCohort(folder, opts);
    });

  program
    .command('batch')
    .description('results for every row of a cohort CSV, streamed (docs/batch.md)')
    .argument('<in.csv>', 'CSV with a header row, or - for standard input; columns named like the flags (sbp, dbp, hr, edv, esv, ef, sv, pep, et, …)')
    .option('--out <file>', 'write to this file (replaced only when the run completes) instead of standard output')
    .action(async (file: string, opts: Record<string, unknown>) => {
      const { runBatch } = await import('./batch-command.js');
      await runBatch(file, opts);
    });
}
