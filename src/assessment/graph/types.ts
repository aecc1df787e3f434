/**
 * The shapes of the graph of quantities (src/assessment/graph/README in
 * DEVELOPERS.md, "Adding a method"): a node is one result key with its unit
 * and one or more rules; a rule names what it is computed from (inputs of the
 * visit or other nodes), the pure function of src/physiology that computes
 * it, and its method text and source. Method choices select a node's rule;
 * they are never separate code paths.
 */
import type { Outcome } from '../../physiology/outcome.js';
import type { BsaMethod, MapMethod, NumericKey, PesMethod } from '../fields.js';

export type StrokeVolumeSource = 'doppler' | 'volumetric';

/** The method choices a rule can be selected by. */
export interface Selection {
  pesMethod: PesMethod;
  strokeVolumeSource: StrokeVolumeSource;
  mapMethod: MapMethod;
  bsaMethod: BsaMethod;
}

/**
 * A rule's answer: a number (NaN or ±Infinity: not computable), or an
 * Outcome whose reason is shown when the value is null.
 */
export type RuleValue = number | Outcome;

export interface Rule {
  /** The method choices under which this rule applies (all must match); absent: any. */
  when?: Partial<Selection>;
  /**
   * What the rule is computed from, in the order `compute` takes them: keys of
   * visit inputs (graph/inputs.ts) or of other nodes.
   */
  from: readonly string[];
  /** The src/physiology function (or a thin adapter of units around it); pure. */
  compute: (...args: number[]) => RuleValue;
  /** Method text shown beside the value; a function when it names the method of a node it passes on. */
  method: string | ((methodOf: (key: string) => string | undefined) => string);
  /** The publication or "common practice", appended to the method text in parentheses. */
  source?: string;
}

export interface NodeDef<K extends string = string> {
  /** The result key (JSON and CSV); never equal to an input key. */
  key: K;
  unit: string;
  /**
   * Rules in order of preference: the first whose `when` matches the method
   * choice and whose inputs are all given (and whose nodes are computable) is
   * used for the visit.
   */
  rules: readonly Rule[];
  /** Why the node is not computable when no rule applies; by default "needs …" from the first matching rule's missing inputs. */
  missing?: string;
}

/** One visit input that nodes read: what its absence is called and its physical domain in a Monte Carlo draw. */
export interface GraphInput {
  key: NumericKey;
  /** "needs <this>" when a rule needs it and it was not given. */
  needs: string;
  /** A drawn value must be below this (exclusive); every input must also be above 0. */
  below?: number;
  /**
   * A relation to another input a draw must keep: `lessThan` this one must be
   * below it; `greaterThan` above it. With `losesBoth` a violation loses both
   * values, else only this one.
   */
  relation?: { lessThan?: NumericKey; greaterThan?: NumericKey; losesBoth: boolean };
}

/** A list of nodes with their keys kept as literal types (a file of nodes exports one). */
export function defineNodes<const T extends readonly NodeDef[]>(nodes: T): T {
  return nodes;
}

/** The rule of a node that reports a value as it is (an input as used, or the node a method choice picked). */
export function passThrough(value: number): number {
  return value;
}
