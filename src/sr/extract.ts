/**
 * From the allow-listed SR tree to measurements: numeric items found anywhere
 * in the tree by concept code, made specific by their finding site, method,
 * image mode and flow direction (their own or an enclosing container's), with
 * units from their UCUM code converted through the unit layer. Pure apart
 * from the unit layer; no file access and no dcmjs here.
 */
import { showValue } from '../errors.js';
import { convertMeasured } from '../units/quantity.js';
import {
  CONCEPTS, FINDING_SITE, FLOW_DIRECTION, IMAGE_MODE, MEASUREMENT_METHOD, METHOD_RANK, METHOD_VALUES, METHOD_WORDS,
  PATIENT_CHARACTERISTICS, READ_SCHEMES, SELECTION_STATUS, SELECTION_VALUES, SEX_VALUES, SUBJECT_SEX, UCUM_UNITS,
  codeText, sameCode, targetOf, type ConceptRow, type MethodName, type SrKey,
} from './codes.js';
import type { CodeRef, SrDocument, SrNode } from './read-dicom.js';

/** One numeric item the importer recognised, converted to the target unit. */
export interface Found {
  key: SrKey;
  value: number;
  /** The value as the file gives it, e.g. "41 mm". */
  shown: string;
  row: ConceptRow;
  /** For volumes and EF: the method; null for other measurements. */
  method: MethodName | null;
  preferred: boolean;
  studyDate: string | null;
  file: string;
}

/** An item that names a concept the importer reads but cannot be used. */
export interface Refused {
  key: SrKey;
  file: string;
  /** e.g. "LN 79996-5 Left ventricular end diastolic volume biplane (MOD)" */
  item: string;
  reason: string;
}

export interface Extracted {
  found: Found[];
  refused: Refused[];
  sex: { value: 'female' | 'male'; file: string } | null;
  /** Template families whose codes were seen: 'TID 5200' and/or 'TID 5300'. */
  families: Set<string>;
  /** Items with a code of a scheme not read (vendor-private): ignored. */
  privateItems: number;
}

interface Context {
  site: CodeRef | null;
  method: CodeRef | null;
  mode: CodeRef | null;
  flow: CodeRef | null;
  patientSection: boolean;
}

const VOLUME_KEYS: ReadonlySet<SrKey> = new Set(['edv', 'esv', 'ef']);

function modifiers(node: SrNode, inherited: Context): Context {
  const ctx = { ...inherited };
  for (const child of node.children) {
    if (child.valueType !== 'CODE' || !child.name || !child.code) continue;
    if (child.relationship !== 'HAS CONCEPT MOD' && child.relationship !== 'HAS ACQ CONTEXT') continue;
    if (!READ_SCHEMES.has(child.code.scheme)) continue;
    if (sameCode(child.name, FINDING_SITE)) ctx.site = child.code;
    else if (sameCode(child.name, MEASUREMENT_METHOD)) ctx.method = child.code;
    else if (sameCode(child.name, IMAGE_MODE)) ctx.mode = child.code;
    else if (sameCode(child.name, FLOW_DIRECTION)) ctx.flow = child.code;
  }
  return ctx;
}

function isPreferred(node: SrNode): boolean {
  return node.children.some(
    (c) => c.valueType === 'CODE' && c.name !== null && sameCode(c.name, SELECTION_STATUS) && c.code !== undefined && SELECTION_VALUES.some((v) => sameCode(v, c.code!)),
  );
}

/** The volume method of an item: pre-coordinated in the code, else from its image mode and method modifiers. */
function methodOf(row: ConceptRow, ctx: Context): MethodName | 'other' {
  if (row.method) return row.method;
  const threeD = METHOD_VALUES.find((m) => m.method === 'threeD')!;
  if (ctx.mode && sameCode(ctx.mode, threeD)) return 'threeD';
  if (!ctx.method) return 'unstated';
  const known = METHOD_VALUES.find((m) => sameCode(m, ctx.method!));
  return known ? known.method : 'other';
}

function itemText(row: ConceptRow): string {
  return `${codeText(row.concept)} ${row.concept.meaning}`;
}

