/**
 * A subject's visits as a series of assessments. Results are computed here,
 * when the file is read, by the same parse and assess as a single visit:
 * nothing computed is ever stored, so the numbers always come from the
 * methods version that is running (Assessment.methodsVersion). Pure.
 */
import { assess, type Assessment } from '../assessment/assess.js';
import { parseInputs, type RawInputs, type VisitInputs } from '../assessment/inputs.js';
import { InputError, showValue } from '../errors.js';
import type { SubjectFile, SubjectInfo, Visit } from './subject-schema.js';

export interface SeriesEntry {
  /** 1-based position in date order: the number `record show` prints. */
  index: number;
  date: string;
  visit: Visit;
  assessment: Assessment;
}

function subjectOf(subject: SubjectFile | SubjectInfo): SubjectInfo {
  return 'visits' in subject ? subject.subject : subject;
}

/** Age in whole years at a visit from the birth year alone (may be one year high before the birthday). */
export function ageAtVisit(birthYear: number, date: string): number {
  return Number(date.slice(0, 4)) - birthYear;
}

/**
 * The raw inputs of a visit with the subject's own data underneath: height and
 * sex from the subject, age from the birth year and the visit date. Anything
 * the visit itself records wins.
 */
export function visitRawInputs(subject: SubjectFile | SubjectInfo, visit: Visit): RawInputs {
  const s = subjectOf(subject);
  const base: RawInputs = {};
  if (s.height !== undefined) base.height = s.height;
  if (s.sex !== undefined) base.sex = s.sex;
  if (s.birthYear !== undefined) base.age = ageAtVisit(s.birthYear, visit.date);
  return { ...base, ...visit.inputs };
}

/** Parsed inputs of one visit (see visitRawInputs); InputError names the visit and the field. */
export function visitInputs(subject: SubjectFile | SubjectInfo, visit: Visit): VisitInputs {
  try {
    return parseInputs(visitRawInputs(subject, visit));
  } catch (err) {
    if (err instanceof InputError) {
      throw new InputError(err.problems.map((p) => ({ ...p, field: `visit ${visit.date}: ${p.field}` })));
    }
    throw err;
  }
}

/** Visits in date order (stable: visits on the same date keep their file order). */
export function visitsInOrder(file: SubjectFile): { index: number; visit: Visit; position: number }[] {
  return file.visits
    .map((visit, position) => ({ visit, position }))
    .sort((a, b) => (a.visit.date < b.visit.date ? -1 : a.visit.date > b.visit.date ? 1 : a.position - b.position))
    .map((v, i) => ({ ...v, index: i + 1 }));
}

/** Every visit assessed, in date order. */
export function assessSeries(file: SubjectFile): SeriesEntry[] {
  return visitsInOrder(file).map(({ index, visit }) => ({
    index,
    date: visit.date,
    visit,
    assessment: assess(visitInputs(file, visit)),
  }));
}

/**
 * Find a visit by 1-based index (as `record show` numbers them) or by date.
 * A date shared by several visits is ambiguous: the error lists their numbers.
 */
export function findVisit(file: SubjectFile, selector: string): { index: number; visit: Visit; position: number } {
  const ordered = visitsInOrder(file);
  const text = selector.trim();
  const count = ordered.length;
  const accepted = count === 0 ? 'a visit, but this file has none yet' : `a visit number 1–${count} or the date of one visit (${ordered.map((v) => v.visit.date).join(', ')})`;
  if (/^\d+$/.test(text)) {
    const n = Number(text);
    const hit = ordered.find((v) => v.index === n);
    if (!hit) throw new InputError({ field: 'visit', value: showValue(selector), reason: 'no such visit', accepted });
    return hit;
  }
  if (/^\d{4}-\d{2}-\d{2}$/.test(text)) {
    const hits = ordered.filter((v) => v.visit.date === text);
    if (hits.length === 1) return hits[0]!;
    if (hits.length > 1) {
      throw new InputError({ field: 'visit', value: showValue(selector), reason: `${hits.length} visits share this date`, accepted: `one of their numbers: ${hits.map((h) => h.index).join(', ')}` });
    }
    throw new InputError({ field: 'visit', value: showValue(selector), reason: 'no visit on this date', accepted });
  }
  throw new InputError({ field: 'visit', value: showValue(selector), accepted });
}

/** Insert a visit keeping the file in date order (after any visit on the same date). */
export function insertVisit(file: SubjectFile, visit: Visit): SubjectFile {
  const at = file.visits.findIndex((v) => v.date > visit.date);
  const visits = [...file.visits];
  visits.splice(at === -1 ? visits.length : at, 0, visit);
  return { ...file, visits };
}

const BARE_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Inputs as they will be stored: a value typed as a bare number is kept as a
 * number, text with a unit is kept as text ("16.5kPa"), and a single reading
 * of SBP or DBP is kept as one value. Nothing is converted between units.
 */
export function tidyEntered(raw: RawInputs): RawInputs {
  const out: Record<string, unknown> = {};
  const one = (v: unknown): unknown => (typeof v === 'string' && BARE_NUMBER.test(v.trim()) ? Number(v.trim()) : v);
  for (const [key, value] of Object.entries(raw)) {
    if (value === undefined) continue;
    if (key === 'errors') {
      out[key] = value;
    } else if (Array.isArray(value)) {
      const list = value.map(one);
      out[key] = list.length === 1 ? list[0] : list;
    } else out[key] = one(value);
  }
  return out as RawInputs;
}
