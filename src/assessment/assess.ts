/**
 * The whole assessment of one visit: inputs → result, pure. Every view
 * (terminal, JSON, CSV, HTML, SVG) renders this object.
 */
import { caveatsFor, referralNote } from './caveats.js';
import { checkVisit } from './checks.js';
import { PES_METHOD_LABEL, computeResults, defaultChoice, hasDopplerStrokeVolume, type MethodChoice, type Results, type StrokeVolumeSource } from './graph/index.js';
import { PES_METHODS, type PesMethod } from './fields.js';
import type { VisitInputs } from './inputs.js';
import { visitMechanics, type Mechanics } from './mechanics.js';
import { METHODS_VERSION, type Flag } from './result.js';

export interface MethodVariant {
  pesMethod: PesMethod;
  pesLabel: string;
  strokeVolumeSource: StrokeVolumeSource | 'none';
  pes: number | null;
  /** The stroke volume this variant used. */
  svUsed: number | null;
  ea: number | null;
  ees: number | null;
  eesMethod: 'single-beat' | 'Pes/ESV';
  eaEes: number | null;
  reason?: string;
  isMain: boolean;
}

export interface Assessment {
  methodsVersion: string;
  inputs: VisitInputs;
  choice: MethodChoice;
  results: Results;
  flags: Flag[];
  caveats: string[];
  referral: string;
  /** The recheck view: the same subject under the method variants. */
  variants: MethodVariant[];
  /** Every Pes estimate side by side. */
  pesEstimates: { method: PesMethod; label: string; value: number | null }[];
  /** Wall stress, energetics, diastolic curve and loop geometry (src/assessment/mechanics.ts). */
  mechanics?: Mechanics;
}

export function assess(inputs: VisitInputs): Assessment {
  const choice = defaultChoice(inputs);
  const results = computeResults(inputs, choice);
  const flags = checkVisit(inputs, results);
  return {
    methodsVersion: METHODS_VERSION,
    inputs,
    choice,
    results,
    flags,
    caveats: caveatsFor(flags),
    referral: referralNote(inputs, results, flags),
    variants: methodVariants(inputs, choice),
    pesEstimates: PES_METHODS.map((m) => ({ method: m, label: PES_METHOD_LABEL[m], value: m === choice.pesMethod ? results.pes.value : computeResults(inputs, { ...choice, pesMethod: m }).pes.value })),
    mechanics: visitMechanics(inputs, results),
  };
}

/** Pes estimates × SV sources, each with single-beat Ees, plus the crude Pes/ESV row. */
export function methodVariants(inputs: VisitInputs, main: MethodChoice = defaultChoice(inputs)): MethodVariant[] {
  const sources: StrokeVolumeSource[] = hasDopplerStrokeVolume(inputs) ? ['doppler', 'volumetric'] : ['volumetric'];
  const rows: MethodVariant[] = [];
  for (const pesMethod of PES_METHODS) {
    if (pesMethod === 'measured' && inputs.pesMeasured === null) continue;
    for (const source of sources) {
      const r = computeResults(inputs, { pesMethod, strokeVolumeSource: source });
      rows.push(row(pesMethod, source, r, 'single-beat', main));
    }
    const r = computeResults(inputs, { pesMethod, strokeVolumeSource: main.strokeVolumeSource });
    // The crude row carries its own reason only: never the single-beat one, never an undefined key.
    const { reason: _singleBeatReason, ...crude } = row(pesMethod, main.strokeVolumeSource, r, 'Pes/ESV', main);
    const crudeRow: MethodVariant = {
      ...crude,
      ees: r.eesNoIntercept.value,
      eaEes: r.ea.value !== null && r.eesNoIntercept.value !== null ? r.ea.value / r.eesNoIntercept.value : null,
      isMain: false,
    };
    if (r.eesNoIntercept.reason) crudeRow.reason = r.eesNoIntercept.reason;
    rows.push(crudeRow);
  }
  return rows;
}

function row(pesMethod: PesMethod, source: StrokeVolumeSource, r: Results, eesMethod: MethodVariant['eesMethod'], main: MethodChoice): MethodVariant {
  const v: MethodVariant = {
    pesMethod,
    pesLabel: PES_METHOD_LABEL[pesMethod],
    strokeVolumeSource: source,
    pes: r.pes.value,
    svUsed: r.svUsed.value,
    ea: r.ea.value,
    ees: r.ees.value,
    eesMethod,
    eaEes: r.eaEes.value,
    isMain: eesMethod === 'single-beat' && pesMethod === main.pesMethod && source === main.strokeVolumeSource,
  };
  if (r.ees.reason) v.reason = r.ees.reason;
  return v;
}
