/**
 * Text sections for the mechanics of a visit (afterload beside Ea,
 * energetics, diastolic side), shared by the terminal report and the
 * Markdown report. Pure: data in, lines out; numbers via render/format.ts.
 */
import type { Assessment } from '../assessment/assess.js';
import type { Mechanics } from '../assessment/mechanics.js';
import type { Quantity } from '../assessment/result.js';
import { formatNumber, formatQuantity, pad } from './format.js';
import { wrap } from './terminal.js';
import { DEFAULT_WIDTH } from './style.js';
import { EA_RT_LABEL, V0_DIASTOLIC } from '../assessment/labels.js';

const LABEL_WIDTH = 34;

function row(label: string, q: Quantity, extra = ''): string {
  const method = q.value !== null && q.method ? `  ${q.method}` : '';
  return `${pad(label, LABEL_WIDTH)}${formatQuantity(q)}${extra}${method}`;
}

function withJoules(joules: Quantity): string {
  return joules.value !== null ? ` (${formatNumber(joules.value, 3)} J)` : '';
}

export function afterloadLines(m: Mechanics, a: Assessment, width = DEFAULT_WIDTH - 2): string[] {
  const r = a.results;
  const lines = [
    row('End-systolic pressure Pes', r.pes),
    row('Arterial elastance Ea', r.ea),
    row(`  ${EA_RT_LABEL}`, r.eaResistance),
    row('Wall stress, thin wall (Laplace)', m.wallStress.thinWall),
    row('Wall stress, meridional', m.wallStress.meridional),
  ];
  if (m.wallStress.thinWall.value !== null) {
    lines.push(`${pad('  pressure in both forms', LABEL_WIDTH)}${formatQuantity(m.wallStress.pressure)}  cuff SBP, as Reichek 1982 validated; Pes would give 10 % less`);
  }
  lines.push(...wrap(m.afterloadNote, width));
  return lines;
}

export function energeticsLines(m: Mechanics, width = DEFAULT_WIDTH - 2): string[] {
  const e = m.energetics;
  return [
    row('Stroke work SW', e.strokeWork, withJoules(e.strokeWorkJoules)),
    row('Potential energy PE', e.potentialEnergy, withJoules(e.potentialEnergyJoules)),
    row('Pressure–volume area PVA', e.pressureVolumeArea, withJoules(e.pressureVolumeAreaJoules)),
    row('Mechanical efficiency SW/PVA', e.efficiency),
    ...wrap('Model values (linear end-systolic line, Suga; Burkhoff & Sagawa 1986), not measurements; PE and PVA inherit the uncertainty of V0(ES).', width),
  ];
}

export function diastolicLines(m: Mechanics, width = DEFAULT_WIDTH - 2): string[] {
  const d = m.diastolic;
  const lines = [row('End-diastolic pressure used', d.edp)];
  if (d.edpSource === 'entered' && d.edpFromEOverEPrime.value !== null) {
    lines.push(row('  E/e′ estimate, for comparison', d.edpFromEOverEPrime));
  }
  if (d.curve) {
    const c = d.curve;
    lines.push(
      `${pad('Diastolic curve (Klotz 2006)', LABEL_WIDTH)}P = ${c.alpha.toPrecision(4)}·V^${formatNumber(c.beta, 3)}; ${formatNumber(c.anchorPressure, 0)} mmHg at ${formatNumber(c.anchorVolume, 0)} mL; ${V0_DIASTOLIC} ${formatNumber(c.unstressedVolume, 0)} mL`,
    );
    if (c.anchorPressure === 15) lines.push(...wrap('EDP above 22 mmHg: the curve is anchored at 15 mmHg instead of 30 mmHg (Klotz protocol), where the one-point formula is singular.', width));
  } else {
    lines.push(`${pad('Diastolic curve', LABEL_WIDTH)}not drawn: ${d.reason ?? 'not computable'}`);
  }
  return lines;
}

/** The three sections, ready for the terminal report's extra sections. */
export function mechanicsSections(a: Assessment, width = DEFAULT_WIDTH): { title: string; lines: string[] }[] {
  const m = a.mechanics;
  if (!m) return [];
  return [
    { title: 'Afterload beside Ea: wall stress, Pes and Ea', lines: afterloadLines(m, a, width - 2) },
    { title: 'Energetics (elastance model)', lines: energeticsLines(m, width - 2) },
    { title: 'Diastolic side (single-beat EDPVR)', lines: diastolicLines(m, width - 2) },
  ];
}
