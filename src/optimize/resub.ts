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
import { graphFacts, simulateOver, stateConeNodes, supportOf } from "./tables.js";

const MAX_CHECKS = 8_000;
const TRIED_PER_OUTPUT = 6;

export function resubstitute(g: LogicGraph, ctx: PassContext): LogicGraph {
  const L = limitsOf(ctx);
  const cost = costOf(ctx);
  let cur = g;
  let curCost = cost(cur);
  let evaluations = 0;
  for (let port = 0; port < g.outputs.length; port++) {
    if (evaluations >= L.maxEvaluations) {
      note(ctx, { kind: "limit", pass: "resub", message: `evaluation budget (${L.maxEvaluations}) reached` });
      break;
    }
    const f = graphFacts(cur, ctx.stateNames);
    const t = cur.outputs[port]!.node;
    const op = cur.nodes[t]!.op;
    if (f.free.has(t) || op === "const0" || op === "const1" || op === "input") continue;
    const inState = stateConeNodes(f);
    if (inState[t]) continue;
    const S = supportOf(f, t, undefined, L.resubMaxVariables);
    if (!S || S.length < 2) continue;
    // Nodes that depend on t cannot be divisors.
    const after = new Uint8Array(cur.nodes.length);
    const stack = [t];
    while (stack.length) {
      const id = stack.pop()!;
      if (after[id]) continue;
      after[id] = 1;
      stack.push(...f.readers[id]!);
    }
    const Sset = new Set(S);
    const divisors: { id: number; size: number }[] = [];
    cur.nodes.forEach((n, id) => {
      if (after[id] || f.free.has(id) || n.op === "input" || n.op === "const0" || n.op === "const1" || n.op === "buf") return;
      const s = supportOf(f, id, undefined, S.length);
      if (!s || !s.every((v) => Sset.has(v))) return;
      // Size: nodes in its cone (bigger divisors say more).
      let size = 0;
      const seen = new Set<number>();
      const st = [id];
      while (st.length) {
        const x = st.pop()!;
        if (seen.has(x) || f.free.has(x)) continue;
        seen.add(x);
        size++;
        st.push(...cur.nodes[x]!.fanins);
      }
      divisors.push({ id, size });
    });
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
