/**
 * The interactive flow's logic, kept pure so a test can drive it without a
 * terminal: which questions to ask and in what order (the order an echo
 * report is read), how each answer is read and checked, what is shown between
 * questions, and the review screen. Units, ranges and labels come from the
 * field registry (src/assessment/fields.ts); nothing here repeats them.
 */
import { NUMERIC_FIELDS, RHYTHMS, SEXES, VALVE_FLAGS, describeRange, fieldByKey, type NumericField, type NumericKey, type Rhythm, type Sex, type ValveKey } from '../assessment/fields.js';
import { parseInputs, type RawInputs } from '../assessment/inputs.js';
import { InputError, describeProblem, showValue } from '../errors.js';
import { ejectionFractionFromVolumes } from '../physiology/ejection-fraction.js';
import { normalizedEjectionOnset } from '../physiology/normalized-time.js';
import { rightAtrialPressureFromVenaCava } from '../physiology/right-atrial-pressure.js';
import { strokeVolumeDoppler } from '../physiology/stroke-volume.js';
import { formatNumber, formatValue } from '../render/format.js';
import { toInternalUnit } from '../units/quantity.js';

/** One value as entered: a bare number in the field's unit, or text with a unit. */
export type RawValue = number | string;
/** A field's entry: one value, or several readings for SBP and DBP. */
export type RawEntry = RawValue | RawValue[];

/** A free-text question (the shape `@inquirer/prompts` input takes). */
export interface TextQuestion {
  message: string;
  default?: string;
  /** true, or the reason the answer is refused (shown, then asked again). */
  validate: (text: string) => true | string;
}
export interface Choice<T> {
  name: string;
  value: T;
  description?: string;
  checked?: boolean;
}
/** Pick one (the shape `@inquirer/prompts` select takes). */
export interface ChoiceQuestion<T> {
  message: string;
  choices: Choice<T>[];
  default?: T;
  pageSize?: number;
}
/** Pick any (the shape `@inquirer/prompts` checkbox takes). */
export interface ManyQuestion<T> {
  message: string;
  choices: Choice<T>[];
}

/** The questions in the order an echo report is read. */
export const ASK_ORDER = ['rhythm', 'hr', 'edv', 'esv', 'ef', 'doppler', 'pep', 'et', 'valves', 'rightHeart', 'sbp', 'dbp', 'height', 'weight', 'sex'] as const;
export type StepId = (typeof ASK_ORDER)[number];

/** Numeric steps asked one field at a time. */
export const NUMBER_STEPS = ['hr', 'edv', 'esv', 'pep', 'et', 'sbp', 'dbp', 'height', 'weight'] as const satisfies readonly NumericKey[];
export type NumberStep = (typeof NUMBER_STEPS)[number];

export function isNumberStep(step: string): step is NumberStep {
  return (NUMBER_STEPS as readonly string[]).includes(step);
}

export const INTRO =
  'Some inputs are missing. Type each value in the unit shown, or with its own unit (e.g. 16.5kPa, 0.14 L, 0.3s).\n' +
  'Several cuff readings may be given comma-separated. You can correct any value before computing; Ctrl-C leaves.';

// ---------------------------------------------------------------------------
// Reading and checking answers

/** Text as typed → the raw entry (undefined when empty). Bare numbers become numbers. */
export function entryFromText(field: NumericField, text: string): RawEntry | undefined {
  const trimmed = text.trim();
  if (trimmed === '') return undefined;
  const parts = field.multiple ? trimmed.split(',').map((p) => p.trim()).filter((p) => p !== '') : [trimmed];
  const values = parts.map(asRawValue);
  if (values.length === 0) return trimmed;
  return values.length === 1 ? (values[0] as RawValue) : values;
}

function asRawValue(text: string): RawValue {
  const n = Number(text);
  // Keep the number only when it prints back exactly as typed ("150", "2.1"); "1e3" or "150.0" stay text.
  return Number.isFinite(n) && String(n) === text ? n : text;
}

