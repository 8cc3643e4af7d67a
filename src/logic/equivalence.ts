// Equivalence of two logic graphs over the same input names and the same state signal names.
// Each output and each state signal's next value is compared over its support: exhaustively,
// bit-parallel, when the support is small enough and the check's work budget allows; with
// seeded random vectors otherwise (then the cone is reported as checked only partially).
// Don't-care points of the reference's outputs (src/logic/dontcares.ts) are free: the two
// graphs may differ there.
//
// Cost. Supports are counted for all cones at once (bitsets over the variables, in blocks, one
// pass over each graph a block). Exhaustive cones are evaluated on their own nodes only, in
// chunks of words, within a budget of node-words in all (MAX_EXHAUSTIVE_WORK). The cones checked
// with random vectors share one bit-parallel pass over both graphs.
import type { DontCareSet, LogicGraph } from "./graph.js";
import { dontCareWords, usableDontCares } from "./dontcares.js";
import { evaluationOrder } from "./loops.js";
import { enumerationWords, evalOpWords, simulateWords } from "./evaluate.js";
import { runWordProgram, wordProgram } from "./words.js";

/** Work the exhaustive checks of one comparison may spend, in node-words (one node evaluated
 *  on 32 vectors): about a second on one core. Cones beyond it are checked with the random
 *  vectors and reported as partial. */
export const MAX_EXHAUSTIVE_WORK = 2 ** 28;

export interface EquivalenceOptions {
  /** Names of the state signals (loop cut points), identical in both graphs. */
  stateNames: readonly string[];
  /** Largest support (inputs plus state signals of one cone) checked exhaustively. */
  maxExhaustiveSupport?: number;
  /** Random vectors for the cones above that, in words of 32 vectors. */
  randomWords?: number;
  seed?: number;
  /** Don't-cares of the outputs, by output name (default: the usable don't-cares of `ref`). */
  dontCares?: ReadonlyMap<string, DontCareSet>;
  /** Work budget of the exhaustive checks in node-words (default MAX_EXHAUSTIVE_WORK). */
  maxExhaustiveWork?: number;
}

export interface ConeCheck {
  name: string;
  kind: "output" | "state";
  support: number;
  exhaustive: boolean;
  vectors: number;
  /** Points left free by the output's don't-cares (exhaustive checks only). */
  dontCarePoints?: number;
  /** Set when a cone small enough to be checked exhaustively was checked with the random
   *  vectors only, because the check's work budget was spent. */
  limitedBy?: "work";
}

export interface Counterexample {
  name: string;
  kind: "output" | "state";
  assignment: Record<string, 0 | 1>;
  expected: 0 | 1;
  actual: 0 | 1;
}

export interface EquivalenceResult {
  equivalent: boolean;
  /** True when every cone was checked exhaustively. */
  complete: boolean;
  cones: ConeCheck[];
  counterexample?: Counterexample;
  /** Set when the graphs cannot be compared at all (different ports, uncut loop, ...). */
  problem?: string;
}

/**
 * The GW3002 warning's text when some cones were checked only partially (undefined when none
 * was): how many had more than `maxExhaustiveSupport` free variables, how many were left over
 * when the exhaustive check's work budget was spent, and the random vectors they got.
 */
export function partialCheckText(eq: EquivalenceResult, maxExhaustiveSupport = 20): string | undefined {
  const partial = eq.cones.filter((c) => !c.exhaustive);
  if (!partial.length) return undefined;
  const bySupport = partial.filter((c) => c.limitedBy === undefined).length;
  const byWork = partial.length - bySupport;
  const cones = (k: number) => `${k} output or state cone${k > 1 ? "s" : ""}`;
  const parts: string[] = [];
  if (bySupport) parts.push(`${cones(bySupport)} ${bySupport > 1 ? "have" : "has"} more than ${maxExhaustiveSupport} free variables`);
  if (byWork) parts.push(`${cones(byWork)} ${byWork > 1 ? "were" : "was"} not enumerated because the exhaustive check's work budget was spent`);
  return `the logic check was partial: ${parts.join(", and ")} and ${partial.length > 1 ? "were" : "was"} checked with ${partial[0]!.vectors} random vectors each`;
}

