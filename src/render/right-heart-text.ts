/**
 * The right heart of one visit (RAP as used, PASP, TAPSE/PASP and the published cut-offs with
 * their populations) as rows: the terminal section and the reports' mechanics table both take
 * them from here, so the two views cannot word it differently.
 */
import type { Assessment } from '../assessment/assess.js';
import { hasRightHeartMeasurements } from '../assessment/checks.js';
import type { Quantity } from '../assessment/result.js';
import { rightAtrialPressureFromVenaCava } from '../physiology/right-atrial-pressure.js';
import { TAPSE_PASP_CUT_OFFS, TR_VELOCITY_SUSPICION_ABOVE } from '../physiology/right-ventricular-coupling.js';
import { formatNumber, formatValue } from './format.js';

export interface RightHeartRow {
  label: string;
  value: string;
  note: string;
}

function shown(q: Quantity): string {
  return q.value === null ? '—' : formatValue(q.value, q.unit);
}

function why(q: Quantity, text: string): string {
  return q.value === null ? `not computable: ${q.reason ?? 'missing input'}` : text;
}

export function rightHeartRows(a: Assessment): RightHeartRow[] {
  if (!hasRightHeartMeasurements(a.inputs)) return [];
  const i = a.inputs;
  const r = a.results;
  const rapNote = (): string => {
    if (i.rap !== null) return 'measured, as entered';
    if (i.ivc !== null && i.ivcCollapse !== null) {
      const band = rightAtrialPressureFromVenaCava(i.ivc, i.ivcCollapse).band;
      return `estimated from the IVC (${formatNumber(i.ivc, 1)} cm, ${formatNumber(i.ivcCollapse, 0)} % sniff collapse): ${band} band, Rudski 2010`;
    }
    return '';
  };
  const tr = i.trVelocity;
  const trNote =
    tr === null
      ? 'no measurable TR jet: no PASP, no index'
      : tr > TR_VELOCITY_SUSPICION_ABOVE
        ? `above ${TR_VELOCITY_SUSPICION_ABOVE} m/s, the echo threshold for suspecting pulmonary hypertension (ESC/ERS 2022)`
        : `at or below ${TR_VELOCITY_SUSPICION_ABOVE} m/s (ESC/ERS 2022 threshold)`;
  const rows: RightHeartRow[] = [
    { label: 'TAPSE', value: i.tapse === null ? '—' : formatValue(i.tapse, 'mm', 0), note: i.tapse === null ? 'not given' : 'as entered' },
    { label: 'Peak TR velocity', value: tr === null ? '—' : formatValue(tr, 'm/s', 2), note: trNote },
    { label: 'Right-atrial pressure used', value: shown(r.rapUsed), note: why(r.rapUsed, rapNote()) },
    { label: 'PASP', value: shown(r.pasp), note: why(r.pasp, r.pasp.method ?? '') },
    { label: 'TAPSE/PASP', value: shown(r.tapsePasp), note: why(r.tapsePasp, 'right ventricle–pulmonary artery coupling') },
  ];
  const index = r.tapsePasp.value;
  if (index !== null) {
    for (const c of TAPSE_PASP_CUT_OFFS) {
      rows.push({
        label: `  cut-off ${c.below} mm/mmHg`,
        value: index < c.below ? 'below it' : 'not below it',
        note: `in ${c.population}, values below it marked ${c.finding} (${c.source})`,
      });
    }
  }
  return rows;
}
