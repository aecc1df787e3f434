/**
 * Asking for missing inputs at the terminal. The questions go through an
 * `Asker` (by default `@inquirer/prompts`, loaded only here, only when
 * prompting), so a test can drive the whole flow with scripted answers. The
 * order, checks, notes and review list live in ./prompt-steps.ts.
 *
 * Ctrl-C anywhere: inquirer rejects with ExitPromptError, which main.ts turns
 * into a quiet exit with code 130.
 */
import { fieldByKey, type NumericKey, type Rhythm } from '../assessment/fields.js';
import type { RawInputs } from '../assessment/inputs.js';
import {
  ASK_ORDER, INTRO, dopplerKeys, dopplerQuestion, dopplerSource, dopplerUntouched, defaultText, efQuestion,
  entryFromText, finalProblem, impliedEfNote, isNumberStep, needsAnswer, notesAfter, numberQuestion, reviewQuestion,
  RIGHT_HEART_KEYS, rhythmQuestion, rightHeartAsk, rightHeartQuestion, rightHeartUntouched, sexQuestion, withoutRightHeart, valveQuestion, withSex, valvesUntouched, withDopplerSource, withEfAnswer, withEntry, withValves,
  type CheckScope, type ChoiceQuestion, type SexAnswer, type ManyQuestion, type ReviewId, type StepId, type TextQuestion,
} from './prompt-steps.js';

/** Where questions go: inquirer at the terminal, a script in tests. */
export interface Asker {
  input(question: TextQuestion): Promise<string>;
  select<T>(question: ChoiceQuestion<T>): Promise<T>;
  checkbox<T>(question: ManyQuestion<T>): Promise<T[]>;
  /** A line of information between questions (implied EF, tNd, mean of readings, a refused given value). */
  note(text: string): void;
}

export interface CollectOptions {
  /** Offered as defaults, e.g. the previous visit's height, rhythm and valve flags. */
  suggestions?: Partial<RawInputs>;
  ask?: Asker;
}

/** The terminal Asker: `@inquirer/prompts`, imported on first use. */
export async function inquirerAsker(output: NodeJS.WritableStream = process.stdout): Promise<Asker> {
  const prompts = await import('@inquirer/prompts');
  return {
    input: (q) => prompts.input(q),
    select: <T>(q: ChoiceQuestion<T>) =>
      prompts.select<T>({
        message: q.message,
        choices: q.choices.map((c) => ({ name: c.name, value: c.value, ...(c.description ? { description: c.description } : {}) })),
        ...(q.default !== undefined ? { default: q.default } : {}),
        ...(q.pageSize !== undefined ? { pageSize: q.pageSize } : {}),
      }),
    checkbox: <T>(q: ManyQuestion<T>) =>
      prompts.checkbox<T>({
        message: q.message,
        choices: q.choices.map((c) => ({ name: c.name, value: c.value, checked: c.checked === true })),
      }),
    note: (text) => {
      output.write(text + '\n');
    },
  };
}

/**
 * Ask for what `partial` lacks, in the order an echo report is read, then let
 * the user review and correct every value. Resolves with raw inputs that
 * parse (src/assessment/inputs.ts parseInputs).
 */
export async function collectInteractively(partial: RawInputs, options: CollectOptions = {}): Promise<RawInputs> {
  const ask = options.ask ?? (await inquirerAsker());
  const suggestions = options.suggestions ?? {};
  ask.note(INTRO);
  let draft: RawInputs = { ...partial };
  const asked = new Set<StepId>();
  for (const step of ASK_ORDER) {
    const next = await flowStep(ask, step, draft, suggestions, asked);
    if (next !== draft) asked.add(step);
    draft = next;
  }
  return review(ask, draft, suggestions);
}

/** Ask until the answer passes the question's check (inquirer already re-asks; a scripted Asker may not). */
async function askText(ask: Asker, q: TextQuestion): Promise<string> {
  for (;;) {
    const text = await ask.input(q);
    const verdict = q.validate(text);
    if (verdict === true) return text;
    ask.note(verdict);
  }
}

/** How a numeric question is put: whether it may be left empty, and what empty means. */
type Asking = { optional?: boolean; extra?: string };

async function askNumber(ask: Asker, key: NumericKey, draft: RawInputs, scope: CheckScope, suggestions: Partial<RawInputs>, how: Asking = {}): Promise<RawInputs> {
  const opts: Parameters<typeof numberQuestion>[2] = { scope, ...how };
  const def = defaultText(key, draft, suggestions);
  if (def !== undefined) opts.default = def;
  const text = await askText(ask, numberQuestion(key, draft, opts));
  const next = withEntry(draft, key, entryFromText(fieldByKey(key), text));
  for (const line of notesAfter(key, next, scope)) ask.note(line);
  return next;
}

/** A numeric field in the flow: asked when absent, or when the given value is refused (after saying why). */
async function flowNumber(ask: Asker, key: NumericKey, draft: RawInputs, suggestions: Partial<RawInputs>, how: Asking = {}): Promise<RawInputs> {
  const need = needsAnswer(key, draft);
  if (!need.ask) return draft;
  if (need.given) {
    ask.note(need.given);
    draft = withEntry(draft, key, undefined);
  }
  return askNumber(ask, key, draft, 'flow', suggestions, how);
}