/** An entry as the user would type it again (the default of a correction). */
export function entryText(entry: unknown): string {
  if (Array.isArray(entry)) return entry.map((v) => entryText(v)).join(', ');
  if (typeof entry === 'number') return Number.isFinite(entry) ? String(entry) : '';
  if (typeof entry === 'string') return entry;
  return '';
}

function isAbsent(v: unknown): boolean {
  return v === undefined || v === null || v === '' || (Array.isArray(v) && v.length === 0);
}

/** An entry in internal units (the mean of its readings), or why it is refused. */
function readEntry(f: NumericField, entry: RawEntry): { value: number } | { problem: string } {
  const list = Array.isArray(entry) ? entry : [entry];
  let sum = 0;
  for (const item of list) {
    let v: number;
    try {
      v = toInternalUnit(f.flag, item, f.kind);
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      return { problem: err.problems.map((p) => describeProblem({ ...p, accepted: `${p.accepted}; range ${describeRange(f)}` })).join('\n') };
    }
    if (v < f.min || v > f.max) {
      return { problem: describeProblem({ field: f.flag, value: showValue(item), reason: 'outside the accepted range', accepted: `${f.label}, ${describeRange(f)}` }) };
    }
    sum += v;
  }
  return { value: sum / list.length };
}

/** The internal-unit value of a field in the draft (mean of readings), or null when absent or refused. */
export function internalValue(key: NumericKey, draft: RawInputs): number | null {
  const entry = draft[key] as RawEntry | undefined;
  if (entry === undefined || isAbsent(entry)) return null;
  const read = readEntry(fieldByKey(key), entry);
  return 'value' in read ? read.value : null;
}

/** Pairs that must be ordered: the lower value is asked after the upper one. */
const ORDERED = [
  { lower: 'dbp', upper: 'sbp', lowerName: 'DBP', upperName: 'SBP' },
  { lower: 'esv', upper: 'edv', lowerName: 'ESV', upperName: 'EDV' },
] as const;

/**
 * `flow`: check a value only against fields asked before it (so a wrong value
 * given on the command line is caught at its own question, not at its partner's);
 * `all`: check against every other field (corrections on the review screen).
 */
export type CheckScope = 'flow' | 'all';

function shortNumber(x: number): string {
  return formatNumber(x, Number.isInteger(x) ? 0 : 1);
}

/** Why an entry is refused, or null when it is accepted. Messages name the field, the value and what is accepted. */
export function entryProblem(key: NumericKey, entry: RawEntry | undefined, draft: RawInputs, scope: CheckScope, optional: boolean): string | null {
  const f = fieldByKey(key);
  if (entry === undefined || isAbsent(entry)) {
    return optional ? null : describeProblem({ field: f.flag, value: '', reason: 'required', accepted: `${f.label}, ${describeRange(f)}` });
  }
  const read = readEntry(f, entry);
  if ('problem' in read) return read.problem;
  const mine = read.value;
  for (const pair of ORDERED) {
    if (key === pair.lower) {
      const upper = internalValue(pair.upper, draft);
      if (upper !== null && mine >= upper) {
        return describeProblem({ field: f.flag, value: `${shortNumber(mine)} ${f.unit}`, reason: `not below ${pair.upperName} ${shortNumber(upper)} ${f.unit}`, accepted: `${pair.lowerName} lower than ${pair.upperName}` });
      }
    } else if (key === pair.upper && scope === 'all') {
      const lower = internalValue(pair.lower, draft);
      if (lower !== null && lower >= mine) {
        return describeProblem({ field: f.flag, value: `${shortNumber(mine)} ${f.unit}`, reason: `not above ${pair.lowerName} ${shortNumber(lower)} ${f.unit}`, accepted: `${pair.upperName} higher than ${pair.lowerName}` });
      }
    }
  }
  return null;
}