interface Side {
  g: LogicGraph;
  order: number[];
  /** Position of each node in `order`. */
  pos: Int32Array;
  /** Variable index of each free node (inputs and state signals), -1 for the others. */
  freeVar: Int32Array;
  cutIds: Set<number>;
  /** Node of each state signal, by name. */
  stateNode: Map<string, number>;
}

function prepare(g: LogicGraph, stateNames: readonly string[], varIndex: ReadonlyMap<string, number>): Side | string {
  const byName = new Map<string, number>();
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined && !byName.has(n.name)) byName.set(n.name, id);
  });
  const cutIds = new Set<number>();
  const stateNode = new Map<string, number>();
  for (const s of stateNames) {
    const id = byName.get(s);
    if (id === undefined) return `state signal '${s}' is missing from '${g.name}'`;
    cutIds.add(id);
    stateNode.set(s, id);
  }
  const order = evaluationOrder(g, cutIds);
  if (!order) return `'${g.name}' has a loop not broken at the state signals`;
  const pos = new Int32Array(g.nodes.length);
  order.forEach((id, k) => (pos[id] = k));
  const freeVar = new Int32Array(g.nodes.length).fill(-1);
  // As a map from names: a later entry for the same node wins.
  const freeByName = new Map<string, number>();
  for (const p of g.inputs) freeByName.set(p.name, p.node);
  for (const s of stateNames) freeByName.set(s, byName.get(s)!);
  for (const [name, id] of freeByName) freeVar[id] = varIndex.get(name)!;
  return { g, order, pos, freeVar, cutIds, stateNode };
}

type Observed = { name: string; kind: "output" | "state"; ra: number; rb: number; through: boolean; dc?: DontCareSet };

/**
 * The support of every observed cone: its size, and its variables (ascending) when there are at
 * most `keep`. Bitsets over the variables, 32 × BLOCK variables a pass over both graphs.
 */
function supports(a: Side, b: Side, observed: readonly Observed[], nVars: number, dcVars: (o: Observed) => number[], keep: number): { count: number; vars: number[] }[] {
  const BLOCK = 8;
  const res = observed.map(() => ({ count: 0, vars: [] as number[] }));
  const blockBits = 32 * BLOCK;
  const dcOf = observed.map((o) => dcVars(o));
  for (let base = 0; base < Math.max(1, nVars); base += blockBits) {
    const W = Math.max(1, Math.min(BLOCK, Math.ceil((nVars - base) / 32)));
    const bits = (side: Side) => {
      const buf = new Uint32Array(side.g.nodes.length * W);
      for (const id of side.order) {
        const o = id * W;
        const v = side.freeVar[id]!;
        if (v >= 0) {
          if (v >= base && v < base + 32 * W) buf[o + ((v - base) >>> 5)] = 1 << ((v - base) & 31);
          continue;
        }
        for (const f of side.g.nodes[id]!.fanins) {
          const x = f * W;
          for (let i = 0; i < W; i++) buf[o + i] |= buf[x + i]!;
        }
      }
      return buf;
    };
    const ba = bits(a);
    const bb = bits(b);
    const acc = new Uint32Array(W);
    observed.forEach((o, k) => {
      acc.fill(0);
      const add = (buf: Uint32Array, id: number) => {
        for (let i = 0; i < W; i++) acc[i] |= buf[id * W + i]!;
      };
      if (o.through) {
        for (const f of a.g.nodes[o.ra]!.fanins) add(ba, f);
        for (const f of b.g.nodes[o.rb]!.fanins) add(bb, f);
      } else {
        add(ba, o.ra);
        add(bb, o.rb);
      }
      for (const v of dcOf[k]!) if (v >= base && v < base + 32 * W) acc[(v - base) >>> 5] |= 1 << ((v - base) & 31);
      const r = res[k]!;
      for (let i = 0; i < W; i++) {
        let x = acc[i]!;
        while (x) {
          const low = x & -x;
          if (r.count < keep + 1) r.vars.push(base + 32 * i + 31 - Math.clz32(low));
          r.count++;
          x ^= low;
        }
      }
    });
  }
  return res;
}

/** The nodes of a cone (stopping at free nodes) in evaluation order, or undefined when there
 *  are more than `cap`. */
