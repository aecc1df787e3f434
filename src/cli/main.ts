/**
 * The command line: thin. Parses options, gathers inputs, calls the pure
 * core and hands the result to a renderer. Heavy modules load only when the
 * command that needs them runs.
 */
import { Command, CommanderError } from 'commander';
import { EXIT_FILE_FAULT, FileFault, InputError, plainCause, showValue } from '../errors.js';
import { sanitizeText } from '../text/sanitize.js';
import { toolVersion } from './package-info.js';
import { addMeasurementOptions } from './measurement-options.js';
import { registerRecordCommands } from './record-commands.js';
import { addExamples } from './help-examples.js';
import { registerScenarioCommand, registerSyntheticCommand } from './scenario-options.js';
import { addSrOption } from './sr-option.js';

export { helpFooter } from './help-examples.js';

export const EXIT_BAD_INPUT = 2;
export const EXIT_CANCELLED = 130;
export { EXIT_FILE_FAULT };

/** Raised when the user leaves a prompt with Ctrl-C: the CLI exits quietly. */
export class Cancelled extends Error {
  constructor() {
    super('cancelled');
    this.name = 'Cancelled';
  }
}

export function buildProgram(): Command {
  const program = new Command();
  program
    .name('elastimate')
    .description('Ventricular–arterial coupling from echocardiography and cuff pressure: Pes, Ea, single-beat Ees, Ea/Ees.\nResearch use only; not a diagnosis.')
    .version(toolVersion(), '-V, --version', 'print the version')
    .exitOverride()
    .configureOutput({ writeErr: (s) => process.stderr.write(s), outputError: (s, write) => write(commanderMessage(s)) });

  const assess = program
    .command('assess')
    .description('assess one visit from flags, a visit file or prompts');
  addMeasurementOptions(assess);
  addSrOption(assess);
  assess
    .option('--input <file>', 'visit file in JSON (docs/visit-file.md), or - for standard input; flags override it')
    .option('--no-input', 'never prompt: missing inputs are an error')
    .option('--json', 'print one JSON object (docs/json-output.md)')
    .option('--recheck', 'show the method variants side by side')
    .option('--uncertainty', 'add 95 % intervals, variance shares per input and the method\'s own error, by Monte Carlo (docs/uncertainty.md)')
    .option('--draws <n>', 'Monte Carlo draws, 1000–500000 (default 20000); implies --uncertainty')
    .option('--seed <n>', 'seed of the Monte Carlo draws, 0–4294967295 (default 1); implies --uncertainty')
    .option('--svg <file>', 'also write the estimated pressure–volume diagram as SVG')
    .option('--sketch', 'also print a compact text drawing of the pressure–volume diagram')
    .option('--model-loop', 'overlay on --svg/--sketch the simulated loop of the model fitted to this visit (docs/model.md)')
    .action(async (opts: Record<string, unknown>, cmd: Command) => {
      const { runAssess } = await import('./assess-command.js');
      await runAssess(opts, inputFileOf(cmd));
    });
  addExamples(assess, [
    'elastimate assess --sbp 138 --dbp 82 --hr 64 --edv 118 --esv 52 --pep 96 --et 292',
    'elastimate assess --input cases/hypertension-trial.visit.json --uncertainty',
    'elastimate assess --input cases/cardio-oncology.visit.json --json',
  ]);

  const demo = program
    .command('demo')
    .description('the full report for a built-in invented subject, no prompts')
    .option('--json', 'print JSON instead of the report')
    .action(async (opts: Record<string, unknown>) => {
      const { runDemo } = await import('./demo-command.js');
      await runDemo(opts);
    });
  addExamples(demo, ['elastimate demo', 'elastimate demo --json']);

  registerRecordCommands(program, inputFileOf);
  registerScenarioCommand(program, inputFileOf);
  registerSyntheticCommand(program);

  const report = program
    .command('report')
    .description('the case-conference report of one visit in its series: one self-contained HTML page, or Markdown with SVG files')
    .argument('<subject-file>', 'subject file (docs/subject-file.md)')
    .option('--visit <visit>', 'visit number (as record show prints it) or date; default the last visit')
    .option('--out <file>', 'where to write the report, e.g. report.html or report.md')
    .option('--format <format>', 'html or md (default from the --out file name, else html)')
    .option('--draws <n>', 'Monte Carlo draws for the intervals, 1000–500000 (default 20000)')
    .option('--seed <n>', 'seed of the Monte Carlo draws (default 1)')
    .option('--model-loop', 'overlay on the diagram the simulated loop of the model fitted to the reported visit (docs/model.md)')
    .action(async (file: string, opts: Record<string, unknown>) => {
      const { runReport } = await import('./report-command.js');
      await runReport(file, opts);
    });
  addExamples(report, [
    'elastimate report cases/cardio-oncology.subject.json --out co203.html',
    'elastimate report cases/cardio-oncology.subject.json --visit 2 --out co203-visit2.md',
  ]);

  addExamples(program, [
    'elastimate demo',
    'elastimate assess --input cases/hypertension-trial.visit.json',
    'elastimate record show cases/cardio-oncology.subject.json',
  ]);
  return program;
}

