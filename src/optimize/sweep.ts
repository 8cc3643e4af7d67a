// Pass: functional constant propagation and merging of equivalent nodes. This finds what
// structural hashing cannot see, such as (a & b) | (a & !b) and a. Logic that feeds a loop is not
// merged (its terms may be there to cover hazards).
//
// Few free variables (up to sweepMaxVariables): every node is simulated on every point, so equal
// words (or complementary ones) are equal functions, merged into the earlier node; all-equal
// words are a constant.
//
// More: the graph is rebuilt node by node in evaluation order (a functionally reduced graph, after
// Mishchenko, Chatterjee, Jiang and Brayton, "FRAIGs: a unifying representation for logic
// synthesis and verification", 2005). Each new node gets words on seeded random vectors from its
// operands' words, and its support as it is built; a node whose words match an earlier node's
// (or its complement's), or look constant, is compared with it exhaustively over their joint
// support when that is at most sweepMaxVariables variables, and on a proof the node is not kept:
// its readers read the earlier node (or the constant) instead. Because the readers are built
// afterwards, over the reduced operands, a constant found deep in the graph folds its readers
// through the builder in the same pass and their supports shrink, so they can be proven in turn.
// The proofs have a work budget in proportion to the graph (SWEEP_WORK_PER_NODE words simulated
// per node); candidates left when it runs out are kept as they are, with a note.
import type { LogicGraph, LogicNode } from "../logic/graph.js";
import { enumerationWords, seededRandom } from "../logic/evaluate.js";
import { assembleGraph, GraphBuilder, liveNodes, rebuild, rebuildWith, type Replacement } from "./builder.js";
import { limitsOf, note, type PassContext } from "./context.js";
import { constant, lit } from "./form.js";
import { graphFacts, simulateOver, stateConeNodes, type GraphFacts } from "./tables.js";

/** Random words per node (32 vectors a word). */
const WORDS = 32;
/** Words the exhaustive comparisons of one pass may simulate, per node of the graph. */
export const SWEEP_WORK_PER_NODE = 4096;
/** Earlier nodes with the same words a node is compared with, at most. */
const TRIES_PER_NODE = 2;

export function sweepEquivalent(g: LogicGraph, ctx: PassContext): LogicGraph {
  const L = limitsOf(ctx);
  const f = graphFacts(g, ctx.stateNames);
  if (f.free.size <= L.sweepMaxVariables) return sweepExhaustive(g, ctx, f);
  return sweepBuilding(g, ctx, f);
}

/** Every free variable enumerated: a node's words are its function. */
function sweepExhaustive(g: LogicGraph, ctx: PassContext, f: GraphFacts): LogicGraph {
  const inState = stateConeNodes(f);
  const freeIds = [...f.free].sort((a, b) => a - b);
  const sim = simulateOver(f, freeIds, [...g.outputs.map((p) => p.node), ...f.cuts]);
  const words = sim.words;
  let values = sim.values;
  // Only the first 2^n points mean anything when n < 5: the rest repeat them.
  const smallMask = freeIds.length < 5 ? (2 ** (2 ** freeIds.length) - 1) >>> 0 : 0xffffffff;
  if (freeIds.length < 5) values = values.map((w) => (w ? Uint32Array.from(w, (x) => (x & smallMask) >>> 0) : w));
  const classes = new Map<string, number>();
  const replacements = new Map<number, Replacement>();
  const isGate = (id: number) => {
    const op = g.nodes[id]!.op;
    return op === "and" || op === "or" || op === "xor" || op === "not";
  };
  const keyOf = (w: Uint32Array, flip: boolean) => Array.from(w, (x) => ((flip ? ~x : x) & smallMask) >>> 0).join(",");
  const zeroKey = keyOf(new Uint32Array(words), false);
  for (const id of f.order) {
    const w = values[id];
    if (!w) continue;
    const flip = (w[0]! & 1) === 1;
    const key = keyOf(w, flip);
    const rep = classes.get(key);
    const isCandidate = isGate(id) && !inState[id] && !f.cuts.has(id);
    if (isCandidate && (rep !== undefined || key === zeroKey)) {
      if (key === zeroKey) replacements.set(id, { form: constant(flip ? 1 : 0), leaves: [] });
      else replacements.set(id, { form: lit(0, flip !== ((values[rep!]![0]! & 1) === 1)), leaves: [rep!] });
      continue;
    }
    if (rep === undefined) classes.set(key, id);
  }
  if (replacements.size === 0) return g;
  return rebuildWith(g, ctx.stateNames, replacements);
}

