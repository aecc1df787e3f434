/**
 * `elastimate report <subject-file> [--visit N] --out report.html [--format html|md]`:
 * the case-conference report of one visit in its series. The model is built
 * by a pure function (buildReportModel); this file only reads the subject
 * file, checks the paths, passes in the date and writes the files
 * through io/safe-write.ts (the SVG pictures first, the page that links them last).
 */
import { basename, dirname, extname, join } from 'node:path';
import type { SubjectFile } from '../records/subject-schema.js';
import { InputError, showValue } from '../errors.js';
import type { ReportModel, ReportVisit } from '../render/report-html.js';
import { checkOutputPath, writeFileSafely } from '../io/safe-write.js';
import { toolVersion } from './package-info.js';

export type ReportFormat = 'html' | 'md';

export interface ReportModelOptions {
  /** Visit number or date (as `record show` prints them); default the last visit. */
  visit?: string;
  draws?: number;
  seed?: number;
  /** YYYY-MM-DD. */
  generated: string;
  toolVersion: string;
  /** Overlay the simulated loop of the model fitted to the reported visit. */
  modelLoop?: boolean;
}

/** Everything the report shows, computed from the subject file. Pure. */
export async function buildReportModel(file: SubjectFile, options: ReportModelOptions): Promise<ReportModel> {
  const [{ assessSeries, findVisit }, { attachNoiseChecks, compareVisits }, uncertainty] = await Promise.all([
    import('../records/series.js'),
    import('../records/compare.js'),
    import('../assessment/uncertainty.js'),
  ]);
  const series = assessSeries(file);
  if (series.length === 0) {
    throw new InputError({ field: 'subject file', value: showValue(file.subject.id), reason: 'has no visits yet', accepted: 'a subject file with at least one visit (add one with `elastimate record add`)' });
  }
  const selectedIndex = options.visit !== undefined ? findVisit(file, options.visit).index : series[series.length - 1]!.index;
  const selected = series.findIndex((e) => e.index === selectedIndex);
  const compared = selected > 0 ? selected - 1 : null;
  const runOptions = { ...(options.draws !== undefined ? { draws: options.draws } : {}), ...(options.seed !== undefined ? { seed: options.seed } : {}) };

  const visits: ReportVisit[] = series.map((entry, i) => {
    // Sensitivity shares only for the reported visit: the other visits need their intervals alone.
    const report = uncertainty.assessUncertainty(entry.assessment.inputs, { ...runOptions, sensitivity: i === selected });
    const v: ReportVisit = {
      index: entry.index,
      date: entry.date,
      assessment: { ...entry.assessment, results: uncertainty.withIntervals(entry.assessment.results, report) },
      uncertainty: report,
    };
    if (entry.visit.note) v.note = entry.visit.note;
    return v;
  });

  let comparison: ReportModel['comparison'] = null;
  if (compared !== null) {
    const from = series[compared]!;
    const to = series[selected]!;
    comparison = compareVisits(from.assessment, to.assessment);
    attachNoiseChecks(comparison, uncertainty.changeNoiseChecks(from.assessment.inputs, to.assessment.inputs, runOptions));
  }

  const first = visits[selected]!.uncertainty;
  const uncertaintyNote = first
    ? `Intervals: Monte Carlo over input measurement error, ${first.draws.toLocaleString('en-US')} draws, seed ${first.seed} (docs/uncertainty.md); the method's own error against invasive Ees is shown separately.`
    : 'No intervals were computed.';

  const model: ReportModel = { subject: file.subject, visits, selected, compared, comparison, generated: options.generated, toolVersion: options.toolVersion, uncertaintyNote };
  if (options.modelLoop) model.modelLoop = (await import('../model/model-loop.js')).modelLoopOverlay(series[selected]!.assessment);
  return model;
}

/** The file-name endings of each report format. */
export const REPORT_EXTENSIONS: Record<ReportFormat, readonly string[]> = { html: ['.html', '.htm'], md: ['.md', '.markdown'] };

/** --format when given, else the format the --out file name ends in (HTML when it names none). */
export function reportFormat(opts: Record<string, unknown>): ReportFormat {
  const raw = opts.format;
  if (raw === undefined) {
    const ending = typeof opts.out === 'string' ? extname(opts.out).toLowerCase() : '';
    return REPORT_EXTENSIONS.md.includes(ending) ? 'md' : 'html';
  }
  if (raw === 'html' || raw === 'md') return raw;
  throw new InputError({ field: '--format', value: showValue(raw), accepted: 'html or md' });
}

function today(now: Date): string {
  return now.toISOString().slice(0, 10);
}

export async function runReport(subjectPath: string, opts: Record<string, unknown>): Promise<void> {
  const format = reportFormat(opts);
  if (opts.out === undefined) {
    throw new InputError({ field: '--out', value: '', reason: 'required', accepted: format === 'md' ? 'a file path ending in .md, e.g. --out report.md' : 'a file path ending in .html, e.g. --out report.html' });
  }
  const inputs = [subjectPath];
  // Without --format the file name chooses the format, so every ending of every format is accepted.
  const extensions = opts.format === undefined ? [...REPORT_EXTENSIONS.html, ...REPORT_EXTENSIONS.md] : REPORT_EXTENSIONS[format];
  const out = checkOutputPath(opts.out, { option: '--out', extensions, inputs });
  const parsed: { draws?: number; seed?: number } = {};
  if (opts.draws !== undefined || opts.seed !== undefined) {
    const { parseDraws, parseSeed } = await import('../assessment/uncertainty.js');
    if (opts.draws !== undefined) parsed.draws = parseDraws(opts.draws);
    if (opts.seed !== undefined) parsed.seed = parseSeed(opts.seed);
  }
  const { readSubjectFile } = await import('../records/store.js');
  const file = readSubjectFile(subjectPath);
  const model = await buildReportModel(file, {
    ...(typeof opts.visit === 'string' ? { visit: opts.visit } : {}),
    ...parsed,
    ...(opts.modelLoop === true ? { modelLoop: true } : {}),
    generated: today(new Date()),
    toolVersion: toolVersion(),
  });

  if (format === 'html') {
    const { renderReportHtml } = await import('../render/report-html.js');
    writeFileSafely(out, renderReportHtml(model), { option: '--out', inputs });
    process.stdout.write(`elastimate: report written to ${out}\n`);
    return;
  }
  const { renderReportMarkdown } = await import('../render/report-markdown.js');
  const base = basename(out, extname(out));
  const { markdown, files } = renderReportMarkdown(model, base);
  // Every picture's path is checked before the first file is written.
  for (const f of files) checkOutputPath(join(dirname(out), f.name), { option: '--out', extensions: ['.svg'], inputs });
  for (const f of files) {
    const path = join(dirname(out), f.name);
    writeFileSafely(path, f.content, { option: '--out', inputs });
  }
  writeFileSafely(out, markdown, { option: '--out', inputs });
  process.stdout.write(`elastimate: report written to ${out} with ${files.length} SVG files beside it\n`);
}
