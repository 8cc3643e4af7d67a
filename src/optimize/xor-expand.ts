// Pass: XOR expansion. Every XOR becomes two-input XORs, and each of those the four-NAND
// structure n = !(a & b), x = !(!(a & n) & !(b & n)) (common practice), written in AND and NOT
// so that structural hashing can share n with an AND of the same operands elsewhere (the half
// adder's carry is !n) and later passes can reuse its parts. The mapper builds an XOR node
// this same way, but privately; expanded, the parts are there to share.
import type { LogicGraph } from "../logic/graph.js";
import { rebuild, type GraphBuilder } from "./builder.js";
import type { PassContext } from "./context.js";

function xor2(b: GraphBuilder, a: number, c: number): number {
  const n = b.not(b.and([a, c]));
  return b.not(b.and([b.not(b.and([a, n])), b.not(b.and([c, n]))]));
}

export function expandXors(g: LogicGraph, ctx: PassContext): LogicGraph {
  return rebuild(g, ctx.stateNames, (b, node, operands) => {
    if (node.op !== "xor") return b.op(node.op, operands);
    // The builder's own XOR first: constants, repeated and complemented operands folded.
    const x = b.xor(operands);
    const xn = b.nodes[x]!;
    const inv = xn.op === "not" && b.nodes[xn.fanins[0]!]!.op === "xor";
    const core = inv ? b.nodes[xn.fanins[0]!]! : xn;
    if (core.op !== "xor") return x;
    let level = [...core.fanins];
    while (level.length > 1) {
      const next: number[] = [];
      for (let i = 0; i < level.length; i += 2) next.push(i + 1 < level.length ? xor2(b, level[i]!, level[i + 1]!) : level[i]!);
      level = next;
    }
    return inv ? b.not(level[0]!) : level[0]!;
  });
}
