// Pass: common-subexpression extraction across the sums of products of the graph (Brayton and
// McMullen's kernel extraction, common practice): a kernel that divides several sums, or a pair
// of literals that several product terms share, becomes one node that each of them uses
// (f = q·k + r by weak division). Each extraction is kept only when the graph gets cheaper in
// the cost model. Algebraic only; logic that feeds a loop is left as it is.
import type { LogicGraph } from "../logic/graph.js";
import { rebuildWith, type Replacement } from "./builder.js";
import { costOf, limitsOf, type PassContext } from "./context.js";
import { and, formLeaves, lit, or, type Form } from "./form.js";
import { kernels, literalsOf, weakDivide, type Sum } from "./sop/algebra.js";
import { LeafTable, readSops } from "./sop-nodes.js";
import { graphFacts, stateConeNodes } from "./tables.js";

const MAX_ROUNDS = 30;

function remap(form: Form, map: ReadonlyMap<number, number>): Form {
  switch (form.t) {
    case "lit":
      return lit(map.get(form.v)!, form.neg);
    case "const":
      return form;
    case "not":
      return { t: "not", arg: remap(form.arg, map) };
    default:
      return { t: form.t, args: form.args.map((a) => remap(a, map)) };
  }
}

export function extractCommon(g: LogicGraph, ctx: PassContext): LogicGraph {
  const L = limitsOf(ctx);
  const cost = costOf(ctx);
  const f = graphFacts(g, ctx.stateNames);
  const pinned = new Set<number>([...g.outputs.map((p) => p.node), ...f.cuts]);
  const table = new LeafTable();
  const sops = readSops(g, f.readerCounts, pinned, table, stateConeNodes(f));
  if (sops.length === 0) return g;
  const base = table.leaves.length;
  const divisors: Sum[] = []; // pseudo variable base + i stands for divisors[i]
  const sums = new Map(sops.map((s) => [s.node, s.sum]));
  const changed = new Set<number>();
  const pseudoForm = new Map<number, Form>();
  const formOfSum = (s: Sum): Form =>
    or(s.map((t) => and(t.map((x) => (x >> 1 >= base ? formOfPseudo(x >> 1, (x & 1) === 1) : lit(x >> 1, (x & 1) === 1))))));
  const formOfPseudo = (v: number, neg: boolean): Form => {
    let fm = pseudoForm.get(v);
    if (!fm) {
      fm = formOfSum(divisors[v - base]!);
      pseudoForm.set(v, fm);
    }
    return neg ? { t: "not", arg: fm } : fm;
  };
  const replacementsFor = (ss: Map<number, Sum>, which: Set<number>): Map<number, Replacement> => {
    const out = new Map<number, Replacement>();
    for (const node of which) {
      const form = formOfSum(ss.get(node)!);
      const used = [...formLeaves(form)].sort((a, b) => a - b);
      const local = new Map(used.map((v, i) => [v, i]));
      out.set(node, { form: remap(form, local), leaves: used.map((v) => table.leaves[v]!) });
    }
    return out;
  };
  let curCost = cost(g);
  let best = g;
  const rejected = new Set<string>();
  let evaluations = 0;
  for (let round = 0; round < MAX_ROUNDS && evaluations < L.maxEvaluations; round++) {
    // Candidate divisors and the sums they divide.
    const cands = new Map<string, { div: Sum; nodes: Set<number>; value: number }>();
    for (const [node, s] of sums) {
      if (s.length >= 2) {
        for (const { kernel } of kernels(s, 16)) {
          const key = "k:" + kernel.map((t) => t.join(".")).sort().join("|");
          const c = cands.get(key) ?? { div: kernel, nodes: new Set<number>(), value: 0 };
          c.nodes.add(node);
          cands.set(key, c);
        }
      }
      for (const t of s) {
        for (let i = 0; i < t.length; i++) for (let j = i + 1; j < t.length; j++) {
          const key = `c:${t[i]},${t[j]}`;
          const c = cands.get(key) ?? { div: [[t[i]!, t[j]!]], nodes: new Set<number>(), value: 0 };
          c.nodes.add(node);
          c.value++; // occurrences
          cands.set(key, c);
        }
      }
    }
    let pick: { key: string; div: Sum; nodes: Set<number>; score: number } | undefined;
    for (const [key, c] of cands) {
      if (rejected.has(key)) continue;
      const score = key.startsWith("k:") ? (c.nodes.size - 1) * literalsOf(c.div) - 1 : c.value - 2;
      if (key.startsWith("k:") && c.nodes.size < 2) continue;
      if (score <= 0) continue;
      if (!pick || score > pick.score) pick = { key, div: c.div, nodes: c.nodes, score };
    }
    if (!pick) break;
    const v = base + divisors.length;
    const trialSums = new Map(sums);
    const touched = new Set<number>();
    for (const node of pick.nodes) {
      const { q, r } = weakDivide(sums.get(node)!, pick.div);
      if (q.length === 0) continue;
      const next: Sum = [...q.map((t) => [...t, 2 * v].sort((a, b) => a - b)), ...r];
      trialSums.set(node, next);
      touched.add(node);
    }
    if (touched.size === 0) {
      rejected.add(pick.key);
      continue;
    }
    divisors.push(pick.div);
    const which = new Set([...changed, ...touched]);
    evaluations++;
    const trial = rebuildWith(g, ctx.stateNames, replacementsFor(trialSums, which));
    const c = cost(trial);
    if (c < curCost) {
      curCost = c;
      best = trial;
      for (const [k, s] of trialSums) sums.set(k, s);
      for (const k of touched) changed.add(k);
    } else {
      divisors.pop();
      pseudoForm.delete(v);
      rejected.add(pick.key);
    }
  }
  return best;
}
