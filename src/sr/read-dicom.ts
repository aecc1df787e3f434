/**
 * Reading one DICOM Structured Report file with dcmjs (loaded here, only when
 * an SR is given), and keeping only what the importer may use: the study date,
 * an opaque key that groups the files of one study, and the coded and numeric
 * content items of the report tree. Names, IDs, birth date, accession number,
 * institution, operator and physician names, text items and UIDs are never
 * copied out of the parsed data set; they are only counted, so the user can be
 * told once that they were ignored.
 *
 * dcmjs reads what it can: a file cut short at an element boundary parses
 * "successfully" with values missing or short. The checks here refuse what a
 * complete report cannot look like (a study date of three digits, a numeric
 * item without its unit, a code without its scheme).
 */
import { createHash } from 'node:crypto';
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { InputError, showValue } from '../errors.js';
import { readInputFile, type InputKind } from '../io/read-input.js';

/** Larger than any echo report; a bigger file is refused before it is read. */
export const MAX_SR_BYTES = 32 * 1024 * 1024;
/** Deeper than any template nests (TID 5200 is about five levels deep). */
const MAX_DEPTH = 64;

export interface CodeRef {
  scheme: string;
  code: string;
}

export interface SrNumber {
  value: number;
  /** The UCUM code as the file spells it (null when the item has none). */
  unit: string | null;
}

export interface SrNode {
  relationship: string;
  valueType: string;
  name: CodeRef | null;
  /** The value of a CODE item. */
  code?: CodeRef;
  /** The value of a NUM item; null when the item carries no value; 'incomplete' when cut short. */
  num?: SrNumber | null | 'incomplete';
  children: SrNode[];
}

export interface SrDocument {
  path: string;
  /** YYYY-MM-DD, or null when the file has no study date. */
  studyDate: string | null;
  /** A one-way hash of the study's identity, used only to group files; never shown. */
  studyKey: string | null;
  root: SrNode;
  /** How many identifying attributes the file held (none of them is read). */
  identifying: number;
}

/** Attributes that identify a person, place or object: counted, never read. */
const IDENTIFYING = [
  'PatientName', 'PatientID', 'OtherPatientIDs', 'OtherPatientIDsSequence', 'IssuerOfPatientID', 'PatientBirthDate', 'PatientBirthTime',
  'PatientAddress', 'PatientTelephoneNumbers', 'PatientMotherBirthName', 'MilitaryRank', 'EthnicGroup', 'PatientComments',
  'AccessionNumber', 'StudyID', 'InstitutionName', 'InstitutionAddress', 'InstitutionalDepartmentName', 'StationName',
  'ReferringPhysicianName', 'PerformingPhysicianName', 'NameOfPhysiciansReadingStudy', 'OperatorsName', 'PhysiciansOfRecord',
  'VerifyingObserverSequence', 'AuthorObserverSequence', 'ParticipantSequence', 'DeviceSerialNumber',
  'StudyInstanceUID', 'SeriesInstanceUID', 'SOPInstanceUID', 'FrameOfReferenceUID', 'PatientAge', 'PatientSize', 'PatientWeight', 'PatientSex',
];

const SR_ACCEPTED = 'a DICOM structured report (SR) of an echo study';

function refuse(path: string, reason: string): InputError {
  return new InputError({ field: 'sr', value: showValue(path), reason, accepted: SR_ACCEPTED });
}

/** A DICOM SR file, for the one input reader (src/io/read-input.ts): regular, at most 32 MiB. */
export const SR_FILE: InputKind = {
  field: 'sr',
  noun: 'a DICOM SR file',
  limit: MAX_SR_BYTES,
  accepted: SR_ACCEPTED,
  stdin: false,
};

