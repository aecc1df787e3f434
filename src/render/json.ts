/**
 * The `--json` view: a public contract for pipelines, documented in
 * docs/json-output.md. Keys are stable; values are numbers or null, never
 * NaN, Infinity or undefined.
 */
import type { Assessment } from '../assessment/assess.js';
import type { Mechanics } from '../assessment/mechanics.js';
import type { EndDiastolicCurve } from '../physiology/end-diastolic-pressure-volume.js';
import { BEYOND_C0_CLASS } from '../text/sanitize.js';

export const JSON_FORMAT = 'elastimate-assessment';
/** 2: result keys renamed (svUsed, efUsed, normalizedElastanceAvg/Est, interval95, edpUsed, edvUsed, esvUsed); docs/json-output.md lists them. */
export const JSON_FORMAT_VERSION = 2;

export function assessmentToJson(a: Assessment, toolVersion: string): Record<string, unknown> {
  const inputs = { ...a.inputs } as Record<string, unknown>;
  return {
    format: JSON_FORMAT,
    formatVersion: JSON_FORMAT_VERSION,
    tool: { name: 'elastimate', version: toolVersion },
    methodsVersion: a.methodsVersion,
    inputs,
    inputUnits: INPUT_UNITS,
    choice: a.choice,
    results: a.results,
    flags: a.flags,
    caveats: a.caveats,
    referral: a.referral,
    pesEstimates: a.pesEstimates,
    variants: a.variants,
    ...(a.mechanics ? { mechanics: mechanicsToJson(a.mechanics) } : {}),
  };
}

/**
 * Wall stress, energetics, diastolic side and loop geometry under their own
 * key (docs/report.md). A value used for an input (EDP entered or estimated,
 * the loop's EDV and ESV) carries the suffix `Used`, so no result key equals
 * an input key.
 */
function mechanicsToJson(m: Mechanics): Record<string, unknown> {
  const { diastolicCurve: _sameAsDiastolicCurve, edv, esv, edp, ...loop } = m.loop;
  const { edp: edpUsed, curve, ...diastolic } = m.diastolic;
  return {
    wallStress: m.wallStress,
    energetics: m.energetics,
    diastolic: { edpUsed, ...diastolic, curve: curve && curveToJson(curve) },
    loop: { edvUsed: edv, esvUsed: esv, edpUsed: edp, ...loop },
    afterloadNote: m.afterloadNote,
  };
}

/** The diastolic curve, its building point named as the values used (edvUsed, edpUsed). */
function curveToJson(curve: EndDiastolicCurve): Record<string, unknown> {
  const { edv, edp, ...rest } = curve;
  return { ...rest, edvUsed: edv, edpUsed: edp };
}

export const INPUT_UNITS = {
  sbp: 'mmHg', dbp: 'mmHg', sbpReadings: 'mmHg', dbpReadings: 'mmHg', hr: 'bpm', edv: 'mL', esv: 'mL', ef: '%', sv: 'mL',
  lvotDiameter: 'cm', lvotVti: 'cm', pep: 'ms', et: 'ms', height: 'cm', weight: 'kg', age: 'years', pesMeasured: 'mmHg',
  edp: 'mmHg', eOverEPrime: '', lvids: 'cm', pwts: 'cm',
} as const;

/** Serialise with a guard: any non-finite number becomes null. */
export function stringifySafe(value: unknown, indent = 2): string {
  const text = JSON.stringify(value, (_k, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), indent);
  // JSON.stringify escapes C0 controls but leaves the other characters the sanitiser replaces raw
  // (DEL, C1, whose U+009B is a one-character CSI on many terminals, and the bidirectional controls
  // that reorder what a terminal shows: text/sanitize.ts): written as \u escapes, the same JSON value.
  return RAW_IN_JSON.test(text) ? text.replace(RAW_IN_JSON_G, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`) : text;
}
const RAW_IN_JSON = new RegExp(`[${BEYOND_C0_CLASS}]`);
const RAW_IN_JSON_G = new RegExp(RAW_IN_JSON.source, 'g');