/**
 * `--input <file>` and `--no-input` share commander's `input` property; the
 * file name is kept from the option event so `--no-input` cannot erase it.
 */
const inputFiles = new WeakMap<Command, string>();
function inputFileOf(cmd: Command): string | undefined {
  return inputFiles.get(cmd);
}
function trackInputFile(program: Command): void {
  for (const cmd of program.commands) {
    cmd.on('option:input', (value: unknown) => {
      if (typeof value === 'string') inputFiles.set(cmd, value);
    });
    trackInputFile(cmd);
  }
}

/**
 * commander's own usage errors in our one message style: the field, the value, what is accepted.
 * (Exit code 2 comes from reportError.)
 */
export function commanderMessage(text: string): string {
  const message = text.replace(/^error:\s*/, '').trim();
  const rules: [RegExp, (m: RegExpExecArray) => string][] = [
    [/^unknown option '([^']+)'(.*)$/s, (m) => `option: got ${showValue(m[1])}; unknown${m[2] ? ` (${m[2].replace(/^[\s\n]*\(?|\)?$/g, '').trim()})` : ''}; accepted: an option listed by --help`],
    [/^too many arguments(?: for '([^']+)')?\. Expected (\d+) arguments? but got (\d+)\.?$/s, (m) => `arguments: got ${m[3]}; accepted: ${m[2]} for ${m[1] ?? 'this command'} (see --help)`],
    [/^missing required argument '([^']+)'$/s, (m) => `${m[1]}: missing; accepted: see --help for the command's arguments`],
    [/^option '([^']+)' argument missing$/s, (m) => `${m[1]}: missing value; accepted: see --help`],
    [/^unknown command '([^']+)'$/s, (m) => `command: got ${showValue(m[1])}; accepted: assess, demo, record, export, batch, sr-cohort, report, scenario, synthetic (see --help)`],
  ];
  for (const [pattern, format] of rules) {
    const m = pattern.exec(message);
    if (m) return `elastimate: ${sanitizeText(format(m))}\n`;
  }
  return `elastimate: ${sanitizeText(message)}; accepted: see --help\n`;
}

export async function main(argv: string[]): Promise<number> {
  // A reader that goes away early (`elastimate demo | head`) is not an error: stop quietly, as Unix tools do.
  process.stdout.on('error', (err: NodeJS.ErrnoException) => {
    if (err.code === 'EPIPE') process.exit(0);
    // Any other write failure (a full disk, a closed file): one line, no stack trace.
    process.stderr.write(`elastimate: standard output: cannot be written: ${err.code ? `${plainCause(err.code)} (${err.code})` : err.message}\n`);
    process.exit(EXIT_FILE_FAULT);
  });
  const program = buildProgram();
  trackInputFile(program);
  try {
    await program.parseAsync(argv);
    return typeof process.exitCode === 'number' ? process.exitCode : 0;
  } catch (err) {
    return reportError(err);
  }
}

export function reportError(err: unknown): number {
  if (err instanceof CommanderError) {
    if (err.code === 'commander.helpDisplayed' || err.code === 'commander.version' || err.code === 'commander.help') return 0;
    // commander has already printed its message.
    return EXIT_BAD_INPUT;
  }
  if (err instanceof InputError) {
    process.stderr.write(`elastimate: ${err.message.split('\n').join('\nelastimate: ')}\n`);
    return EXIT_BAD_INPUT;
  }
  if (err instanceof FileFault) {
    process.stderr.write(`elastimate: ${err.message}\n`);
    return EXIT_FILE_FAULT;
  }
  if (err instanceof Cancelled || (err instanceof Error && err.name === 'ExitPromptError')) {
    process.stderr.write('\n');
    return EXIT_CANCELLED;
  }
  const message = err instanceof Error ? err.message : String(err);
  process.stderr.write(`elastimate: internal error: ${message}\nPlease report this with the command you ran.\n`);
  return 1;
}
