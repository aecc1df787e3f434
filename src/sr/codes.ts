/**
 * The DICOM SR code table: every code the importer reads, in one place, each
 * row naming the code list it comes from. Sources: DICOM PS3.16 (Content
 * Mapping Resource) context groups, quoted as "CID n"; LOINC (LN), SNOMED CT
 * (SCT) and DICOM's own codes (DCM) as PS3.16 lists them. Body height and
 * weight are the LOINC vital-sign codes (LOINC; also the HL7 FHIR vital-signs
 * profiles). test/sr/codes.test.ts checks every row against the code
 * dictionary Debian's python3-pydicom ships (an independent copy of PS3.16).
 *
 * Two template families are read, anywhere in the content tree:
 * - TID 5200 (Adult Echocardiography Procedure Report): generic concepts made
 *   specific by modifiers (finding site, measurement method, image mode, flow
 *   direction), e.g. "Velocity Time Integral" with finding site "Left Ventricle
 *   Outflow Tract".
 * - TID 5300 (Simplified Adult Echo, CID 12300 "Core Echo Measurements"):
 *   pre-coordinated LOINC codes that carry site and method in the code itself.
 * Codes of any other scheme (vendor-private schemes such as 99xxx) are never read.
 */

/** A coded concept: scheme designator, code value, meaning (as PS3.16 spells it). */
export interface Code {
  scheme: 'LN' | 'SCT' | 'DCM';
  code: string;
  meaning: string;
}

/** The code schemes the importer reads; everything else counts as private and is ignored. */
export const READ_SCHEMES: ReadonlySet<string> = new Set(['LN', 'SCT', 'SRT', 'DCM']);

/**
 * The SNOMED-RT codes (scheme SRT) that reports written before DICOM moved to SNOMED CT use for
 * the SNOMED CT concepts of this table, from PS3.16's SNOMED CT to SNOMED-RT mapping (checked
 * against pydicom's copy of it, pydicom.sr._snomed_dict). An SRT code matches its SCT concept.
 */
export const SRT_EQUIVALENTS: Readonly<Record<string, string>> = {
  '363698007': 'G-C0E3', // Finding Site
  '370129005': 'G-C036', // Measurement Method
  '399264008': 'G-0373', // Image Mode
  '260674002': 'G-C048', // Direction of flow
  '13418002': 'T-32650', // Left Ventricle Outflow Tract
  '44627009': 'T-32550', // Right Ventricle Outflow Tract
  '87878005': 'T-32600', // Left Ventricle
  '34202007': 'T-35400', // Aortic Valve
  '91134007': 'T-35300', // Mitral Valve
  '46030003': 'T-35100', // Tricuspid Valve
  '397417004': 'G-0367', // Regurgitant Flow
  '426865009': 'P0-02242', // 3D mode
  '399027007': 'G-038F', // Cardiovascular Orifice Diameter
  '90096001': 'F-32120', // Stroke Volume
  '399140004': 'G-037B', // Ratio of MV Peak Velocity to LV Peak Tissue Velocity E-Wave
};

/** Keys of the values an SR can supply: the visit inputs, plus the right-heart inputs. */
export type SrKey =
  | 'edv' | 'esv' | 'ef' | 'lvotDiameter' | 'lvotVti' | 'sv' | 'pep' | 'et' | 'hr' | 'lvids' | 'pwts'
  | 'eOverEPrime' | 'sbp' | 'dbp' | 'height' | 'weight'
  | 'tapse' | 'trVelocity' | 'ivc' | 'ivcCollapse';

export type Dimension = 'volume' | 'length' | 'time' | 'velocity' | 'rate' | 'percent' | 'ratio' | 'pressure' | 'mass';

export interface SrTarget {
  key: SrKey;
  /** Words for people. */
  label: string;
  dimension: Dimension;
  /** The unit the value is converted to (mathjs spelling; '' for a plain ratio). */
  unit: string;
  /** Only read inside the patient-characteristics section (TID 5201 / DCM 121118). */
  patientSection?: boolean;
}

