// Pass: Boolean resubstitution. An output is re-expressed as a small function of nodes the graph
// already has (divisors) and of its own variables: with up to three of them as the new
// function's inputs, the output must be a function of their values (no two points with equal
// divisor values and different output values), the combinations that never occur are
// don't-cares, and the new function is minimized exactly. The old cone is dropped if nothing
// else needs it. This is how the full adder's carry comes out as one NAND of two NANDs the sum
// already has (common practice). Outputs whose logic feeds a loop are not touched.
import type { LogicGraph } from "../logic/graph.js";
import { rebuildWith } from "./builder.js";
import { costOf, limitsOf, note, type PassContext } from "./context.js";
import { twoLevelCandidates } from "./candidates.js";
import { formLiterals, type Form } from "./form.js";
import { DC, OFF, ON } from "./sop/cube.js";
import { graphFacts, simulateOver, stateConeNodes, supportOf, type GraphFacts } from "./tables.js";

const MAX_CHECKS = 8_000;
const TRIED_PER_OUTPUT = 6;

export function resubstitute(g: LogicGraph, ctx: PassContext): LogicGraph {
  const L = limitsOf(ctx);
  const cost = costOf(ctx);
  let cur = g;
  let curCost = cost(cur);
  let evaluations = 0;
  // The facts of the current graph, made again only when a port's rewrite is kept.
  let facts: { g: LogicGraph; f: GraphFacts; inState: Uint8Array; leaves: number[] } | undefined;
  for (let port = 0; port < g.outputs.length; port++) {
    if (evaluations >= L.maxEvaluations) {
      note(ctx, { kind: "limit", pass: "resub", message: `evaluation budget (${L.maxEvaluations}) reached` });
      break;
    }
    if (facts?.g !== cur) {
      const f0 = graphFacts(cur, ctx.stateNames);
      // Nodes without operands that are no free variable (constants, an input without a port):
      // they add nothing to a support.
      const leaves: number[] = [];
      cur.nodes.forEach((n, id) => {
        if (n.fanins.length === 0 && !f0.free.has(id)) leaves.push(id);
      });
      facts = { g: cur, f: f0, inState: stateConeNodes(f0), leaves };
    }
    const { f, inState } = facts;
    const t = cur.outputs[port]!.node;
    const op = cur.nodes[t]!.op;
    if (f.free.has(t) || op === "const0" || op === "const1" || op === "input") continue;
    if (inState[t]) continue;
    const S = supportOf(f, t, undefined, L.resubMaxVariables);
    if (!S || S.length < 2) continue;
    // Nodes that depend on t cannot be divisors.
    const after = new Set<number>();
    const stack = [t];
    while (stack.length) {
      const id = stack.pop()!;
      if (after.has(id)) continue;
      after.add(id);
      for (const each of f.readers[id]!) stack.push(each);
    }
    const divisors: { id: number; size: number }[] = [];
    for (const id of nodesOverSupport(f, S, facts.leaves)) {
      const n = cur.nodes[id]!;
      if (after.has(id) || f.free.has(id) || n.op === "input" || n.op === "const0" || n.op === "const1" || n.op === "buf") continue;
      // Size: nodes in its cone (bigger divisors say more).
      let size = 0;
      const seen = new Set<number>();
      const st = [id];
      while (st.length) {
        const x = st.pop()!;
        if (seen.has(x) || f.free.has(x)) continue;
        seen.add(x);
        size++;
        for (const each of cur.nodes[x]!.fanins) st.push(each);
      }
      divisors.push({ id, size });
    }
    divisors.sort((a, b) => b.size - a.size || a.id - b.id);
    const divs = divisors.slice(0, L.resubMaxDivisors).map((d) => d.id);
    if (divs.length === 0) continue;
    const sim = simulateOver(f, S, [t, ...divs]);
    const points = 2 ** S.length;
    const bitAt = (id: number, p: number) => (sim.values[id]![p >>> 5]! >>> (p & 31)) & 1;
    const pool = [...divs, ...S];
    const found: { form: Form; leaves: number[]; size: number }[] = [];
    let checks = 0;
    const tryLeaves = (leaves: number[]) => {
      checks++;
      const k = leaves.length;
      const seen = new Int8Array(2 ** k).fill(-1);
      for (let p = 0; p < points; p++) {
        let key = 0;
        for (let i = 0; i < k; i++) key |= bitAt(leaves[i]!, p) << i;
        const v = bitAt(t, p);
        if (seen[key] === -1) seen[key] = v;
        else if (seen[key] !== v) return;
      }
      const spec = new Uint8Array(2 ** k);
      for (let key = 0; key < spec.length; key++) spec[key] = seen[key] === -1 ? DC : seen[key] === 1 ? ON : OFF;
      for (const c of twoLevelCandidates(spec, k, { xor: true })) found.push({ form: c.form, leaves, size: formLiterals(c.form) + k });
    };
    const nd = divs.length;
    for (let a = 0; a < nd && checks < MAX_CHECKS; a++) {
      tryLeaves([pool[a]!]);
      for (let b = a + 1; b < pool.length && checks < MAX_CHECKS; b++) {
        tryLeaves([pool[a]!, pool[b]!]);
        for (let c = b + 1; c < pool.length && checks < MAX_CHECKS; c++) tryLeaves([pool[a]!, pool[b]!, pool[c]!]);
      }
    }
    found.sort((x, y) => x.size - y.size);
    let best: LogicGraph | undefined;
    let bestCost = curCost;
    for (const cand of found.slice(0, TRIED_PER_OUTPUT)) {
      evaluations++;
      const trial = rebuildWith(cur, ctx.stateNames, new Map([[t, { form: cand.form, leaves: cand.leaves }]]));
      const c = cost(trial);
      if (c < bestCost) {
        bestCost = c;
        best = trial;
      }
    }
    if (best) {
      cur = best;
      curCost = bestCost;
    }
  }
  return cur;
}

/**
 * The nodes whose support lies within S (free variables), in no particular order: forward from
 * S and from the nodes without operands, a node is taken when all its operands are. Work in
 * proportion to the readers of the nodes taken, not to the graph.
 */
function nodesOverSupport(f: GraphFacts, S: readonly number[], leaves: readonly number[]): number[] {
  const inside = new Set<number>();
  const waiting = new Map<number, number>();
  const queue: number[] = [];
  for (const v of S) {
    inside.add(v);
    queue.push(v);
  }
  for (const id of leaves) {
    inside.add(id);
    queue.push(id);
  }
  const out: number[] = [];
  for (let head = 0; head < queue.length; head++) {
    const x = queue[head]!;
    for (const r of f.readers[x]!) {
      if (inside.has(r) || f.free.has(r)) continue;
      const left = (waiting.get(r) ?? f.g.nodes[r]!.fanins.length) - 1;
      if (left > 0) {
        waiting.set(r, left);
        continue;
      }
      waiting.delete(r);
      inside.add(r);
      out.push(r);
      queue.push(r);
    }
  }
  for (const id of leaves) out.push(id);
  return out;
}
