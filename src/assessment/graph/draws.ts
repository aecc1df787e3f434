/**
 * A plan of the graph compiled for Monte Carlo draws. Only the nodes the
 * wanted outputs need are computed, and only those that vary with a drawn
 * input; the rest keep their value for the visit. The computation of one
 * draw is generated as straight-line JavaScript (one local per value, each
 * node a direct call of its rule's function), so the engine inlines the
 * physiology functions as it did the hand-written kernel this replaces:
 * typed-array columns in and out, no object per draw. The generated text
 * holds only slot numbers and fixed names, never a value from the user; the
 * functions and constants are passed in. One compiled function per shape of
 * program, cached.
 *
 * A drawn input outside its physical domain (graph/inputs.ts: not above 0,
 * not below its bound, or breaking its relation to another input) becomes
 * NaN, so exactly the results that depend on it are lost in that draw; a
 * node with an argument that is NaN (or infinite) is NaN without its
 * function being called, as in the one-visit evaluation.
 */
import { GRAPH_INPUTS, type GraphInputKey } from './inputs.js';
import { SLOT_COUNT, dependencies, slotOf, type Plan } from './plan.js';
import type { ResultKey } from './registry.js';
import type { Rule } from './types.js';

export interface DrawProgram {
  /** Draws per chunk: the length of every column. */
  readonly chunk: number;
  /** The column a drawn input is written into (only inputs given as varying). */
  input(key: GraphInputKey): Float64Array;
  /** The column of a node, or of an input as drawn (after run: NaN where outside its domain); a constant column when it does not vary. */
  output(key: GraphInputKey | ResultKey): Float64Array;
  /** Apply the domains and compute the varying nodes for draws 0…n−1 of the chunk. */
  run(n: number): void;
  /**
   * For the draws 0…n−1 in which `target` is NaN: where it was lost, the
   * first slot in evaluation order of its dependencies (or itself) that is
   * NaN; adds one to counts[slot] per such draw.
   */
  countLosses(target: ResultKey, n: number, counts: Float64Array): void;
}

type Kernel = (n: number) => void;
type KernelFactory = (functions: readonly Rule['compute'][], columns: readonly Float64Array[], constants: Float64Array) => Kernel;

const factories = new Map<string, KernelFactory>();

/**
 * Compile `plan` for draws of the `varying` inputs (the others keep the
 * visit's values from `nominal`, a vector evaluated by evaluatePlan) that
 * yield the `wanted` nodes.
 */
