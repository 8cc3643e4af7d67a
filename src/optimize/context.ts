// What every optimization pass is given: the state signals, how to price a graph, where to put
// notes, the limits, and the usable don't-cares of the outputs.
import type { DontCareSet, LogicGraph } from "../logic/graph.js";
import { DEFAULT_TWO_LEVEL_LIMITS, type TwoLevelLimits } from "./sop/minimize.js";
import type { OptimizationNote, OptimizationReport } from "./report.js";
import { liveNodes } from "./builder.js";

export interface OptimizeLimits extends TwoLevelLimits {
  /** Most variables of a region (fan-out-free part of a large design) minimized on its own. */
  regionMaxVariables: number;
  /** Most cost evaluations one pass may make (each maps a candidate graph). */
  maxEvaluations: number;
  /** Most variables of a node re-expressed over other nodes (resubstitution). */
  resubMaxVariables: number;
  /** Most candidate divisor nodes per re-expressed node. */
  resubMaxDivisors: number;
  /** Most variables over which two nodes are compared to be merged (sweep). */
  sweepMaxVariables: number;
}

export const DEFAULT_OPTIMIZE_LIMITS: OptimizeLimits = {
  ...DEFAULT_TWO_LEVEL_LIMITS,
  regionMaxVariables: 10,
  maxEvaluations: 400,
  resubMaxVariables: 10,
  resubMaxDivisors: 24,
  sweepMaxVariables: 16,
};

export interface PassContext {
  stateNames: readonly string[];
  /** Price of a graph, lower is better (default: structuralCost). */
  cost?: (g: LogicGraph) => number;
  notes?: OptimizationNote[];
  counts?: OptimizationReport["twoLevel"];
  limits?: Partial<OptimizeLimits>;
  /** Don't-cares an optimizer may use, by output name (src/logic/dontcares.ts). */
  dontCares?: ReadonlyMap<string, DontCareSet>;
}

export function limitsOf(ctx: PassContext): OptimizeLimits {
  return { ...DEFAULT_OPTIMIZE_LIMITS, ...(ctx.limits ?? {}) };
}

/**
 * A price of a graph without mapping it, roughly in DTL parts (a gate of k inputs 9 + k, an
 * inverter 7, a two-input XOR four gates), for passes used on their own.
 */
export function structuralCost(g: LogicGraph, stateNames: readonly string[] = []): number {
  const states = new Set(stateNames);
  const cuts = new Set<number>();
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined && states.has(n.name) && n.op !== "input") cuts.add(id);
  });
  const live = liveNodes(g, cuts);
  let c = 0;
  g.nodes.forEach((n, id) => {
    if (!live[id]) return;
    if (n.op === "and" || n.op === "or") c += 9 + n.fanins.length;
    else if (n.op === "not") c += 7;
    else if (n.op === "xor") c += 44 * (n.fanins.length - 1);
  });
  return c;
}

export function costOf(ctx: PassContext): (g: LogicGraph) => number {
  return ctx.cost ?? ((g) => structuralCost(g, ctx.stateNames));
}

export function note(ctx: PassContext, n: OptimizationNote): void {
  ctx.notes?.push(n);
}
