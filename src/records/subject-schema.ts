/**
 * The subject file: one JSON file per (pseudonymous) subject holding the
 * visits as entered. Results are never stored; they are computed when the
 * file is read, so a file never carries numbers from an older method.
 * Documented in docs/subject-file.md. This zod schema is the single source
 * of truth: types are inferred from it and error messages come from it.
 */
import { z } from 'zod';
import { SEXES } from '../assessment/fields.js';
import { RawInputsSchema } from '../assessment/inputs.js';

export const SUBJECT_FORMAT = 'elastimate-subject';
/** The schema version this build writes. Files with a higher number are refused. */
export const CURRENT_SCHEMA_VERSION = 1;

const BIRTH_YEAR_RANGE = { min: 1900, max: 2100 } as const;

/** A calendar date written YYYY-MM-DD that exists (no 2024-02-30). */
export function isCalendarDate(text: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text);
  if (!m) return false;
  const year = Number(m[1]);
  const month = Number(m[2]);
  const day = Number(m[3]);
  if (month < 1 || month > 12 || day < 1) return false;
  const daysInMonth = new Date(Date.UTC(year, month, 0)).getUTCDate();
  return day <= daysInMonth;
}

export const VisitDateSchema = z
  .string()
  .refine(isCalendarDate, { message: 'a calendar date written YYYY-MM-DD, e.g. 2024-03-18' });

/**
 * A subject id: pseudonymous text, 1–64 printable characters, no line breaks.
 * Whether it looks like a name or a birth date is warned about
 * (src/records/pseudonym.ts), not refused.
 */
export const SubjectIdSchema = z
  .string()
  .min(1, { message: 'a pseudonymous id of 1–64 characters, e.g. CO-203' })
  .max(64, { message: 'a pseudonymous id of 1–64 characters, e.g. CO-203' })
  .refine((s) => s.trim() === s && !/[\u0000-\u001f\u007f]/.test(s), {
    message: 'printable characters without leading or trailing spaces, e.g. CO-203',
  });

/** The provenance of one imported input: a DICOM SR concept, its method and the study date. */
export const InputSourceSchema = z
  .object({
    from: z.literal('DICOM SR'),
    code: z.string().max(64),
    meaning: z.string().max(200),
    method: z.string().max(80).optional(),
    studyDate: VisitDateSchema.optional(),
    how: z.string().max(120),
  })
  .strict();

export const VisitSchema = z
  .object({
    date: VisitDateSchema,
    /** The inputs as entered, with their units (same keys as a visit file). */
    inputs: RawInputsSchema,
    note: z.string().max(10_000, { message: 'a note of at most 10,000 characters' }).optional(),
    /** Where inputs came from when imported, by input key (docs/sr-import.md); typed inputs have none. */
    sources: z.record(z.string(), InputSourceSchema).optional(),
  })
  .strict();

export const SubjectSchema = z
  .object({
    id: SubjectIdSchema,
    sex: z.enum(SEXES).optional(),
    birthYear: z
      .number()
      .int({ message: 'a whole year, e.g. 1978' })
      .min(BIRTH_YEAR_RANGE.min, { message: `a year from ${BIRTH_YEAR_RANGE.min} to ${BIRTH_YEAR_RANGE.max}` })
      .max(BIRTH_YEAR_RANGE.max, { message: `a year from ${BIRTH_YEAR_RANGE.min} to ${BIRTH_YEAR_RANGE.max}` })
      .optional(),
    /** Adult height, as entered (a number in cm, or text with a unit such as "1.65 m"); a visit's own height wins. */
    height: z.union([z.number(), z.string()]).optional(),
  })
  .strict();

export const SubjectFileSchema = z
  .object({
    format: z.literal(SUBJECT_FORMAT),
    schemaVersion: z.number().int().min(1),
    subject: SubjectSchema,
    visits: z.array(VisitSchema),
  })
  .strict();

export type SubjectFile = z.infer<typeof SubjectFileSchema>;
export type Visit = z.infer<typeof VisitSchema>;
export type SubjectInfo = z.infer<typeof SubjectSchema>;

export { BIRTH_YEAR_RANGE };

/** A new, empty subject file at the current schema version. */
export function newSubjectFile(subject: SubjectInfo): SubjectFile {
  return { format: SUBJECT_FORMAT, schemaVersion: CURRENT_SCHEMA_VERSION, subject, visits: [] };
}
