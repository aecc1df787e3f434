/**
 * The change between two visits, explained and judged against measurement
 * noise. Pure: two assessments in, a Comparison out; renderers word it.
 *
 * Attribution (exact identities on the log scale, so the parts add up):
 * - Arterial load. Ea ≈ TPR × HR / 60 (the R/T estimate; Sunagawa 1983,
 *   Kelly 1992), so
 *     ln Ea = ln TPR + ln HR − ln 60 + ln(Ea / (TPR·HR/60))
 *   and Δln Ea = Δln HR (heart-rate part) + Δln TPR (resistance part)
 *   + Δln(Ea / (TPR·HR/60)) (pulsatile remainder). Because TPR = MAP / CO and
 *   CO = SV × HR, TPR·HR/60 equals MAP/SV, and the remainder is Δln(Pes/MAP):
 *   the share of the load that the steady (mean-pressure) view misses, which
 *   grows with stiffer arteries and wave reflection (Kelly 1992).
 * - End-systolic pressure. Pes = Ea × SV, so Δln Pes = Δln Ea + Δln SV.
 * - ΔEes and Δ(Ea/Ees) are reported as differences and on the log scale.
 *
 * Judgement: the least significant change between two visits is
 * LSC = 2.77 × CV (2.77 = 1.96·√2, the Bland–Altman repeatability
 * coefficient; Bland, University of York measurement pages, see
 * docs/methods-verification.md §11). With CVs this large the limit is applied
 * on the log scale, where the within-subject SD of ln x is about the CV
 * (common practice), so the limit is symmetric for rises and falls:
 * |Δln x| > 2.77 × CV. For Ees, CV 20.3 % gives 0.562, i.e. beyond ×1.75 or ÷1.75.
 *
 * A row may later carry `noise`: the 95 % interval of the change from the
 * propagated uncertainty of the inputs (filled by the uncertainty module);
 * renderers show it beside the LSC judgement.
 */
import type { Assessment } from '../assessment/assess.js';
import { PES_METHOD_WORDS, STROKE_VOLUME_SOURCE_WORDS, listInWords, methodLimitWords } from '../assessment/labels.js';
import { METHODS_VERSION } from '../assessment/result.js';

/** 1.96·√2, rounded as usually quoted: the repeatability coefficient per unit within-subject SD. */
export const LSC_FACTOR = 2.77;

/**
 * Repeatability behind each judgement, with where it comes from.
 * - Ees: Chen CH et al., JACC 2001;38:2028 (abstract): repeated single-beat Ees over
 *   two months in 7 patients, CV 20.3 ± 6 %. Small sample; includes biological change.
 * - Ea/Ees: no published repeat CV for the single-beat ratio was found. In
 *   Ea/Ees(sb) = ENd(est)·Pes / (DBP − ENd(est)·Pes) stroke volume cancels, so its
 *   noise comes from the same ENd(est), DBP and Pes terms as Ees: we assume Ees's CV.
 * - Pes and Ea: no published repeat CV found; built from their measurements.
 *   Cuff pressure: SD 8 mmHg, the ISO 81060-2 pass limit for device-minus-reference
 *   differences, used as a conservative stand-in for visit-to-visit measurement SD
 *   (common practice). Stroke volume: test–retest CV 10 % (from memory; repeated
 *   biplane acquisitions gave CV 7–19 %, PubMed 9076390, see docs/methods-verification.md §10).
 *   CV(Pes) = 8 mmHg / mean SBP of the two visits; CV(Ea) = √(CV(Pes)² + 0.10²).
 * - PASP and TAPSE/PASP: no published test–retest CV was found. Derived here from the
 *   inter-observer reading variabilities of Ferrara F et al. (RIGHT-NET, Cardiovasc Ultrasound
 *   2021;19:9): TAPSE 5.3 %, peak TR velocity 3.8 %. These are reading variabilities of one
 *   acquisition, so a lower bound on visit-to-visit noise. PASP ≈ 4v² (RAP ignored), so
 *   CV(PASP) ≈ 2 × CV(v) = 7.6 %; CV(TAPSE/PASP) = √(5.3² + 7.6²) ≈ 9.3 %.
 */
export const REPEATABILITY = {
  eesCv: 0.203,
  eesSource: 'Chen 2001 abstract: single-beat Ees repeated over two months, n = 7, CV 20.3 %',
  eaEesSource: 'assumed equal to single-beat Ees (CV 20.3 %, Chen 2001): stroke volume cancels from Ea/Ees(sb), the rest shares Ees\'s terms; no published repeat CV found',
  cuffSdMmHg: 8,
  strokeVolumeCv: 0.1,
  pesSource: 'cuff SD 8 mmHg (ISO 81060-2 pass limit, a conservative stand-in; common practice) over the mean SBP',
  eaSource: 'combined from cuff SD 8 mmHg (ISO 81060-2, common practice) and stroke-volume CV 10 % (from memory)',
  tapseCv: 0.053,
  trVelocityCv: 0.038,
  paspSource: 'derived here: 2 × the inter-observer variability of peak TR velocity, 3.8 % (Ferrara 2021, RIGHT-NET; PASP ≈ 4v², RAP ignored); a reading variability, so a lower bound on visit-to-visit noise; no published repeat CV found',
  tapsePaspSource: 'derived here: √(5.3² + 7.6²) % from the inter-observer variabilities of TAPSE (5.3 %) and of PASP via TR velocity (2 × 3.8 %) (Ferrara 2021, RIGHT-NET); reading variabilities, so a lower bound on visit-to-visit noise; no published repeat CV found',
} as const;

