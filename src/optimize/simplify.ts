// Pass: constant propagation, double-inversion removal, structural hashing (shared inverters
// and shared sub-expressions), idempotence and complement laws. All of it is done by the
// GraphBuilder; this pass rebuilds the graph through it.
import type { LogicGraph } from "../logic/graph.js";
import { rebuild } from "./builder.js";

export function simplifyLogic(g: LogicGraph, stateNames: readonly string[]): LogicGraph {
  return rebuild(g, stateNames);
}
