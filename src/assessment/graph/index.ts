/**
 * The graph of quantities, evaluated for one visit: inputs → every result
 * with its unit, method and reason. `assess` calls it once for the report and
 * again for each method variant of the recheck view; the Monte Carlo draws
 * and the sensitivity runs evaluate the same plan (graph/draws.ts).
 */
import type { PesMethod } from '../fields.js';
import type { VisitInputs } from '../inputs.js';
import { planForInputs, resultsFor, resultsInto, type Plan, type Results } from './plan.js';

export { scratchResults } from './plan.js';
import { NODES, type ResultKey } from './registry.js';
import type { Rule, Selection, StrokeVolumeSource } from './types.js';

export { RESULT_KEYS, type ResultKey } from './registry.js';

/** The unit of every result key, as its node declares it. */
export const RESULT_UNITS = Object.fromEntries(NODES.map((n) => [n.key, n.unit])) as Record<ResultKey, string>;
export type { Results, Plan } from './plan.js';
export type { Selection, StrokeVolumeSource } from './types.js';

/** The method choices shown with a visit's results (the JSON `choice`); MAP and BSA formulas come with the inputs. */
export interface MethodChoice {
  pesMethod: PesMethod;
  strokeVolumeSource: StrokeVolumeSource;
}

export function selectionFor(inputs: VisitInputs, choice: MethodChoice): Selection {
  return { pesMethod: choice.pesMethod, strokeVolumeSource: choice.strokeVolumeSource, mapMethod: inputs.mapMethod, bsaMethod: inputs.bsaMethod };
}

/**
 * The visit's own choices: its Pes method, MAP and BSA formulas, and Doppler SV preferred, which the SV
 * node's rules turn into the volumes when there is none (defaultChoice).
 */
function ownSelection(inputs: VisitInputs): Selection {
  return { pesMethod: inputs.pesMethod, strokeVolumeSource: 'doppler', mapMethod: inputs.mapMethod, bsaMethod: inputs.bsaMethod };
}

/** The plan of a visit under a method choice (default: the visit's own). */
export function visitPlan(inputs: VisitInputs, choice?: MethodChoice): Plan {
  return planForInputs(inputs, choice ? selectionFor(inputs, choice) : ownSelection(inputs));
}

/** Default method choice: the inputs' Pes method, Doppler SV when given (as in Chen 2001). */
export function defaultChoice(inputs: VisitInputs): MethodChoice {
  return { pesMethod: inputs.pesMethod, strokeVolumeSource: visitPlan(inputs).nodes[SV_DOPPLER]!.rule ? 'doppler' : 'volumetric' };
}

/** Every result of one visit under a method choice. */
export function computeResults(inputs: VisitInputs, choice?: MethodChoice): Results {
  return resultsFor(inputs, choice ? selectionFor(inputs, choice) : ownSelection(inputs));
}

/**
 * computeResults(inputs) written into `target` (from scratchResults), whose
 * quantities are overwritten: for a batch, which writes each row's results
 * out before it computes the next row (plan.ts resultsInto).
 */
export function computeResultsInto(target: Results, inputs: VisitInputs): Results {
  return resultsInto(target, inputs, ownSelection(inputs));
}

/** Whether the visit has a Doppler stroke volume (entered, or from LVOT diameter and VTI). */
export function hasDopplerStrokeVolume(inputs: VisitInputs): boolean {
  return defaultChoice(inputs).strokeVolumeSource === 'doppler';
}

function nodeIndex(key: string): number {
  return NODES.findIndex((n) => n.key === key);
}

const SV_DOPPLER = nodeIndex('svDoppler');

/** The method text of Pes under each estimate (the pes node's rules). */
export const PES_METHOD_LABEL: Record<PesMethod, string> = (() => {
  const labels = {} as Record<PesMethod, string>;
  for (const rule of NODES[nodeIndex('pes')]!.rules as readonly Rule[]) {
    const m = rule.when?.pesMethod;
    if (m && typeof rule.method === 'string') labels[m] = rule.source ? `${rule.method} (${rule.source})` : rule.method;
  }
  return labels;
})();
