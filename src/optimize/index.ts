// The optimization pipeline of a logic graph before mapping. Each pass: LogicGraph → LogicGraph,
// keeping the inputs, the outputs and the named state signals.
import type { LogicGraph } from "../logic/graph.js";
import { simplifyLogic } from "./simplify.js";
import { flattenTrees } from "./flatten.js";

export interface OptimizeOptions {
  stateNames: readonly string[];
  maxFanin: number;
}

export function optimizeLogic(g: LogicGraph, opts: OptimizeOptions): LogicGraph {
  let x = simplifyLogic(g, opts.stateNames);
  x = flattenTrees(x, opts.stateNames, opts.maxFanin);
  return simplifyLogic(x, opts.stateNames);
}

export { simplifyLogic, flattenTrees };