/** What an SR can supply, in the order the summary lists it. */
export const SR_TARGETS: readonly SrTarget[] = [
  { key: 'edv', label: 'LV end-diastolic volume', dimension: 'volume', unit: 'mL' },
  { key: 'esv', label: 'LV end-systolic volume', dimension: 'volume', unit: 'mL' },
  { key: 'ef', label: 'Ejection fraction', dimension: 'percent', unit: '%' },
  { key: 'sv', label: 'Doppler stroke volume (LVOT)', dimension: 'volume', unit: 'mL' },
  { key: 'lvotDiameter', label: 'LVOT diameter', dimension: 'length', unit: 'cm' },
  { key: 'lvotVti', label: 'LVOT velocity–time integral', dimension: 'length', unit: 'cm' },
  { key: 'pep', label: 'Pre-ejection period', dimension: 'time', unit: 'ms' },
  { key: 'et', label: 'Ejection time', dimension: 'time', unit: 'ms' },
  { key: 'hr', label: 'Heart rate', dimension: 'rate', unit: 'min^-1' },
  { key: 'lvids', label: 'LV end-systolic dimension LVIDs', dimension: 'length', unit: 'cm' },
  { key: 'pwts', label: 'Posterior wall at end-systole', dimension: 'length', unit: 'cm' },
  { key: 'eOverEPrime', label: 'E/e′ ratio', dimension: 'ratio', unit: '' },
  { key: 'tapse', label: 'TAPSE', dimension: 'length', unit: 'mm' },
  { key: 'trVelocity', label: 'TR peak velocity', dimension: 'velocity', unit: 'm/s' },
  { key: 'ivc', label: 'IVC diameter', dimension: 'length', unit: 'cm' },
  { key: 'ivcCollapse', label: 'IVC collapse', dimension: 'percent', unit: '%' },
  { key: 'sbp', label: 'Systolic blood pressure', dimension: 'pressure', unit: 'mmHg' },
  { key: 'dbp', label: 'Diastolic blood pressure', dimension: 'pressure', unit: 'mmHg' },
  { key: 'height', label: 'Height', dimension: 'length', unit: 'cm', patientSection: true },
  { key: 'weight', label: 'Weight', dimension: 'mass', unit: 'kg', patientSection: true },
];

export function targetOf(key: SrKey): SrTarget {
  return SR_TARGETS.find((t) => t.key === key)!;
}

/**
 * Volume methods, best first (common practice, ASE/EACVI chamber quantification 2015: biplane
 * method of disks is the recommended 2D method; 3D where available and reliable; a single
 * plane only when the second view is not usable). Rank 4: no method stated.
 */
export const METHOD_RANK = { biplaneDisks: 1, threeD: 2, singlePlane: 3, unstated: 4 } as const;
export type MethodName = keyof typeof METHOD_RANK;
export const METHOD_WORDS: Record<MethodName, string> = {
  biplaneDisks: 'biplane method of disks',
  threeD: '3D',
  singlePlane: 'single-plane method of disks',
  unstated: 'method not stated',
};

// ---- Modifier concepts (names of HAS CONCEPT MOD / HAS ACQ CONTEXT children) ----
// SNOMED CT and DICOM codes as PS3.16 lists them; the CIDs named are those of their values.
export const FINDING_SITE: Code = { scheme: 'SCT', code: '363698007', meaning: 'Finding Site' }; // SNOMED CT, PS3.16 CID 9000
export const MEASUREMENT_METHOD: Code = { scheme: 'SCT', code: '370129005', meaning: 'Measurement Method' }; // SNOMED CT, PS3.16 CID 9000; values CID 12227
export const IMAGE_MODE: Code = { scheme: 'SCT', code: '399264008', meaning: 'Image Mode' }; // SNOMED CT; values CID 12224
export const FLOW_DIRECTION: Code = { scheme: 'SCT', code: '260674002', meaning: 'Direction of flow' }; // SNOMED CT; values CID 12221
export const SELECTION_STATUS: Code = { scheme: 'DCM', code: '121404', meaning: 'Selection Status' }; // DCM, PS3.16; values CID 224
export const PATIENT_CHARACTERISTICS: Code = { scheme: 'DCM', code: '121118', meaning: 'Patient Characteristics' }; // DCM, PS3.16 (the TID 5201 section)
export const SUBJECT_SEX: Code = { scheme: 'DCM', code: '121032', meaning: 'Subject Sex' }; // DCM, PS3.16; values CID 7455

