// Pass: two-level minimization. Each output's cone (and each state signal's next value) is
// collapsed to its truth table over the free variables it depends on (inputs and state
// signals), minimized with the output's don't-cares (src/sop: exact up to a size, heuristic
// beyond), several outputs together so that they share product terms, and rebuilt as whichever
// candidate is cheapest in the graph: sum of products, product of sums, either factored, or an
// XOR decomposition. A cone is replaced only when the whole graph gets cheaper.
//
// Logic that feeds a loop is rebuilt only as a hazard-free cover of the state signal's next
// value (every pair of adjacent ON points in one term, so the consensus terms stay), exact or
// not at all, and only for a state signal whose next value reads no other state signal (state
// signals that feed each other, as in a flip-flop, can race: that logic stays as written);
// outputs whose logic lies inside a loop are left alone.
//
// Large designs (mode "regions"): cones with too many variables are not collapsed; instead each
// fan-out-free region (the logic between nodes read more than once) is minimized over its own
// leaves, up to regionMaxVariables, priced on its own.
import type { DontCareSet, LogicGraph } from "../logic/graph.js";
import { dontCareWords } from "../logic/dontcares.js";
import { enumerationWords } from "../logic/evaluate.js";
import { GraphBuilder, rebuildWith, type Replacement } from "./builder.js";
import { costOf, limitsOf, note, type PassContext } from "./context.js";
import type { NoteKind } from "./report.js";
import { twoLevelCandidates, type FormCandidate } from "./candidates.js";
import { buildForm, formLiterals, not, sopForm, type Form } from "./form.js";
import { factorSum, termsOfCover } from "./sop/algebra.js";
import { complementSpec, popcount } from "./sop/cube.js";
import { minimizeMany } from "./sop/minimize.js";
import { graphFacts, markDontCares, simulateOver, specOfWords, stateConeNodes, supportOf, type GraphFacts } from "./tables.js";

export interface CollapseOptions extends PassContext {
  mode?: "cones" | "regions";
}

/** Points (2^variables, both polarities) one pass may minimize; beyond, cones are kept as
 *  written with a note. A 16-variable cone takes 2 · 65,536. Groups are taken smallest first. */
export const TWO_LEVEL_POINTS_PER_PASS = 2 ** 19;

/** A candidate with more literals than SIZE_RATIO × the cone's literals + SIZE_SLACK is not
 *  priced: a two-level form that much larger than the logic as written does not win. */
const SIZE_RATIO = 2;
const SIZE_SLACK = 16;

/** Operand count of the gates of the cones of `roots` down to the free variables (shared
 *  gates once): the size of the logic as written. */
function coneLiterals(f: GraphFacts, roots: readonly number[]): number {
  const seen = new Set<number>();
  const stack = [...roots];
  let k = 0;
  while (stack.length) {
    const id = stack.pop()!;
    if (seen.has(id) || f.free.has(id)) continue;
    seen.add(id);
    const n = f.g.nodes[id]!;
    if (n.op === "and" || n.op === "or") k += n.fanins.length;
    else if (n.op === "xor") k += 4 * n.fanins.length;
    for (const each of n.fanins) stack.push(each);
  }
  return k;
}

interface Root {
  /** Node whose construction is replaced (for a state signal: the state signal itself). */
  at: number;
  kind: "output" | "state";
  name: string;
  support: number[];
  dc?: DontCareSet;
}

export function collapseTwoLevel(g: LogicGraph, opts: CollapseOptions): LogicGraph {
  return opts.mode === "regions" ? collapseRegions(g, opts) : collapseCones(g, opts);
}

/** Notes about many signals, gathered and given once per kind. */
class NoteGroups {
  private readonly groups = new Map<string, { kind: NoteKind; names: string[]; say: (list: string, many: boolean) => string }>();
  add(key: string, kind: NoteKind, name: string, say: (list: string, many: boolean) => string): void {
    const g = this.groups.get(key) ?? { kind, names: [], say };
    g.names.push(name);
    this.groups.set(key, g);
  }
  flush(ctx: PassContext): void {
    for (const g of this.groups.values()) {
      const shown = g.names.slice(0, 6).map((x) => `'${x}'`).join(", ");
      const list = g.names.length > 6 ? `${shown} and ${g.names.length - 6} more` : shown;
      note(ctx, { kind: g.kind, pass: "collapse", message: g.say(list, g.names.length > 1), ...(g.names.length === 1 ? { signal: g.names[0]! } : {}) });
    }
  }
}

