// Splits gates wider than the fan-in limit into balanced trees of gates within it, and XORs
// into two-input XORs (each maps onto the four-gate XOR structure).
import type { LogicGraph } from "../logic/graph.js";
import { rebuild, type GraphBuilder } from "../optimize/builder.js";

/** The last split of each graph, by its limit and state signals: the optimizer prices a graph
 *  and the pipeline maps it, for two families, each splitting it again. Graphs are not changed
 *  once made, so a split graph is handed out again as it is (its readers only read it). */
const lastSplit = new WeakMap<LogicGraph, { stateNames: readonly string[]; maxFanin: number; split: LogicGraph }>();

const sameNames = (a: readonly string[], b: readonly string[]) => a.length === b.length && a.every((x, i) => x === b[i]);

export function limitFanin(g: LogicGraph, stateNames: readonly string[], maxFanin: number): LogicGraph {
  const last = lastSplit.get(g);
  if (last && last.maxFanin === maxFanin && sameNames(last.stateNames, stateNames)) return last.split;
  const split = splitGates(g, stateNames, maxFanin);
  lastSplit.set(g, { stateNames: [...stateNames], maxFanin, split });
  return split;
}

function splitGates(g: LogicGraph, stateNames: readonly string[], maxFanin: number): LogicGraph {
  const split = (b: GraphBuilder, op: "and" | "or", args: number[]): number => {
    if (args.length <= maxFanin) return b.op(op, args);
    // Balanced: as few groups as possible, of near-equal size.
    const groups = Math.ceil(args.length / maxFanin);
    const parts: number[] = [];
    const size = Math.ceil(args.length / Math.min(groups, maxFanin));
    for (let i = 0; i < args.length; i += size) parts.push(split(b, op, args.slice(i, i + size)));
    return split(b, op, parts);
  };
  return rebuild(g, stateNames, (b, node, operands) => {
    if (node.op === "and" || node.op === "or") return split(b, node.op, operands);
    if (node.op === "xor" && operands.length > 2) {
      // Balanced tree of two-input XORs.
      let level = operands;
      while (level.length > 1) {
        const next: number[] = [];
        for (let i = 0; i < level.length; i += 2) next.push(i + 1 < level.length ? b.xor([level[i]!, level[i + 1]!]) : level[i]!);
        level = next;
      }
      return level[0]!;
    }
    return b.op(node.op, operands);
  });
}
