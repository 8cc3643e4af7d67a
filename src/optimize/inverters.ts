// Pass: inverter minimization. Complemented signals are made once and shared (the builder keeps
// one NOT per signal), and an AND or OR most of whose operands are complemented is turned over
// by De Morgan's law (and(!a, !b, c) = !or(a, b, !c)), which removes those NOTs for one NOT at
// the output; a NOT in front of a NOT then cancels. Logic that feeds a loop is left as it is.
import type { LogicGraph } from "../logic/graph.js";
import { rebuild } from "./builder.js";
import type { PassContext } from "./context.js";
import { graphFacts, stateConeNodes } from "./tables.js";

export function minimizeInverters(g: LogicGraph, ctx: PassContext): LogicGraph {
  const inState = stateConeNodes(graphFacts(g, ctx.stateNames));
  return rebuild(g, ctx.stateNames, (b, node, operands, id) => {
    if ((node.op !== "and" && node.op !== "or") || inState[id]) return b.op(node.op, operands);
    const negated = operands.filter((x) => b.nodes[x]!.op === "not").length;
    if (negated < operands.length - negated + 2) return b.op(node.op, operands);
    const flipped = operands.map((x) => b.not(x));
    return b.not(node.op === "and" ? b.or(flipped) : b.and(flipped));
  });
}

/** NOT nodes that outputs and state signals need (for tests and reports). */
export function countInverters(g: LogicGraph): number {
  const live = new Uint8Array(g.nodes.length);
  const stack = g.outputs.map((p) => p.node);
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined) stack.push(id);
  });
  while (stack.length) {
    const id = stack.pop()!;
    if (live[id]) continue;
    live[id] = 1;
    for (const each of g.nodes[id]!.fanins) stack.push(each);
  }
  return g.nodes.filter((n, id) => live[id] && n.op === "not").length;
}
