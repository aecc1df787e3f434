/**
 * The case-conference report in Markdown, with its pictures as SVG files
 * beside it (linked by relative name). Same model and content as the HTML
 * page (report-html.ts). Pure: the caller writes the files.
 */
import { escapeMarkdownInline } from '../text/sanitize.js';
import { decimalsFor, formatNumber } from './format.js';
import {
  REFERENCES, REPORT_TITLE, TREND_NOTE, VISIT_COLUMNS, comparedVisit, keyRows, mechanicsRows, modelLoopCaption, provenanceLine, pvDiagramSvg, reportCaveats,
  selectedVisit, subjectLine, trendSpecs, visitLabel, type ReportModel,
} from './report-html.js';
import { comparisonSummary, judgementWords } from './series.js';
import { renderTrendChart } from './trend-chart.js';

export interface MarkdownReport {
  markdown: string;
  /** SVG files to write beside the Markdown file: name (no folder) and content. */
  files: { name: string; content: string }[];
}

/** Escape text for a Markdown table cell or paragraph. */
function md(text: string): string {
  return escapeMarkdownInline(text);
}

function table(headers: string[], rows: string[][], numeric: (i: number) => boolean = () => false): string[] {
  return [
    `| ${headers.map(md).join(' | ')} |`,
    `| ${headers.map((_, i) => (numeric(i) ? '---:' : '---')).join(' | ')} |`,
    ...rows.map((r) => `| ${r.map(md).join(' | ')} |`),
  ];
}

/**
 * @param baseName the Markdown file's name without `.md`; picture files are
 *   named `<baseName>-pv.svg` and `<baseName>-trend-<key>.svg`.
 */
export function renderReportMarkdown(m: ReportModel, baseName: string): MarkdownReport {
  const sel = selectedVisit(m);
  const cmp = comparedVisit(m);
  const a = sel.assessment;
  const files: MarkdownReport['files'] = [];
  const out: string[] = [];

  out.push(`# ${md(REPORT_TITLE)}`, '');
  out.push(`**${md(subjectLine(m))}**`, '');
  out.push(`Visit reported: **${md(visitLabel(sel))}**${cmp ? `; compared with ${md(visitLabel(cmp))}` : ''}. **Research use only; not a diagnosis.**`, '');
  out.push(`_${md(provenanceLine(m))}_`, '');
  if (sel.note) out.push(`Visit note: ${md(sel.note)}`, '');

  out.push('## Key results', '');
  out.push(...table(['Quantity', 'Value', '95 % interval (input measurement error)', 'Method or note'], keyRows(sel).map((r) => [r.label, r.value, r.interval, r.note]), (i) => i === 1 || i === 2));
  out.push('', md(m.uncertaintyNote), '');

  const pvName = `${baseName}-pv.svg`;
  files.push({ name: pvName, content: pvDiagramSvg(m) + '\n' });
  out.push('## Estimated pressure–volume diagram', '');
  out.push(`![Estimated pressure–volume diagram of ${md(visitLabel(sel))}](${encodeURI(pvName)})`, '');
  out.push(`End-systolic line from single-beat Ees and V0(ES); diastolic curve by the Klotz single-beat method; Ea line from (EDV, 0) to (ESV, Pes)${cmp ? `; ${md(visitLabel(cmp))} overlaid in orange with open squares` : ''}.${md(modelLoopCaption(m))}`, '');

  out.push(`## Afterload beside Ea, energetics and the diastolic side`, '');
  out.push(...table(['', 'Quantity', 'Value', 'Method or note'], mechanicsRows(a).map((r) => [r.group, r.label, r.value, r.note]), (i) => i === 2));
  if (a.mechanics) out.push('', md(a.mechanics.afterloadNote));
  out.push('');

  out.push('## Visits', '');
  out.push(...table(
    VISIT_COLUMNS.map((c) => (c.unit ? `${c.title} (${c.unit})` : c.title)),
    m.visits.map((v) => VISIT_COLUMNS.map((c, i) => (i === 0 && v === sel ? `${c.cell(v)} (reported)` : c.cell(v)))),
    (i) => i >= 2,
  ));
  out.push('');

  if (m.comparison && cmp) {
    out.push(`## Change from ${md(visitLabel(cmp))} to ${md(visitLabel(sel))}`, '');
    out.push(...table(
      ['Quantity', 'From', 'To', 'Change', 'Least significant change', 'Judgement'],
      m.comparison.rows.map((row) => {
        const d = decimalsFor(row.unit);
        return [
          row.label,
          formatNumber(row.from, d),
          formatNumber(row.to, d),
          row.percentChange === null ? '—' : `${row.percentChange > 0 ? '+' : ''}${formatNumber(row.percentChange, 0)} %`,
          `+${formatNumber(row.lsc.percentUp, 0)} % / −${formatNumber(row.lsc.percentDown, 0)} %`,
          judgementWords(row),
        ];
      }),
      (i) => i >= 1 && i <= 4,
    ));
    out.push('');
    for (const line of comparisonSummary(m.comparison)) out.push(`- ${md(line)}`);
    for (const c of m.comparison.cautions) out.push(`- _${md(c)}_`);
    out.push('');
  }

  out.push('## Trends across visits', '');
  out.push(md(TREND_NOTE), '');
  for (const spec of trendSpecs(m)) {
    const name = `${baseName}-trend-${spec.key}.svg`;
    files.push({ name, content: renderTrendChart(spec) + '\n' });
    out.push(`![${md(spec.title)} across visits](${encodeURI(name)})`, '');
    if (spec.bandSource) out.push(`Repeat CV: ${md(spec.bandSource)}.`, '');
  }

  out.push(`## Checks and caveats (${md(visitLabel(sel))})`, '');
  const c = reportCaveats(sel);
  for (const f of c.flags) out.push(`- **[${md(f.level)}]** ${md(f.message)}`);
  if (c.flags.length === 0) out.push('- No consistency or validity problem found.');
  for (const cv of c.caveats) out.push(`- ${md(cv)}`);
  out.push('');
  out.push('## Referral note (ready to paste)', '');
  out.push(`> ${md(a.referral)}`, '');
  out.push('## Methods and sources', '');
  REFERENCES.forEach((r, i) => out.push(`${i + 1}. ${md(r)}`));
  out.push('', `_${md(provenanceLine(m))} Defer to local protocols and licensed clinical practice._`, '');
  return { markdown: out.join('\n'), files };
}