function collapseCones(g: LogicGraph, ctx: CollapseOptions): LogicGraph {
  const L = limitsOf(ctx);
  const later = new NoteGroups();
  const cost = costOf(ctx);
  const f = graphFacts(g, ctx.stateNames);
  const inState = stateConeNodes(f);
  const inputByName = new Map(g.inputs.map((p) => [p.name, p.node]));
  const portsOf = new Map<number, number>();
  for (const p of g.outputs) portsOf.set(p.node, (portsOf.get(p.node) ?? 0) + 1);

  const roots: Root[] = [];
  const seenNodes = new Set<number>();
  const isGate = (id: number) => {
    const op = g.nodes[id]!.op;
    return op !== "input" && op !== "const0" && op !== "const1" && !f.free.has(id);
  };
  for (const p of g.outputs) {
    const id = p.node;
    if (!isGate(id) || seenNodes.has(id) || inState[id]) continue;
    seenNodes.add(id);
    let support = supportOf(f, id, undefined, L.heuristicMaxVariables);
    let dc = ctx.dontCares?.get(p.name);
    if (dc && (f.readerCounts[id]! > 0 || portsOf.get(id)! > 1)) dc = undefined;
    if (support && dc) {
      const extra = dc.variables.map((v) => inputByName.get(v)!).filter((x) => !support!.includes(x));
      if (extra.length) support = [...support, ...extra].sort((a, b) => a - b);
      if (support.length > L.heuristicMaxVariables) support = undefined;
    }
    if (!support) {
      ctx.counts && ctx.counts.keptAsWritten++;
      later.add("wide", "limit", p.name, (list, many) => `output${many ? "s" : ""} ${list} depend${many ? "" : "s"} on more than ${L.heuristicMaxVariables} variables: not collapsed to two levels`);
      continue;
    }
    const r: Root = { at: id, kind: "output", name: p.name, support };
    if (dc) r.dc = dc;
    roots.push(r);
  }
  for (const c of f.cuts) {
    const n = g.nodes[c]!;
    if (n.op !== "buf" || !isGate(n.fanins[0]!)) continue;
    const support = supportOf(f, c, undefined, L.exactMaxVariables);
    if (support && support.some((v) => v !== c && f.cuts.has(v))) {
      // State signals that feed each other can race; a hazard-free cover does not guard
      // against that, so such logic stays as written.
      ctx.counts && ctx.counts.keptAsWritten++;
      later.add("races", "hazard", n.name!, (list, many) => `the logic feeding state signal${many ? "s" : ""} ${list} also reads other state signals: kept as written`);
      continue;
    }
    if (!support) {
      ctx.counts && ctx.counts.keptAsWritten++;
      later.add("state-wide", "hazard", n.name!, (list, many) => `the logic feeding state signal${many ? "s" : ""} ${list} depends on more than ${L.exactMaxVariables} variables: kept as written (a hazard-free cover is made exactly or not at all)`);
      continue;
    }
    roots.push({ at: c, kind: "state", name: n.name!, support });
  }

  // Groups: state signals alone (hazard-free); outputs that share variables together.
  const groups: Root[][] = [];
  const outputs = roots.filter((r) => r.kind === "output").sort((a, b) => b.support.length - a.support.length);
  for (const r of outputs) {
    let placed = false;
    for (const grp of groups) {
      if (grp[0]!.kind !== "output" || grp.length >= L.multiOutputMaxOutputs) continue;
      const union = new Set(grp.flatMap((x) => x.support));
      if (!r.support.some((v) => union.has(v))) continue;
      for (const v of r.support) union.add(v);
      if (union.size > L.multiOutputMaxVariables) continue;
      grp.push(r);
      placed = true;
      break;
    }
    if (!placed) groups.push([r]);
  }
  for (const r of roots) if (r.kind === "state") groups.push([r]);
  const varsOf = (grp: Root[]) => new Set(grp.flatMap((r) => r.support)).size;
  groups.sort((a, b) => varsOf(a) - varsOf(b));

  const accepted = new Map<number, Replacement>();
  const method = new Map<number, FormCandidate["method"] | "hazard-free">();
  let evaluations = 0;
  let points = 0;
  let pointsNoted = false;
  let curCost = cost(g);
  let budgetNoted = false;
  const price = (trial: Map<number, Replacement>): number => {
    evaluations++;
    return cost(rebuildWith(g, ctx.stateNames, trial));
  };

  for (const grp of groups) {
    if (evaluations >= L.maxEvaluations) {
      if (!budgetNoted) {
        budgetNoted = true;
        note(ctx, { kind: "limit", pass: "collapse", message: `evaluation budget (${L.maxEvaluations}) reached: the remaining cones are kept as written` });
      }
      ctx.counts && (ctx.counts.keptAsWritten += grp.length);
      continue;
    }
    const vars = [...new Set(grp.flatMap((r) => r.support))].sort((a, b) => a - b);
    const n = vars.length;
    points += 2 * grp.length * 2 ** n;
    if (points > TWO_LEVEL_POINTS_PER_PASS) {
      if (!pointsNoted) {
        pointsNoted = true;
        note(ctx, { kind: "limit", pass: "collapse", message: `two-level work budget (${TWO_LEVEL_POINTS_PER_PASS} points a pass) reached: the remaining cones are kept as written` });
      }
      ctx.counts && (ctx.counts.keptAsWritten += grp.length);
      continue;
    }
    const sim = simulateOver(f, vars, grp.map((r) => r.at));
    const specs = grp.map((r) => {
      const node = r.kind === "state" ? g.nodes[r.at]!.fanins[0]! : r.at;
      const spec = specOfWords(sim.values[node]!, n);
      if (r.dc) {
        const idx = new Map(vars.map((v, i) => [v, i]));
        const dcw = dontCareWords(r.dc, (name) => {
          const i = idx.get(inputByName.get(name)!);
          return i === undefined ? undefined : enumerationWords(i, sim.words);
        }, sim.words);
        markDontCares(spec, dcw);
      }
      return spec;
    });
    const hazardFree = grp[0]!.kind === "state";
    const nodeOfRoot = (r: Root) => (r.kind === "state" ? g.nodes[r.at]!.fanins[0]! : r.at);
    const written = coneLiterals(f, grp.map(nodeOfRoot));
    const bound = (k: number) => SIZE_RATIO * k + SIZE_SLACK;
    const perRoot: FormCandidate[][] = grp.map((r, k) =>
      twoLevelCandidates(specs[k]!, n, { hazardFree: r.kind === "state", limits: L, xor: r.kind !== "state" }).filter(
        (c) => formLiterals(c.form) <= bound(coneLiterals(f, [nodeOfRoot(r)])),
      ),
    );
    grp.forEach((r, k) => {
      if (perRoot[k]!.length === 0) {
        ctx.counts && ctx.counts.keptAsWritten++;
        later.add(hazardFree ? "state-beyond" : "beyond", hazardFree ? "hazard" : "limit", r.name, (list) => `${list}: beyond the two-level limits, kept as written`);
      }
    });
    const rep = (form: Form): Replacement => ({ form, leaves: vars });
    // Shared covers for several outputs (sum of products and product of sums).
    const together: Map<number, Replacement>[] = [];
    if (grp.length > 1) {
      for (const complement of [false, true]) {
        const m = minimizeMany(complement ? specs.map(complementSpec) : specs, n, { limits: L });
        if (!m || !m.shared) continue;
        const trial = new Map<number, Replacement>();
        grp.forEach((r, k) => {
          const sop = sopForm(m.covers[k]!, n);
          trial.set(r.at, rep(complement ? not(sop) : sop));
        });
        const lits = m.covers.reduce((s2, c) => s2 + c.reduce((s3, cube) => s3 + popcount(cube.mask), 0), 0);
        if (lits > bound(written)) continue;
        together.push(trial);
        if (m.method === "heuristic") continue;
        // The same shared terms, factored per output.
        const fact = new Map<number, Replacement>();
        grp.forEach((r, k) => {
          const fs = m.covers[k]!.length > 1 ? factorSum(termsOfCover(m.covers[k]!, n)) : sopForm(m.covers[k]!, n);
          fact.set(r.at, rep(complement ? not(fs) : fs));
        });
        together.push(fact);
      }
    }
    if (g.nodes.length > LOCAL_PRICING_NODES) {
      // Large graph: choose on the cones alone, then price the choice once in the whole graph.
      const nodeOf = (r: Root) => (r.kind === "state" ? g.nodes[r.at]!.fanins[0]! : r.at);
      let localBest = cost(regionGraph(f, grp.map(nodeOf), vars));
      evaluations++;
      let pick: Map<number, Replacement> | undefined;
      const options: Map<number, Replacement>[] = [...together];
      const single = new Map<number, Replacement>();
      grp.forEach((r, k) => {
        let bc = Infinity;
        for (const cand of perRoot[k]!) {
          const c = cost(formGraph(cand.form, n));
          evaluations++;
          if (c < bc) {
            bc = c;
            single.set(r.at, rep(cand.form));
          }
        }
      });
      if (single.size === grp.length) options.push(single);
      for (const o of options) {
        const c = cost(formGraph(grp.map((r) => o.get(r.at)!.form), n));
        evaluations++;
        if (c < localBest) {
          localBest = c;
          pick = o;
        }
      }
      if (pick) {
        const trial = new Map([...accepted, ...pick]);
        const c = price(trial);
        if (c < curCost) {
          for (const [k, v] of pick) accepted.set(k, v);
          curCost = c;
          grp.forEach((r) => method.set(r.at, r.kind === "state" ? "hazard-free" : perRoot[grp.indexOf(r)]![0]?.method ?? "exact"));
        }
      }
      continue;
    }
    let best = new Map(accepted);
    let bestCost = curCost;
    const chosen = new Map<number, FormCandidate["method"] | "hazard-free">();
    for (const t of together) {
      if (evaluations >= L.maxEvaluations) break;
      const trial = new Map([...accepted, ...t]);
      const c = price(trial);
      if (c < bestCost) {
        bestCost = c;
        best = trial;
        grp.forEach((r) => chosen.set(r.at, "exact"));
      }
    }
    // Each output on its own, over the best so far.
    grp.forEach((r, k) => {
      for (const cand of perRoot[k]!) {
        if (evaluations >= L.maxEvaluations) return;
        const trial = new Map(best);
        trial.set(r.at, rep(cand.form));
        const c = price(trial);
        if (c < bestCost) {
          bestCost = c;
          best = trial;
          chosen.set(r.at, r.kind === "state" ? "hazard-free" : cand.method);
        }
      }
    });
    if (bestCost < curCost) {
      for (const [k, v] of best) accepted.set(k, v);
      curCost = bestCost;
      for (const [k, v] of chosen) method.set(k, v);
    }
  }
  for (const r of roots) {
    const m = method.get(r.at);
    if (!m || !ctx.counts) continue;
    if (m === "hazard-free") ctx.counts.hazardFree++;
    else if (m === "exact") ctx.counts.exact++;
    else if (m === "exact-bounded") ctx.counts.exactBounded++;
    else ctx.counts.heuristic++;
    if (m === "heuristic") later.add("heuristic", "heuristic", r.name, (list) => `${list} minimized by the heuristic (expand / irredundant / reduce), not proven minimum`);
    if (m === "exact-bounded") later.add("bounded", "heuristic", r.name, (list) => `${list}: the search for a minimum cover stopped at its budget; the best cover found is used`);
  }
  later.flush(ctx);
  if (accepted.size === 0) return g;
  return rebuildWith(g, ctx.stateNames, accepted);
}