/** Sorted union of two sorted id lists, or null when it has more than `limit` ids. */
function unionWithin(a: readonly number[], b: readonly number[], limit: number): number[] | null {
  const out: number[] = [];
  let i = 0;
  let j = 0;
  while (i < a.length || j < b.length) {
    const x = i < a.length ? a[i]! : Infinity;
    const y = j < b.length ? b[j]! : Infinity;
    if (x <= y) {
      out.push(x);
      i++;
      if (x === y) j++;
    } else {
      out.push(y);
      j++;
    }
    if (out.length > limit) return null;
  }
  return out;
}

/** The graph rebuilt with proven-equal nodes merged as they are built (see the top). */
function sweepBuilding(g: LogicGraph, ctx: PassContext, f: GraphFacts): LogicGraph {
  const L = limitsOf(ctx);
  const limit = L.sweepMaxVariables;
  const inState = stateConeNodes(f);
  const live = liveNodes(g, f.cuts);
  const b = new GraphBuilder();
  const rand = seededRandom(0x51eed);
  const W = WORDS;

  // Per builder node: its words, its support (null: more than `limit` variables), whether it is a
  // free variable. Filled as the builder makes nodes (describe).
  let sig = new Uint32Array(Math.max(64, g.nodes.length + 16) * W);
  const sup: (number[] | null)[] = [];
  const free: boolean[] = [];
  const describe = () => {
    for (let id = sup.length; id < b.nodes.length; id++) {
      if ((id + 1) * W > sig.length) {
        const grown = new Uint32Array(sig.length * 2);
        grown.set(sig);
        sig = grown;
      }
      const n = b.nodes[id]!;
      const o = id * W;
      const isFree = n.op === "input" || (n.op === "buf" && n.fanins.length === 0);
      free.push(isFree);
      if (isFree) {
        for (let k = 0; k < W; k++) sig[o + k] = rand();
        sup.push([id]);
        continue;
      }
      if (n.op === "const0" || n.op === "const1") {
        sig.fill(n.op === "const1" ? 0xffffffff : 0, o, o + W);
        sup.push([]);
        continue;
      }
      const fs = n.fanins;
      let s: number[] | null = sup[fs[0]!]!;
      for (let j = 1; j < fs.length && s; j++) {
        const t = sup[fs[j]!]!;
        s = t ? unionWithin(s, t, limit) : null;
      }
      sup.push(s);
      const a = fs[0]! * W;
      if (n.op === "not") for (let k = 0; k < W; k++) sig[o + k] = ~sig[a + k]!;
      else if (n.op === "buf") sig.copyWithin(o, a, a + W);
      else {
        sig.copyWithin(o, a, a + W);
        for (let j = 1; j < fs.length; j++) {
          const c = fs[j]! * W;
          if (n.op === "and") for (let k = 0; k < W; k++) sig[o + k] &= sig[c + k]!;
          else if (n.op === "or") for (let k = 0; k < W; k++) sig[o + k] |= sig[c + k]!;
          else for (let k = 0; k < W; k++) sig[o + k] ^= sig[c + k]!;
        }
      }
    }
  };

  // Words normalized so that the first vector reads 0 (a node and its complement meet).
  const flipOf = (id: number) => (sig[id * W]! & 1) === 1;
  const hashOf = (id: number): number => {
    const o = id * W;
    const m = flipOf(id) ? 0xffffffff : 0;
    let h = 0x811c9dc5;
    for (let k = 0; k < W; k++) h = Math.imul(h ^ ((sig[o + k]! ^ m) >>> 0), 0x01000193);
    return h >>> 0;
  };
  const sameWords = (x: number, y: number): boolean => {
    const m = flipOf(x) !== flipOf(y) ? 0xffffffff : 0;
    const ox = x * W;
    const oy = y * W;
    for (let k = 0; k < W; k++) if (((sig[ox + k]! ^ sig[oy + k]! ^ m) >>> 0) !== 0) return false;
    return true;
  };
  const looksConstant = (id: number): boolean => {
    const o = id * W;
    const m = flipOf(id) ? 0xffffffff : 0;
    for (let k = 0; k < W; k++) if (((sig[o + k]! ^ m) >>> 0) !== 0) return false;
    return true;
  };

  // Exhaustive comparison over a support: the cone of the roots in builder ids (ascending ids
  // are an evaluation order: the builder makes operands first).
  const budget = SWEEP_WORK_PER_NODE * g.nodes.length;
  let spent = 0;
  let outOfBudget = 0;
  let stamp = new Int32Array(0);
  let slot = new Int32Array(0);
  let epoch = 0;
  let scratch = new Uint32Array(0);
  /** Whether x equals y (or its complement with `neg`; y < 0: the constant `neg ? 1 : 0`) at
   *  every point of `vars`. Undefined when the budget does not allow the comparison. */
  const proveEqual = (x: number, y: number, neg: boolean, vars: readonly number[]): boolean | undefined => {
    const n = vars.length;
    const words = n <= 5 ? 1 : 2 ** (n - 5);
    if (stamp.length < b.nodes.length) {
      stamp = new Int32Array(b.nodes.length * 2);
      slot = new Int32Array(b.nodes.length * 2);
    }
    epoch++;
    const cone: number[] = [];
    const stack = y >= 0 ? [x, y] : [x];
    for (const v of vars) stamp[v] = -epoch; // leaves
    while (stack.length) {
      const id = stack.pop()!;
      if (stamp[id] === epoch || stamp[id] === -epoch) continue;
      stamp[id] = epoch;
      cone.push(id);
      for (const each of b.nodes[id]!.fanins) stack.push(each);
    }
    const cost = (cone.length + n) * words;
    if (spent + cost > budget) return undefined;
    spent += cost;
    cone.sort((p, q) => p - q);
    const need = (cone.length + n) * words;
    if (scratch.length < need) scratch = new Uint32Array(Math.max(need, scratch.length * 2));
    vars.forEach((v, i) => {
      slot[v] = i;
      scratch.set(enumerationWords(i, words), i * words);
    });
    cone.forEach((id, k) => (slot[id] = n + k));
    for (const id of cone) {
      const nd = b.nodes[id]!;
      const o = slot[id]! * words;
      if (nd.op === "const0" || nd.op === "const1") {
        scratch.fill(nd.op === "const1" ? 0xffffffff : 0, o, o + words);
        continue;
      }
      const fs = nd.fanins;
      const a = slot[fs[0]!]! * words;
      scratch.copyWithin(o, a, a + words);
      if (nd.op === "not") for (let k = 0; k < words; k++) scratch[o + k] = ~scratch[o + k]!;
      for (let j = 1; j < fs.length; j++) {
        const c = slot[fs[j]!]! * words;
        if (nd.op === "and") for (let k = 0; k < words; k++) scratch[o + k] &= scratch[c + k]!;
        else if (nd.op === "or") for (let k = 0; k < words; k++) scratch[o + k] |= scratch[c + k]!;
        else for (let k = 0; k < words; k++) scratch[o + k] ^= scratch[c + k]!;
      }
    }
    const mask = n < 5 ? (2 ** (2 ** n) - 1) >>> 0 : 0xffffffff;
    const ox = slot[x]! * words;
    const m = neg ? 0xffffffff : 0;
    if (y < 0) {
      for (let k = 0; k < words; k++) if ((((scratch[ox + k]! ^ m) & mask) >>> 0) !== 0) return false;
      return true;
    }
    const oy = slot[y]! * words;
    for (let k = 0; k < words; k++) if ((((scratch[ox + k]! ^ scratch[oy + k]! ^ m) & mask) >>> 0) !== 0) return false;
    return true;
  };

  const classes = new Map<number, number[]>();
  const map = new Int32Array(g.nodes.length).fill(-1);
  for (const p of g.inputs) map[p.node] = b.input(p.name, g.nodes[p.node]!.span);
  for (const id of f.cuts) map[id] = b.placeholder(g.nodes[id]!.name!, g.nodes[id]!.span);
  describe();
  const enter = (id: number) => {
    const h = hashOf(id);
    const list = classes.get(h);
    if (list) list.push(id);
    else classes.set(h, [id]);
  };
  // The free variables are classes too: a gate may turn out to be one of them.
  for (let id = 0; id < b.nodes.length; id++) enter(id);
  let merged = 0;
  // Builder nodes merged away, and what stands for them: a later node the builder finds equal to
  // one of them in structure takes the same stand-in.
  const standIn = new Map<number, number>();
  for (const id of f.order) {
    if (map[id]! >= 0 || !live[id]) continue;
    const n = g.nodes[id]!;
    if (n.op === "input") {
      map[id] = b.input(n.name ?? `in${id}`);
      describe();
      enter(map[id]!);
      continue;
    }
    const before = b.nodes.length;
    let r = b.op(n.op, n.fanins.map((x) => map[x]!));
    describe();
    const known = standIn.get(r);
    if (known !== undefined) r = known;
    const op = b.nodes[r]!.op;
    if (r >= before && (op === "and" || op === "or" || op === "xor") && !inState[id]) {
      const made = r;
      const s = sup[r]!;
      let done = false;
      if (s && looksConstant(r)) {
        const proof = proveEqual(r, -1, flipOf(r), s);
        if (proof === undefined) outOfBudget++;
        else if (proof) {
          r = b.constant(flipOf(r) ? 1 : 0);
          done = true;
        }
      }
      const h = hashOf(r);
      if (!done && s) {
        const list = classes.get(h);
        let tries = 0;
        for (const rep of list ?? []) {
          if (tries >= TRIES_PER_NODE) break;
          if (!sameWords(r, rep)) continue;
          tries++;
          const s2 = sup[rep];
          const vars = s2 ? unionWithin(s, s2, limit) : null;
          if (!vars) continue;
          const neg = flipOf(r) !== flipOf(rep);
          const proof = proveEqual(r, rep, neg, vars);
          if (proof === undefined) {
            outOfBudget++;
            break;
          }
          if (proof) {
            r = neg ? b.not(rep) : rep;
            describe();
            done = true;
            break;
          }
        }
      }
      if (done) {
        merged++;
        standIn.set(made, r);
      } else if (b.nodes[r]!.op !== "const0" && b.nodes[r]!.op !== "const1") enter(r);
    }
    map[id] = r;
    b.nameNode(r, n.name, n.span);
  }
  if (outOfBudget) {
    note(ctx, { kind: "limit", pass: "sweep", message: `work budget of the equivalence proofs (${SWEEP_WORK_PER_NODE} words a node) reached: ${outOfBudget} candidate merge${outOfBudget > 1 ? "s" : ""} not tried` });
  }
  if (merged === 0) return g;
  for (const id of f.cuts) {
    const n = g.nodes[id]!;
    const operands = n.fanins.map((x) => map[x]!);
    b.bind(map[id]!, n.op === "buf" ? operands[0]! : b.op(n.op, operands));
  }
  const built = assembleGraph(g, b.nodes as LogicNode[], map);
  // Nodes made and then merged away are left behind: one more rebuild drops them.
  return rebuild(built, ctx.stateNames);
}
