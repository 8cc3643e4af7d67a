// Reading sums of products out of a graph: an OR node is a sum whose terms are its operands;
// an operand that is an AND read by nothing else is a product of its operands, anything else a
// single literal (a NOT of x is the literal x', other nodes positive literals). Leaves are the
// nodes the literals stand for.
import type { LogicGraph } from "../logic/graph.js";
import type { Sum } from "./sop/algebra.js";

export interface SopNode {
  node: number;
  sum: Sum;
}

export class LeafTable {
  readonly leaves: number[] = [];
  private readonly index = new Map<number, number>();
  of(node: number): number {
    let i = this.index.get(node);
    if (i === undefined) {
      i = this.leaves.push(node) - 1;
      this.index.set(node, i);
    }
    return i;
  }
}

export function literalOf(g: LogicGraph, id: number, table: LeafTable): number {
  const n = g.nodes[id]!;
  return n.op === "not" ? 2 * table.of(n.fanins[0]!) + 1 : 2 * table.of(id);
}

/** Sums of products of the OR nodes (not those in `skip`) with their terms read as described;
 *  `readerCounts` gives the number of readers of each node. */
export function readSops(g: LogicGraph, readerCounts: ArrayLike<number>, pinned: ReadonlySet<number>, table: LeafTable, skip?: Uint8Array): SopNode[] {
  const out: SopNode[] = [];
  g.nodes.forEach((n, id) => {
    if (n.op !== "or" || skip?.[id]) return;
    const sum: Sum = n.fanins.map((x) => {
      const c = g.nodes[x]!;
      if (c.op === "and" && readerCounts[x] === 1 && !pinned.has(x)) {
        return [...new Set(c.fanins.map((y) => literalOf(g, y, table)))].sort((a, b) => a - b);
      }
      return [literalOf(g, x, table)];
    });
    out.push({ node: id, sum });
  });
  return out;
}

/** The sum renumbered over its own leaves only (what a Replacement of its node may depend on). */
export function localize(sum: Sum, table: LeafTable): { sum: Sum; leaves: number[] } {
  const local = new Map<number, number>();
  const leaves: number[] = [];
  const out = sum.map((t) =>
    t
      .map((x) => {
        const v = x >> 1;
        let i = local.get(v);
        if (i === undefined) {
          i = leaves.push(table.leaves[v]!) - 1;
          local.set(v, i);
        }
        return 2 * i + (x & 1);
      })
      .sort((a, b) => a - b),
  );
  return { sum: out, leaves };
}
