/**
 * A plan of the graph compiled for Monte Carlo draws: one Float64Array column
 * per input and node, a chunk of draws at a time, each node computed by its
 * rule's function in a tight loop over its argument columns. No object per
 * draw (beyond what a physiology function itself returns for a value it
 * cannot compute), only the nodes the wanted outputs need, and only those
 * that vary with a drawn input: the rest keep their value for the visit.
 *
 * A drawn input outside its physical domain (graph/inputs.ts: not above 0,
 * not below its bound, or breaking its relation to another input) becomes
 * NaN, so exactly the results that depend on it are lost in that draw.
 */
import { GRAPH_INPUTS, type GraphInputKey } from './inputs.js';
import { INPUT_COUNT, SLOT_COUNT, dependencies, slotOf, type Plan } from './plan.js';
import type { ResultKey } from './registry.js';
import type { Rule } from './types.js';

interface Step {
  compute: Rule['compute'];
  out: Float64Array;
  args: Float64Array[];
}

interface Bound {
  column: Float64Array;
  below: number;
  /** Zero is a possible value (a right-atrial pressure, a collapse of 0 %): the draw must be ≥ 0, not > 0. */
  zeroAllowed: boolean;
}

interface Relation {
  column: Float64Array;
  other: Float64Array;
  /** true: this must be below other; false: above. */
  lessThan: boolean;
  losesBoth: boolean;
}

export interface DrawProgram {
  /** Draws per chunk: the length of every column. */
  readonly chunk: number;
  /** The column a drawn input is written into (only inputs given as varying). */
  input(key: GraphInputKey): Float64Array;
  /** The column of a node (after run); a constant column when the node does not vary. */
  output(key: ResultKey): Float64Array;
  /** Apply the domains and compute the varying nodes for draws 0…n−1 of the chunk. */
  run(n: number): void;
  /**
   * For the draws 0…n−1 in which `target` is NaN: where it was lost, the
   * first slot in evaluation order of its dependencies (or itself) that is
   * NaN; adds one to counts[slot] per such draw.
   */
  countLosses(target: ResultKey, n: number, counts: Float64Array): void;
}

function valueOf(r: ReturnType<Rule['compute']>): number {
  return typeof r === 'number' ? r : (r.value ?? Number.NaN);
}

/** One node over a chunk; an argument that is NaN (or infinite) makes the node NaN without calling its function. */
function runStep(s: Step, n: number): void {
  const f = s.compute;
  const out = s.out;
  const a = s.args;
  switch (a.length) {
    case 1: {
      const a0 = a[0]!;
      for (let i = 0; i < n; i++) {
        const x = a0[i]!;
        out[i] = x - x === 0 ? valueOf(f(x)) : Number.NaN;
      }
      return;
    }
    case 2: {
      const a0 = a[0]!;
      const a1 = a[1]!;
      for (let i = 0; i < n; i++) {
        const x = a0[i]!;
        const y = a1[i]!;
        out[i] = x - x === 0 && y - y === 0 ? valueOf(f(x, y)) : Number.NaN;
      }
      return;
    }
    case 3: {
      const a0 = a[0]!;
      const a1 = a[1]!;
      const a2 = a[2]!;
      for (let i = 0; i < n; i++) {
        const x = a0[i]!;
        const y = a1[i]!;
        const z = a2[i]!;
        out[i] = x - x === 0 && y - y === 0 && z - z === 0 ? valueOf(f(x, y, z)) : Number.NaN;
      }
      return;
    }
    case 4: {
      const a0 = a[0]!;
      const a1 = a[1]!;
      const a2 = a[2]!;
      const a3 = a[3]!;
      for (let i = 0; i < n; i++) {
        const x = a0[i]!;
        const y = a1[i]!;
        const z = a2[i]!;
        const w = a3[i]!;
        out[i] = x - x === 0 && y - y === 0 && z - z === 0 && w - w === 0 ? valueOf(f(x, y, z, w)) : Number.NaN;
      }
      return;
    }
    default: {
      const values = new Array<number>(a.length);
      for (let i = 0; i < n; i++) {
        let ok = true;
        for (let k = 0; k < a.length; k++) {
          const x = a[k]![i]!;
          values[k] = x;
          if (x - x !== 0) ok = false;
        }
        out[i] = ok ? valueOf(f(...values)) : Number.NaN;
      }
    }
  }
}

/**
 * Compile `plan` for draws of the `varying` inputs (the others keep the
 * visit's values from `nominal`, a vector evaluated by evaluatePlan) that
 * yield the `wanted` nodes.
 */
