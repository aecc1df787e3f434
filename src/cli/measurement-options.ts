/**
 * The measurement flags shared by `assess`, `record add` and friends, built
 * from the field registry, and their translation into raw inputs.
 */
import type { Command } from 'commander';
import { BSA_METHODS, MAP_METHODS, NUMERIC_FIELDS, PES_METHODS, RHYTHMS, SEXES, VALVE_FLAGS, describeRange } from '../assessment/fields.js';
import type { RawInputs } from '../assessment/inputs.js';
import { InputError, showValue } from '../errors.js';

function collectReadings(value: string, previous: string[] | undefined): string[] {
  const parts = value.split(',').map((p) => p.trim()).filter((p) => p !== '');
  return [...(previous ?? []), ...(parts.length ? parts : [value])];
}

export function addMeasurementOptions(cmd: Command): Command {
  for (const f of NUMERIC_FIELDS) {
    const help = `${f.label} (${f.unit || 'ratio'}, ${describeRange(f)}); ${f.help}`;
    if (f.multiple) cmd.option(`--${f.flag} <values>`, `${help}; comma-separated or repeated`, collectReadings);
    else cmd.option(`--${f.flag} <value>`, help);
  }
  cmd.option('--rhythm <rhythm>', `rhythm during the echo: ${RHYTHMS.join(', ')} (default sinus)`);
  for (const v of VALVE_FLAGS) cmd.option(`--${v.flag}`, `${v.label} present`);
  cmd.option('--pes-method <method>', `end-systolic pressure estimate: ${PES_METHODS.join(', ')} (default sbp90)`);
  cmd.option('--map-method <method>', `mean pressure formula: ${MAP_METHODS.join(', ')} (default third)`);
  cmd.option('--bsa-method <method>', `body surface area formula: ${BSA_METHODS.join(', ')} (default mosteller)`);
  cmd.option('--sex <sex>', `${SEXES.join(' or ')}, for reference ranges`);
  cmd.option('--error <input=value>', 'measurement error of an input, absolute in its unit or N% (repeatable), e.g. --error sbp=6 --error edv=12%', collectErrors);
  return cmd;
}

function collectErrors(value: string, previous: Record<string, string> | undefined): Record<string, string> {
  const m = /^([A-Za-z-]+)\s*=\s*(.+)$/.exec(value.trim());
  if (!m || !m[1] || !m[2]) throw new InputError({ field: 'error', value: showValue(value), accepted: 'input=value, e.g. sbp=6 or edv=12%' });
  const key = m[1].replace(/-([a-z])/g, (_s, c: string) => c.toUpperCase());
  return { ...(previous ?? {}), [key]: m[2].trim() };
}

const ENUM_OPTIONS = [
  ['rhythm', RHYTHMS],
  ['pesMethod', PES_METHODS],
  ['mapMethod', MAP_METHODS],
  ['bsaMethod', BSA_METHODS],
  ['sex', SEXES],
] as const;

/** Raw inputs from parsed commander options (only what was given). */
export function rawFromOptions(opts: Record<string, unknown>): RawInputs {
  const raw: Record<string, unknown> = {};
  for (const f of NUMERIC_FIELDS) {
    const v = opts[f.key];
    if (v !== undefined) raw[f.key] = v;
  }
  for (const [key, allowed] of ENUM_OPTIONS) {
    const v = opts[key];
    if (v === undefined) continue;
    if (!(allowed as readonly string[]).includes(String(v))) {
      const flag = key.replace(/[A-Z]/g, (c) => '-' + c.toLowerCase());
      throw new InputError({ field: flag, value: showValue(v), accepted: allowed.join(', ') });
    }
    raw[key] = v;
  }
  for (const v of VALVE_FLAGS) if (opts[v.key] === true) raw[v.key] = true;
  if (opts.error !== undefined) raw.errors = opts.error;
  return raw as RawInputs;
}

/** Flags override the file; error overrides merge. */
export function mergeRaw(base: RawInputs, override: RawInputs): RawInputs {
  const merged = { ...base, ...override } as RawInputs;
  if (base.errors || override.errors) merged.errors = { ...(base.errors ?? {}), ...(override.errors ?? {}) };
  return merged;
}