/** CV of PASP ≈ 4v²: twice the CV of the TR velocity. */
export const PASP_CV = 2 * REPEATABILITY.trVelocityCv;
/** CV of TAPSE/PASP: the two CVs combined in quadrature. */
export const TAPSE_PASP_CV = Math.hypot(REPEATABILITY.tapseCv, PASP_CV);

export type ChangeKey = 'ea' | 'pes' | 'ees' | 'eaEes' | 'pasp' | 'tapsePasp';
export type PartKey = 'heartRate' | 'resistance' | 'pulsatile' | 'ea' | 'strokeVolume';
export type Verdict = 'beyond-noise' | 'within-noise' | 'not-computable';

/** The 95 % interval of the change (to − from, in the row's unit) from the uncertainty of the inputs. */
export interface NoiseCheck {
  interval95: [number, number];
  /** True when the interval excludes zero (the change is larger than the inputs' uncertainty). */
  exceeds: boolean;
  source: string;
}

export interface LeastSignificantChange {
  /** Within-subject coefficient of variation, as a fraction. */
  cv: number;
  /** 2.77 × CV: the limit for |Δln x|. */
  logLimit: number;
  /** The same limit as a percentage rise (e^limit − 1) and fall (1 − e^−limit). */
  percentUp: number;
  percentDown: number;
  source: string;
}

export interface ChangePart {
  key: PartKey;
  label: string;
  /** This part's contribution to the row's Δln. */
  logChange: number | null;
  reason?: string;
}

export interface ChangeRow {
  key: ChangeKey;
  label: string;
  unit: string;
  from: number | null;
  to: number | null;
  /** to − from, in `unit`. */
  difference: number | null;
  /** ln(to / from). */
  logChange: number | null;
  /** 100 × (to / from − 1). */
  percentChange: number | null;
  lsc: LeastSignificantChange;
  verdict: Verdict;
  reason?: string;
  /** The attribution: parts that add up to logChange. */
  parts?: ChangePart[];
  noise?: NoiseCheck;
}

export interface Comparison {
  methodsVersion: string;
  rows: ChangeRow[];
  /** Method differences between the two visits that can masquerade as change. */
  cautions: string[];
}

/**
 * The one rule for "is this change beyond noise?", used by every view
 * (record compare and show, the trend charts and their bands, the reports,
 * the CSV): beyond when |Δln x| exceeds the least significant change.
 */
export function changeVerdict(logChange: number | null, logLimit: number): Verdict {
  if (logChange === null || !Number.isFinite(logChange)) return 'not-computable';
  return Math.abs(logChange) > logLimit ? 'beyond-noise' : 'within-noise';
}

/** Attach the input-uncertainty check of each change (from the uncertainty module) to its row. */
export function attachNoiseChecks(c: Comparison, checks: Partial<Record<ChangeKey, NoiseCheck>>): Comparison {
  for (const row of c.rows) {
    const check = checks[row.key];
    if (check) row.noise = check;
  }
  return c;
}

export function leastSignificantChange(cv: number, source: string): LeastSignificantChange {
  const logLimit = LSC_FACTOR * cv;
  return { cv, logLimit, percentUp: 100 * (Math.exp(logLimit) - 1), percentDown: 100 * (1 - Math.exp(-logLimit)), source };
}

function positive(v: number | null | undefined): v is number {
  return typeof v === 'number' && Number.isFinite(v) && v > 0;
}

function logRatio(from: number | null | undefined, to: number | null | undefined): number | null {
  return positive(from) && positive(to) ? Math.log(to / from) : null;
}

function changeRow(key: ChangeKey, label: string, unit: string, from: number | null, to: number | null, lsc: LeastSignificantChange, reason: string | undefined): ChangeRow {
  const logChange = logRatio(from, to);
  const row: ChangeRow = {
    key,
    label,
    unit,
    from,
    to,
    difference: from !== null && to !== null ? to - from : null,
    logChange,
    percentChange: logChange !== null ? 100 * (Math.exp(logChange) - 1) : null,
    lsc,
    verdict: changeVerdict(logChange, lsc.logLimit),
  };
  if (logChange === null) row.reason = reason ?? 'not computable at one of the visits';
  return row;
}

function part(key: PartKey, label: string, logChange: number | null, reason: string): ChangePart {
  const p: ChangePart = { key, label, logChange };
  if (logChange === null) p.reason = reason;
  return p;
}

