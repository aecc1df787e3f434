/**
 * Importing the measurements of one echo study from one or more DICOM SR
 * files (docs/sr-import.md): read each file (src/sr/read-dicom.ts), find the
 * measurements (src/sr/extract.ts), choose one value per input, and say where
 * each came from. Only the study date, the listed measurements and sex,
 * height and weight from the patient-characteristics section leave here.
 */
import { InputError, showValue } from '../errors.js';
import { METHOD_WORDS, SR_TARGETS, codeText, targetOf, type SrKey } from './codes.js';
import { SPREAD_LIMIT, choose, extract, type Disagreement, type Extracted, type Found } from './extract.js';
import type { SrDocument } from './read-dicom.js';

/** Where an input came from, as stored in a subject file and shown in the inputs-as-used view. */
export interface SrSource {
  from: 'DICOM SR';
  /** e.g. "LN 79996-5" */
  code: string;
  meaning: string;
  /** Volume method, e.g. "biplane method of disks". */
  method?: string;
  studyDate?: string;
  /** How the value was chosen among repeats. */
  how: string;
}

export interface SrImport {
  /** Values for the visit inputs (only keys the input schema knows), in each input's default unit. */
  raw: Record<string, number | string | number[]>;
  sources: Record<string, SrSource>;
  /** Values read that are not inputs of this version (e.g. right-heart measurements). */
  studyDate: string | null;
  /** Inputs the report does not carry, and inputs whose items were refused (labels). */
  notFound: string[];
  notUsed: string[];
  /** Lines for people: what was read, from where, what was not found or refused. */
  summary: string[];
}

/** Decides a disagreement at the terminal: the value to use, or null to leave the input to flags or prompts. */
export type Decide = (d: Disagreement, label: string) => Promise<number | null>;

export interface ImportOptions {
  /** Keys of the visit input schema (sex is taken only when it is one). */
  inputKeys: ReadonlySet<string>;
  /** Default unit of each numeric input (fields registry), to decide whether a bare number is right. */
  inputUnits: ReadonlyMap<string, string>;
  /** Inputs that take several readings (cuff pressures): repeats are passed as readings, not their mean. */
  readingKeys?: ReadonlySet<string>;
  decide?: Decide;
}

/** Files of two studies in one set: refused, naming both files by the paths the user gave. */
function refuseStudies(a: SrDocument, b: SrDocument): InputError {
  return new InputError({
    field: 'sr',
    value: showValue(b.path),
    reason: `belongs to a different study than ${showValue(a.path)}${a.studyDate && b.studyDate && a.studyDate !== b.studyDate ? ` (study dates ${a.studyDate} and ${b.studyDate})` : ''}`,
    accepted: 'SR files of one study per visit (use the cohort command for several studies)',
  });
}

/** Check that the documents belong to one study; returns its date. */
export function oneStudy(docs: readonly SrDocument[]): string | null {
  const first = docs[0]!;
  for (const d of docs.slice(1)) {
    const differentKey = first.studyKey !== null && d.studyKey !== null && first.studyKey !== d.studyKey;
    const differentDate = first.studyDate !== null && d.studyDate !== null && first.studyDate !== d.studyDate;
    if (differentKey || differentDate) throw refuseStudies(first, d);
  }
  return docs.find((d) => d.studyDate !== null)?.studyDate ?? null;
}

function unitWord(unit: string): string {
  return unit === 'min^-1' ? 'bpm' : unit;
}

function formatValue(v: number): string {
  return String(Number(v.toPrecision(6)));
}

/** A value of one input in words: "112 mL", "68 bpm", "11". */
export function valueText(key: SrKey, value: number): string {
  const unit = unitWord(targetOf(key).unit);
  return `${formatValue(value)}${unit ? ' ' + unit : ''}`;
}

/** The spread limit of repeated measurements in words ("10 %"). */
export const SPREAD_WORDS = `${Math.round(SPREAD_LIMIT * 100)} %`;

/** The source line of one input: code, meaning, method, study date, how chosen. Shown and stored alike. */
export function describeSource(s: SrSource): string {
  return `DICOM SR ${s.code} ${s.meaning}${s.method ? `, ${s.method}` : ''}${s.studyDate ? `, study ${s.studyDate}` : ''} (${s.how})`;
}