/** CID 7455 Sex: the two values the tool's reference ranges use. */
export const SEX_VALUES: readonly (Code & { sex: 'female' | 'male' })[] = [
  { scheme: 'DCM', code: 'F', meaning: 'Female', sex: 'female' },
  { scheme: 'DCM', code: 'M', meaning: 'Male', sex: 'male' },
];

/** CID 224 Selection Method: any of these marks the measurement the SR prefers. */
export const SELECTION_VALUES: readonly Code[] = [
  { scheme: 'DCM', code: '121410', meaning: 'User chosen value' },
  { scheme: 'DCM', code: '121411', meaning: 'Most recent value chosen' },
  { scheme: 'DCM', code: '121412', meaning: 'Mean value chosen' },
];

// ---- Finding sites (CID 12236 and neighbours, SNOMED CT) ----
export const SITES = {
  lvot: { scheme: 'SCT', code: '13418002', meaning: 'Left Ventricle Outflow Tract' },
  rvot: { scheme: 'SCT', code: '44627009', meaning: 'Right Ventricle Outflow Tract' },
  leftVentricle: { scheme: 'SCT', code: '87878005', meaning: 'Left Ventricle' },
  aorticValve: { scheme: 'SCT', code: '34202007', meaning: 'Aortic Valve' },
  mitralValve: { scheme: 'SCT', code: '91134007', meaning: 'Mitral Valve' },
  tricuspidValve: { scheme: 'SCT', code: '46030003', meaning: 'Tricuspid Valve' },
} as const satisfies Record<string, Code>;

/** CID 12221 Flow Direction: the regurgitant jet. */
export const REGURGITANT_FLOW: Code = { scheme: 'SCT', code: '397417004', meaning: 'Regurgitant Flow' };

/** CID 12227/12228 method values and CID 12224 image mode values that set a volume method. */
export const METHOD_VALUES: readonly (Code & { method: MethodName })[] = [
  { scheme: 'DCM', code: '125207', meaning: 'Method of Disks, Biplane', method: 'biplaneDisks' }, // CID 12228
  { scheme: 'DCM', code: '125208', meaning: 'Method of Disks, Single Plane', method: 'singlePlane' }, // CID 12228
  { scheme: 'SCT', code: '426865009', meaning: '3D mode', method: 'threeD' }, // CID 12224 (image mode)
];

// ---- Measurement concepts ----
export interface ConceptRow {
  key: SrKey;
  concept: Code;
  /** The code list the row comes from. */
  list: string;
  /** Pre-coordinated method (TID 5300 codes); otherwise read from the modifiers. */
  method?: MethodName;
  /** The finding site must be one of these (from the item or an enclosing container). */
  sites?: readonly Code[];
  /** The flow direction must be this. */
  flow?: Code;
}

const LV_EJECTION_SITES = [SITES.lvot, SITES.aorticValve, SITES.leftVentricle];