/** Set or clear one field, returning a new draft. */
export function withEntry(draft: RawInputs, key: NumericKey, entry: RawEntry | undefined): RawInputs {
  const next: Record<string, unknown> = { ...draft };
  if (entry === undefined) delete next[key];
  else next[key] = entry;
  return next as RawInputs;
}

// ---------------------------------------------------------------------------
// Questions

/** Whether the user may leave a field empty. */
export function isOptional(key: NumericKey): boolean {
  return !fieldByKey(key).required;
}

/** "Brachial systolic pressure (in mmHg, accepted 60–260 mmHg; …)" */
export function numberMessage(f: NumericField, optional: boolean, extra?: string): string {
  const parts = [`in ${f.unit || 'plain numbers'}, accepted ${describeRange(f)}`];
  if (f.multiple) parts.push('one or several readings, comma-separated');
  if (extra) parts.push(extra);
  else if (optional) parts.push('leave empty to skip');
  return `${f.label} (${parts.join('; ')})`;
}

/** The question for one numeric field, with its check. */
export function numberQuestion(key: NumericKey, draft: RawInputs, opts: { scope: CheckScope; default?: string; optional?: boolean; extra?: string } = { scope: 'flow' }): TextQuestion {
  const f = fieldByKey(key);
  const optional = opts.optional ?? isOptional(key);
  const q: TextQuestion = {
    message: numberMessage(f, optional, opts.extra),
    validate: (text) => entryProblem(key, entryFromText(f, text), draft, opts.scope, optional) ?? true,
  };
  if (opts.default) q.default = opts.default;
  return q;
}

/** The default offered for a field: its current value if acceptable, else the suggestion. */
export function defaultText(key: NumericKey, draft: RawInputs, suggestions: Partial<RawInputs>): string | undefined {
  for (const source of [draft, suggestions as RawInputs]) {
    const entry = source[key] as RawEntry | undefined;
    if (entry !== undefined && !isAbsent(entry) && internalValue(key, source) !== null) return entryText(entry);
  }
  return undefined;
}

/** Whether a numeric step must be asked: absent, or given but refused (with the reason). */
export function needsAnswer(key: NumericKey, draft: RawInputs): { ask: false } | { ask: true; given?: string } {
  const entry = draft[key] as RawEntry | undefined;
  if (entry === undefined || isAbsent(entry)) return { ask: true };
  const problem = entryProblem(key, entry, draft, 'flow', false);
  return problem === null ? { ask: false } : { ask: true, given: `Given value not accepted: ${problem}` };
}

// ---- ejection fraction

/** EF (%) the volumes imply, or null when either volume is missing or refused. */
export function impliedEjectionFraction(draft: RawInputs): number | null {
  const edv = internalValue('edv', draft);
  const esv = internalValue('esv', draft);
  if (edv === null || esv === null || esv >= edv) return null;
  return ejectionFractionFromVolumes(edv, esv);
}

export function impliedEfNote(draft: RawInputs): string | undefined {
  const ef = impliedEjectionFraction(draft);
  if (ef === null) return undefined;
  return `The volumes imply EF ${formatValue(ef, '%')} ((EDV − ESV)/EDV with EDV ${formatValue(internalValue('edv', draft), 'mL')}, ESV ${formatValue(internalValue('esv', draft), 'mL')}).`;
}

/**
 * The reported-EF question. Empty leaves EF to the volumes (their EF is named in the question, not
 * offered as a default), so any value typed, even the one the volumes imply, is the reported EF.
 */
export function efQuestion(draft: RawInputs, scope: CheckScope): TextQuestion {
  const implied = impliedEjectionFraction(draft);
  const impliedText = implied === null ? undefined : formatNumber(implied, 0);
  const current = draft.ef !== undefined && internalValue('ef', draft) !== null ? entryText(draft.ef) : undefined;
  const extra = !impliedText
    ? 'leave empty to use the EF from the volumes'
    : current === undefined
      ? `leave empty to use the ${impliedText} % the volumes imply`
      : `the volumes imply ${impliedText} %`;
  const q = numberQuestion('ef', draft, { scope, optional: true, extra });
  if (current !== undefined) q.default = current;
  return q;
}

