// Equivalence of two logic graphs over the same input names and the same state signal names.
// Each output and each state signal's next value is compared over its support: exhaustively,
// bit-parallel, when the support is small enough; with seeded random vectors otherwise.
// Don't-care points of the reference's outputs (src/logic/dontcares.ts) are free: the two
// graphs may differ there.
import type { DontCareSet, LogicGraph } from "./graph.js";
import { dontCareWords, usableDontCares } from "./dontcares.js";
import { evaluationOrder } from "./loops.js";
import { enumerationWords, evalOpWords, seededRandom, simulateWords } from "./evaluate.js";

export interface EquivalenceOptions {
  /** Names of the state signals (loop cut points), identical in both graphs. */
  stateNames: readonly string[];
  /** Largest support (inputs plus state signals of one cone) checked exhaustively. */
  maxExhaustiveSupport?: number;
  /** Random vectors per cone above that, in words of 32 vectors. */
  randomWords?: number;
  seed?: number;
  /** Don't-cares of the outputs, by output name (default: the usable don't-cares of `ref`). */
  dontCares?: ReadonlyMap<string, DontCareSet>;
}

export interface ConeCheck {
  name: string;
  kind: "output" | "state";
  support: number;
  exhaustive: boolean;
  vectors: number;
  /** Points left free by the output's don't-cares (exhaustive checks only). */
  dontCarePoints?: number;
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

interface Side {
  g: LogicGraph;
  order: number[];
  freeByName: Map<string, number>;
  cutIds: Set<number>;
}

function prepare(g: LogicGraph, stateNames: readonly string[]): Side | string {
  const byName = new Map<string, number>();
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined && !byName.has(n.name)) byName.set(n.name, id);
  });
  const cutIds = new Set<number>();
  for (const s of stateNames) {
    const id = byName.get(s);
    if (id === undefined) return `state signal '${s}' is missing from '${g.name}'`;
    cutIds.add(id);
  }
  const order = evaluationOrder(g, cutIds);
  if (!order) return `'${g.name}' has a loop not broken at the state signals`;
  const freeByName = new Map<string, number>();
  for (const p of g.inputs) freeByName.set(p.name, p.node);
  for (const s of stateNames) freeByName.set(s, byName.get(s)!);
  return { g, order, freeByName, cutIds };
}

/** Free variables (by name) reached from a node, not crossing cut nodes except at the root. */
function support(side: Side, root: number, throughRoot: boolean): Set<string> {
  const names = new Set<string>();
  const seen = new Set<number>();
  const stack = throughRoot ? [...side.g.nodes[root]!.fanins] : [root];
  const freeIds = new Map<number, string>();
  for (const [n, id] of side.freeByName) freeIds.set(id, n);
  while (stack.length) {
    const id = stack.pop()!;
    if (seen.has(id)) continue;
    seen.add(id);
    const free = freeIds.get(id);
    if (free !== undefined) {
      names.add(free);
      continue;
    }
    stack.push(...side.g.nodes[id]!.fanins);
  }
  return names;
}

function cone(side: Side, root: number, throughRoot: boolean): Uint8Array {
  const needed = new Uint8Array(side.g.nodes.length);
  const stack = throughRoot ? [...side.g.nodes[root]!.fanins] : [root];
  const freeIds = new Set(side.freeByName.values());
  while (stack.length) {
    const id = stack.pop()!;
    if (needed[id]) continue;
    needed[id] = 1;
    if (freeIds.has(id)) continue;
    stack.push(...side.g.nodes[id]!.fanins);
  }
  return needed;
}

function evaluateObserved(side: Side, root: number, throughRoot: boolean, assign: Map<string, Uint32Array>, words: number): Uint32Array {
  const needed = cone(side, root, throughRoot);
  const free = new Map<number, Uint32Array>();
  const zero = new Uint32Array(words);
  for (const [name, id] of side.freeByName) if (needed[id]) free.set(id, assign.get(name) ?? zero);
  const values = simulateWords(side.g, side.order, free, words, needed);
  if (!throughRoot) return values[root]!;
  const node = side.g.nodes[root]!;
  return evalOpWords(node.op, node.fanins.map((f) => values[f]!), words);
}

