/**
 * `--sr` on `assess` and `record add`: read the files, import the study's
 * measurements, print what was imported (on stderr, so `--json` output stays
 * one object), and ask at a terminal when repeated measurements disagree.
 * dcmjs loads here, only when an SR is given.
 */
import { resolve } from 'node:path';
import { NUMERIC_FIELDS } from '../assessment/fields.js';
import { RawInputsSchema, type RawInputs } from '../assessment/inputs.js';
import { SPREAD_WORDS, describeFound, describeSource, importStudy, valueText, type SrImport, type SrSource } from '../sr/import.js';
import { readSrFile } from '../sr/read-dicom.js';
import type { Disagreement } from '../sr/extract.js';
import { wrap } from '../render/terminal.js';
import { canPrompt } from './assess-command.js';
import { info } from './messages.js';

export function srFiles(opts: Record<string, unknown>): string[] {
  const v = opts.sr;
  const given = Array.isArray(v) ? v.map(String) : typeof v === 'string' ? [v] : [];
  // The same file named twice would count its measurements twice as repeats: read it once.
  const seen = new Set<string>();
  return given.filter((f) => !seen.has(resolve(f)) && seen.add(resolve(f)));
}

/** The keys a visit's raw inputs may have (the input schema), for the importer. */
export function inputKeys(): ReadonlySet<string> {
  return new Set(Object.keys(RawInputsSchema.shape).filter((k) => k !== 'errors'));
}

export function inputUnits(): ReadonlyMap<string, string> {
  return new Map(NUMERIC_FIELDS.map((f) => [f.key, f.unit]));
}

/** Inputs that take several readings. */
export function readingKeys(): ReadonlySet<string> {
  return new Set(NUMERIC_FIELDS.filter((f) => f.multiple).map((f) => f.key));
}

async function decideAtTerminal(d: Disagreement, label: string): Promise<number | null> {
  const { select } = await import('@inquirer/prompts');
  const mean = d.found.reduce((a, f) => a + f.value, 0) / d.found.length;
  const choices: { name: string; value: number | null }[] = d.found.map((f) => ({ name: describeFound(f), value: f.value }));
  choices.push({ name: `their mean, ${valueText(d.key, mean)}`, value: Number(mean.toPrecision(12)) });
  choices.push({ name: 'none: I will give the value myself', value: null });
  return select<number | null>({
    message: `${label}: the report's repeated measurements differ by ${Math.round(d.spread * 100)} % (more than ${SPREAD_WORDS}). Which one is right?`,
    choices,
  });
}

/** Import the SR files of `--sr`; null when none is given. */
export async function gatherSr(opts: Record<string, unknown>): Promise<SrImport | null> {
  const files = srFiles(opts);
  if (files.length === 0) return null;
  const docs = [];
  for (const f of files) docs.push(await readSrFile(f));
  const result = await importStudy(docs, { inputKeys: inputKeys(), inputUnits: inputUnits(), readingKeys: readingKeys(), ...(canPrompt(opts) ? { decide: decideAtTerminal } : {}) });
  // Wrapped to the screen (stderr's width, else 100 columns), continuation lines indented.
  const width = Math.max(40, (process.stderr.columns ?? 100) - 'elastimate: '.length);
  for (const line of result.summary) {
    const indent = /^ */.exec(line)![0];
    wrap(line.trim(), width - indent.length).forEach((part, i) => info(`${indent}${i > 0 ? '    ' : ''}${part}`));
  }
  return result;
}

/** The SR's values under the given ones (flags and visit file win), and the sources of what stays from the SR. */
export function underGiven(sr: SrImport | null, given: RawInputs): { raw: RawInputs; sources: Record<string, SrSource> } {
  if (!sr) return { raw: given, sources: {} };
  const fromSr: SrImport['raw'] = { ...sr.raw };
  // Doppler stroke volume needs both LVOT diameter and VTI: half of the pair from the report alone is
  // set aside (and said), rather than refusing the visit for what the report happens to lack.
  for (const [have, lacking, flag] of [['lvotDiameter', 'lvotVti', 'lvot-vti'], ['lvotVti', 'lvotDiameter', 'lvot-diameter']] as const) {
    if (fromSr[have] !== undefined && fromSr[lacking] === undefined && given[lacking] === undefined && given[have] === undefined) {
      delete fromSr[have];
      info(`${have === 'lvotDiameter' ? 'LVOT diameter' : 'LVOT VTI'} from the report set aside: Doppler stroke volume needs the ${lacking === 'lvotVti' ? 'VTI' : 'diameter'} too (give --${flag} to use both).`);
    }
  }
  const raw = { ...fromSr, ...given } as RawInputs;
  if (given.errors) raw.errors = given.errors;
  const sources: Record<string, SrSource> = {};
  for (const [key, s] of Object.entries(sr.sources)) if (fromSr[key] !== undefined && (given as Record<string, unknown>)[key] === undefined) sources[key] = s;
  return { raw, sources };
}

/** Keep only the sources of inputs the visit still holds with the SR's value. */
export function sourcesStillUsed(sources: Record<string, SrSource>, sr: SrImport | null, inputs: RawInputs): Record<string, SrSource> {
  const out: Record<string, SrSource> = {};
  if (!sr) return out;
  for (const [key, s] of Object.entries(sources)) {
    const value = (inputs as Record<string, unknown>)[key];
    if (value !== undefined && JSON.stringify(value) === JSON.stringify(sr.raw[key])) out[key] = s;
  }
  return out;
}

/** Source lines for the inputs-as-used view, by input key. */
export function sourceTexts(sources: Record<string, SrSource>): Record<string, string> {
  return Object.fromEntries(Object.entries(sources).map(([k, s]) => [k, `from ${describeSource(s)}`]));
}

