/**
 * Views of the uncertainty report: a terminal section and the additions to
 * the `--json` object (docs/json-output.md, docs/uncertainty.md). Pure: the
 * assessment and the report in, text or plain data out.
 */
import type { Assessment } from '../assessment/assess.js';
import type { ResultKey } from '../assessment/graph/index.js';
import type { ErrorInputKey } from '../assessment/error-model.js';
import { formatCount, withIntervals, type Share, type UncertaintyReport } from '../assessment/uncertainty.js';
import { decimalsFor, formatNumber, formatValue, pad } from './format.js';
import { assessmentToJson } from './json.js';
import { plainStyle, type Style } from './style.js';
import { renderTerminal, type TerminalOptions } from './terminal.js';

/** Short names of the inputs, as a reader of an echo report says them. */
export const INPUT_SHORT_NAMES: Record<ErrorInputKey, string> = {
  sbp: 'SBP', dbp: 'DBP', hr: 'heart rate', edv: 'EDV', esv: 'ESV', ef: 'reported EF', sv: 'Doppler SV',
  lvotDiameter: 'LVOT diameter', lvotVti: 'LVOT VTI', pep: 'PEP', et: 'ET', pesMeasured: 'measured Pes',
  height: 'height', weight: 'weight',
};

const INTERVAL_ROWS: { key: ResultKey; label: string }[] = [
  { key: 'pes', label: 'Pes' },
  { key: 'svUsed', label: 'SV used' },
  { key: 'efUsed', label: 'EF used' },
  { key: 'co', label: 'Cardiac output' },
  { key: 'tpr', label: 'TPR' },
  { key: 'ea', label: 'Ea' },
  { key: 'tNd', label: 'tNd' },
  { key: 'normalizedElastanceEst', label: 'ENd(est)' },
  { key: 'ees', label: 'Ees' },
  { key: 'eaEes', label: 'Ea/Ees' },
  { key: 'v0', label: 'V0' },
];

/** A probability or fraction as a percentage: one decimal near 0 % and 100 %, none between; never rounded to 0 or 100 when it is not. */
export function percent(p: number): string {
  const v = p * 100;
  if (v > 0 && v < 0.05) return '< 0.1 %';
  if (v < 100 && v >= 99.95) return '> 99.9 %';
  return `${formatNumber(v, v < 10 || v > 90 ? 1 : 0)} %`;
}

function range(ci: readonly [number, number] | null, unit: string): string {
  if (!ci) return '—';
  const d = decimalsFor(unit);
  return `${formatNumber(ci[0], d)} to ${formatNumber(ci[1], d)}${unit ? ' ' + unit : ''}`;
}

function shareList(shares: readonly Share[], limit = 5): string {
  if (shares.length === 0) return 'no input error reaches it';
  const shown = shares.slice(0, limit).map((s) => `${INPUT_SHORT_NAMES[s.input]} ${percent(s.share)}`);
  const rest = shares.length > limit ? `, ${shares.length - limit} more` : '';
  return shown.join(', ') + rest;
}

/** The sentence naming the measurement to repeat. */
export function driverAdvice(report: UncertaintyReport): string {
  const d = report.driver;
  if (!d && !report.outputs.ees) return 'Ees is not computable at these inputs (see the checks): no range for it and no measurement to repeat.';
  if (!d) return 'No input error reaches Ees or Ea/Ees: nothing to repeat.';
  const target = d.output === 'ees' ? 'Ees' : 'Ea/Ees';
  const name = INPUT_SHORT_NAMES[d.input];
  const what = d.input === 'sbp' || d.input === 'dbp' ? `Repeat the cuff reading (${name}; more readings shrink only its random part)` : `Repeat the ${name} measurement`;
  return `${what} to tighten ${target} most: it drives ${percent(d.share)} of the variance of ${target}.`;
}

