/**
 * The graph for one visit: which rule each node uses, given which inputs are
 * present and the method choices (a plan, cached: a cohort has few patterns),
 * and the evaluation of a plan over a vector of values. Slots of the value
 * vector: the inputs in GRAPH_INPUTS order, then the nodes in NODES order.
 */
import { BSA_METHODS, MAP_METHODS, PES_METHODS, type NumericKey } from '../fields.js';
import type { Quantity } from '../result.js';
import { quantity } from '../result.js';
import { GRAPH_INPUTS, GRAPH_INPUT_KEYS, type GraphInputKey } from './inputs.js';
import { NODES, RESULT_KEYS, type ResultKey } from './registry.js';
import { passThrough, type NodeDef, type Rule, type RuleValue, type Selection } from './types.js';

export type Results = Record<ResultKey, Quantity>;

export const INPUT_COUNT = GRAPH_INPUTS.length;
export const NODE_COUNT = NODES.length;
export const SLOT_COUNT = INPUT_COUNT + NODE_COUNT;

const SLOT = new Map<string, number>([
  ...GRAPH_INPUT_KEYS.map((k, i): [string, number] => [k, i]),
  ...RESULT_KEYS.map((k, i): [string, number] => [k, INPUT_COUNT + i]),
]);

/** The slot of an input or node key. */
export function slotOf(key: GraphInputKey | ResultKey): number {
  return SLOT.get(key)!;
}

/** The key in a slot. */
export function keyOfSlot(slot: number): GraphInputKey | ResultKey {
  return slot < INPUT_COUNT ? GRAPH_INPUT_KEYS[slot]! : RESULT_KEYS[slot - INPUT_COUNT]!;
}

export function isInputSlot(slot: number): boolean {
  return slot < INPUT_COUNT;
}

/** Node indices with every node after the nodes it is computed from (whatever rule is chosen). */
const TOPOLOGICAL: readonly number[] = (() => {
  const order: number[] = [];
  const done = new Set<number>();
  const visit = (i: number): void => {
    if (done.has(i)) return;
    done.add(i);
    for (const r of NODES[i]!.rules) for (const ref of r.from) {
      const s = SLOT.get(ref)!;
      if (s >= INPUT_COUNT) visit(s - INPUT_COUNT);
    }
    order.push(i);
  };
  NODES.forEach((_n, i) => visit(i));
  return order;
})();

export interface PlannedNode {
  key: ResultKey;
  /** Position in NODES (and RESULT_KEYS). */
  index: number;
  slot: number;
  unit: string;
  /** The rule used; null: not computable for this visit (see reason). */
  rule: Rule | null;
  /** Slots of the rule's `from`, in order. */
  args: readonly number[];
  method: string | undefined;
  /** Why the node is not computable, when rule is null. */
  reason: string | undefined;
  /** The rule passes another node's value on unchanged (its draws are that node's). */
  alias: number | null;
}

export interface Plan {
  selection: Selection;
  /** Inputs present, by input slot. */
  present: readonly boolean[];
  /** Every node, in NODES order. */
  nodes: readonly PlannedNode[];
  /** The computable nodes in an order where each follows those it is computed from. */
  order: readonly PlannedNode[];
}

function matches(rule: Rule, selection: Selection): boolean {
  const when = rule.when;
  if (!when) return true;
  for (const k in when) if (when[k as keyof Selection] !== selection[k as keyof Selection]) return false;
  return true;
}