/** The file's bytes, through the shared input reader (missing, folder, device, pipe, oversized: refused). */
export function readSrBytes(path: string): Uint8Array {
  const bytes = readInputFile(path, SR_FILE);
  return new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

type Dcmjs = typeof import('dcmjs').default;
let library: Dcmjs | undefined;

/**
 * dcmjs, loaded on first use with its console logging off (it would print tag values). Its
 * minified CommonJS build beside the main one loads in about half the time of the ES module build
 * (about 0.12 s against 0.25 s here); the package's own entry point is the fallback.
 */
export async function loadDcmjs(): Promise<Dcmjs> {
  if (!library) {
    const require = createRequire(import.meta.url);
    const main = require.resolve('dcmjs');
    const minified = join(dirname(main), 'dcmjs.min.js');
    library = (existsSync(minified) ? require(minified) : require(main)) as Dcmjs;
    library.log.setLevel('silent');
  }
  return library;
}

const SR_CLASS_PREFIX = '1.2.840.10008.5.1.4.1.1.88.';

/** Parse one SR file into the allow-listed document. */
export async function readSrFile(path: string): Promise<SrDocument> {
  const bytes = readSrBytes(path);
  return parseSr(path, bytes, await loadDcmjs());
}

export function parseSr(path: string, bytes: Uint8Array, dcmjs: Dcmjs): SrDocument {
  let data: Record<string, unknown>;
  try {
    const buffer = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
    const message = dcmjs.data.DicomMessage.readFile(buffer);
    data = dcmjs.data.DicomMetaDictionary.naturalizeDataset(message.dict);
  } catch (err) {
    // The library's own message is not shown: it may quote values from the file.
    if (err instanceof RangeError && /call stack/i.test(err.message)) throw refuse(path, 'nested too deeply');
    const head = new TextDecoder('latin1').decode(bytes.subarray(128, 132));
    throw refuse(path, bytes.length < 132 || head !== 'DICM' ? 'not a DICOM file' : 'truncated or damaged DICOM file');
  }
  const sopClass = typeof data.SOPClassUID === 'string' ? data.SOPClassUID : '';
  if (data.Modality !== 'SR' || !sopClass.startsWith(SR_CLASS_PREFIX)) {
    throw refuse(path, sopClass === '' ? 'a DICOM file without a SOP class (truncated, or not a report)' : 'a DICOM object that is not a structured report');
  }
  const studyDate = checkStudyDate(path, data.StudyDate);
  const studyUid = typeof data.StudyInstanceUID === 'string' && data.StudyInstanceUID !== '' ? data.StudyInstanceUID : null;
  const root = toNode(path, data, 'ROOT', 0);
  let identifying = 0;
  for (const name of IDENTIFYING) if (present(data[name])) identifying++;
  return {
    path,
    studyDate,
    studyKey: studyUid ? createHash('sha256').update(studyUid).digest('hex') : null,
    root,
    identifying,
  };
}

function present(v: unknown): boolean {
  if (v === undefined || v === null || v === '') return false;
  if (Array.isArray(v)) return v.length > 0;
  return true;
}

/** DICOM DA: exactly eight digits YYYYMMDD naming a calendar day; anything else is cut short or damaged. */
function checkStudyDate(path: string, value: unknown): string | null {
  if (value === undefined || value === null || value === '') return null;
  const text = typeof value === 'string' ? value.trim() : '';
  const m = /^(\d{4})(\d{2})(\d{2})$/.exec(text);
  if (m) {
    const [year, month, day] = [Number(m[1]), Number(m[2]), Number(m[3])];
    const days = new Date(Date.UTC(year, month, 0)).getUTCDate();
    if (year >= 1900 && month >= 1 && month <= 12 && day >= 1 && day <= days) return `${m[1]}-${m[2]}-${m[3]}`;
  }
  throw refuse(path, `the study date is incomplete or damaged (${text.length} characters; a DICOM date has 8, YYYYMMDD)`);
}

function firstItem(v: unknown): Record<string, unknown> | null {
  const item = Array.isArray(v) ? v[0] : v;
  return item && typeof item === 'object' ? (item as Record<string, unknown>) : null;
}

function codeOf(path: string, v: unknown): CodeRef | null {
  const item = firstItem(v);
  if (!item) return null;
  const scheme = item.CodingSchemeDesignator;
  const code = item.CodeValue ?? item.LongCodeValue ?? item.URNCodeValue;
  if (typeof scheme !== 'string' || scheme.trim() === '' || typeof code !== 'string' || code.trim() === '') {
    throw refuse(path, 'a coded entry without its code or scheme (truncated or damaged)');
  }
  return { scheme: scheme.trim(), code: code.trim() };
}

function numberOf(path: string, item: Record<string, unknown>): SrNode['num'] {
  const measured = firstItem(item.MeasuredValueSequence);
  if (!measured) return null;
  const raw = Array.isArray(measured.NumericValue) ? measured.NumericValue[0] : measured.NumericValue;
  const value = typeof raw === 'number' ? raw : typeof raw === 'string' && raw.trim() !== '' ? Number(raw) : NaN;
  if (!Number.isFinite(value)) return 'incomplete';
  let unit: string | null = null;
  try {
    const u = codeOf(path, measured.MeasurementUnitsCodeSequence);
    unit = u ? (u.scheme === 'UCUM' ? u.code : `${u.scheme}:${u.code}`) : null;
  } catch {
    return 'incomplete';
  }
  return { value, unit };
}

function toNode(path: string, item: Record<string, unknown>, relationship: string, depth: number): SrNode {
  if (depth > MAX_DEPTH) throw refuse(path, 'the report tree is nested too deeply');
  const valueType = typeof item.ValueType === 'string' ? item.ValueType : '';
  if (valueType === '') throw refuse(path, 'a content item without its value type (truncated or damaged)');
  const node: SrNode = { relationship, valueType, name: codeOf(path, item.ConceptNameCodeSequence), children: [] };
  if (valueType === 'CODE') node.code = codeOf(path, item.ConceptCodeSequence) ?? undefined;
  if (valueType === 'NUM') node.num = numberOf(path, item);
  const children = Array.isArray(item.ContentSequence) ? item.ContentSequence : [];
  for (const child of children) {
    if (!child || typeof child !== 'object') continue;
    const c = child as Record<string, unknown>;
    const rel = typeof c.RelationshipType === 'string' ? c.RelationshipType : '';
    if (rel === '') throw refuse(path, 'a content item without its relationship (truncated or damaged)');
    // Only coded, numeric and container items are kept; text, names, dates and references never leave here.
    if (c.ValueType === 'CONTAINER' || c.ValueType === 'NUM' || c.ValueType === 'CODE') node.children.push(toNode(path, c, rel, depth + 1));
    else if (typeof c.ValueType !== 'string' || c.ValueType === '') throw refuse(path, 'a content item without its value type (truncated or damaged)');
  }
  return node;
}