export function compileDraws(plan: Plan, nominal: Float64Array, varying: readonly GraphInputKey[], wanted: readonly ResultKey[], chunk: number): DrawProgram {
  const columns: (Float64Array | undefined)[] = new Array<Float64Array | undefined>(SLOT_COUNT);
  const varies = new Array<boolean>(SLOT_COUNT).fill(false);
  const constant = (slot: number): Float64Array => new Float64Array(chunk).fill(nominal[slot]!);
  const bounds: Bound[] = [];
  for (const key of varying) {
    const s = slotOf(key);
    if (!plan.present[s] || varies[s]) continue;
    varies[s] = true;
    const column = new Float64Array(chunk);
    columns[s] = column;
    const spec = GRAPH_INPUTS[s]!;
    bounds.push({ column, below: 'below' in spec ? spec.below : Number.POSITIVE_INFINITY, zeroAllowed: 'zeroAllowed' in spec && spec.zeroAllowed === true });
  }
  // A relation can break when either of its inputs is drawn; the other then
  // varies too (it may be lost), refilled with the visit's value each chunk.
  const relations: Relation[] = [];
  const refill: number[] = [];
  GRAPH_INPUTS.forEach((spec, s) => {
    if (!('relation' in spec)) return;
    const rel = spec.relation;
    const o = slotOf(('lessThan' in rel ? rel.lessThan : rel.greaterThan) as GraphInputKey);
    if (!plan.present[s] || !plan.present[o] || !(varies[s] || varies[o])) return;
    for (const x of [s, o]) {
      if (varies[x]) continue;
      varies[x] = true;
      columns[x] = constant(x);
      refill.push(x);
    }
    relations.push({ column: columns[s]!, other: columns[o]!, lessThan: 'lessThan' in rel, losesBoth: rel.losesBoth });
  });
  // The nodes the wanted ones need, and whether each varies.
  const needed = new Set<number>();
  for (const key of wanted) {
    const s = slotOf(key);
    if (plan.nodes[s - INPUT_COUNT]!.rule === null) continue;
    needed.add(s);
    for (const d of dependencies(plan, key)) needed.add(d);
  }
  const steps: Step[] = [];
  for (const p of plan.order) {
    if (!needed.has(p.slot)) continue;
    varies[p.slot] = p.args.some((a) => varies[a]);
    if (!varies[p.slot]) continue;
    const args = p.args.map((a) => (columns[a] ??= constant(a)));
    if (p.alias !== null) columns[p.slot] = args[0]!; // the same draws under another name
    else {
      const out = new Float64Array(chunk);
      columns[p.slot] = out;
      steps.push({ compute: p.rule!.compute, out, args });
    }
  }

  return {
    chunk,
    input(key) {
      const c = columns[slotOf(key)];
      if (!c || !varies[slotOf(key)]) throw new Error(`${key} is not a varying input of this program`);
      return c;
    },
    output(key) {
      return (columns[slotOf(key)] ??= constant(slotOf(key)));
    },
    run(n) {
      for (const x of refill) columns[x]!.fill(nominal[x]!, 0, n);
      for (const b of bounds) {
        const c = b.column;
        const below = b.below;
        if (b.zeroAllowed) {
          for (let i = 0; i < n; i++) {
            const x = c[i]!;
            if (!(x >= 0 && x < below)) c[i] = Number.NaN;
          }
        } else {
          for (let i = 0; i < n; i++) {
            const x = c[i]!;
            if (!(x > 0 && x < below)) c[i] = Number.NaN;
          }
        }
      }
      for (const r of relations) {
        const c = r.column;
        const o = r.other;
        for (let i = 0; i < n; i++) {
          const kept = r.lessThan ? c[i]! < o[i]! : c[i]! > o[i]!;
          if (!kept) {
            c[i] = Number.NaN;
            if (r.losesBoth) o[i] = Number.NaN;
          }
        }
      }
      for (const s of steps) runStep(s, n);
    },
    countLosses(target, n, counts) {
      const t = this.output(target);
      const chain = [...dependencies(plan, target), slotOf(target)].filter((s) => varies[s] && columns[s] !== undefined);
      const cols = chain.map((s) => columns[s]!);
      for (let i = 0; i < n; i++) {
        const v = t[i]!;
        if (v - v === 0) continue;
        let at = slotOf(target);
        for (let k = 0; k < cols.length; k++) {
          const x = cols[k]![i]!;
          if (x - x !== 0) {
            at = chain[k]!;
            break;
          }
        }
        counts[at]!++;
      }
    },
  };
}