/** Walk one document. */
export function extract(doc: SrDocument, into?: Extracted): Extracted {
  const out: Extracted = into ?? { found: [], refused: [], sex: null, families: new Set(), privateItems: 0 };
  const start: Context = { site: null, method: null, mode: null, flow: null, patientSection: false };
  const visit = (node: SrNode, inherited: Context) => {
    if (node.name && !READ_SCHEMES.has(node.name.scheme) && node.name.scheme !== 'UCUM') {
      out.privateItems++;
      return; // a vendor's private concept: neither it nor anything under it is read
    }
    const ctx = modifiers(node, inherited);
    if (node.valueType === 'CONTAINER') {
      if (node.name && sameCode(node.name, PATIENT_CHARACTERISTICS)) ctx.patientSection = true;
      for (const child of node.children) visit(child, ctx);
      return;
    }
    if (node.valueType === 'CODE' && ctx.patientSection && node.name && sameCode(node.name, SUBJECT_SEX) && node.code) {
      const sex = SEX_VALUES.find((v) => sameCode(v, node.code!));
      if (sex) out.sex = { value: sex.sex, file: doc.path };
      return;
    }
    if (node.valueType === 'NUM' && node.name) measure(node, ctx);
  };
  const measure = (node: SrNode, ctx: Context) => {
    const rows = CONCEPTS.filter((r) => sameCode(r.concept, node.name!));
    for (const row of rows) {
      const target = targetOf(row.key);
      if (target.patientSection && !ctx.patientSection) continue;
      if (row.sites && !(ctx.site && row.sites.some((s) => sameCode(s, ctx.site!)))) continue;
      if (row.flow && !(ctx.flow && sameCode(row.flow, ctx.flow))) continue;
      out.families.add(row.list.includes('CID 12300') ? 'TID 5300' : 'TID 5200');
      const refuse = (reason: string) => out.refused.push({ key: row.key, file: doc.path, item: itemText(row), reason });
      const num = node.num;
      if (num === null || num === undefined) continue; // an item without a value (e.g. "not measured")
      if (num === 'incomplete') {
        refuse('the value or its unit is incomplete (truncated or damaged)');
        continue;
      }
      let method: MethodName | null = null;
      if (VOLUME_KEYS.has(row.key)) {
        const m = methodOf(row, ctx);
        if (m === 'other') {
          refuse(`measured by a method other than ${METHOD_WORDS.biplaneDisks}, 3D or ${METHOD_WORDS.singlePlane} (${codeText(ctx.method!)})`);
          continue;
        }
        method = m;
      }
      const converted = convert(num.value, num.unit, target.dimension, target.unit);
      if (typeof converted === 'string') {
        refuse(converted);
        continue;
      }
      out.found.push({
        key: row.key,
        value: converted,
        shown: `${num.value}${num.unit ? ' ' + num.unit : ''}`,
        row,
        method,
        preferred: isPreferred(node),
        studyDate: doc.studyDate,
        file: doc.path,
      });
    }
  };
  visit(doc.root, start);
  return out;
}

/** A value in the target unit, or the reason it is refused. */
export function convert(value: number, ucum: string | null, dimension: string, target: string): number | string {
  if (ucum === null) return 'no unit given';
  const unit = UCUM_UNITS.get(ucum);
  const shown = showValue(ucum); // clipped and with control characters made visible, as every shown value
  if (!unit) return `unknown unit ${shown} (UCUM codes such as mL, mm, ms, m/s, /min, % are read)`;
  if (unit.dimension !== dimension) return `unit ${shown} is not a ${dimension} unit`;
  if (dimension === 'percent' || dimension === 'ratio') return value;
  const converted = convertMeasured(value, unit.math, target);
  return converted === null ? `unit ${shown} could not be converted to ${target}` : converted;
}

// ---- Choosing one value per input ----

/**
 * Repeated measurements of one input that differ by more than this share of their mean are
 * not averaged: the user is asked (terminal) or the input is refused. Our own choice: twice
 * the 5 % test–retest spread commonly quoted for biplane volumes (common practice, from memory).
 */
export const SPREAD_LIMIT = 0.1;

export interface Chosen {
  key: SrKey;
  value: number;
  found: Found[];
  /** How the value was chosen, in words: "one measurement", "marked preferred in the report", "mean of 3". */
  how: string;
  method: MethodName | null;
}

export interface Disagreement {
  key: SrKey;
  found: Found[];
  spread: number;
}

export interface Choices {
  chosen: Chosen[];
  disagreements: Disagreement[];
}

function spreadOf(values: number[]): number {
  const mean = values.reduce((a, b) => a + b, 0) / values.length;
  return mean === 0 ? 0 : (Math.max(...values) - Math.min(...values)) / Math.abs(mean);
}

/** The method rank used for a volume input: EDV and ESV from one method when both exist in it. */
function volumeRanks(found: Found[]): Map<SrKey, number> {
  const ranks = new Map<SrKey, number>();
  const ranksOf = (key: SrKey) => new Set(found.filter((f) => f.key === key).map((f) => METHOD_RANK[f.method ?? 'unstated']));
  const edv = ranksOf('edv');
  const esv = ranksOf('esv');
  const shared = [...edv].filter((r) => esv.has(r)).sort((a, b) => a - b)[0];
  for (const key of ['edv', 'esv', 'ef'] as SrKey[]) {
    const own = [...ranksOf(key)].sort((a, b) => a - b)[0];
    if (own === undefined) continue;
    ranks.set(key, key !== 'ef' && shared !== undefined ? shared : own);
  }
  return ranks;
}

export function choose(found: Found[]): Choices {
  const out: Choices = { chosen: [], disagreements: [] };
  const ranks = volumeRanks(found);
  const keys = [...new Set(found.map((f) => f.key))];
  for (const key of keys) {
    let group = found.filter((f) => f.key === key);
    const rank = ranks.get(key);
    if (rank !== undefined) group = group.filter((f) => METHOD_RANK[f.method ?? 'unstated'] === rank);
    const preferred = group.filter((f) => f.preferred);
    const pool = preferred.length > 0 ? preferred : group;
    const values = pool.map((f) => f.value);
    const spread = spreadOf(values);
    if (pool.length > 1 && spread > SPREAD_LIMIT) {
      out.disagreements.push({ key, found: pool, spread });
      continue;
    }
    const mean = values.reduce((a, b) => a + b, 0) / values.length;
    const how =
      preferred.length === 1 ? 'marked preferred in the report'
        : pool.length === 1 ? 'one measurement'
          : `mean of ${pool.length}${preferred.length > 1 ? ' marked preferred' : ''} measurements`;
    out.chosen.push({ key, value: Number(mean.toPrecision(12)), found: pool, how, method: pool[0]!.method });
  }
  return out;
}
