/**
 * Every node of the graph, in the order results are listed (JSON, CSV). A
 * file of nodes is added here and nowhere else. Checked when loaded: keys
 * unique and never equal to an input key, every `from` names an input or a
 * node, no cycles.
 */
import { GRAPH_INPUT_KEYS } from './inputs.js';
import { ELASTANCE_NODES } from './nodes/elastance.js';
import { FLOW_NODES } from './nodes/flow.js';
import { PRESSURE_NODES } from './nodes/pressure.js';
import type { NodeDef } from './types.js';

export const NODES = [...PRESSURE_NODES, ...FLOW_NODES, ...ELASTANCE_NODES] as const;

export type ResultKey = (typeof NODES)[number]['key'];
export const RESULT_KEYS: readonly ResultKey[] = NODES.map((n) => n.key);

/** Problems with a list of nodes over the given inputs (empty when sound); a test runs it, and loading refuses a faulty graph. */
export function graphProblems(nodes: readonly NodeDef[], inputKeys: readonly string[]): string[] {
  const problems: string[] = [];
  const inputs = new Set(inputKeys);
  const keys = new Map<string, NodeDef>();
  for (const n of nodes) {
    if (keys.has(n.key)) problems.push(`node ${n.key} is defined twice`);
    if (inputs.has(n.key)) problems.push(`node ${n.key} has the key of an input; report the value used as ${n.key}Used`);
    if (n.rules.length === 0) problems.push(`node ${n.key} has no rule`);
    keys.set(n.key, n);
  }
  for (const n of nodes) {
    for (const r of n.rules) {
      for (const ref of r.from) if (!inputs.has(ref) && !keys.has(ref)) problems.push(`node ${n.key} is computed from ${ref}, which is neither an input nor a node`);
      if (r.compute.length !== r.from.length) problems.push(`node ${n.key}: its function takes ${r.compute.length} arguments but the rule names ${r.from.length}`);
    }
  }
  // Cycles: depth-first over node references.
  const state = new Map<string, 1 | 2>();
  const visit = (key: string, path: string[]): void => {
    const s = state.get(key);
    if (s === 2) return;
    if (s === 1) {
      problems.push(`cycle: ${[...path, key].join(' → ')}`);
      return;
    }
    state.set(key, 1);
    for (const r of keys.get(key)!.rules) for (const ref of r.from) if (keys.has(ref)) visit(ref, [...path, key]);
    state.set(key, 2);
  };
  for (const n of nodes) visit(n.key, []);
  return problems;
}

const problems = graphProblems(NODES, GRAPH_INPUT_KEYS);
if (problems.length) throw new Error(`the graph of quantities is not sound:\n${problems.join('\n')}`);
