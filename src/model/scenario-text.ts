/** Words and rounding for a projection, shared by every view. */
import { decimalsFor } from '../render/format.js';
import { SCENARIO_KEYS, SCENARIO_UNITS, type ScenarioChanges, type ScenarioKey } from './project.js';

export const DECIMALS_OF_SCENARIO: Readonly<Record<ScenarioKey, number>> = Object.fromEntries(
  SCENARIO_KEYS.map((k) => [k, k === 'eaEes' || k === 'swPva' ? 2 : decimalsFor(SCENARIO_UNITS[k])]),
) as Record<ScenarioKey, number>;

function signed(p: number): string {
  return `${p > 0 ? '+' : p < 0 ? '−' : '±'}${Math.abs(p)} %`;
}

/** The changes in a sentence, in the trade's words. */
export function describeChanges(c: ScenarioChanges): string {
  const parts: string[] = [];
  if (c.toHr !== undefined) parts.push(`heart rate to ${c.toHr} bpm (PEP and ET follow the Weissler slopes)`);
  if (c.resistance !== undefined) parts.push(`peripheral resistance ${signed(c.resistance)}`);
  if (c.compliance !== undefined) parts.push(`arterial compliance ${signed(c.compliance)}`);
  if (c.contractility !== undefined) parts.push(`contractility (Emax) ${signed(c.contractility)}`);
  if (c.toEdv !== undefined) parts.push(`filling adjusted to an EDV of ${c.toEdv} mL`);
  return parts.length ? `Projected with ${parts.join('; ')}. Everything else as fitted.` : 'No change given: the projection is the baseline beat (a check of the fit).';
}