/** The terminal section "Uncertainty". */
export function uncertaintySection(a: Assessment, report: UncertaintyReport, s: Style = plainStyle): { title: string; lines: string[] } {
  const lines: string[] = [];
  const r = a.results;
  lines.push(s.dim(`Monte Carlo, ${formatCount(report.draws)} draws, seed ${report.seed}; 95 % ranges are the 2.5th–97.5th percentiles over the draws in which each value is computable.`));
  lines.push(s.strong('Measurement error (inputs only):'));
  for (const row of INTERVAL_ROWS) {
    const spread = report.outputs[row.key];
    if (!spread) continue;
    const unit = r[row.key].unit;
    const note = spread.computableFraction < 1 ? s.dim(`  computable in ${percent(spread.computableFraction)} of draws`) : '';
    lines.push(`  ${pad(row.label, 16)}${pad(formatValue(spread.value, unit), 16)}95 % ${range(spread.interval95, unit)}${note}`);
  }
  const e = report.ees;
  lines.push(
    e.notComputableFraction > 0
      ? `Ees not computable in ${percent(e.notComputableFraction)} of draws: an input it needs drawn outside its physical range in ${percent(e.inadmissibleInputs)}, ` +
          `tNd outside the curve's window in ${percent(e.tNdOutsideWindow)}, DBP not above ENd(est)·Pes in ${percent(e.eesNotPositive)}; the ranges use the other draws.`
      : 'Ees was computable in every draw.',
  );
  const c = report.coupling;
  if (c.probabilityAbove !== null) {
    lines.push(
      `Probability that Ea/Ees exceeds ${c.cutoff}: ${percent(c.probabilityAbove)} from measurement error` +
        (c.probabilityAboveWithMethodError !== null ? `; ${percent(c.probabilityAboveWithMethodError)} with the method's own error added.` : '.'),
    );
  }
  const m = report.methodError;
  lines.push(s.strong(`Method error (single-beat vs invasive Ees; Chen 2001: Ees = ${m.slope}·Ees(sb) + ${m.intercept.toFixed(2)}, SEE ${m.see} mmHg/mL):`));
  if (m.calibratedEes === null) {
    lines.push('  not available: Ees is not computable at these inputs.');
  } else {
    lines.push(`  ${pad('Ees, method error only', 36)}${range(m.eesMethodOnly, 'mmHg/mL')}  (invasive Ees this estimate predicts: ${formatValue(m.calibratedEes, 'mmHg/mL')})`);
    lines.push(`  ${pad('Ees, measurement + method error', 36)}${range(m.eesCombined, 'mmHg/mL')}`);
    lines.push(`  ${pad('Ea/Ees, method error only', 36)}${range(m.eaEesMethodOnly, '')}`);
    lines.push(`  ${pad('Ea/Ees, measurement + method error', 36)}${range(m.eaEesCombined, '')}`);
  }
  lines.push(s.strong(`Which input drives the spread (share of variance, one input at a time, ${formatCount(report.sensitivityMethod.drawsPerInput)} draws each):`));
  lines.push(`  ${pad('Ees', 8)}${shareList(report.sensitivity.ees)}`);
  lines.push(`  ${pad('Ea/Ees', 8)}${shareList(report.sensitivity.eaEes)}`);
  lines.push(`  ${pad('Ea', 8)}${shareList(report.sensitivity.ea)}`);
  lines.push(s.strong(driverAdvice(report)));
  lines.push(s.strong('Error model (SD of each input as used; override with --error input=value or "errors" in a visit file):'));
  for (const spec of report.errorModel) {
    const unit = spec.unit === '%' ? 'points' : spec.unit;
    const sd = `${formatNumber(spec.sd, spec.sd < 1 ? 2 : 1)}${unit ? ' ' + unit : ''}`;
    lines.push(`  ${pad(INPUT_SHORT_NAMES[spec.input], 14)}${pad(sd, 12)}${s.dim(`${spec.basis} [${spec.provenance}]`)}`);
  }
  lines.push(s.dim('Sources of the defaults: docs/uncertainty.md. Errors are taken as independent and normal.'));
  return { title: 'Uncertainty: how sure are these numbers', lines };
}

/** The assessment with each main result's 95 % interval attached; values unchanged. */
export function assessmentWithIntervals(a: Assessment, report: UncertaintyReport): Assessment {
  return { ...a, results: withIntervals(a.results, report) };
}

/** The full terminal report with intervals on every line and the uncertainty section. */
export function renderTerminalWithUncertainty(a: Assessment, report: UncertaintyReport, options: TerminalOptions = {}): string {
  const section = uncertaintySection(a, report, options.style ?? plainStyle);
  return renderTerminal(assessmentWithIntervals(a, report), { ...options, extraSections: [...(options.extraSections ?? []), section] });
}

function round(x: number): number {
  return Number(x.toPrecision(7));
}
function roundPair(p: readonly [number, number] | null): [number, number] | null {
  return p ? [round(p[0]), round(p[1])] : null;
}