/** Apply the EF answer: empty leaves EF to the volumes; a typed value is the reported EF. */
export function withEfAnswer(draft: RawInputs, text: string): RawInputs {
  const trimmed = text.trim();
  return withEntry(draft, 'ef', trimmed === '' ? undefined : entryFromText(fieldByKey('ef'), trimmed));
}

// ---- Doppler stroke volume

export type DopplerSource = 'direct' | 'lvot' | 'none';

export function dopplerSource(draft: RawInputs): DopplerSource {
  if (!isAbsent(draft.sv)) return 'direct';
  if (!isAbsent(draft.lvotDiameter) || !isAbsent(draft.lvotVti)) return 'lvot';
  return 'none';
}

/** Whether the Doppler step asks which source (nothing given yet). */
export function dopplerUntouched(draft: RawInputs): boolean {
  return draft.sv === undefined && draft.lvotDiameter === undefined && draft.lvotVti === undefined;
}

export function dopplerQuestion(current?: DopplerSource): ChoiceQuestion<DopplerSource> {
  const sv = fieldByKey('sv');
  const q: ChoiceQuestion<DopplerSource> = {
    message: 'Doppler stroke volume (feeds Ea and Ees when given)',
    choices: [
      { name: `enter it directly (${sv.unit}, accepted ${describeRange(sv)})`, value: 'direct' },
      { name: 'from LVOT diameter and velocity–time integral', value: 'lvot' },
      { name: 'none: use the volumetric stroke volume (EDV − ESV)', value: 'none' },
    ],
  };
  if (current) q.default = current;
  return q;
}

/** Keep only the fields of the chosen source. */
export function withDopplerSource(draft: RawInputs, source: DopplerSource): RawInputs {
  let next = draft;
  if (source !== 'direct') next = withEntry(next, 'sv', undefined);
  if (source !== 'lvot') next = withEntry(withEntry(next, 'lvotDiameter', undefined), 'lvotVti', undefined);
  return next;
}

export function dopplerNote(draft: RawInputs): string | undefined {
  const d = internalValue('lvotDiameter', draft);
  const vti = internalValue('lvotVti', draft);
  if (d === null || vti === null) return undefined;
  return `Doppler stroke volume from the LVOT: ${formatValue(strokeVolumeDoppler(d, vti), 'mL')} (VTI × π(D/2)²).`;
}

// ---- timing, readings

export function timingNote(draft: RawInputs): string | undefined {
  const pep = internalValue('pep', draft);
  const et = internalValue('et', draft);
  if (pep === null || et === null) return undefined;
  return `Normalized time tNd = PEP/(PEP + ET) = ${formatNumber(normalizedEjectionOnset(pep, et), 3)}.`;
}

export function readingsNote(key: 'sbp' | 'dbp', draft: RawInputs): string | undefined {
  const entry = draft[key];
  const mean = internalValue(key, draft);
  if (!Array.isArray(entry) || entry.length < 2 || mean === null) return undefined;
  return `${key === 'sbp' ? 'SBP' : 'DBP'}: mean of ${entry.length} readings ${formatValue(mean, 'mmHg')}.`;
}

// ---- rhythm and valves

export function rhythmQuestion(current: Rhythm | undefined): ChoiceQuestion<Rhythm> {
  return {
    message: 'Rhythm during the echo',
    choices: RHYTHMS.map((r) => ({ name: r.replace('-', ' '), value: r })),
    default: current ?? 'sinus',
  };
}

// ---- sex (optional: the reference ranges use it)

/** The answer that leaves sex unrecorded. */
export const SEX_NOT_GIVEN = 'not-given';
export type SexAnswer = Sex | typeof SEX_NOT_GIVEN;

export function sexQuestion(current: Sex | undefined): ChoiceQuestion<SexAnswer> {
  return {
    message: 'Sex (optional; the reference ranges use it)',
    choices: [...SEXES.map((s) => ({ name: s, value: s as SexAnswer })), { name: 'not given', value: SEX_NOT_GIVEN }],
    default: current ?? SEX_NOT_GIVEN,
  };
}