/** Import one study's SR documents. Throws InputError when nothing usable is found. */
export async function importStudy(docs: readonly SrDocument[], options: ImportOptions): Promise<SrImport> {
  const studyDate = oneStudy(docs);
  let extracted: Extracted | undefined;
  for (const d of docs) extracted = extract(d, extracted);
  const ex = extracted!;
  if (ex.found.length === 0 && ex.refused.length === 0) {
    throw new InputError({
      field: 'sr',
      value: showValue(docs.length === 1 ? docs[0]!.path : docs.map((d) => d.path).join(', ')),
      reason: 'no echo measurements found (none of the codes listed in docs/sr-import.md)',
      accepted: 'an echo SR (TID 5200 or TID 5300) with coded measurements',
    });
  }
  const { chosen, disagreements } = choose(ex.found);
  const summary: string[] = [];
  const identifying = docs.reduce((n, d) => n + d.identifying, 0);
  summary.push(
    `read ${docs.length === 1 ? 'one DICOM SR file' : `${docs.length} DICOM SR files of one study`}` +
      `${studyDate ? ` (study date ${studyDate})` : ' (no study date in the file)'}; codes of ${[...ex.families].sort().join(' and ')}.`,
  );
  if (identifying > 0) {
    summary.push(`${identifying} identifying attribute${identifying === 1 ? '' : 's'} in the file${docs.length === 1 ? '' : 's'} (names, IDs, birth date, UIDs and the like) ignored: none is shown or stored.`);
  }
  const refusedLines: string[] = ex.refused.map((r) => `not used: ${r.item} in ${showValue(r.file)}: ${r.reason}`);

  const decided = [...chosen];
  for (const d of disagreements) {
    const t = targetOf(d.key);
    const values = d.found.map((f) => valueText(d.key, f.value)).join(', ');
    const value = options.decide ? await options.decide(d, t.label) : null;
    if (value !== null) {
      decided.push({ key: d.key, value, found: d.found, how: 'chosen at the prompt among repeats', method: d.found[0]!.method });
    } else {
      refusedLines.push(`not used: ${t.label}: repeated measurements disagree by ${Math.round(d.spread * 100)} % (${values}); more than the ${SPREAD_WORDS} accepted`);
    }
  }

  const raw: SrImport['raw'] = {};
  const sources: Record<string, SrSource> = {};
  const readLines: string[] = [];
  for (const t of SR_TARGETS) {
    const c = decided.find((x) => x.key === t.key);
    if (!c) continue;
    const row = c.found[0]!.row;
    const shownUnit = unitWord(t.unit);
    const text = valueText(t.key, c.value);
    const source: SrSource = {
      from: 'DICOM SR',
      code: codeText(row.concept),
      meaning: row.concept.meaning,
      ...(c.method ? { method: METHOD_WORDS[c.method] } : {}),
      ...(studyDate ? { studyDate } : {}),
      how: c.how,
    };
    const fieldUnit = options.inputUnits.get(t.key);
    const bare = fieldUnit === undefined || fieldUnit === shownUnit;
    // Repeated cuff readings stay readings (the tool averages them, and its error model counts them).
    const readings = options.readingKeys?.has(t.key) && c.how.startsWith('mean of') && bare;
    raw[t.key] = readings ? c.found.map((f) => f.value) : bare ? c.value : `${c.value} ${t.unit}`;
    sources[t.key] = source;
    readLines.push(`  ${t.label}: ${text} from ${describeSource(source)}`);
  }
  if (ex.sex && options.inputKeys.has('sex')) {
    raw.sex = ex.sex.value;
    readLines.push(`  Sex: ${ex.sex.value} (patient characteristics)`);
  }
  if (readLines.length > 0) summary.push('imported:', ...readLines);
  summary.push(...refusedLines);
  const missing = SR_TARGETS.filter((t) => !decided.some((c) => c.key === t.key) && !ex.refused.some((r) => r.key === t.key)).map((t) => t.label);
  if (missing.length > 0) summary.push(`not in the report: ${missing.join(', ')}.`);
  if (ex.privateItems > 0) summary.push(`${ex.privateItems} item${ex.privateItems === 1 ? '' : 's'} with vendor-private codes ignored.`);
  const notUsed = [...new Set([...ex.refused.map((r) => targetOf(r.key).label), ...disagreements.filter((d) => !decided.some((c) => c.key === d.key)).map((d) => targetOf(d.key).label)])];
  return { raw, sources, studyDate, notFound: missing, notUsed, summary };
}

/** The found items of one input, for a prompt: "112 mL (LN 79996-5, file a.dcm)". */
export function describeFound(f: Found): string {
  return `${valueText(f.key, f.value)} (${f.shown} as given, ${codeText(f.row.concept)}${f.preferred ? ', marked preferred' : ''})`;
}
