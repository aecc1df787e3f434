/**
 * The graph for one visit: which rule each node uses, given which inputs are
 * present and the method choices (a plan, cached: a cohort has few patterns),
 * and the evaluation of a plan over a vector of values. Slots of the value
 * vector: the inputs in GRAPH_INPUTS order, then the nodes in NODES order.
 */
import type { NumericKey } from '../fields.js';
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

const plans = new Map<string, Plan>();

/** The plan for a visit with these inputs present (by GRAPH_INPUTS slot) under these choices. */
export function planFor(present: readonly boolean[], selection: Selection): Plan {
  let id = `${selection.pesMethod}|${selection.strokeVolumeSource}|${selection.mapMethod}|${selection.bsaMethod}|`;
  for (let i = 0; i < INPUT_COUNT; i++) id += present[i] ? '1' : '0';
  let plan = plans.get(id);
  if (!plan) {
    plan = buildPlan([...present], selection);
    plans.set(id, plan);
  }
  return plan;
}

/** Which graph inputs a visit has. */
export function presentInputs(inputs: Readonly<Record<NumericKey, number | null>>): boolean[] {
  const present = new Array<boolean>(INPUT_COUNT);
  for (let i = 0; i < INPUT_COUNT; i++) present[i] = inputs[GRAPH_INPUT_KEYS[i]!] !== null;
  return present;
}

/** A value vector with the visit's inputs filled in (NaN where absent) and the nodes still NaN. */
export function inputVector(inputs: Readonly<Record<NumericKey, number | null>>, into = new Float64Array(SLOT_COUNT)): Float64Array {
  for (let i = 0; i < INPUT_COUNT; i++) into[i] = inputs[GRAPH_INPUT_KEYS[i]!] ?? Number.NaN;
  for (let i = INPUT_COUNT; i < SLOT_COUNT; i++) into[i] = Number.NaN;
  return into;
}

/** Call a rule's function with the values in `args` slots of `v`. */
export function callRule(compute: Rule['compute'], args: readonly number[], v: Float64Array): RuleValue {
  switch (args.length) {
    case 1:
      return compute(v[args[0]!]!);
    case 2:
      return compute(v[args[0]!]!, v[args[1]!]!);
    case 3:
      return compute(v[args[0]!]!, v[args[1]!]!, v[args[2]!]!);
    case 4:
      return compute(v[args[0]!]!, v[args[1]!]!, v[args[2]!]!, v[args[3]!]!);
    default:
      return compute(...args.map((s) => v[s]!));
  }
}

/**
 * Evaluate a plan over `v` (inputs filled in): each node's value into its
 * slot, NaN where not computable, with the reason in `reasons`. A node whose
 * argument is not computable is not computed and carries that argument's reason.
 */
export function evaluatePlan(plan: Plan, v: Float64Array, reasons: (string | undefined)[]): void {
  for (const p of plan.nodes) if (p.rule === null) reasons[p.slot] = p.reason;
  for (const p of plan.order) {
    const args = p.args;
    let missing = -1;
    for (let k = 0; k < args.length; k++) {
      const x = v[args[k]!]!;
      if (x - x !== 0) {
        missing = args[k]!;
        break;
      }
    }
    if (missing >= 0) {
      v[p.slot] = Number.NaN;
      reasons[p.slot] = reasons[missing] ?? 'not computable';
      continue;
    }
    const r = callRule(p.rule!.compute, args, v);
    if (typeof r === 'number') {
      v[p.slot] = r;
      reasons[p.slot] = r - r === 0 ? undefined : 'not a finite number';
    } else {
      v[p.slot] = r.value ?? Number.NaN;
      reasons[p.slot] = r.reason;
    }
  }
}

const scratchValues = new Float64Array(SLOT_COUNT);
const scratchReasons: (string | undefined)[] = new Array<string | undefined>(SLOT_COUNT);

/** Every result of a plan for these inputs, with unit, method and (when not computable) reason, in NODES order. */
export function resultsOf(plan: Plan, inputs: Readonly<Record<NumericKey, number | null>>): Results {
  const v = inputVector(inputs, scratchValues);
  evaluatePlan(plan, v, scratchReasons);
  const results = {} as Results;
  for (const p of plan.nodes) {
    const x = v[p.slot]!;
    results[p.key] = quantity(x - x === 0 ? x : null, p.unit, p.method, scratchReasons[p.slot]);
  }
  return results;
}

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