export function compileDraws(plan: Plan, nominal: Float64Array, varying: readonly GraphInputKey[], wanted: readonly ResultKey[], chunk: number): DrawProgram {
  const varies = new Array<boolean>(SLOT_COUNT).fill(false);
  const drawn: number[] = [];
  for (const key of varying) {
    const s = slotOf(key);
    if (!plan.present[s] || varies[s]) continue;
    varies[s] = true;
    drawn.push(s);
  }
  // A relation can break when either of its inputs is drawn; the other then varies too (it may be lost).
  const relations: { slot: number; other: number; lessThan: boolean; losesBoth: boolean }[] = [];
  GRAPH_INPUTS.forEach((spec, s) => {
    if (!('relation' in spec)) return;
    const rel = spec.relation;
    const o = slotOf(('lessThan' in rel ? rel.lessThan : rel.greaterThan) as GraphInputKey);
    if (!plan.present[s] || !plan.present[o] || !(varies[s] || varies[o])) return;
    varies[s] = true;
    varies[o] = true;
    relations.push({ slot: s, other: o, lessThan: 'lessThan' in rel, losesBoth: rel.losesBoth });
  });
  // The nodes the wanted ones need, and whether each varies.
  const needed = new Set<number>();
  for (const key of wanted) {
    const s = slotOf(key);
    if (plan.nodes[s - GRAPH_INPUTS.length]!.rule === null) continue;
    needed.add(s);
    for (const d of dependencies(plan, key)) needed.add(d);
  }
  const steps = plan.order.filter((p) => {
    if (!needed.has(p.slot)) return false;
    varies[p.slot] = p.args.some((a) => varies[a]);
    return varies[p.slot];
  });

  // Columns: one per varying slot (inputs drawn or in a broken relation, varying nodes); constants for the rest.
  const columnIndex = new Map<number, number>();
  const columnList: Float64Array[] = [];
  const columnOf = (slot: number): Float64Array => {
    let c = columnIndex.get(slot);
    if (c === undefined) {
      c = columnList.length;
      columnIndex.set(slot, c);
      columnList.push(varies[slot] ? new Float64Array(chunk) : new Float64Array(chunk).fill(nominal[slot]!));
    }
    return columnList[c]!;
  };
  const functions: Rule['compute'][] = [];
  const lines: string[] = [];
  const declared = new Set<number>();
  const v = (slot: number): string => (varies[slot] ? `v${slot}` : `k[${slot}]`);
  // Inputs: drawn ones from their columns, a relation's undrawn partner from the visit's value.
  const head: string[] = [];
  for (const s of varies.map((x, i) => (x && i < GRAPH_INPUTS.length ? i : -1)).filter((i) => i >= 0)) {
    columnOf(s);
    head.push(`const c${s} = C[${columnIndex.get(s)}];`);
    declared.add(s);
    if (drawn.includes(s)) {
      const spec = GRAPH_INPUTS[s]!;
      const below = 'below' in spec ? ` && v${s} < ${spec.below}` : '';
      // Zero is a possible value of some inputs (a right-atrial pressure, a collapse of 0 %).
      const floor = 'zeroAllowed' in spec && spec.zeroAllowed ? '>= 0' : '> 0';
      lines.push(`let v${s} = c${s}[i];`, `if (!(v${s} ${floor}${below})) v${s} = NaN;`);
    } else lines.push(`let v${s} = k[${s}];`);
  }
  for (const r of relations) {
    const kept = r.lessThan ? `v${r.slot} < v${r.other}` : `v${r.slot} > v${r.other}`;
    lines.push(`if (!(${kept})) { v${r.slot} = NaN;${r.losesBoth ? ` v${r.other} = NaN;` : ''} }`);
  }
  for (const s of declared) lines.push(`c${s}[i] = v${s};`);
  for (const p of steps) {
    const s = p.slot;
    columnOf(s);
    head.push(`const c${s} = C[${columnIndex.get(s)}];`);
    if (p.alias !== null) {
      lines.push(`const v${s} = ${v(p.alias)};`, `c${s}[i] = v${s};`);
      continue;
    }
    const f = functions.length;
    functions.push(p.rule!.compute);
    head.push(`const f${s} = F[${f}];`);
    const args = p.args.map(v);
    const guard = p.args.filter((a) => varies[a]).map((a) => `v${a} - v${a} === 0`);
    // An Outcome is read for its value at once, so the engine need not allocate it.
    const call = `{ const r = f${s}(${args.join(', ')}); v${s} = typeof r === 'number' ? r : (r.value ?? NaN); }`;
    lines.push(`let v${s} = NaN;`, guard.length ? `if (${guard.join(' && ')}) ${call}` : call, `c${s}[i] = v${s};`);
  }
  const source = `${head.join('\n')}\nreturn function run(n) {\nfor (let i = 0; i < n; i++) {\n${lines.join('\n')}\n}\n};`;
  let factory = factories.get(source);
  if (!factory) {
    // The text is built above from slot numbers and fixed names only (no user data).
    factory = new Function('F', 'C', 'k', source) as KernelFactory;
    factories.set(source, factory);
  }
  const kernel = factory(functions, columnList, nominal);

  return {
    chunk,
    input(key) {
      const s = slotOf(key);
      if (!drawn.includes(s)) throw new Error(`${key} is not a drawn input of this program`);
      return columnOf(s);
    },
    output(key) {
      return columnOf(slotOf(key));
    },
    run(n) {
      kernel(n);
    },
    countLosses(target, n, counts) {
      const t = columnOf(slotOf(target));
      const chain = [...dependencies(plan, target), slotOf(target)].filter((s) => varies[s] && columnIndex.has(s));
      const cols = chain.map((s) => columnOf(s));
      for (let i = 0; i < n; i++) {
        const x = t[i]!;
        if (x - x === 0) continue;
        let at = slotOf(target);
        for (let k = 0; k < cols.length; k++) {
          const y = cols[k]![i]!;
          if (y - y !== 0) {
            at = chain[k]!;
            break;
          }
        }
        counts[at]!++;
      }
    },
  };
}
