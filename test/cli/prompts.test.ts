/**
 * The interactive flow driven end to end with a scripted Asker (answers in
 * order, emulating inquirer: an empty answer takes the default, a refused
 * answer shows the reason and is asked again), and real inquirer prompts of
 * ours rendered with @inquirer/testing.
 */
import { input, select } from '@inquirer/prompts';
import { render } from '@inquirer/testing';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { assess } from '../../src/assessment/assess.js';
import { parseInputs, type RawInputs } from '../../src/assessment/inputs.js';
import { Cancelled, EXIT_CANCELLED, reportError } from '../../src/cli/main.js';
import {
  efQuestion, entryFromText, entryProblem, numberQuestion, reviewQuestion, type ChoiceQuestion, type ManyQuestion, type TextQuestion,
} from '../../src/cli/prompt-steps.js';
import { collectInteractively, type Asker } from '../../src/cli/prompts.js';
import { fieldByKey } from '../../src/assessment/fields.js';

type Step = { input: string; expect?: RegExp } | { select: unknown; expect?: RegExp } | { checkbox: unknown[]; expect?: RegExp };

interface Log {
  /** Questions and notes in the order they happened ("? message" / "= default" / "! refusal" / "note"). */
  events: string[];
  refusals: string[];
  notes: string[];
  texts: TextQuestion[];
  selects: ChoiceQuestion<unknown>[];
  checkboxes: ManyQuestion<unknown>[];
}

/** An Asker that answers from a script and records everything shown. */
function scripted(steps: Step[]): { ask: Asker; log: Log; left: () => number } {
  const log: Log = { events: [], refusals: [], notes: [], texts: [], selects: [], checkboxes: [] };
  let i = 0;
  function next<K extends 'input' | 'select' | 'checkbox'>(kind: K, message: string): Extract<Step, Record<K, unknown>> {
    const step = steps[i++];
    if (!step) throw new Error(`script ran out at question "${message}"`);
    if (!(kind in step)) throw new Error(`question "${message}" is a ${kind}, the script has ${JSON.stringify(step)}`);
    if (step.expect && !step.expect.test(message)) throw new Error(`expected a question matching ${step.expect}, got "${message}"`);
    return step as Extract<Step, Record<K, unknown>>;
  }
  const ask: Asker = {
    async input(q) {
      log.texts.push(q);
      for (;;) {
        log.events.push(`? ${q.message}`);
        if (q.default !== undefined) log.events.push(`= ${q.default}`);
        const step = next('input', q.message);
        // inquirer's input: an empty answer takes the default; a refused answer is shown and asked again.
        const text = step.input === '' && q.default !== undefined ? q.default : step.input;
        const verdict = q.validate(text);
        if (verdict === true) return text;
        log.refusals.push(verdict);
        log.events.push(`! ${verdict}`);
      }
    },
    async select<T>(q: ChoiceQuestion<T>): Promise<T> {
      log.selects.push(q as ChoiceQuestion<unknown>);
      log.events.push(`? ${q.message}`);
      const step = next('select', q.message);
      if (!q.choices.some((c) => c.value === step.select)) throw new Error(`"${String(step.select)}" is not a choice of "${q.message}"`);
      return step.select as T;
    },
    async checkbox<T>(q: ManyQuestion<T>): Promise<T[]> {
      log.checkboxes.push(q as ManyQuestion<unknown>);
      log.events.push(`? ${q.message}`);
      return next('checkbox', q.message).checkbox as T[];
    },
    note(text) {
      log.notes.push(text);
      log.events.push(text);
    },
  };
  return { ask, log, left: () => steps.length - i };
}

/** The right-heart section's opening question, answered "skip". */
const SKIP_RIGHT_HEART: Step = { select: false, expect: /^Right heart \(optional\)/ };

const MMHG_PER_KPA = 1000 / 133.322387415; // 1 mmHg = 133.322387415 Pa (conventional definition; common practice)