export const CONCEPTS: readonly ConceptRow[] = [
  // TID 5300, CID 12300 Core Echo Measurements (pre-coordinated LOINC)
  { key: 'edv', concept: { scheme: 'LN', code: '79996-5', meaning: 'Left ventricular end diastolic volume biplane (MOD)' }, list: 'LOINC, PS3.16 CID 12300', method: 'biplaneDisks' },
  { key: 'edv', concept: { scheme: 'LN', code: '79995-7', meaning: 'Left ventricular end diastolic volume (3D)' }, list: 'LOINC, PS3.16 CID 12300', method: 'threeD' },
  { key: 'edv', concept: { scheme: 'LN', code: '79999-9', meaning: 'Left ventricular end diastolic volume single plane 4C (MOD)' }, list: 'LOINC, PS3.16 CID 12300', method: 'singlePlane' },
  { key: 'edv', concept: { scheme: 'LN', code: '79998-1', meaning: 'Left ventricular end diastolic volume single plane 2C (MOD)' }, list: 'LOINC, PS3.16 CID 12300', method: 'singlePlane' },
  { key: 'esv', concept: { scheme: 'LN', code: '80001-1', meaning: 'Left ventricular end systolic volume biplane (MOD)' }, list: 'LOINC, PS3.16 CID 12300', method: 'biplaneDisks' },
  { key: 'esv', concept: { scheme: 'LN', code: '80000-3', meaning: 'Left ventricular end systolic volume (3D)' }, list: 'LOINC, PS3.16 CID 12300', method: 'threeD' },
  { key: 'esv', concept: { scheme: 'LN', code: '80004-5', meaning: 'Left ventricular end systolic volume single plane 4C (MOD)' }, list: 'LOINC, PS3.16 CID 12300', method: 'singlePlane' },
  { key: 'esv', concept: { scheme: 'LN', code: '80003-7', meaning: 'Left ventricular end systolic volume single plane 2C (MOD)' }, list: 'LOINC, PS3.16 CID 12300', method: 'singlePlane' },
  { key: 'ef', concept: { scheme: 'LN', code: '79991-6', meaning: 'Left ventricular ejection fraction biplane (MOD)' }, list: 'LOINC, PS3.16 CID 12300', method: 'biplaneDisks' },
  { key: 'ef', concept: { scheme: 'LN', code: '79990-8', meaning: 'Left ventricular ejection fraction 3D' }, list: 'LOINC, PS3.16 CID 12300', method: 'threeD' },
  { key: 'ef', concept: { scheme: 'LN', code: '79993-2', meaning: 'Left ventricular ejection fraction single plane 4C (MOD)' }, list: 'LOINC, PS3.16 CID 12300', method: 'singlePlane' },
  { key: 'ef', concept: { scheme: 'LN', code: '79992-4', meaning: 'Left ventricular ejection fraction single plane 2C (MOD)' }, list: 'LOINC, PS3.16 CID 12300', method: 'singlePlane' },
  { key: 'lvotDiameter', concept: { scheme: 'LN', code: '80028-4', meaning: 'Left ventricular outflow tract dimension (2D)' }, list: 'LOINC, PS3.16 CID 12300' },
  { key: 'lvotVti', concept: { scheme: 'LN', code: '80030-0', meaning: 'Left ventricular outflow tract VTI' }, list: 'LOINC, PS3.16 CID 12300' },
  { key: 'pep', concept: { scheme: 'LN', code: '79989-0', meaning: 'Left ventricular pre-ejection period' }, list: 'LOINC, PS3.16 CID 12300' },
  { key: 'lvids', concept: { scheme: 'LN', code: '80011-0', meaning: 'Left ventricular internal systolic dimension - 2D' }, list: 'LOINC, PS3.16 CID 12300' },
  { key: 'lvids', concept: { scheme: 'LN', code: '80012-8', meaning: 'Left ventricular internal systolic dimension - MM' }, list: 'LOINC, PS3.16 CID 12300' },
  { key: 'pwts', concept: { scheme: 'LN', code: '80033-4', meaning: 'Left ventricular posterior wall systolic thickness' }, list: 'LOINC, PS3.16 CID 12300' },
  { key: 'pwts', concept: { scheme: 'LN', code: '80034-2', meaning: 'Left ventricular posterior wall systolic thickness' }, list: 'LOINC, PS3.16 CID 12300' },
  { key: 'tapse', concept: { scheme: 'LN', code: '77903-3', meaning: 'Tricuspid Annular Plane Systolic Excursion (TAPSE)' }, list: 'LOINC, PS3.16 CID 12300' },
  { key: 'trVelocity', concept: { scheme: 'LN', code: '79921-3', meaning: 'Tricuspid regurgitation Vmax' }, list: 'LOINC, PS3.16 CID 12300' },
  { key: 'ivc', concept: { scheme: 'LN', code: '79967-6', meaning: 'Inferior vena cava diameter' }, list: 'LOINC, PS3.16 CID 12300' },

  // TID 5200 (post-coordinated: method and site from modifiers)
  { key: 'edv', concept: { scheme: 'LN', code: '18026-5', meaning: 'Left Ventricular End Diastolic Volume' }, list: 'LOINC, PS3.16 CID 12202' },
  { key: 'esv', concept: { scheme: 'LN', code: '18148-7', meaning: 'Left Ventricular End Systolic Volume' }, list: 'LOINC, PS3.16 CID 12202' },
  { key: 'ef', concept: { scheme: 'LN', code: '18043-0', meaning: 'Left Ventricular Ejection Fraction by US' }, list: 'LOINC, PS3.16 CID 12202' },
  { key: 'lvotDiameter', concept: { scheme: 'SCT', code: '399027007', meaning: 'Cardiovascular Orifice Diameter' }, list: 'SNOMED CT, PS3.16 CID 12222', sites: [SITES.lvot] },
  { key: 'lvotVti', concept: { scheme: 'LN', code: '20354-7', meaning: 'Velocity Time Integral' }, list: 'LOINC, PS3.16 CID 12222', sites: [SITES.lvot] },
  { key: 'sv', concept: { scheme: 'SCT', code: '90096001', meaning: 'Stroke Volume' }, list: 'SNOMED CT, PS3.16 CID 12200', sites: [SITES.lvot] },
  { key: 'pep', concept: { scheme: 'LN', code: '59085-1', meaning: 'Pre-Ejection Period' }, list: 'LOINC, PS3.16 CID 12257', sites: LV_EJECTION_SITES },
  { key: 'et', concept: { scheme: 'LN', code: '20222-6', meaning: 'Ejection Time' }, list: 'LOINC, PS3.16 CID 12257', sites: LV_EJECTION_SITES },
  { key: 'et', concept: { scheme: 'LN', code: '18041-4', meaning: 'Aortic Valve Ejection Time' }, list: 'LOINC, PS3.16 CID 12211' },
  { key: 'hr', concept: { scheme: 'LN', code: '8867-4', meaning: 'Heart rate' }, list: 'LOINC, PS3.16 CID 12200' },
  { key: 'lvids', concept: { scheme: 'LN', code: '29438-9', meaning: 'Left Ventricle Internal Systolic Dimension' }, list: 'LOINC, PS3.16 CID 12201' },
  { key: 'pwts', concept: { scheme: 'LN', code: '18156-0', meaning: 'Left Ventricle Posterior Wall Systolic Thickness' }, list: 'LOINC, PS3.16 CID 12201' },
  { key: 'eOverEPrime', concept: { scheme: 'LN', code: '59111-5', meaning: 'E Velocity to Annulus E Velocity Ratio' }, list: 'LOINC, PS3.16 CID 12207', sites: [SITES.mitralValve] },
  { key: 'eOverEPrime', concept: { scheme: 'SCT', code: '399140004', meaning: 'Ratio of MV Peak Velocity to LV Peak Tissue Velocity E-Wave' }, list: 'SNOMED CT, PS3.16 CID 12203' },
  { key: 'trVelocity', concept: { scheme: 'LN', code: '11726-7', meaning: 'Peak Systolic Velocity' }, list: 'LOINC, PS3.16 CID 12208', sites: [SITES.tricuspidValve], flow: REGURGITANT_FLOW },
  { key: 'ivc', concept: { scheme: 'LN', code: '18006-7', meaning: 'Inferior Vena Cava Diameter' }, list: 'LOINC, PS3.16 CID 12215' },
  { key: 'ivcCollapse', concept: { scheme: 'LN', code: '18050-5', meaning: 'Inferior Vena Cava % Collapse' }, list: 'LOINC, PS3.16 CID 12215' },
  { key: 'sbp', concept: { scheme: 'LN', code: '8480-6', meaning: 'Systolic blood pressure' }, list: 'LOINC, PS3.16 TID 5201 (CID 3611)' },
  { key: 'dbp', concept: { scheme: 'LN', code: '8462-4', meaning: 'Diastolic blood pressure' }, list: 'LOINC, PS3.16 TID 5201 (CID 3611)' },
  { key: 'height', concept: { scheme: 'LN', code: '8302-2', meaning: 'Body height' }, list: 'LOINC vital signs (PS3.16 TID 5201)' },
  { key: 'weight', concept: { scheme: 'LN', code: '29463-7', meaning: 'Body weight' }, list: 'LOINC vital signs (PS3.16 TID 5201)' },
];