/** The change from visit `a` (earlier) to visit `b` (later). */
export function compareVisits(a: Assessment, b: Assessment): Comparison {
  const ra = a.results;
  const rb = b.results;
  const meanSbp = (a.inputs.sbp + b.inputs.sbp) / 2;
  const pesCv = REPEATABILITY.cuffSdMmHg / meanSbp;
  const eaCv = Math.hypot(pesCv, REPEATABILITY.strokeVolumeCv);

  const ea = changeRow('ea', 'Arterial elastance Ea', 'mmHg/mL', ra.ea.value, rb.ea.value, leastSignificantChange(eaCv, REPEATABILITY.eaSource), ra.ea.reason ?? rb.ea.reason);
  const hrPart = logRatio(a.inputs.hr, b.inputs.hr);
  const tprPart = logRatio(ra.tpr.value, rb.tpr.value);
  const pulsatileA = positive(ra.ea.value) && positive(ra.eaResistance.value) ? Math.log(ra.ea.value / ra.eaResistance.value) : null;
  const pulsatileB = positive(rb.ea.value) && positive(rb.eaResistance.value) ? Math.log(rb.ea.value / rb.eaResistance.value) : null;
  const needsHr = 'needs heart rate at both visits';
  ea.parts = [
    part('heartRate', 'heart rate (Δln HR)', hrPart, needsHr),
    part('resistance', 'resistance (Δln TPR)', tprPart, needsHr),
    part('pulsatile', 'pulsatile remainder (Δln Ea/(TPR·HR/60))', pulsatileA !== null && pulsatileB !== null ? pulsatileB - pulsatileA : null, needsHr),
  ];

  const pes = changeRow('pes', 'End-systolic pressure Pes', 'mmHg', ra.pes.value, rb.pes.value, leastSignificantChange(pesCv, REPEATABILITY.pesSource), ra.pes.reason ?? rb.pes.reason);
  pes.parts = [
    part('ea', 'arterial elastance (Δln Ea)', ea.logChange, 'Ea not computable at one of the visits'),
    part('strokeVolume', 'stroke volume (Δln SV)', logRatio(ra.svUsed.value, rb.svUsed.value), 'stroke volume missing at one of the visits'),
  ];

  const ees = changeRow('ees', 'End-systolic elastance Ees (single-beat)', 'mmHg/mL', ra.ees.value, rb.ees.value, leastSignificantChange(REPEATABILITY.eesCv, REPEATABILITY.eesSource), ra.ees.reason ?? rb.ees.reason);
  const eaEes = changeRow('eaEes', 'Coupling ratio Ea/Ees', '', ra.eaEes.value, rb.eaEes.value, leastSignificantChange(REPEATABILITY.eesCv, REPEATABILITY.eaEesSource), ra.eaEes.reason ?? rb.eaEes.reason);

  const rows = [ea, pes, ees, eaEes];
  // The right heart: a row only when both visits have the value (a TR jet at both).
  if (ra.pasp.value !== null && rb.pasp.value !== null) {
    rows.push(changeRow('pasp', 'Pulmonary artery systolic pressure PASP', 'mmHg', ra.pasp.value, rb.pasp.value, leastSignificantChange(PASP_CV, REPEATABILITY.paspSource), undefined));
  }
  if (ra.tapsePasp.value !== null && rb.tapsePasp.value !== null) {
    rows.push(changeRow('tapsePasp', 'Right ventricle–pulmonary artery coupling TAPSE/PASP', 'mm/mmHg', ra.tapsePasp.value, rb.tapsePasp.value, leastSignificantChange(TAPSE_PASP_CV, REPEATABILITY.tapsePaspSource), undefined));
  }

  const cautions: string[] = [];
  if (a.choice.strokeVolumeSource !== b.choice.strokeVolumeSource) {
    cautions.push(`Stroke volume comes from different sources (${STROKE_VOLUME_SOURCE_WORDS[a.choice.strokeVolumeSource]} at the first visit, ${STROKE_VOLUME_SOURCE_WORDS[b.choice.strokeVolumeSource]} at the second): part of any change in Ea and Ees may be method, not physiology.`);
  }
  if (a.choice.pesMethod !== b.choice.pesMethod) {
    cautions.push(`End-systolic pressure was estimated differently (${PES_METHOD_WORDS[a.choice.pesMethod]} then ${PES_METHOD_WORDS[b.choice.pesMethod]}): part of any change in Pes, Ea and Ees may be method, not physiology.`);
  }
  const limits = methodLimitWords([a, b].map((x) => ({ flags: x.flags, rhythm: x.inputs.rhythm })));
  if (limits.length) cautions.push(`Method limits apply (${listInWords(limits)}); read the elastance changes with caution.`);
  return { methodsVersion: a.methodsVersion === b.methodsVersion ? a.methodsVersion : METHODS_VERSION, rows, cautions };
}

/** Each visit of a series compared with the one before it (null for the first). */
export function changesAlongSeries(assessments: readonly Assessment[]): (Comparison | null)[] {
  return assessments.map((a, i) => (i === 0 ? null : compareVisits(assessments[i - 1]!, a)));
}