/** `sensitivity` and `uncertainty` for the JSON view. */
export function uncertaintyJson(report: UncertaintyReport): { sensitivity: Record<string, Share[]>; uncertainty: Record<string, unknown> } {
  const outputs: Record<string, unknown> = {};
  for (const [key, spread] of Object.entries(report.outputs)) {
    outputs[key] = { mean: round(spread.mean), sd: round(spread.sd), interval95: roundPair(spread.interval95), computableFraction: spread.computableFraction };
  }
  const m = report.methodError;
  return {
    sensitivity: report.sensitivity,
    uncertainty: {
      method: 'Monte Carlo propagation of independent normal input errors; 95 % intervals are the 2.5th and 97.5th percentiles over the draws in which each quantity is computable',
      draws: report.draws,
      seed: report.seed,
      generator: report.generator,
      errorModel: report.errorModel.map((e) => ({
        input: e.input, flag: e.flag, unit: e.unit, value: e.value, sd: round(e.sd), given: e.given, basis: e.basis, provenance: e.provenance, source: e.source,
      })),
      notComputableFraction: report.ees.notComputableFraction,
      notComputable: { output: 'ees', ...report.ees },
      outputs,
      probabilityEaEesAboveCutoff: {
        cutoff: report.coupling.cutoff,
        measurementError: report.coupling.probabilityAbove,
        withMethodError: report.coupling.probabilityAboveWithMethodError,
        over: 'draws in which Ea/Ees is computable',
        computableDraws: report.coupling.computableDraws,
        source: report.coupling.source,
      },
      methodError: {
        source: m.source,
        calibration: { slope: m.slope, intercept: m.intercept, see: m.see },
        note: 'methodOnly: invasive Ees predicted from the main estimate (0.86·Ees + 0.40 ± SEE); combined: measurement and method error together',
        ees: { calibrated: m.calibratedEes === null ? null : round(m.calibratedEes), methodOnly: roundPair(m.eesMethodOnly), combined: roundPair(m.eesCombined), measurementOnly: roundPair(report.outputs.ees?.interval95 ?? null) },
        eaEes: { methodOnly: roundPair(m.eaEesMethodOnly), combined: roundPair(m.eaEesCombined), measurementOnly: roundPair(report.outputs.eaEes?.interval95 ?? null) },
      },
      sensitivityMethod: {
        method: 'one input at a time: variance of the output with only that input drawn (same deviates as the main run), divided by the sum over inputs; interactions are ignored',
        drawsPerInput: report.sensitivityMethod.drawsPerInput,
        additivity: report.sensitivityMethod.additivity,
      },
      driver: report.driver ? { ...report.driver, advice: driverAdvice(report) } : null,
    },
  };
}

/** The `--json` object of assess with intervals, `sensitivity` and `uncertainty`. */
export function assessmentToJsonWithUncertainty(a: Assessment, report: UncertaintyReport, toolVersion: string): Record<string, unknown> {
  const base = assessmentToJson(assessmentWithIntervals(a, report), toolVersion);
  return { ...base, ...uncertaintyJson(report) };
}

/**
 * Lines under the series table (`record show --uncertainty`): each visit's
 * 95 % ranges from measurement error, and the not-computable share of Ees.
 */
export function seriesIntervalLines(entries: readonly { index: number; date: string; assessment: Assessment }[], reports: readonly UncertaintyReport[], s: Style = plainStyle): string[] {
  const lines: string[] = [];
  const first = reports[0];
  if (!first) return lines;
  lines.push(s.heading('95 % ranges from measurement error'));
  lines.push(s.dim(`  Monte Carlo, ${formatCount(first.draws)} draws per visit, seed ${first.seed}; error model and method in docs/uncertainty.md.`));
  entries.forEach((e, i) => {
    const report = reports[i]!;
    const r = e.assessment.results;
    const cell = (label: string, key: 'pes' | 'ea' | 'ees' | 'eaEes') => {
      const spread = report.outputs[key];
      const d = decimalsFor(r[key].unit);
      return spread ? `${label} ${formatNumber(spread.value, d)} (${formatNumber(spread.interval95[0], d)} to ${formatNumber(spread.interval95[1], d)})` : `${label} —`;
    };
    const missing = report.ees.notComputableFraction > 0 ? s.dim(`  Ees not computable in ${percent(report.ees.notComputableFraction)} of draws`) : '';
    lines.push(`  ${pad(String(e.index), 3)} ${pad(e.date, 11)} ${[cell('Pes', 'pes'), cell('Ea', 'ea'), cell('Ees', 'ees'), cell('Ea/Ees', 'eaEes')].join('  ')}${missing}`);
  });
  lines.push(s.dim('  `elastimate record compare` judges each change against the combined noise of its two visits.'));
  return lines;
}