export function withSex(draft: RawInputs, answer: SexAnswer): RawInputs {
  const next: RawInputs = { ...draft };
  if (answer === SEX_NOT_GIVEN) delete next.sex;
  else next.sex = answer;
  return next;
}

export function valveQuestion(draft: RawInputs, suggestions: Partial<RawInputs>): ManyQuestion<ValveKey> {
  const source = valvesUntouched(draft) ? suggestions : draft;
  return {
    message: 'Valve and outflow findings (space to mark the significant ones, Enter when done; none is fine)',
    choices: VALVE_FLAGS.map((v) => ({ name: v.label, value: v.key, checked: source[v.key] === true })),
  };
}

export function withValves(draft: RawInputs, marked: readonly ValveKey[]): RawInputs {
  const next: Record<string, unknown> = { ...draft };
  for (const v of VALVE_FLAGS) next[v.key] = marked.includes(v.key);
  return next as RawInputs;
}

export function valvesUntouched(draft: RawInputs): boolean {
  return VALVE_FLAGS.every((v) => draft[v.key] === undefined);
}

// ---- right heart (optional section after the left-heart questions)

/** The right-heart fields in the order asked. */
export const RIGHT_HEART_KEYS = ['tapse', 'trVelocity', 'rap', 'ivc', 'ivcCollapse'] as const satisfies readonly NumericKey[];
export type RightHeartKey = (typeof RIGHT_HEART_KEYS)[number];

/** Whether no right-heart value was given yet (then the section starts with "enter them?"). */
export function rightHeartUntouched(draft: RawInputs): boolean {
  return RIGHT_HEART_KEYS.every((k) => isAbsent(draft[k]));
}

export function rightHeartQuestion(entered: boolean): ChoiceQuestion<boolean> {
  return {
    message: 'Right heart (optional): TAPSE, TR jet velocity, right-atrial pressure or IVC',
    choices: [
      { name: 'skip the right heart', value: false },
      { name: 'enter right-heart measurements', value: true },
    ],
    default: entered,
  };
}

/**
 * Whether and how a right-heart field is asked, given the draft so far: null when it is not asked
 * (the IVC only when no right-atrial pressure is given; its collapse only with a diameter, as
 * the estimate needs both or neither).
 */
export function rightHeartAsk(key: RightHeartKey, draft: RawInputs, scope: CheckScope): { optional: boolean; extra?: string } | null {
  switch (key) {
    case 'tapse':
      return { optional: true };
    case 'trVelocity':
      return { optional: true, extra: 'leave empty when no TR jet is measurable' };
    case 'rap':
      // In the flow, an IVC diameter and collapse already given stand for the RAP.
      if (scope === 'flow' && !isAbsent(draft.ivc) && !isAbsent(draft.ivcCollapse)) return null;
      return { optional: true, extra: 'leave empty to estimate it from the IVC' };
    case 'ivc':
      if (!isAbsent(draft.rap)) return null;
      // A collapse given without a diameter needs the diameter; on review, empty clears both.
      return scope === 'flow' && !isAbsent(draft.ivcCollapse) ? { optional: false } : { optional: true, extra: 'leave empty if not measured: no RAP estimate' };
    case 'ivcCollapse':
      return !isAbsent(draft.rap) || isAbsent(draft.ivc) ? null : { optional: false };
  }
}

/** The draft without any right-heart value ("skip" on review). */
export function withoutRightHeart(draft: RawInputs): RawInputs {
  return RIGHT_HEART_KEYS.reduce((next, k) => withEntry(next, k, undefined), draft);
}

/** The right-atrial pressure the IVC implies (Rudski 2010 bands), or null without both values or with a RAP given. */
function rapFromIvc(draft: RawInputs): number | null {
  const ivc = internalValue('ivc', draft);
  const collapse = internalValue('ivcCollapse', draft);
  if (!isAbsent(draft.rap) || ivc === null || collapse === null) return null;
  return rightAtrialPressureFromVenaCava(ivc, collapse).value;
}