export function checkEquivalence(ref: LogicGraph, impl: LogicGraph, opts: EquivalenceOptions): EquivalenceResult {
  const maxEx = opts.maxExhaustiveSupport ?? 20;
  const randomWords = opts.randomWords ?? 512;
  const a = prepare(ref, opts.stateNames);
  const b = prepare(impl, opts.stateNames);
  if (typeof a === "string") return { equivalent: false, complete: false, cones: [], problem: a };
  if (typeof b === "string") return { equivalent: false, complete: false, cones: [], problem: b };
  const names = (g: LogicGraph, k: "inputs" | "outputs") => g[k].map((p) => p.name).join(",");
  if (names(ref, "inputs") !== names(impl, "inputs")) return { equivalent: false, complete: false, cones: [], problem: "the inputs differ" };
  if (names(ref, "outputs") !== names(impl, "outputs")) return { equivalent: false, complete: false, cones: [], problem: "the outputs differ" };

  type Observed = { name: string; kind: "output" | "state"; ra: number; rb: number; through: boolean };
  const observed: Observed[] = [];
  ref.outputs.forEach((p, i) => {
    const q = impl.outputs[i]!;
    // An output that is itself a state signal is compared as state below.
    if (a.cutIds.has(p.node) && b.cutIds.has(q.node)) return;
    observed.push({ name: p.name, kind: "output", ra: p.node, rb: q.node, through: false });
  });
  for (const s of opts.stateNames) {
    observed.push({ name: s, kind: "state", ra: a.freeByName.get(s)!, rb: b.freeByName.get(s)!, through: true });
  }

  const rand = seededRandom(opts.seed ?? 0x5eed);
  const cones: ConeCheck[] = [];
  const free = opts.dontCares ?? usableDontCares(ref, opts.stateNames);
  for (const o of observed) {
    const dc = o.kind === "output" ? free.get(o.name) : undefined;
    const sup = [...new Set([...support(a, o.ra, o.through), ...support(b, o.rb, o.through), ...(dc?.variables ?? [])])].sort();
    const exhaustive = sup.length <= maxEx;
    const words = exhaustive ? Math.max(1, 2 ** Math.max(0, sup.length - 5)) : randomWords;
    const assign = new Map<string, Uint32Array>();
    sup.forEach((name, i) => {
      if (exhaustive) assign.set(name, enumerationWords(i, words));
      else {
        const w = new Uint32Array(words);
        for (let k = 0; k < words; k++) w[k] = rand();
        assign.set(name, w);
      }
    });
    const va = evaluateObserved(a, o.ra, o.through, assign, words);
    const vb = evaluateObserved(b, o.rb, o.through, assign, words);
    // Only the first 2^k vectors are meaningful when k < 5.
    const mask = exhaustive && sup.length < 5 ? (2 ** (2 ** sup.length) - 1) >>> 0 : 0xffffffff;
    const check: ConeCheck = { name: o.name, kind: o.kind, support: sup.length, exhaustive, vectors: exhaustive ? 2 ** sup.length : words * 32 };
    const dcw = dc ? dontCareWords(dc, (name) => assign.get(name), words) : undefined;
    if (dcw && exhaustive) {
      let count = 0;
      for (let w = 0; w < words; w++) {
        let x = (dcw[w]! & mask) >>> 0;
        while (x) {
          x &= x - 1;
          count++;
        }
      }
      check.dontCarePoints = count;
    }
    cones.push(check);
    for (let w = 0; w < words; w++) {
      const diff = ((va[w]! ^ vb[w]!) & mask & (dcw ? ~dcw[w]! : 0xffffffff)) >>> 0;
      if (diff) {
        const bit = 31 - Math.clz32(diff & -diff);
        const assignment: Record<string, 0 | 1> = {};
        for (const name of sup) assignment[name] = ((assign.get(name)![w]! >>> bit) & 1) as 0 | 1;
        return {
          equivalent: false,
          complete: false,
          cones,
          counterexample: {
            name: o.name,
            kind: o.kind,
            assignment,
            expected: ((va[w]! >>> bit) & 1) as 0 | 1,
            actual: ((vb[w]! >>> bit) & 1) as 0 | 1,
          },
        };
      }
    }
  }
  return { equivalent: true, complete: cones.every((c) => c.exhaustive), cones };
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