function coneNodes(side: Side, root: number, through: boolean, cap: number): number[] | undefined {
  const seen = new Set<number>();
  const stack = through ? [...side.g.nodes[root]!.fanins] : [root];
  while (stack.length) {
    const id = stack.pop()!;
    if (seen.has(id)) continue;
    seen.add(id);
    if (seen.size > cap) return undefined;
    if (side.freeVar[id]! >= 0) continue;
    for (const f of side.g.nodes[id]!.fanins) if (!seen.has(f)) stack.push(f);
  }
  return [...seen].sort((x, y) => side.pos[x]! - side.pos[y]!);
}

/** A cone as a program over local slots: the root's value ends in slot `rootSlot`. */
function coneProgram(side: Side, root: number, through: boolean, nodes: number[], scratch: Int32Array) {
  nodes.forEach((id, k) => (scratch[id] = k));
  const p = wordProgram(side.g, nodes, scratch, side.freeVar, through ? [root] : []);
  const rootSlot = through ? nodes.length : scratch[root]!;
  return { p, rootSlot };
}

/** A seeded random word for variable v, word w (a hash, so any vector can be read again). */
function randomWord(seed: number, v: number, w: number): number {
  let h = (Math.imul(v + 1, 0x9e3779b1) ^ seed) >>> 0;
  h = fmix(h);
  h = fmix((h ^ Math.imul(w + 1, 0x85ebca6b)) >>> 0);
  return h;
}