export function rapEstimateNote(draft: RawInputs): string | undefined {
  const rap = rapFromIvc(draft);
  if (rap === null) return undefined;
  return `Right-atrial pressure estimated from the IVC: ${formatValue(rap, 'mmHg')} (Rudski 2010: 3, 8 or 15 mmHg by diameter and sniff collapse).`;
}

function displayRightHeart(draft: RawInputs): string {
  if (rightHeartUntouched(draft)) return 'skipped';
  const parts = [`TAPSE ${displayEntry('tapse', draft)}`, `TR velocity ${isAbsent(draft.trVelocity) ? 'no jet given' : displayEntry('trVelocity', draft)}`];
  const ivc = `IVC ${displayEntry('ivc', draft)}, collapse ${displayEntry('ivcCollapse', draft)}`;
  const estimate = rapFromIvc(draft);
  if (!isAbsent(draft.rap)) parts.push(`RAP ${displayEntry('rap', draft)}` + (isAbsent(draft.ivc) && isAbsent(draft.ivcCollapse) ? '' : ` (${ivc} not used)`));
  else if (estimate !== null) parts.push(`${ivc} → RAP ${formatValue(estimate, 'mmHg')} estimated`);
  else parts.push(isAbsent(draft.ivc) && isAbsent(draft.ivcCollapse) ? 'RAP not given' : ivc);
  return parts.join('; ');
}

// ---------------------------------------------------------------------------
// Review

export type ReviewId = 'compute' | 'rhythm' | 'ef' | 'doppler' | 'valves' | 'rightHeart' | 'sex' | NumericKey;

/** A field's value as entered, with its unit, and the converted value when typed with a unit. */
export function displayEntry(key: NumericKey, draft: RawInputs): string {
  const f = fieldByKey(key);
  const entry = draft[key] as RawEntry | undefined;
  if (entry === undefined || isAbsent(entry)) return 'not given';
  const list = Array.isArray(entry) ? entry : [entry];
  // A plain number (typed, or a string from a flag) is in the field's unit; anything else carries its own.
  const bare = list.every((v) => typeof v === 'number' || (typeof v === 'string' && v.trim() !== '' && Number.isFinite(Number(v))));
  const shown = bare ? `${entryText(entry)}${f.unit ? ' ' + f.unit : ''}` : entryText(entry);
  const value = internalValue(key, draft);
  const extras: string[] = [];
  if (list.length > 1 && value !== null) extras.push(`mean ${formatValue(value, f.unit)}`);
  else if (!bare && value !== null) extras.push(`= ${formatValue(value, f.unit)}`);
  return extras.length ? `${shown} (${extras.join(', ')})` : shown;
}

function displayEf(draft: RawInputs): string {
  const implied = impliedEjectionFraction(draft);
  if (draft.ef === undefined) return implied === null ? 'not given' : `from the volumes, ${formatValue(implied, '%')}`;
  return displayEntry('ef', draft) + (implied === null ? '' : ` (volumes imply ${formatValue(implied, '%')})`);
}

function displayDoppler(draft: RawInputs): string {
  switch (dopplerSource(draft)) {
    case 'direct':
      return displayEntry('sv', draft);
    case 'lvot': {
      const d = internalValue('lvotDiameter', draft);
      const vti = internalValue('lvotVti', draft);
      const sv = d === null || vti === null ? '' : ` → ${formatValue(strokeVolumeDoppler(d, vti), 'mL')}`;
      return `LVOT ${displayEntry('lvotDiameter', draft)}, VTI ${displayEntry('lvotVti', draft)}${sv}`;
    }
    default:
      return 'none (volumetric SV used)';
  }
}

function displayValves(draft: RawInputs): string {
  const marked = VALVE_FLAGS.filter((v) => draft[v.key] === true).map((v) => v.label.replace(/^Significant /, '').toLowerCase());
  return marked.length ? marked.join(', ') : 'none marked';
}