/** A standalone graph of the logic between `leaves` and `roots` (the leaves as inputs). */
function regionGraph(f: GraphFacts, roots: number | readonly number[], leaves: readonly number[]): LogicGraph {
  const b = new GraphBuilder();
  const map = new Map<number, number>();
  leaves.forEach((l, i) => map.set(l, b.input(`l${i}`)));
  const list = typeof roots === "number" ? [roots] : roots;
  for (const root of list) buildInto(f, b, map, root);
  return {
    name: "region",
    nodes: b.nodes,
    inputs: leaves.map((_, i) => ({ name: `l${i}`, node: map.get(leaves[i]!)! })),
    outputs: list.map((r, k) => ({ name: `y${k}`, node: map.get(r)! })),
  };
}

function buildInto(f: GraphFacts, b: GraphBuilder, map: Map<number, number>, root: number): void {
  const stack: { id: number; i: number }[] = [{ id: root, i: 0 }];
  while (stack.length) {
    const top = stack[stack.length - 1]!;
    const n = f.g.nodes[top.id]!;
    if (map.has(top.id)) {
      stack.pop();
      continue;
    }
    if (top.i < n.fanins.length) {
      const x = n.fanins[top.i++]!;
      if (!map.has(x)) stack.push({ id: x, i: 0 });
      continue;
    }
    stack.pop();
    map.set(top.id, b.op(n.op, n.fanins.map((x) => map.get(x)!)));
  }
}