function joinAnd(items: readonly string[]): string {
  return items.length <= 1 ? (items[0] ?? '') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

function buildPlan(present: readonly boolean[], selection: Selection): Plan {
  const nodes: PlannedNode[] = new Array<PlannedNode>(NODE_COUNT);
  const computable = (slot: number): boolean => (slot < INPUT_COUNT ? present[slot]! : nodes[slot - INPUT_COUNT]!.rule !== null);
  for (const i of TOPOLOGICAL) {
    const def: NodeDef = NODES[i]!;
    let chosen: Rule | null = null;
    let firstMissing: string | undefined;
    for (const rule of def.rules) {
      if (!matches(rule, selection)) continue;
      const slots = rule.from.map((k) => SLOT.get(k)!);
      if (slots.every(computable)) {
        chosen = rule;
        break;
      }
      if (firstMissing === undefined) {
        const missingNode = slots.find((s) => s >= INPUT_COUNT && !computable(s));
        const missingInputs = slots.filter((s) => s < INPUT_COUNT && !present[s]).map((s) => GRAPH_INPUTS[s]!.needs);
        firstMissing = missingInputs.length ? `needs ${joinAnd(missingInputs)}` : nodes[missingNode! - INPUT_COUNT]!.reason;
      }
    }
    const args = chosen ? chosen.from.map((k) => SLOT.get(k)!) : [];
    nodes[i] = {
      key: def.key as ResultKey,
      index: i,
      slot: INPUT_COUNT + i,
      unit: def.unit,
      rule: chosen,
      args,
      method: undefined,
      reason: chosen ? undefined : (def.missing ?? firstMissing ?? 'no method applies to this visit'),
      alias: chosen && chosen.compute === passThrough && args[0]! >= INPUT_COUNT ? args[0]! : null,
    };
  }
  const methodOf = (key: string): string | undefined => nodes[SLOT.get(key)! - INPUT_COUNT]?.method;
  for (const i of TOPOLOGICAL) {
    const p = nodes[i]!;
    if (!p.rule) continue;
    const text = typeof p.rule.method === 'string' ? p.rule.method : p.rule.method(methodOf);
    p.method = p.rule.source ? `${text} (${p.rule.source})` : text;
  }
  return { selection, present, nodes, order: TOPOLOGICAL.map((i) => nodes[i]!).filter((p) => p.rule !== null) };
}

const plans = new Map<number, Plan>();
/** Every value of each method choice: a new choice is a field of Selection and a line here (the type checker asks for it). */
const SELECTION_VALUES: { readonly [K in keyof Selection]: readonly Selection[K][] } = {
  pesMethod: PES_METHODS,
  strokeVolumeSource: ['doppler', 'volumetric'],
  mapMethod: MAP_METHODS,
  bsaMethod: BSA_METHODS,
};
const SELECTION_KEYS = Object.keys(SELECTION_VALUES) as (keyof Selection)[];

/**
 * A number naming the selection and the inputs present (mixed radix): the plan cache's key (a cohort has few patterns).
 * Generated once from SELECTION_KEYS (plain identifiers of our own) as readInputs is: each choice read by its
 * name, since reads by a key that changes on every step of a loop are slow and this runs once per visit.
 */
const planCode = ((): ((presentMask: number, selection: Selection) => number) => {
  const body = SELECTION_KEYS.map((k, i) => {
    if (!/^[A-Za-z][A-Za-z0-9]*$/.test(k)) throw new Error(`selection key ${k} is not a plain identifier`);
    return `code = code * ${SELECTION_VALUES[k].length} + V[${i}].indexOf(selection.${k});`;
  });
  const factory = new Function('V', `return function planCode(presentMask, selection) { let code = presentMask;\n${body.join('\n')}\nreturn code; };`);
  return factory(SELECTION_KEYS.map((k) => SELECTION_VALUES[k])) as (presentMask: number, selection: Selection) => number;
})();

function planByCode(code: number, inputs: Readonly<Record<NumericKey, number | null>>, selection: Selection): Plan {
  let plan = plans.get(code);
  if (!plan) {
    plan = buildPlan(presentInputs(inputs), selection);
    plans.set(code, plan);
  }
  return plan;
}

/** The plan for a visit's inputs under these choices. */
export function planForInputs(inputs: Readonly<Record<NumericKey, number | null>>, selection: Selection): Plan {
  return planByCode(planCode(readInputs(inputs, scratchValues), selection), inputs, selection);
}

type InputReader = (inputs: Readonly<Record<NumericKey, number | null>>, v: Float64Array) => number;

/**
 * Copy a visit's graph inputs into slots 0… of `v` (NaN when absent) and
 * return the mask of those present (bit i: input i). Generated once from the
 * input keys (plain identifiers of our own), as property reads by name are
 * much faster than reads by a key that changes on every step of a loop.
 */
const readInputs: InputReader = (() => {
  const body = GRAPH_INPUT_KEYS.map((k, i) => {
    if (!/^[A-Za-z][A-Za-z0-9]*$/.test(k)) throw new Error(`input key ${k} is not a plain identifier`);
    return `x = inputs.${k}; if (x === null || x === undefined) v[${i}] = NaN; else { v[${i}] = x; mask += ${2 ** i}; }`;
  });
  return new Function('inputs', 'v', `let mask = 0; let x;\n${body.join('\n')}\nreturn mask;`) as InputReader;
})();

/** Which graph inputs a visit has. */
function presentInputs(inputs: Readonly<Record<NumericKey, number | null>>): boolean[] {
  const present = new Array<boolean>(INPUT_COUNT);
  for (let i = 0; i < INPUT_COUNT; i++) present[i] = inputs[GRAPH_INPUT_KEYS[i]!] !== null;
  return present;
}

/** A value vector with the visit's inputs filled in (NaN where absent) and the nodes still NaN. */
export function inputVector(inputs: Readonly<Record<NumericKey, number | null>>, into = new Float64Array(SLOT_COUNT)): Float64Array {
  readInputs(inputs, into);
  into.fill(Number.NaN, INPUT_COUNT);
  return into;
}


type Evaluator = (v: Float64Array, reasons: (string | undefined)[]) => void;
const evaluators = new WeakMap<Plan, Evaluator>();

/**
 * Evaluate a plan over `v` (inputs filled in): each node's value into its
 * slot, NaN where not computable, with the reason in `reasons`. A node whose
 * argument is not computable is not computed and carries that argument's
 * reason. The plan is compiled once into straight-line code that calls each
 * rule's function directly (as draws.ts does for the Monte Carlo draws): a
 * cohort evaluates it a hundred thousand times.
 */
export function evaluatePlan(plan: Plan, v: Float64Array, reasons: (string | undefined)[]): void {
  let evaluate = evaluators.get(plan);
  if (!evaluate) {
    evaluate = compileEvaluator(plan);
    evaluators.set(plan, evaluate);
  }
  evaluate(v, reasons);
}

function compileEvaluator(plan: Plan): Evaluator {
  const functions: Rule['compute'][] = [];
  const staticReasons: (string | undefined)[] = [];
  const lines: string[] = [];
  for (const p of plan.nodes) {
    if (p.rule !== null) continue;
    staticReasons[p.slot] = p.reason;
    lines.push(`v[${p.slot}] = NaN; reasons[${p.slot}] = R[${p.slot}];`);
  }
  for (const p of plan.order) {
    const f = functions.length;
    functions.push(p.rule!.compute);
    const s = p.slot;
    // Inputs a rule reads are present (the plan chose it so); only nodes can be lost at run time.
    const guards = p.args.filter((a) => a >= INPUT_COUNT).map((a) => `if (v[${a}] - v[${a}] !== 0) { v[${s}] = NaN; reasons[${s}] = reasons[${a}] ?? 'not computable'; }`);
    const call = `{ const r = F[${f}](${p.args.map((a) => `v[${a}]`).join(', ')}); if (typeof r === 'number') { v[${s}] = r; reasons[${s}] = r - r === 0 ? undefined : 'not a finite number'; } else { v[${s}] = r.value ?? NaN; reasons[${s}] = r.reason; } }`;
    lines.push(guards.length ? `${guards.join(' else ')} else ${call}` : call);
  }
  // The text holds slot numbers only; functions and reasons are passed in.
  const factory = new Function('F', 'R', `return function evaluate(v, reasons) {\n${lines.join('\n')}\n};`) as (f: Rule['compute'][], r: (string | undefined)[]) => Evaluator;
  return factory(functions, staticReasons);
}

const scratchValues = new Float64Array(SLOT_COUNT);
const scratchReasons: (string | undefined)[] = new Array<string | undefined>(SLOT_COUNT);

/** Every result of a visit's inputs under these choices (planForInputs and resultsOf in one pass over the inputs). */
export function resultsFor(inputs: Readonly<Record<NumericKey, number | null>>, selection: Selection): Results {
  const plan = evaluateInputs(inputs, selection);
  const v = scratchValues;
  const list = scratchQuantities;
  const nodes = plan.nodes;
  for (let i = 0; i < NODE_COUNT; i++) {
    const p = nodes[i]!;
    const x = v[p.slot]!;
    list[i] = quantity(x - x === 0 ? x : null, p.unit, p.method, scratchReasons[p.slot]);
  }
  return resultsLiteral(list);
}

/**
 * A results object for resultsInto: every quantity with all four fields, so
 * that each has one shape whatever its value.
 */
export function scratchResults(): Results {
  return resultsLiteral(NODES.map((n) => ({ value: null, unit: n.unit, method: undefined, reason: undefined })));
}

/**
 * resultsFor written into `target` (from scratchResults), whose quantities
 * are overwritten in place: the same values, units, methods and reasons
 * (method and reason undefined where resultsFor leaves them out), without a
 * new object per result. For a batch, which writes out each row's results
 * before it computes the next: `target` holds only the latest visit's.
 */
export function resultsInto(target: Results, inputs: Readonly<Record<NumericKey, number | null>>, selection: Selection): Results {
  const plan = evaluateInputs(inputs, selection);
  const v = scratchValues;
  const nodes = plan.nodes;
  let i = 0;
  // Walking the target's own keys in their order (RESULT_KEYS, as scratchResults makes it) is much faster
  // than looking each up by a name that changes with every step.
  for (const key in target) {
    const q = target[key as ResultKey];
    const p = nodes[i++]!;
    const x = v[p.slot]!;
    q.unit = p.unit;
    q.method = p.method;
    if (x - x === 0) {
      q.value = x;
      q.reason = undefined;
    } else {
      q.value = null;
      q.reason = scratchReasons[p.slot] ?? 'not computable';
    }
  }
  if (i !== NODE_COUNT) throw new Error('resultsInto: the target is not from scratchResults');
  return target;
}

/** The plan of a visit's inputs under these choices, evaluated into scratchValues and scratchReasons. */
function evaluateInputs(inputs: Readonly<Record<NumericKey, number | null>>, selection: Selection): Plan {
  const v = scratchValues;
  const plan = planByCode(planCode(readInputs(inputs, v), selection), inputs, selection);
  v.fill(Number.NaN, INPUT_COUNT);
  evaluatePlan(plan, v, scratchReasons);
  return plan;
}

const scratchQuantities = new Array<Quantity>(NODE_COUNT);

/**
 * The results object written as one literal with the keys in NODES order:
 * a cohort makes a hundred thousand of these, and a literal is far cheaper
 * than adding keys one by one. Generated from the registry's keys (checked
 * to be plain identifiers), never from user data.
 */
const resultsLiteral = ((): ((q: readonly Quantity[]) => Results) => {
  for (const k of RESULT_KEYS) if (!/^[A-Za-z][A-Za-z0-9]*$/.test(k)) throw new Error(`result key ${k} is not a plain identifier`);
  return new Function('q', `return { ${RESULT_KEYS.map((k, i) => `${k}: q[${i}]`).join(', ')} };`) as (q: readonly Quantity[]) => Results;
})();

/** The input and node slots a node's value depends on under a plan (its closure, the node itself excluded), inputs first, then nodes in evaluation order. */
export function dependencies(plan: Plan, key: ResultKey): number[] {
  const seen = new Set<number>();
  const walk = (slot: number): void => {
    if (seen.has(slot)) return;
    seen.add(slot);
    if (slot >= INPUT_COUNT) for (const a of plan.nodes[slot - INPUT_COUNT]!.args) walk(a);
  };
  const start = slotOf(key);
  for (const a of plan.nodes[start - INPUT_COUNT]!.args) walk(a);
  const inputs = [...seen].filter((s) => s < INPUT_COUNT).sort((a, b) => a - b);
  const nodes = plan.order.filter((p) => seen.has(p.slot)).map((p) => p.slot);
  return [...inputs, ...nodes];
}

/** The inputs a node's value depends on under a plan, in GRAPH_INPUTS order. */
export function inputsOf(plan: Plan, key: ResultKey): GraphInputKey[] {
  return dependencies(plan, key).filter((s) => s < INPUT_COUNT).map((s) => GRAPH_INPUT_KEYS[s]!);
}