function fmix(x: number): number {
  let h = x;
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

function enumerationWord(i: number, w: number): number {
  if (i < 5) return [0xaaaaaaaa, 0xcccccccc, 0xf0f0f0f0, 0xff00ff00, 0xffff0000][i]! >>> 0;
  return ((w >>> (i - 5)) & 1) !== 0 ? 0xffffffff : 0;
}

/** Words of exhaustive checks evaluated at once. */
const CHUNK_WORDS = 256;
/** Words of the random pass evaluated at once. */
const RANDOM_CHUNK_WORDS = 16;

export function checkEquivalence(ref: LogicGraph, impl: LogicGraph, opts: EquivalenceOptions): EquivalenceResult {
  const maxEx = opts.maxExhaustiveSupport ?? 20;
  const randomWords = opts.randomWords ?? 512;
  const seed = (opts.seed ?? 0x5eed) >>> 0;
  const budget0 = opts.maxExhaustiveWork ?? MAX_EXHAUSTIVE_WORK;
  const names = (g: LogicGraph, k: "inputs" | "outputs") => g[k].map((p) => p.name).join(",");
  // Variables: the inputs and the state signals, by name in sorted order (a cone's support is
  // enumerated in that order).
  const varNames = [...new Set([...ref.inputs.map((p) => p.name), ...opts.stateNames])].sort();
  const varIndex = new Map(varNames.map((n, i) => [n, i]));
  const a = prepare(ref, opts.stateNames, varIndex);
  const b = prepare(impl, opts.stateNames, varIndex);
  if (typeof a === "string") return { equivalent: false, complete: false, cones: [], problem: a };
  if (typeof b === "string") return { equivalent: false, complete: false, cones: [], problem: b };
  if (names(ref, "inputs") !== names(impl, "inputs")) return { equivalent: false, complete: false, cones: [], problem: "the inputs differ" };
  if (names(ref, "outputs") !== names(impl, "outputs")) return { equivalent: false, complete: false, cones: [], problem: "the outputs differ" };

  const dcs = opts.dontCares ?? usableDontCares(ref, opts.stateNames);
  const observed: Observed[] = [];
  ref.outputs.forEach((p, i) => {
    const q = impl.outputs[i]!;
    // An output that is itself a state signal is compared as state below.
    if (a.cutIds.has(p.node) && b.cutIds.has(q.node)) return;
    const o: Observed = { name: p.name, kind: "output", ra: p.node, rb: q.node, through: false };
    const dc = dcs.get(p.name);
    if (dc) o.dc = dc;
    observed.push(o);
  });
  for (const s of opts.stateNames) observed.push({ name: s, kind: "state", ra: a.stateNode.get(s)!, rb: b.stateNode.get(s)!, through: true });

  // A don't-care variable that is no input of the graphs reads as 0 and adds to the support.
  const extraVars = new Map<string, number>();
  const dcVarIndex = (name: string) => varIndex.get(name) ?? extraVars.get(name) ?? (extraVars.set(name, varNames.length + extraVars.size), varNames.length + extraVars.size - 1);
  const sup = supports(a, b, observed, varNames.length, (o) => (o.dc ? o.dc.variables.map(dcVarIndex) : []), maxEx);
  const allNames = [...varNames, ...extraVars.keys()];
  // Support variables in name order (as the enumeration assigns them).
  const supNames = (k: number) => sup[k]!.vars.map((v) => allNames[v]!).sort();

  type Outcome = { check: ConeCheck; counterexample?: Counterexample };
  const outcomes: (Outcome | undefined)[] = new Array(observed.length);
  const randomCones: number[] = [];
  let budget = budget0;
  let failedAt = observed.length;
  const scratchA = new Int32Array(ref.nodes.length);
  const scratchB = new Int32Array(impl.nodes.length);

  // Exhaustive cones, in order, within the budget.
  for (let k = 0; k < observed.length; k++) {
    const o = observed[k]!;
    const n = sup[k]!.count;
    if (n > maxEx) {
      randomCones.push(k);
      continue;
    }
    const words = Math.max(1, 2 ** Math.max(0, n - 5));
    const cap = Math.floor(budget / words);
    const na = coneNodes(a, o.ra, o.through, cap);
    const nb = na && coneNodes(b, o.rb, o.through, cap - na.length);
    if (!na || !nb || (na.length + nb.length + 2) * words > budget) {
      randomCones.push(k);
      budget = Math.max(0, budget - (na?.length ?? cap));
      continue;
    }
    budget -= (na.length + nb.length + 2) * words;
    const names = supNames(k);
    const out = exhaustiveCone(a, b, o, names, na, nb, words, scratchA, scratchB, varIndex);
    outcomes[k] = out;
    if (out.counterexample) {
      failedAt = k;
      break;
    }
  }

  // The rest with the shared random vectors.
  const pending = randomCones.filter((k) => k < failedAt);
  if (pending.length) {
    const results = randomPass(a, b, observed, pending, randomWords, seed, varIndex);
    for (const k of pending) {
      const o = observed[k]!;
      const check: ConeCheck = { name: o.name, kind: o.kind, support: sup[k]!.count, exhaustive: false, vectors: randomWords * 32 };
      if (sup[k]!.count <= maxEx) check.limitedBy = "work";
      const hit = results.get(k);
      const out: Outcome = { check };
      if (hit) out.counterexample = counterexampleAt(a, b, o, hit.w, hit.bit, seed, varIndex, allNames);
      outcomes[k] = out;
    }
  }

  const cones: ConeCheck[] = [];
  for (let k = 0; k < observed.length; k++) {
    const out = outcomes[k];
    if (!out) continue;
    cones.push(out.check);
    if (out.counterexample) return { equivalent: false, complete: false, cones, counterexample: out.counterexample };
  }
  return { equivalent: true, complete: cones.every((c) => c.exhaustive), cones };
}

function exhaustiveCone(
  a: Side,
  b: Side,
  o: Observed,
  names: string[],
  na: number[],
  nb: number[],
  words: number,
  scratchA: Int32Array,
  scratchB: Int32Array,
  varIndex: ReadonlyMap<string, number>,
): { check: ConeCheck; counterexample?: Counterexample } {
  const n = names.length;
  const pa = coneProgram(a, o.ra, o.through, na, scratchA);
  const pb = coneProgram(b, o.rb, o.through, nb, scratchB);
  // Position of each variable in the cone's enumeration.
  const posOf = new Map<number, number>();
  names.forEach((name, i) => {
    const v = varIndex.get(name);
    if (v !== undefined) posOf.set(v, i);
  });
  const W = Math.min(words, CHUNK_WORDS);
  const bufA = new Uint32Array(pa.p.slots * W);
  const bufB = new Uint32Array(pb.p.slots * W);
  const mask = n < 5 ? (2 ** (2 ** n) - 1) >>> 0 : 0xffffffff;
  const check: ConeCheck = { name: o.name, kind: o.kind, support: n, exhaustive: true, vectors: 2 ** n };
  let dcCount = 0;
  const fill = (p: typeof pa.p, buf: Uint32Array, w0: number) => {
    for (let f = 0; f < p.freeSlots.length; f++) {
      const at = posOf.get(p.freeVars[f]!);
      const o2 = p.freeSlots[f]! * W;
      for (let i = 0; i < W; i++) buf[o2 + i] = at === undefined ? 0 : enumerationWord(at, w0 + i);
    }
  };
  for (let w0 = 0; w0 < words; w0 += W) {
    fill(pa.p, bufA, w0);
    fill(pb.p, bufB, w0);
    runWordProgram(pa.p, bufA, W);
    runWordProgram(pb.p, bufB, W);
    let dcw: Uint32Array | undefined;
    if (o.dc) {
      const chunk = new Map<string, Uint32Array>();
      names.forEach((name, i) => {
        const x = new Uint32Array(W);
        for (let j = 0; j < W; j++) x[j] = enumerationWord(i, w0 + j);
        chunk.set(name, x);
      });
      dcw = dontCareWords(o.dc, (name) => chunk.get(name), W);
      for (let j = 0; j < W; j++) {
        let x = (dcw[j]! & mask) >>> 0;
        while (x) {
          x &= x - 1;
          dcCount++;
        }
      }
    }
    const ra = pa.rootSlot * W;
    const rb = pb.rootSlot * W;
    for (let j = 0; j < W; j++) {
      const va = bufA[ra + j]!;
      const vb = bufB[rb + j]!;
      const diff = ((va ^ vb) & mask & (dcw ? ~dcw[j]! : 0xffffffff)) >>> 0;
      if (diff) {
        const bit = 31 - Math.clz32(diff & -diff);
        const assignment: Record<string, 0 | 1> = {};
        names.forEach((name, i) => (assignment[name] = ((enumerationWord(i, w0 + j) >>> bit) & 1) as 0 | 1));
        if (o.dc) check.dontCarePoints = dcCount;
        return {
          check,
          counterexample: { name: o.name, kind: o.kind, assignment, expected: ((va >>> bit) & 1) as 0 | 1, actual: ((vb >>> bit) & 1) as 0 | 1 },
        };
      }
    }
  }
  if (o.dc) check.dontCarePoints = dcCount;
  return { check };
}

/**
 * One bit-parallel pass over both graphs (the nodes the given cones need) with seeded random
 * words for every variable; returns the first differing vector of each cone that differs.
 */
function randomPass(
  a: Side,
  b: Side,
  observed: readonly Observed[],
  cones: readonly number[],
  words: number,
  seed: number,
  varIndex: ReadonlyMap<string, number>,
): Map<number, { w: number; bit: number }> {
  const program = (side: Side, root: (o: Observed) => number) => {
    const needed = new Uint8Array(side.g.nodes.length);
    const stack: number[] = [];
    const through: number[] = [];
    for (const k of cones) {
      const o = observed[k]!;
      const r = root(o);
      if (o.through) {
        through.push(r);
        for (const each of side.g.nodes[r]!.fanins) stack.push(each);
      } else stack.push(r);
    }
    while (stack.length) {
      const id = stack.pop()!;
      if (needed[id]) continue;
      needed[id] = 1;
      if (side.freeVar[id]! >= 0) continue;
      for (const f of side.g.nodes[id]!.fanins) if (!needed[f]) stack.push(f);
    }
    const nodes = side.order.filter((id) => needed[id]);
    const slotOf = new Int32Array(side.g.nodes.length).fill(-1);
    nodes.forEach((id, k) => (slotOf[id] = k));
    const p = wordProgram(side.g, nodes, slotOf, side.freeVar, through);
    // Slot of each cone's value.
    let t = nodes.length;
    const rootSlot = cones.map((k) => (observed[k]!.through ? t++ : slotOf[root(observed[k]!)]!));
    return { p, rootSlot };
  };
  const pa = program(a, (o) => o.ra);
  const pb = program(b, (o) => o.rb);
  const W = Math.min(words, RANDOM_CHUNK_WORDS);
  const bufA = new Uint32Array(pa.p.slots * W);
  const bufB = new Uint32Array(pb.p.slots * W);
  const found = new Map<number, { w: number; bit: number }>();
  const fill = (p: typeof pa.p, buf: Uint32Array, w0: number) => {
    for (let f = 0; f < p.freeSlots.length; f++) {
      const v = p.freeVars[f]!;
      const o = p.freeSlots[f]! * W;
      for (let i = 0; i < W; i++) buf[o + i] = randomWord(seed, v, w0 + i);
    }
  };
  const dcWordsOf = (o: Observed, w0: number) => {
    const chunk = (name: string) => {
      const v = varIndex.get(name);
      const x = new Uint32Array(W);
      if (v !== undefined) for (let j = 0; j < W; j++) x[j] = randomWord(seed, v, w0 + j);
      return x;
    };
    return dontCareWords(o.dc!, chunk, W);
  };
  for (let w0 = 0; w0 < words && found.size < cones.length; w0 += W) {
    fill(pa.p, bufA, w0);
    fill(pb.p, bufB, w0);
    runWordProgram(pa.p, bufA, W);
    runWordProgram(pb.p, bufB, W);
    cones.forEach((k, c) => {
      if (found.has(k)) return;
      const o = observed[k]!;
      const dcw = o.dc ? dcWordsOf(o, w0) : undefined;
      const ra = pa.rootSlot[c]! * W;
      const rb = pb.rootSlot[c]! * W;
      for (let j = 0; j < W && w0 + j < words; j++) {
        const diff = ((bufA[ra + j]! ^ bufB[rb + j]!) & (dcw ? ~dcw[j]! : 0xffffffff)) >>> 0;
        if (diff) {
          found.set(k, { w: w0 + j, bit: 31 - Math.clz32(diff & -diff) });
          return;
        }
      }
    });
  }
  return found;
}

/** The counterexample of a cone at random vector (w, bit): the cone's support and both values. */
function counterexampleAt(a: Side, b: Side, o: Observed, w: number, bit: number, seed: number, varIndex: ReadonlyMap<string, number>, allNames: readonly string[]): Counterexample {
  const assign = new Map<number, Uint32Array>();
  const valueOf = (side: Side, root: number): 0 | 1 => {
    const nodes = coneNodes(side, root, o.through, Infinity)!;
    const free = new Map<number, Uint32Array>();
    for (const id of nodes) {
      const v = side.freeVar[id]!;
      if (v < 0) continue;
      const x = Uint32Array.of(randomWord(seed, v, w));
      assign.set(v, x);
      free.set(id, x);
    }
    const values = simulateWords(side.g, nodes, free, 1);
    const r = o.through ? evalThrough(side, root, values) : values[root]!;
    return ((r[0]! >>> bit) & 1) as 0 | 1;
  };
  const expected = valueOf(a, o.ra);
  const actual = valueOf(b, o.rb);
  const names = [...assign.keys()].map((v) => [allNames[v]!, v] as const);
  for (const name of o.dc?.variables ?? []) {
    const v = varIndex.get(name);
    if (v !== undefined && !assign.has(v)) names.push([name, v]);
  }
  names.sort((x, y) => (x[0] < y[0] ? -1 : x[0] > y[0] ? 1 : 0));
  const assignment: Record<string, 0 | 1> = {};
  for (const [name, v] of names) assignment[name] = ((randomWord(seed, v, w) >>> bit) & 1) as 0 | 1;
  return { name: o.name, kind: o.kind, assignment, expected, actual };
}

function evalThrough(side: Side, root: number, values: (Uint32Array | undefined)[]): Uint32Array {
  const node = side.g.nodes[root]!;
  return evalOpWords(node.op, node.fanins.map((f) => values[f]!), 1);
}

/** Truth table of every output over all input vectors (combinational designs, ≤ 24 inputs). */
export function truthTable(g: LogicGraph): Uint32Array[] {
  const n = g.inputs.length;
  if (n > 24) throw new Error("truth table too large");
  const words = Math.max(1, 2 ** Math.max(0, n - 5));
  const order = evaluationOrder(g, new Set());
  if (!order) throw new Error("truth table of a design with loops");
  const free = new Map<number, Uint32Array>();
  g.inputs.forEach((p, i) => free.set(p.node, enumerationWords(i, words)));
  const values = simulateWords(g, order, free, words);
  return g.outputs.map((p) => values[p.node]!);
}
