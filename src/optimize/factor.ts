// Pass: algebraic factoring. Every sum of products in the graph (an OR of ANDs, src/optimize/
// sop-nodes.ts) is rewritten as its factored form by the best kernel (src/sop/algebra.ts):
// ab + ac + ad becomes a(b + c + d). Only algebraic laws are used; logic that feeds a loop is
// still left as it is (a change of structure there changes the delays the loop sees).
import type { LogicGraph } from "../logic/graph.js";
import { rebuildWith, type Replacement } from "./builder.js";
import type { PassContext } from "./context.js";
import { factorSum, literalsOf } from "./sop/algebra.js";
import { formLiterals } from "./form.js";
import { LeafTable, localize, readSops } from "./sop-nodes.js";
import { graphFacts, stateConeNodes } from "./tables.js";

export function factorNodes(g: LogicGraph, ctx: PassContext): LogicGraph {
  const f = graphFacts(g, ctx.stateNames);
  const pinned = new Set<number>([...g.outputs.map((p) => p.node), ...f.cuts]);
  const table = new LeafTable();
  const replacements = new Map<number, Replacement>();
  for (const s of readSops(g, f.readerCounts, pinned, table, stateConeNodes(f))) {
    const local = localize(s.sum, table);
    const form = factorSum(local.sum);
    if (formLiterals(form) >= literalsOf(local.sum)) continue;
    replacements.set(s.node, { form, leaves: local.leaves });
  }
  if (replacements.size === 0) return g;
  return rebuildWith(g, ctx.stateNames, replacements);
}
