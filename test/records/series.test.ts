import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { parseInputs } from '../../src/assessment/inputs.js';
import { METHODS_VERSION } from '../../src/assessment/result.js';
import { pseudonymWarnings } from '../../src/records/pseudonym.js';
import { ageAtVisit, assessSeries, findVisit, insertVisit, tidyEntered, visitInputs, visitRawInputs, visitsInOrder } from '../../src/records/series.js';
import { SubjectFileSchema, isCalendarDate, newSubjectFile, type SubjectFile, type Visit } from '../../src/records/subject-schema.js';

const base = { sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, pep: 90, et: 290 };
const v = (date: string, extra: Record<string, unknown> = {}, note?: string): Visit => ({ date, inputs: { ...base, ...extra }, ...(note ? { note } : {}) });

const file: SubjectFile = {
  format: 'elastimate-subject',
  schemaVersion: 1,
  subject: { id: 'HF-077', sex: 'male', birthYear: 1961, height: '1.78 m' },
  visits: [v('2024-03-01', { weight: 84 }), v('2023-11-20', { weight: 86 }), v('2024-03-01', { hr: 72, height: 176 }, 'after the walk test')],
};

describe('visits of a subject', () => {
  it('puts the subject height, sex and age from the birth year under the visit inputs; the visit wins', () => {
    const raw = visitRawInputs(file, file.visits[2]!);
    expect(raw.height).toBe(176); // the visit's own height
    expect(raw.sex).toBe('male');
    expect(raw.age).toBe(2024 - 1961);
    const inputs = visitInputs(file, file.visits[0]!);
    expect(inputs.height).toBeCloseTo(178, 10); // "1.78 m" from the subject, converted with mathjs
    expect(inputs.sex).toBe('male');
    expect(inputs.age).toBe(63);
    expect(ageAtVisit(1961, '2024-01-01')).toBe(63);
  });

  it('orders visits by date, keeping the file order for visits on the same date', () => {
    expect(visitsInOrder(file).map((x) => `${x.index}:${x.visit.date}:${x.position}`)).toEqual(['1:2023-11-20:1', '2:2024-03-01:0', '3:2024-03-01:2']);
  });

  it('assesses every visit when read, with the same results as assess on the merged inputs', () => {
    const series = assessSeries(file);
    expect(series.map((e) => e.index)).toEqual([1, 2, 3]);
    for (const e of series) {
      expect(e.assessment.methodsVersion).toBe(METHODS_VERSION);
      expect(e.assessment.results).toEqual(assess(parseInputs(visitRawInputs(file, e.visit))).results);
    }
    // BSA from the subject's height (Mosteller: √(178·86/3600) = 2.0621 m², computed here).
    expect(series[0]!.assessment.results.bsa.value).toBeCloseTo(Math.sqrt((178 * 86) / 3600), 10);
  });

  it('names the visit and the field when stored inputs no longer parse', () => {
    const broken: SubjectFile = { ...file, visits: [v('2024-01-02', { dbp: 130 })] };
    expect(() => assessSeries(broken)).toThrow(/visit 2024-01-02: dbp: got 130; not below SBP 120/);
  });

  it('finds a visit by number or by date, and says which numbers share a date', () => {
    expect(findVisit(file, '1').visit.date).toBe('2023-11-20');
    expect(findVisit(file, '2023-11-20').index).toBe(1);
    expect(() => findVisit(file, '2024-03-01')).toThrow(/2 visits share this date; accepted: one of their numbers: 2, 3/);
    expect(() => findVisit(file, '4')).toThrow(/visit: got "4"; no such visit; accepted: a visit number 1–3/);
    expect(() => findVisit(file, 'last')).toThrow(/visit: got "last"/);
    expect(() => findVisit(newSubjectFile({ id: 'X-1' }), '1')).toThrow(/has none yet/);
  });

  it('inserts a new visit in date order, after visits of the same date', () => {
    const next = insertVisit(file, v('2024-03-01', {}, 'third that day'));
    expect(next.visits.map((x) => x.note ?? x.date)).toEqual(['2024-03-01', '2023-11-20', 'after the walk test', 'third that day']);
    const early = insertVisit(file, v('2023-01-01'));
    expect(early.visits[0]!.date).toBe('2023-01-01');
  });

  it('stores bare numbers as numbers and keeps units as typed', () => {
    expect(tidyEntered({ sbp: ['120', '118'], dbp: ['80'], edv: '0.12 L', pep: '90', et: 290, rhythm: 'sinus', errors: { sbp: '6' } })).toEqual({
      sbp: [120, 118], dbp: 80, edv: '0.12 L', pep: 90, et: 290, rhythm: 'sinus', errors: { sbp: '6' },
    });
  });
});

describe('subject-file schema', () => {
  it('accepts real calendar dates only', () => {
    expect(isCalendarDate('2024-02-29')).toBe(true); // leap year
    expect(isCalendarDate('2023-02-29')).toBe(false);
    expect(isCalendarDate('2024-04-31')).toBe(false);
    expect(isCalendarDate('2024-4-01')).toBe(false);
    expect(isCalendarDate('01.04.2024')).toBe(false);
  });

  it('checks the whole file, including each visit\'s inputs against the visit-file keys', () => {
    expect(SubjectFileSchema.safeParse(file).success).toBe(true);
    expect(SubjectFileSchema.safeParse({ ...file, visits: [{ date: '2024-01-01', inputs: { sbp: 120, pressure: 1 } }] }).success).toBe(false);
    expect(SubjectFileSchema.safeParse({ ...file, subject: { id: ' padded' } }).success).toBe(false);
    expect(SubjectFileSchema.safeParse({ ...file, subject: { id: 'X', birthYear: 1850 } }).success).toBe(false);
  });
});

describe('pseudonymous ids', () => {
  it('passes codes such as CO-203, HT-014, HF 077', () => {
    for (const id of ['CO-203', 'HT-014', 'HF 077', 'S0042', 'site3-p17', 'TRIAL-2024-001']) expect(pseudonymWarnings(id)).toEqual([]);
  });
  it('warns about what looks like a personal name', () => {
    for (const id of ['Maria Keller', 'keller, maria', 'J. Smith', 'patient Anna Berg 3']) expect(pseudonymWarnings(id).join(' ')).toMatch(/personal name/);
  });
  it('warns about what looks like a date of birth', () => {
    for (const id of ['P-1978-04-12', '19780412', 'KM12.04.1978', '12/04/78-x']) expect(pseudonymWarnings(id).join(' ')).toMatch(/full date/);
  });
});