/**
 * UCUM unit codes read (case-sensitive UCUM, with the lower- and upper-case litre both
 * valid: `ml` and `mL`), each with its dimension and the mathjs spelling the unit layer
 * converts from. Anything else is an unknown unit and the item is refused.
 */
export const UCUM_UNITS: ReadonlyMap<string, { dimension: Dimension; math: string }> = new Map([
  ['ml', { dimension: 'volume', math: 'mL' }],
  ['mL', { dimension: 'volume', math: 'mL' }],
  ['l', { dimension: 'volume', math: 'L' }],
  ['L', { dimension: 'volume', math: 'L' }],
  ['cm3', { dimension: 'volume', math: 'cm^3' }],
  ['mm', { dimension: 'length', math: 'mm' }],
  ['cm', { dimension: 'length', math: 'cm' }],
  ['m', { dimension: 'length', math: 'm' }],
  ['ms', { dimension: 'time', math: 'ms' }],
  ['s', { dimension: 'time', math: 's' }],
  ['m/s', { dimension: 'velocity', math: 'm/s' }],
  ['cm/s', { dimension: 'velocity', math: 'cm/s' }],
  ['mm/s', { dimension: 'velocity', math: 'mm/s' }],
  ['/min', { dimension: 'rate', math: 'min^-1' }],
  ['1/min', { dimension: 'rate', math: 'min^-1' }],
  ['{beats}/min', { dimension: 'rate', math: 'min^-1' }],
  ['{H.B.}/min', { dimension: 'rate', math: 'min^-1' }],
  ['%', { dimension: 'percent', math: '%' }],
  ['1', { dimension: 'ratio', math: '' }],
  ['{ratio}', { dimension: 'ratio', math: '' }],
  ['mm[Hg]', { dimension: 'pressure', math: 'mmHg' }],
  ['kPa', { dimension: 'pressure', math: 'kPa' }],
  ['kg', { dimension: 'mass', math: 'kg' }],
  ['g', { dimension: 'mass', math: 'g' }],
  ['[lb_av]', { dimension: 'mass', math: 'lbm' }],
]);

/** The same concept: same scheme and code, or a SNOMED CT code and its SNOMED-RT equivalent. */
export function sameCode(a: { scheme: string; code: string }, b: { scheme: string; code: string }): boolean {
  if (a.scheme === b.scheme) return a.code === b.code;
  if (a.scheme === 'SCT' && b.scheme === 'SRT') return SRT_EQUIVALENTS[a.code] === b.code;
  if (a.scheme === 'SRT' && b.scheme === 'SCT') return SRT_EQUIVALENTS[b.code] === a.code;
  return false;
}

/** "LN 79996-5" */
export function codeText(c: { scheme: string; code: string }): string {
  return `${c.scheme} ${c.code}`;
}