async function askEf(ask: Asker, draft: RawInputs, scope: CheckScope): Promise<RawInputs> {
  const note = impliedEfNote(draft);
  if (note) ask.note(note);
  return withEfAnswer(draft, await askText(ask, efQuestion(draft, scope)));
}

async function askDoppler(ask: Asker, draft: RawInputs, scope: CheckScope, suggestions: Partial<RawInputs>): Promise<RawInputs> {
  const current = dopplerUntouched(draft) ? undefined : dopplerSource(draft);
  const source = await ask.select(dopplerQuestion(current));
  let next = withDopplerSource(draft, source);
  for (const key of dopplerKeys(source)) next = await askNumber(ask, key, next, scope, suggestions, { optional: false });
  return next;
}

/**
 * The right-heart fields: in the flow, only those missing or refused (given values are not asked
 * again); on review, each with its current value as default. A RAP typed on review drops the IVC
 * pair it replaces; an IVC diameter left empty drops its collapse.
 */
async function rightHeartFields(ask: Asker, draft: RawInputs, scope: CheckScope, suggestions: Partial<RawInputs>): Promise<RawInputs> {
  let next = draft;
  for (const key of RIGHT_HEART_KEYS) {
    const how = rightHeartAsk(key, next, scope);
    if (how === null) continue;
    next = scope === 'flow' ? await flowNumber(ask, key, next, suggestions, how) : await askNumber(ask, key, next, 'all', suggestions, how);
    if (scope === 'all' && key === 'rap' && next.rap !== undefined) next = withEntry(withEntry(next, 'ivc', undefined), 'ivcCollapse', undefined);
    if (key === 'ivc' && next.ivc === undefined) next = withEntry(next, 'ivcCollapse', undefined);
  }
  return next;
}

async function askRightHeart(ask: Asker, draft: RawInputs, scope: CheckScope, suggestions: Partial<RawInputs>): Promise<RawInputs> {
  const enter = await ask.select<boolean>(rightHeartQuestion(!rightHeartUntouched(draft)));
  return enter ? rightHeartFields(ask, draft, scope, suggestions) : withoutRightHeart(draft);
}

async function flowStep(ask: Asker, step: StepId, draft: RawInputs, suggestions: Partial<RawInputs>, asked: ReadonlySet<StepId>): Promise<RawInputs> {
  if (isNumberStep(step)) return flowNumber(ask, step, draft, suggestions);
  switch (step) {
    case 'rhythm':
      if (draft.rhythm !== undefined) return draft;
      return { ...draft, rhythm: await ask.select<Rhythm>(rhythmQuestion(suggestions.rhythm)) };
    case 'ef': {
      const need = needsAnswer('ef', draft);
      if (!need.ask) {
        // EF was given: still show what the volumes just entered imply.
        const note = asked.has('edv') || asked.has('esv') ? impliedEfNote(draft) : undefined;
        if (note) ask.note(note);
        return draft;
      }
      if (need.given) ask.note(need.given);
      return askEf(ask, withEntry(draft, 'ef', undefined), 'flow');
    }
    case 'doppler': {
      if (dopplerUntouched(draft)) return askDoppler(ask, draft, 'flow', suggestions);
      // Part of the Doppler input was given: ask only for what is missing or refused.
      let next = draft;
      for (const key of dopplerKeys(dopplerSource(draft))) next = await flowNumber(ask, key, next, suggestions, { optional: false });
      return next;
    }
    case 'valves':
      if (!valvesUntouched(draft)) return draft;
      return withValves(draft, await ask.checkbox(valveQuestion(draft, suggestions)));
    case 'rightHeart':
      // Right-heart values already given: ask only for what they lack, without the opening question.
      return rightHeartUntouched(draft) ? askRightHeart(ask, draft, 'flow', suggestions) : rightHeartFields(ask, draft, 'flow', suggestions);
    case 'sex':
      if (draft.sex !== undefined) return draft;
      return withSex(draft, await ask.select<SexAnswer>(sexQuestion(suggestions.sex)));
  }
  return draft;
}

async function review(ask: Asker, draft: RawInputs, suggestions: Partial<RawInputs>): Promise<RawInputs> {
  let named: NumericKey[] = [];
  for (;;) {
    const choice = await ask.select<ReviewId>(reviewQuestion(draft, named));
    if (choice === 'compute') {
      const problem = finalProblem(draft);
      if (problem === null) return draft;
      ask.note(`Not computed yet: ${problem.message}`);
      named = problem.keys;
      continue;
    }
    draft = await correct(ask, choice, draft, suggestions);
  }
}

async function correct(ask: Asker, id: Exclude<ReviewId, 'compute'>, draft: RawInputs, suggestions: Partial<RawInputs>): Promise<RawInputs> {
  switch (id) {
    case 'rhythm':
      return { ...draft, rhythm: await ask.select<Rhythm>(rhythmQuestion(draft.rhythm)) };
    case 'ef':
      return askEf(ask, draft, 'all');
    case 'doppler':
      return askDoppler(ask, draft, 'all', suggestions);
    case 'valves':
      return withValves(draft, await ask.checkbox(valveQuestion(draft, suggestions)));
    case 'rightHeart':
      return askRightHeart(ask, draft, 'all', suggestions);
    case 'sex':
      return withSex(draft, await ask.select<SexAnswer>(sexQuestion(draft.sex)));
    default:
      return askNumber(ask, id, draft, 'all', suggestions);
  }
}