const DOPPLER_KEYS: readonly NumericKey[] = ['sv', 'lvotDiameter', 'lvotVti'];

/**
 * The review list: "compute now" first, then every value with its unit, in the
 * order asked; `extra` adds fields a failed final check named (e.g. a measured
 * Pes that the chosen Pes method needs) so they can be filled in.
 */
export function reviewQuestion(draft: RawInputs, extra: readonly NumericKey[] = []): ChoiceQuestion<ReviewId> {
  const choices: Choice<ReviewId>[] = [{ name: 'Compute now', value: 'compute' }];
  for (const step of ASK_ORDER) {
    if (step === 'rhythm') choices.push({ name: `Rhythm: ${(draft.rhythm ?? 'sinus').replace('-', ' ')}`, value: 'rhythm' });
    else if (step === 'ef') choices.push({ name: `${fieldByKey('ef').label}: ${displayEf(draft)}`, value: 'ef' });
    else if (step === 'doppler') choices.push({ name: `Doppler stroke volume: ${displayDoppler(draft)}`, value: 'doppler' });
    else if (step === 'valves') choices.push({ name: `Valve and outflow findings: ${displayValves(draft)}`, value: 'valves' });
    else if (step === 'rightHeart') choices.push({ name: `Right heart: ${displayRightHeart(draft)}`, value: 'rightHeart' });
    else if (step === 'sex') choices.push({ name: `Sex: ${draft.sex ?? 'not given'}`, value: 'sex' });
    else choices.push({ name: `${fieldByKey(step).label}: ${displayEntry(step, draft)}`, value: step });
  }
  // Other measurements given on the command line or in the file stay correctable.
  for (const f of NUMERIC_FIELDS) {
    if ((ASK_ORDER as readonly string[]).includes(f.key) || DOPPLER_KEYS.includes(f.key) || (RIGHT_HEART_KEYS as readonly string[]).includes(f.key) || f.key === 'ef') continue;
    if (isAbsent(draft[f.key]) && !extra.includes(f.key)) continue;
    choices.push({ name: `${f.label}: ${displayEntry(f.key, draft)}`, value: f.key });
  }
  return { message: 'Review: pick a value to correct, or compute now', choices, default: 'compute', pageSize: choices.length };
}

/**
 * The final check before computing: null when the inputs are complete and
 * valid, else the parse error's message and the fields it names.
 */
export function finalProblem(draft: RawInputs): { message: string; keys: NumericKey[] } | null {
  try {
    parseInputs(draft);
    return null;
  } catch (err) {
    if (!(err instanceof InputError)) throw err;
    const keys = NUMERIC_FIELDS.filter((f) => err.problems.some((p) => p.field === f.flag)).map((f) => f.key);
    return { message: err.message, keys };
  }
}

/** What to show after a numeric answer: the mean of readings, tNd, and (on review) the EF the corrected volumes imply. */
export function notesAfter(key: NumericKey, draft: RawInputs, scope: CheckScope): string[] {
  const notes: (string | undefined)[] = [];
  if (key === 'sbp' || key === 'dbp') notes.push(readingsNote(key, draft));
  if (key === 'pep' || key === 'et') notes.push(timingNote(draft));
  if (key === 'lvotDiameter' || key === 'lvotVti') notes.push(dopplerNote(draft));
  if (key === 'ivcCollapse') notes.push(rapEstimateNote(draft));
  // In the flow the EF question itself shows the implied EF right after the volumes.
  if (scope === 'all' && (key === 'edv' || key === 'esv')) notes.push(impliedEfNote(draft));
  return notes.filter((n): n is string => n !== undefined);
}

/** The Doppler fields to ask for a source. */
export function dopplerKeys(source: DopplerSource): NumericKey[] {
  return source === 'direct' ? ['sv'] : source === 'lvot' ? ['lvotDiameter', 'lvotVti'] : [];
}
