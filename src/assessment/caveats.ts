/**
 * The cautions printed with every result, and the referral note. Pure text
 * built from the assessment; every view (terminal, JSON, HTML) shows them.
 */
import type { Results } from './graph/index.js';
import type { VisitInputs } from './inputs.js';
import type { Flag } from './result.js';

export const STANDING_CAVEATS: readonly string[] = [
  'For research use only. These are model-based estimates, not a diagnosis, and not a substitute for clinical assessment.',
  'Pes is estimated from the arm cuff, not measured in the ventricle; single-beat Ees has a standard error of about 0.64 mmHg/mL against invasive measurement (Chen 2001) and a repeat-visit variation of about 20 %.',
  'Follow local protocols and defer to licensed clinical practice for any decision about care.',
];

export function caveatsFor(flags: readonly Flag[]): string[] {
  const broken = flags.filter((f) => f.level === 'caution').map((f) => f.message);
  return [...STANDING_CAVEATS, ...(broken.length ? ['Method limits for this subject: ' + broken.join(' ')] : [])];
}

function fmt(v: number | null, digits: number, unit = ''): string {
  return v === null ? 'not computable' : `${v.toFixed(digits)}${unit ? ' ' + unit : ''}`;
}

/** A short paragraph to paste into a note to the subject's clinician. */
export function referralNote(inputs: VisitInputs, r: Results, flags: readonly Flag[]): string {
  const parts: string[] = [];
  parts.push(
    `Research echocardiography and cuff blood pressure (${inputs.sbp.toFixed(0)}/${inputs.dbp.toFixed(0)} mmHg` +
      `${inputs.hr !== null ? `, heart rate ${inputs.hr.toFixed(0)} bpm` : ''}) give EF ${fmt(r.efUsed.value, 0, '%')}, ` +
      `estimated end-systolic pressure ${fmt(r.pes.value, 0, 'mmHg')}, arterial elastance (Ea) ${fmt(r.ea.value, 2, 'mmHg/mL')}, ` +
      `single-beat end-systolic elastance (Ees) ${fmt(r.ees.value, 2, 'mmHg/mL')} and Ea/Ees ${fmt(r.eaEes.value, 2)}.`,
  );
  const attention = flags.filter((f) => f.level === 'attention');
  if (attention.length) {
    parts.push('Findings that may warrant clinical attention under common thresholds: ' + attention.map((f) => f.message.replace(/\.$/, '')).join('; ') + '.');
  } else {
    parts.push('No finding crossed the common thresholds for EF, blood pressure or heart rate that this tool checks.');
  }
  const limits = flags.filter((f) => f.level === 'caution').map((f) => f.code);
  if (limits.length) parts.push(`Method limits apply (${limits.join(', ')}); interpret the elastance values with caution.`);
  parts.push('These are research estimates, not a diagnosis; please assess according to local protocols and your clinical judgement.');
  return parts.join(' ');
}
