// Pass: merge AND trees and OR trees into wide gates (a DTL gate takes many inputs for the
// cost of one diode each), so a & (b & c) becomes one three-input AND. A sub-tree is merged
// only when nothing else reads it and it is not an output or a state signal.
import type { LogicGraph } from "../logic/graph.js";
import { rebuild } from "./builder.js";

export function flattenTrees(g: LogicGraph, stateNames: readonly string[], maxFanin: number): LogicGraph {
  const readers = new Int32Array(g.nodes.length);
  g.nodes.forEach((n) => n.fanins.forEach((f) => readers[f]!++));
  const pinned = new Set<number>(g.outputs.map((p) => p.node));
  const states = new Set(stateNames);
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined && states.has(n.name)) pinned.add(id);
  });
  return rebuild(g, stateNames, (b, node, operands, id) => {
    if (node.op !== "and" && node.op !== "or") return b.op(node.op, operands);
    const flat: number[] = [];
    node.fanins.forEach((f, i) => {
      const child = g.nodes[f]!;
      const inner = b.nodes[operands[i]!]!;
      const mergeable = child.op === node.op && readers[f] === 1 && !pinned.has(f) && inner.op === node.op;
      if (mergeable && flat.length + inner.fanins.length + (node.fanins.length - i - 1) <= maxFanin) {
        for (const each of inner.fanins) flat.push(each);
      } else flat.push(operands[i]!);
    });
    void id;
    return b.op(node.op, flat);
  });
}