function formGraph(form: Form | readonly Form[], leafCount: number): LogicGraph {
  const b = new GraphBuilder();
  const ins = Array.from({ length: leafCount }, (_, i) => b.input(`l${i}`));
  const forms = Array.isArray(form) ? form : [form as Form];
  const ys = forms.map((fm) => buildForm(b, fm, (v) => ins[v]!));
  return { name: "region", nodes: b.nodes, inputs: ins.map((node, i) => ({ name: `l${i}`, node })), outputs: ys.map((node, k) => ({ name: `y${k}`, node })) };
}

/** Above this many nodes a cone's candidates are priced on their own (the cone as a small
 *  graph of its variables), and only the cheapest is priced in the whole graph. */
export const LOCAL_PRICING_NODES = 1500;

/** Region candidates priced per node of the graph (each on a small graph of its own). */
export const REGION_EVALUATIONS_PER_NODE = 0.5;

function collapseRegions(g: LogicGraph, ctx: CollapseOptions): LogicGraph {
  const L = limitsOf(ctx);
  const cost = costOf(ctx);
  const f = graphFacts(g, ctx.stateNames);
  const inState = stateConeNodes(f);
  const ports = new Set(g.outputs.map((p) => p.node));
  const isGate = (id: number) => {
    const op = g.nodes[id]!.op;
    return op !== "input" && op !== "const0" && op !== "const1" && op !== "buf" && !f.free.has(id);
  };
  // Region roots: gates read more than once, outputs, and the operands of state signals (and
  // of buffers).
  const readerCounts = f.readerCounts;
  const readByStateOrBuffer = new Uint8Array(g.nodes.length);
  g.nodes.forEach((n, id) => {
    if (n.op === "buf" || f.cuts.has(id)) for (const each of n.fanins) readByStateOrBuffer[each] = 1;
  });
  const stops = new Set<number>();
  g.nodes.forEach((_, id) => {
    if (!isGate(id)) return;
    if (readerCounts[id]! > 1 || ports.has(id) || readByStateOrBuffer[id]) stops.add(id);
  });
  for (const p of g.outputs) if (isGate(p.node)) stops.add(p.node);
  const accepted = new Map<number, Replacement>();
  let evaluations = 0;
  let skipped = 0;
  // Each region is priced on its own (a graph of a few nodes), so the budget grows with the
  // design rather than being the whole-graph pricing budget.
  const budget = Math.max(L.maxEvaluations, Math.ceil(REGION_EVALUATIONS_PER_NODE * g.nodes.length));
  const pricedBySpec = new Map<string, { form: Form; cost: number }[]>();
  for (const r of stops) {
    if (inState[r]) continue;
    const leaves = supportOf(f, r, stops, L.regionMaxVariables);
    if (!leaves) {
      skipped++;
      continue;
    }
    if (leaves.length < 2) continue;
    // Nodes inside the region: nothing to gain from a single gate.
    let inner = 0;
    const seen = new Set<number>(leaves);
    const stack = [r];
    while (stack.length && inner < 2) {
      const id = stack.pop()!;
      if (seen.has(id)) continue;
      seen.add(id);
      inner++;
      for (const each of g.nodes[id]!.fanins) stack.push(each);
    }
    if (inner < 2) continue;
    if (evaluations >= budget) break;
    const sim = simulateOver(f, leaves, [r]);
    const words = sim.values[r]!;
    const old = regionGraph(f, r, leaves);
    let bestCost = cost(old);
    let bestForm: Form | undefined;
    evaluations++;
    // Regions of one design often compute the same function of their leaves: its candidates
    // and their prices are worked out once.
    const key = `${leaves.length}:${words.join(",")}`;
    let priced = pricedBySpec.get(key);
    if (!priced) {
      const spec = specOfWords(words, leaves.length);
      priced = twoLevelCandidates(spec, leaves.length, { limits: L, xor: true }).map((cand) => ({ form: cand.form, cost: cost(formGraph(cand.form, leaves.length)) }));
      pricedBySpec.set(key, priced);
    }
    for (const cand of priced) {
      evaluations++;
      if (cand.cost < bestCost) {
        bestCost = cand.cost;
        bestForm = cand.form;
      }
    }
    if (bestForm) accepted.set(r, { form: bestForm, leaves });
  }
  if (skipped) note(ctx, { kind: "limit", pass: "collapse", message: `${skipped} region${skipped > 1 ? "s" : ""} of more than ${L.regionMaxVariables} variables kept as written` });
  if (evaluations >= budget) note(ctx, { kind: "limit", pass: "collapse", message: `evaluation budget (${budget}) reached while minimizing regions` });
  if (accepted.size === 0) return g;
  return rebuildWith(g, ctx.stateNames, accepted);
}