describe('collectInteractively: the whole flow from nothing', () => {
  const script: Step[] = [
    { select: 'sinus', expect: /^Rhythm/ },
    { input: '68', expect: /^Heart rate \(in bpm, accepted 25–220 bpm/ },
    { input: '120', expect: /^LV end-diastolic volume \(in mL, accepted 20–600 mL/ },
    { input: '130', expect: /^LV end-systolic volume/ }, // refused: not below EDV
    { input: '50', expect: /^LV end-systolic volume/ },
    { input: '', expect: /^Reported ejection fraction/ }, // empty leaves EF to the volumes
    { select: 'lvot', expect: /^Doppler stroke volume/ },
    { input: '2.1', expect: /^LVOT diameter \(in cm, accepted 1\.2–3\.5 cm/ },
    { input: '21', expect: /^LVOT velocity–time integral/ },
    { input: '95', expect: /^Pre-ejection period \(in ms, accepted 20–250 ms/ },
    { input: '0.285 s', expect: /^Ejection time/ },
    { checkbox: [], expect: /^Valve and outflow/ },
    SKIP_RIGHT_HEART,
    { input: '152, 148', expect: /^Brachial systolic pressure \(in mmHg, accepted 60–260 mmHg; one or several readings/ },
    { input: '94,92', expect: /^Brachial diastolic pressure/ },
    { input: '174', expect: /^Height/ },
    { input: '88', expect: /^Weight/ },
    { select: 'female', expect: /^Sex \(optional/ },
    { select: 'hr', expect: /^Review/ }, // correct the heart rate
    { input: '70', expect: /^Heart rate/ },
    { select: 'compute', expect: /^Review/ },
  ];

  it('asks in echo-report order, re-asks a refused answer with the reason, and returns inputs that parse and assess', async () => {
    const { ask, log, left } = scripted(script);
    const raw = await collectInteractively({}, { ask });
    expect(left()).toBe(0);

    // The refused ESV: the reason names the field, the value and what is accepted.
    expect(log.refusals).toEqual(['esv: got 130 mL; not below EDV 120 mL; accepted: ESV lower than EDV']);

    // The implied EF is shown right before the EF question, which names it but offers no default.
    const efAt = log.events.findIndex((e) => e.startsWith('? Reported ejection fraction'));
    expect(log.events[efAt - 1]).toMatch(/^The volumes imply EF 58 %/); // (120 − 50)/120 = 58.3 %, Lang 2015
    expect(log.events[efAt]).toContain('leave empty to use the 58 % the volumes imply');
    expect(log.events[efAt + 1]).not.toMatch(/^= /);
    // tNd after the timing intervals, the mean after several readings, the Doppler SV after the LVOT.
    expect(log.notes).toContain('Normalized time tNd = PEP/(PEP + ET) = 0.250.'); // 95/(95 + 285), Chen 2001
    expect(log.notes).toContain('SBP: mean of 2 readings 150 mmHg.');
    expect(log.notes).toContain('DBP: mean of 2 readings 93 mmHg.');
    expect(log.notes).toContain('Doppler stroke volume from the LVOT: 73 mL (VTI × π(D/2)²).'); // 21 × π × 1.05² = 72.7

    expect(raw).toEqual({
      rhythm: 'sinus', hr: 70, edv: 120, esv: 50, lvotDiameter: 2.1, lvotVti: 21, pep: 95, et: '0.285 s',
      aorticStenosis: false, aorticRegurgitation: false, mitralRegurgitation: false, outflowObstruction: false,
      sbp: [152, 148], dbp: [94, 92], height: 174, weight: 88, sex: 'female',
    });

    const a = assess(parseInputs(raw));
    expect(a.inputs.et).toBeCloseTo(285, 9);
    expect(a.inputs.ef).toBeNull(); // EF left to the volumes
    expect(a.results.efUsed.value).toBeCloseTo((70 / 120) * 100, 9);
    expect(a.results.svUsed.value).toBeCloseTo(21 * Math.PI * 1.05 ** 2, 6); // Doppler SV, common practice
    expect(a.results.pes.value).toBeCloseTo(0.9 * 150, 9); // Kelly 1992
    expect(a.results.tNd.value).toBeCloseTo(95 / 380, 9);
    expect(a.results.co.value).toBeCloseTo((21 * Math.PI * 1.05 ** 2 * 70) / 1000, 6);
    expect(a.results.ees.value).not.toBeNull();
    expect(a.results.eaEes.value).not.toBeNull();
  });

  it('shows every value with its unit on the review screen, "Compute now" first, and reflects the correction', async () => {
    const { ask, log } = scripted(script);
    await collectInteractively({}, { ask });
    const reviews = log.selects.filter((q) => q.message.startsWith('Review'));
    expect(reviews).toHaveLength(2);
    const [before, after] = reviews.map((q) => q.choices.map((c) => c.name));
    expect(before![0]).toBe('Compute now');
    expect(before).toEqual(expect.arrayContaining([
      'Rhythm: sinus',
      'Heart rate: 68 bpm',
      'LV end-diastolic volume: 120 mL',
      'LV end-systolic volume: 50 mL',
      'Reported ejection fraction: from the volumes, 58 %',
      'Doppler stroke volume: LVOT 2.1 cm, VTI 21 cm → 73 mL',
      'Pre-ejection period: 95 ms',
      'Ejection time: 0.285 s (= 285 ms)',
      'Valve and outflow findings: none marked',
      'Right heart: skipped',
      'Brachial systolic pressure: 152, 148 mmHg (mean 150 mmHg)',
      'Brachial diastolic pressure: 94, 92 mmHg (mean 93 mmHg)',
      'Height: 174 cm',
      'Weight: 88 kg',
      'Sex: female',
    ]));
    expect(after).toContain('Heart rate: 70 bpm');
    // The correction offers the current value as its default.
    const hrQuestions = log.texts.filter((q) => q.message.startsWith('Heart rate'));
    expect(hrQuestions[1]!.default).toBe('68');
    for (const name of [...before!, ...after!]) expect(name).not.toMatch(/\b(NaN|Infinity|undefined)\b/);
  });
});

describe('collectInteractively: only what is missing', () => {
  it('skips what the flags gave and asks the rest in order', async () => {
    const partial: RawInputs = { sbp: ['150'], dbp: '90', hr: 60, edv: 120, esv: 50, rhythm: 'sinus', aorticStenosis: true };
    const { ask, log } = scripted([
      { input: '55', expect: /^Reported ejection fraction/ },
      { select: 'none', expect: /^Doppler/ },
      { input: '90', expect: /^Pre-ejection period/ },
      { input: '290', expect: /^Ejection time/ },
      SKIP_RIGHT_HEART,
      { input: '', expect: /^Height/ },
      { input: '', expect: /^Weight/ },
      { select: 'not-given', expect: /^Sex/ },
      { select: 'compute' },
    ]);
    const raw = await collectInteractively(partial, { ask });
    expect(log.events.filter((e) => e.startsWith('? ')).map((e) => e.slice(2, 12))).toEqual([
      'Reported e', 'Doppler st', 'Pre-ejecti', 'Ejection t', 'Right hear', 'Height (in', 'Weight (in', 'Sex (optio', 'Review: pi',
    ]);
    expect(raw).not.toHaveProperty('sex');
    expect(raw).toMatchObject({ ...partial, ef: 55, pep: 90, et: 290 });
    // Values from flags arrive as text; plain numbers still show their unit on review.
    const review = log.selects.find((q) => q.message.startsWith('Review'))!.choices.map((c) => c.name);
    expect(review).toEqual(expect.arrayContaining(['Brachial systolic pressure: 150 mmHg', 'Brachial diastolic pressure: 90 mmHg', 'Valve and outflow findings: aortic stenosis']));
    expect(raw).not.toHaveProperty('height');
    expect(raw).not.toHaveProperty('sv');
    expect(assess(parseInputs(raw)).results.efUsed.value).toBe(55);
  });

  it('keeps a typed EF that equals the EF the volumes imply as the reported EF', async () => {
    // EDV 120, ESV 50 imply (120 − 50)/120 = 58.3 %, shown as 58: typing 58 reports 58 % (Lang 2015 EF definition).
    const partial: RawInputs = { sbp: 120, dbp: 80, hr: 60, edv: 120, esv: 50, rhythm: 'sinus', sv: 70, pep: 90, et: 290, height: 170, weight: 70, sex: 'female', aorticStenosis: false };
    const { ask } = scripted([{ input: '58', expect: /^Reported ejection fraction/ }, SKIP_RIGHT_HEART, { select: 'compute' }]);
    const raw = await collectInteractively(partial, { ask });
    expect(raw.ef).toBe(58);
    const a = assess(parseInputs(raw));
    expect(a.inputs.ef).toBe(58);
    expect(a.results.efUsed.value).toBe(58);
    expect(a.results.efUsed.method).toBe('reported');
  });

  it('asks again for a given value that is refused, saying why', async () => {
    const partial: RawInputs = { sbp: 120, dbp: 80, edv: 'abc', esv: 50, ef: 60, pep: 90, et: 290, hr: 64, rhythm: 'sinus', sv: 70, height: 170, weight: 70, sex: 'male', outflowObstruction: false };
    const { ask, log } = scripted([
      { input: '120', expect: /^LV end-diastolic volume/ },
      SKIP_RIGHT_HEART,
      { select: 'compute' },
    ]);
    const raw = await collectInteractively(partial, { ask });
    const note = log.notes.find((n) => n.startsWith('Given value not accepted: '));
    expect(note).toMatch(/^Given value not accepted: edv: got "abc"; .*accepted: .*mL.*; range 20–600 mL$/);
    expect(raw.edv).toBe(120);
  });

  it('catches a given value that contradicts an earlier answer (ESV given, EDV answered lower)', async () => {
    const partial: RawInputs = { sbp: 120, dbp: 80, esv: 130, ef: 60, pep: 90, et: 290, hr: 64, rhythm: 'sinus', sv: 70, height: 170, weight: 70, sex: 'female', aorticStenosis: false };
    const { ask, log } = scripted([
      { input: '120', expect: /^LV end-diastolic volume/ },
      { input: '50', expect: /^LV end-systolic volume/ },
      SKIP_RIGHT_HEART,
      { select: 'compute' },
    ]);
    const raw = await collectInteractively(partial, { ask });
    expect(log.notes).toContain('Given value not accepted: esv: got 130 mL; not below EDV 120 mL; accepted: ESV lower than EDV');
    expect(raw.esv).toBe(50);
  });
});

describe('collectInteractively: suggestions (the previous visit) are offered as defaults', () => {
  it('pre-selects rhythm, pre-fills height and pre-checks valve flags', async () => {
    const suggestions: Partial<RawInputs> = { height: 174, rhythm: 'atrial-fibrillation', mitralRegurgitation: true, sex: 'male' };
    const { ask, log } = scripted([
      { select: 'atrial-fibrillation' },
      { input: '' }, // heart rate skipped
      { input: '120' },
      { input: '50' },
      { input: '' },
      { select: 'direct' },
      { input: '0.07 L', expect: /^Doppler stroke volume \(in mL/ },
      { input: '90' },
      { input: '290' },
      { checkbox: ['mitralRegurgitation'] },
      SKIP_RIGHT_HEART,
      { input: '16.5kPa' },
      { input: '80' },
      { input: '', expect: /^Height/ }, // takes the suggested 174
      { input: '' },
      { select: 'male', expect: /^Sex/ }, // the suggested sex is pre-selected
      { select: 'compute' },
    ]);
    const raw = await collectInteractively({}, { ask, suggestions });
    expect(log.selects[0]!.default).toBe('atrial-fibrillation');
    expect(log.selects.find((q) => q.message.startsWith('Sex'))!.default).toBe('male');
    expect(log.texts.find((q) => q.message.startsWith('Height'))!.default).toBe('174');
    expect(log.checkboxes[0]!.choices.filter((c) => c.checked).map((c) => c.value)).toEqual(['mitralRegurgitation']);
    expect(raw).toMatchObject({ rhythm: 'atrial-fibrillation', height: 174, mitralRegurgitation: true, sv: '0.07 L', sbp: '16.5kPa' });
    expect(raw).not.toHaveProperty('hr');
    const inputs = parseInputs(raw);
    expect(inputs.sv).toBeCloseTo(70, 9); // 0.07 L = 70 mL
    // mathjs defines mmHg as 133.322 Pa, 3 ppm from the conventional value: far below cuff precision.
    expect(inputs.sbp).toBeCloseTo(16.5 * MMHG_PER_KPA, 2);
    const review = log.selects.find((q) => q.message.startsWith('Review'))!;
    expect(review.choices.map((c) => c.name)).toContain('Brachial systolic pressure: 16.5kPa (= 124 mmHg)');
    // Atrial fibrillation and mitral regurgitation break the method's assumptions: the assessment says so.
    const flags = assess(inputs).flags.map((f) => f.level);
    expect(flags.filter((l) => l === 'caution').length).toBeGreaterThanOrEqual(2);
  });
});

describe('collectInteractively: the review screen', () => {
  const complete: RawInputs = { rhythm: 'sinus', hr: 64, edv: 120, esv: 50, pep: 90, et: 290, sbp: 120, dbp: 80, aorticStenosis: false, height: 170, weight: 70, sex: 'female', sv: 70 };

  it('refuses a correction that contradicts another value (EDV below ESV), then shows the new implied EF', async () => {
    const { ask, log } = scripted([
      { input: '' }, // EF: keep the implied
      SKIP_RIGHT_HEART,
      { select: 'edv' },
      { input: '40', expect: /^LV end-diastolic volume/ },
      { input: '100' },
      { select: 'compute' },
    ]);
    const raw = await collectInteractively({ ...complete, esv: 50 }, { ask });
    expect(log.refusals).toEqual(['edv: got 40 mL; not above ESV 50 mL; accepted: EDV higher than ESV']);
    expect(log.notes).toContain('The volumes imply EF 50 % ((EDV − ESV)/EDV with EDV 100 mL, ESV 50 mL).');
    expect(raw.edv).toBe(100);
  });

  it('corrects Doppler source, valve flags, rhythm and EF', async () => {
    const { ask } = scripted([
      { input: '' },
      SKIP_RIGHT_HEART,
      { select: 'doppler' },
      { select: 'lvot' },
      { input: '2.0' },
      { input: '20' },
      { select: 'valves' },
      { checkbox: ['aorticStenosis', 'outflowObstruction'] },
      { select: 'rhythm' },
      { select: 'other' },
      { select: 'ef' },
      { input: '61' },
      { select: 'compute' },
    ]);
    const raw = await collectInteractively(complete, { ask });
    expect(raw).not.toHaveProperty('sv');
    expect(raw).toMatchObject({ lvotDiameter: '2.0', lvotVti: 20, aorticStenosis: true, outflowObstruction: true, aorticRegurgitation: false, rhythm: 'other', ef: 61 });
    const a = assess(parseInputs(raw));
    expect(a.results.svUsed.value).toBeCloseTo(20 * Math.PI, 9); // VTI × π(D/2)², D = 2 cm
  });

  it('asks only for the missing half of the LVOT pair', async () => {
    const { sv: _sv, ...withoutSv } = complete;
    const { ask, log } = scripted([
      { input: '' }, // EF
      { input: '2.0', expect: /^LVOT velocity–time integral/ }, // refused: below 5 cm
      { input: '20', expect: /^LVOT velocity–time integral/ },
      SKIP_RIGHT_HEART,
      { select: 'compute' },
    ]);
    const raw = await collectInteractively({ ...withoutSv, lvotDiameter: 2 }, { ask });
    expect(log.refusals).toEqual(['lvot-vti: got "2.0"; outside the accepted range; accepted: LVOT velocity–time integral, 5–50 cm']);
    expect(log.events.filter((e) => e.startsWith('? ')).map((e) => e.slice(2, 12))).toEqual(['Reported e', 'LVOT veloc', 'LVOT veloc', 'Right hear', 'Review: pi']);
    expect(raw).toMatchObject({ lvotDiameter: 2, lvotVti: 20 });
  });

  it('does not compute while the inputs do not parse, says why, and offers the field it needs', async () => {
    const { ask, log } = scripted([
      { input: '' }, // EF
      SKIP_RIGHT_HEART,
      { select: 'compute' }, // refused: pes-method "measured" without the measured value
      { select: 'pesMeasured' },
      { input: '104', expect: /^Measured end-systolic pressure \(in mmHg, accepted 40–260 mmHg/ },
      { select: 'compute' },
    ]);
    const raw = await collectInteractively({ ...complete, pesMethod: 'measured' }, { ask });
    expect(log.notes.some((n) => n.startsWith('Not computed yet: pes-measured: missing'))).toBe(true);
    const reviews = log.selects.filter((q) => q.message.startsWith('Review'));
    expect(reviews[0]!.choices.map((c) => c.value)).not.toContain('pesMeasured');
    expect(reviews[1]!.choices.map((c) => c.name)).toContain('Measured end-systolic pressure: not given');
    expect(assess(parseInputs(raw)).results.pes.value).toBe(104);
  });
});

describe('collectInteractively: the optional right-heart section', () => {
  // Left heart, cuff and body complete except the cuff pressures, so the section's place in the order shows.
  const leftOnly: RawInputs = { rhythm: 'sinus', hr: 64, edv: 120, esv: 50, ef: 58, pep: 90, et: 290, sv: 70, aorticStenosis: false, height: 170, weight: 70, sex: 'female' };
  const cuff: Step[] = [{ input: '120', expect: /^Brachial systolic/ }, { input: '80', expect: /^Brachial diastolic/ }];
  const asked = (log: Log) => log.events.filter((e) => e.startsWith('? ')).map((e) => e.slice(2, 12));

  it('asks once, after the valve findings and before the cuff, defaulting to skip; skipping adds nothing', async () => {
    const { aorticStenosis: _as, ...noValves } = leftOnly;
    const { ask, log, left } = scripted([{ checkbox: [] }, SKIP_RIGHT_HEART, ...cuff, { select: 'compute' }]);
    const raw = await collectInteractively(noValves, { ask });
    expect(left()).toBe(0);
    expect(asked(log)).toEqual(['Valve and ', 'Right hear', 'Brachial s', 'Brachial d', 'Review: pi']);
    const opening = log.selects.find((q) => q.message.startsWith('Right heart'))!;
    expect(opening.default).toBe(false);
    expect(opening.choices.map((c) => c.value)).toEqual([false, true]);
    for (const key of ['tapse', 'trVelocity', 'rap', 'ivc', 'ivcCollapse']) expect(raw).not.toHaveProperty(key);
    expect(log.selects.find((q) => q.message.startsWith('Review'))!.choices.map((c) => c.name)).toContain('Right heart: skipped');
    const r = assess(parseInputs(raw)).results;
    expect(r.rapUsed.value).toBeNull();
    expect(r.pasp.value).toBeNull();
  });

  it('enters TAPSE and the TR jet with RAP left empty: the IVC pair is asked (both needed) and estimates RAP 15 mmHg', async () => {
    const { ask, log, left } = scripted([
      { select: true, expect: /^Right heart/ },
      { input: '17', expect: /^TAPSE \(in mm, accepted 3–40 mm; leave empty to skip\)/ },
      { input: '3.2', expect: /^Peak tricuspid regurgitant velocity \(in m\/s.*leave empty when no TR jet is measurable/ },
      { input: '', expect: /^Right-atrial pressure \(in mmHg.*leave empty to estimate it from the IVC/ },
      { input: '2.4', expect: /^Inferior vena cava diameter \(in cm/ },
      { input: '', expect: /^IVC collapse with a sniff \(in %/ }, // refused: the diameter needs its collapse
      { input: '30', expect: /^IVC collapse with a sniff/ },
      ...cuff,
      { select: 'compute' },
    ]);
    const raw = await collectInteractively(leftOnly, { ask });
    expect(left()).toBe(0);
    expect(log.refusals).toHaveLength(1);
    expect(log.refusals[0]).toMatch(/^ivc-collapse: .*required/);
    expect(raw).toMatchObject({ tapse: 17, trVelocity: 3.2, ivc: 2.4, ivcCollapse: 30 });
    expect(raw).not.toHaveProperty('rap');
    // Rudski 2010 (ASE guideline): IVC > 2.1 cm with < 50 % sniff collapse → RAP 15 mmHg.
    expect(log.notes).toContain('Right-atrial pressure estimated from the IVC: 15 mmHg (Rudski 2010: 3, 8 or 15 mmHg by diameter and sniff collapse).');
    const review = log.selects.find((q) => q.message.startsWith('Review'))!.choices.map((c) => c.name);
    expect(review).toContain('Right heart: TAPSE 17 mm; TR velocity 3.2 m/s; IVC 2.4 cm, collapse 30 % → RAP 15 mmHg estimated');
    const r = assess(parseInputs(raw)).results;
    expect(r.rapUsed.value).toBe(15);
    expect(r.pasp.value).toBeCloseTo(4 * 3.2 ** 2 + 15, 9); // simplified Bernoulli 4·v² + RAP, Rudski 2010
    expect(r.tapsePasp.value).toBeCloseTo(17 / (4 * 3.2 ** 2 + 15), 9); // TAPSE/PASP, Tello 2019
  });

  it('does not ask for the IVC when a right-atrial pressure is typed', async () => {
    const { ask, log, left } = scripted([
      { select: true, expect: /^Right heart/ },
      { input: '20', expect: /^TAPSE/ },
      { input: '2.5', expect: /^Peak tricuspid/ },
      { input: '5', expect: /^Right-atrial pressure/ },
      ...cuff,
      { select: 'compute' },
    ]);
    const raw = await collectInteractively(leftOnly, { ask });
    expect(left()).toBe(0);
    expect(asked(log)).toEqual(['Right hear', 'TAPSE (in ', 'Peak tricu', 'Right-atri', 'Brachial s', 'Brachial d', 'Review: pi']);
    expect(raw).toMatchObject({ tapse: 20, trVelocity: 2.5, rap: 5 });
    const r = assess(parseInputs(raw)).results;
    expect(r.rapUsed.value).toBe(5);
    expect(r.pasp.value).toBeCloseTo(4 * 2.5 ** 2 + 5, 9); // 30 mmHg, simplified Bernoulli (Rudski 2010)
  });

  it('does not ask again what flags gave: no opening question, no TAPSE or IVC diameter, the collapse the diameter needs', async () => {
    const { ask, log, left } = scripted([
      { input: '', expect: /^Peak tricuspid/ }, // no jet
      { input: '', expect: /^Right-atrial pressure/ }, // estimate it from the IVC
      { input: '60', expect: /^IVC collapse with a sniff/ },
      ...cuff,
      { select: 'compute' },
    ]);
    const raw = await collectInteractively({ ...leftOnly, tapse: '18', ivc: '1.8' }, { ask });
    expect(left()).toBe(0);
    expect(asked(log)).toEqual(['Peak tricu', 'Right-atri', 'IVC collap', 'Brachial s', 'Brachial d', 'Review: pi']);
    // Rudski 2010: IVC ≤ 2.1 cm with > 50 % sniff collapse → RAP 3 mmHg.
    expect(assess(parseInputs(raw)).results.rapUsed.value).toBe(3);
  });

  it('shows the section on review and lets it be corrected, then skipped', async () => {
    const given: RawInputs = { ...leftOnly, sbp: 120, dbp: 80, tapse: 18, trVelocity: 2.8, ivc: 1.8, ivcCollapse: 60 };
    const { ask, log, left } = scripted([
      { select: 'rightHeart', expect: /^Review/ },
      { select: true, expect: /^Right heart/ },
      { input: '', expect: /^TAPSE/ }, // keeps 18
      { input: '3', expect: /^Peak tricuspid/ },
      { input: '10', expect: /^Right-atrial pressure/ }, // replaces the IVC estimate
      { select: 'rightHeart', expect: /^Review/ },
      { select: false, expect: /^Right heart/ },
      { select: 'compute', expect: /^Review/ },
    ]);
    const raw = await collectInteractively(given, { ask });
    expect(left()).toBe(0);
    const reviews = log.selects.filter((q) => q.message.startsWith('Review')).map((q) => q.choices.map((c) => c.name));
    expect(reviews[0]).toContain('Right heart: TAPSE 18 mm; TR velocity 2.8 m/s; IVC 1.8 cm, collapse 60 % → RAP 3 mmHg estimated');
    expect(reviews[1]).toContain('Right heart: TAPSE 18 mm; TR velocity 3 m/s; RAP 10 mmHg');
    expect(reviews[2]).toContain('Right heart: skipped');
    expect(log.texts.find((q) => q.message.startsWith('TAPSE'))!.default).toBe('18');
    expect(log.selects.filter((q) => q.message.startsWith('Right heart')).map((q) => q.default)).toEqual([true, true]);
    for (const key of ['tapse', 'trVelocity', 'rap', 'ivc', 'ivcCollapse']) expect(raw).not.toHaveProperty(key);
  });
});

describe('the checks behind every question', () => {
  const sbp = fieldByKey('sbp');
  const bad: [string, RegExp][] = [
    ['abc', /^sbp: got "abc"; .*accepted: .*mmHg.*; range 60–260 mmHg$/],
    ['NaN', /^sbp: got "NaN"; .*accepted: /],
    ['Infinity', /^sbp: got "Infinity"; .*accepted: /],
    ['-5', /^sbp: got -5; outside the accepted range; accepted: Brachial systolic pressure, 60–260 mmHg$/],
    ['999', /^sbp: got 999; outside the accepted range; accepted: .*60–260 mmHg$/],
    ['7 furlongs', /^sbp: got "7 furlongs"; .*accepted: /],
    ['5 kg', /^sbp: got "5 kg"; .*pressure.*; accepted: /],
    ['150, abc', /^sbp: got "abc"; /],
    ['', /^sbp: missing; required; accepted: Brachial systolic pressure, 60–260 mmHg$/],
  ];
  for (const [text, message] of bad) {
    it(`refuses ${JSON.stringify(text)} for SBP with the field, the value and what is accepted`, () => {
      const q = numberQuestion('sbp', {}, { scope: 'flow' });
      expect(q.validate(text)).toMatch(message);
    });
  }

  it('accepts a value with its unit and several readings', () => {
    const q = numberQuestion('sbp', {}, { scope: 'flow' });
    expect(q.validate('16.5kPa')).toBe(true);
    expect(q.validate('152, 148 , 150')).toBe(true);
    expect(entryFromText(sbp, '152, 148 , 150')).toEqual([152, 148, 150]);
    expect(entryFromText(sbp, '16.5kPa')).toBe('16.5kPa');
    expect(entryFromText(fieldByKey('hr'), ' ')).toBeUndefined();
  });

  it('lets optional fields be skipped and requires the others', () => {
    expect(numberQuestion('hr', {}, { scope: 'flow' }).validate('')).toBe(true);
    expect(numberQuestion('edv', {}, { scope: 'flow' }).validate('')).toMatch(/^edv: missing/);
  });

  it('checks DBP below SBP, and on review SBP above DBP', () => {
    expect(numberQuestion('dbp', { sbp: [120, 122] }, { scope: 'flow' }).validate('125')).toBe('dbp: got 125 mmHg; not below SBP 121 mmHg; accepted: DBP lower than SBP');
    expect(numberQuestion('dbp', { sbp: 120 }, { scope: 'flow' }).validate('80')).toBe(true);
    // In the flow SBP comes first, so it is not held against a DBP given earlier; on review it is.
    expect(numberQuestion('sbp', { dbp: 90 }, { scope: 'flow' }).validate('85')).toBe(true);
    expect(numberQuestion('sbp', { dbp: 90 }, { scope: 'all' }).validate('85')).toBe('sbp: got 85 mmHg; not above DBP 90 mmHg; accepted: SBP higher than DBP');
    expect(entryProblem('esv', 120, { edv: 120 }, 'flow', false)).toBe('esv: got 120 mL; not below EDV 120 mL; accepted: ESV lower than EDV');
  });

  it('names the implied EF without offering it as a default while none is reported, and offers the reported one once given', () => {
    const fresh = efQuestion({ edv: 120, esv: 50 }, 'flow');
    expect(fresh.default).toBeUndefined();
    expect(fresh.message).toContain('leave empty to use the 58 % the volumes imply'); // (120 − 50)/120 = 58.3 %
    const reported = efQuestion({ edv: 120, esv: 50, ef: 61 }, 'all');
    expect(reported.default).toBe('61');
    expect(reported.message).toContain('the volumes imply 58 %');
    expect(reported.message).not.toContain('leave empty');
    expect(efQuestion({}, 'flow').default).toBeUndefined();
  });

  it('takes each unit and range from the field registry', () => {
    for (const key of ['hr', 'edv', 'esv', 'ef', 'sv', 'lvotDiameter', 'lvotVti', 'pep', 'et', 'sbp', 'dbp', 'height', 'weight'] as const) {
      const f = fieldByKey(key);
      const message = key === 'ef' ? efQuestion({}, 'flow').message : numberQuestion(key, {}, { scope: 'flow' }).message;
      expect(message).toContain(`${f.label} (in ${f.unit}, accepted ${f.min}–${f.max} ${f.unit}`);
    }
  });
});

describe('Ctrl-C leaves quietly', () => {
  afterEach(() => {
    vi.restoreAllMocks();
  });

  it('an ExitPromptError from any question ends the flow and maps to exit 130 with no stack trace', async () => {
    const exit = Object.assign(new Error('User force closed the prompt with SIGINT'), { name: 'ExitPromptError' });
    const { ask } = scripted([{ select: 'sinus' }]);
    ask.input = () => Promise.reject(exit);
    await expect(collectInteractively({}, { ask })).rejects.toBe(exit);

    const written: string[] = [];
    vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => {
      written.push(String(chunk));
      return true;
    });
    expect(reportError(exit)).toBe(EXIT_CANCELLED);
    expect(reportError(new Cancelled())).toBe(130);
    expect(written.join('')).toBe('\n\n');
  });

  it('a real inquirer prompt of ours rejects with ExitPromptError on Ctrl-C', async () => {
    const { answer, events } = await render(input, numberQuestion('edv', {}, { scope: 'flow' }));
    events.keypress({ name: 'c', ctrl: true });
    await expect(answer).rejects.toMatchObject({ name: 'ExitPromptError' });
  });
});

describe('our questions rendered by inquirer (@inquirer/testing)', () => {
  it('shows unit and range, shows the reason for a bad answer, then accepts a good one', async () => {
    const { answer, events, getScreen, nextRender } = await render(input, numberQuestion('sbp', {}, { scope: 'flow' }));
    expect(getScreen()).toContain('Brachial systolic pressure (in mmHg, accepted 60–260 mmHg; one or several readings, comma-separated)');
    events.type('999');
    events.keypress('enter');
    await nextRender();
    expect(getScreen()).toContain('sbp: got 999; outside the accepted range; accepted: Brachial systolic pressure, 60–260 mmHg');
    for (let i = 0; i < 3; i++) events.keypress('backspace');
    events.type('152, 148');
    events.keypress('enter');
    await expect(answer).resolves.toBe('152, 148');
  });

  it('names the implied EF in the reported-EF question; Enter on nothing leaves EF to the volumes', async () => {
    const { answer, events, getScreen } = await render(input, efQuestion({ edv: 120, esv: 50 }, 'flow'));
    expect(getScreen()).toContain('leave empty to use the 58 % the volumes imply');
    expect(getScreen()).not.toContain('(58)');
    events.keypress('enter');
    await expect(answer).resolves.toBe('');
  });

  it('a unit on the answer is converted; a unit of the wrong kind is refused', async () => {
    const draft: RawInputs = { sbp: 120 };
    const { answer, events, getScreen, nextRender } = await render(input, numberQuestion('dbp', draft, { scope: 'flow' }));
    events.type('10 kg');
    events.keypress('enter');
    await nextRender();
    expect(getScreen()).toMatch(/dbp: got "10 kg"; .*pressure.*; accepted: .*range 30–160 mmHg/);
    for (let i = 0; i < 5; i++) events.keypress('backspace');
    events.type('10.7kPa');
    events.keypress('enter');
    await expect(answer).resolves.toBe('10.7kPa');
  });

  it('renders the review list with "Compute now" first', async () => {
    const q = reviewQuestion({ rhythm: 'sinus', hr: 64, edv: 120, esv: 50, sbp: [150, 148], dbp: 90, pep: 90, et: 290 });
    const { answer, events, getScreen } = await render(select, {
      message: q.message,
      choices: q.choices.map((c) => ({ name: c.name, value: c.value })),
      default: q.default,
      pageSize: q.pageSize,
    });
    const screen = getScreen();
    expect(screen.indexOf('Compute now')).toBeLessThan(screen.indexOf('Rhythm: sinus'));
    expect(screen).toContain('Brachial systolic pressure: 150, 148 mmHg (mean 149 mmHg)');
    expect(screen).toContain('Reported ejection fraction: from the volumes, 58 %');
    expect(screen).toContain('Weight: not given');
    events.keypress('down');
    events.keypress('enter');
    await expect(answer).resolves.toBe('rhythm');
  });
});
