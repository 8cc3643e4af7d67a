// Evaluation of a logic graph: bit-parallel two-valued (32 vectors a word) for equivalence and
// truth tables, and three-valued (0, 1, X) step-by-step for designs that store state.
import type { LogicGraph, LogicOp } from "./graph.js";
import { analyzeLoops, evaluationOrder } from "./loops.js";
import { runTriWordProgram, wordProgram } from "./words.js";

/** Computes one node's words from its operands' words. */
export function evalOpWords(op: LogicOp, operands: Uint32Array[], words: number, out?: Uint32Array): Uint32Array {
  const r = out ?? new Uint32Array(words);
  switch (op) {
    case "const0":
      r.fill(0);
      break;
    case "const1":
      r.fill(0xffffffff);
      break;
    case "buf":
      r.set(operands[0]!);
      break;
    case "not": {
      const a = operands[0]!;
      for (let i = 0; i < words; i++) r[i] = ~a[i]!;
      break;
    }
    case "and": {
      r.set(operands[0]!);
      for (let k = 1; k < operands.length; k++) {
        const a = operands[k]!;
        for (let i = 0; i < words; i++) r[i] = r[i]! & a[i]!;
      }
      break;
    }
    case "or": {
      r.set(operands[0]!);
      for (let k = 1; k < operands.length; k++) {
        const a = operands[k]!;
        for (let i = 0; i < words; i++) r[i] = r[i]! | a[i]!;
      }
      break;
    }
    case "xor": {
      r.set(operands[0]!);
      for (let k = 1; k < operands.length; k++) {
        const a = operands[k]!;
        for (let i = 0; i < words; i++) r[i] = r[i]! ^ a[i]!;
      }
      break;
    }
    case "input":
      throw new Error("input nodes have no operation");
  }
  return r;
}

/** Word pattern of variable `i` when enumerating all 2^k vectors (vector v has bit i = (v >> i) & 1). */
export function enumerationWords(i: number, words: number): Uint32Array {
  const r = new Uint32Array(words);
  if (i < 5) {
    const pattern = [0xaaaaaaaa, 0xcccccccc, 0xf0f0f0f0, 0xff00ff00, 0xffff0000][i]!;
    r.fill(pattern >>> 0);
  } else {
    const period = 1 << (i - 5);
    for (let w = 0; w < words; w++) r[w] = (w & period) !== 0 ? 0xffffffff : 0;
  }
  return r;
}

/** A small seeded generator (xorshift32), so random checks are reproducible. */
export function seededRandom(seed: number): () => number {
  let s = seed >>> 0 || 0x9e3779b9;
  return () => {
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    return s;
  };
}

/**
 * Evaluates the nodes of `needed` (in `order`) with the given words for free nodes (inputs and
 * loop cut points). Returns words per node id (undefined for nodes not needed).
 */
export function simulateWords(
  g: LogicGraph,
  order: readonly number[],
  free: ReadonlyMap<number, Uint32Array>,
  words: number,
  needed?: Uint8Array,
): (Uint32Array | undefined)[] {
  const values: (Uint32Array | undefined)[] = new Array(g.nodes.length);
  for (const id of order) {
    if (needed && !needed[id]) continue;
    const f = free.get(id);
    if (f) {
      values[id] = f;
      continue;
    }
    const node = g.nodes[id]!;
    if (node.op === "input") {
      values[id] = new Uint32Array(words); // an input nobody assigned a value: 0
      continue;
    }
    const operands = node.fanins.map((x) => values[x]!);
    values[id] = evalOpWords(node.op, operands, words);
  }
  return values;
}

// ---------------------------------------------------------------------------------------------
// Three-valued step simulation

export type Tri = 0 | 1 | "X";

/** One node's three-valued value from its fanins' (X where an input decides nothing). */
export function evalTri(op: LogicOp, a: Tri[]): Tri {
  switch (op) {
    case "const0":
      return 0;
    case "const1":
      return 1;
    case "buf":
      return a[0]!;
    case "not":
      return a[0] === "X" ? "X" : a[0] === 1 ? 0 : 1;
    case "and": {
      let x = false;
      for (const v of a) {
        if (v === 0) return 0;
        if (v === "X") x = true;
      }
      return x ? "X" : 1;
    }
    case "or": {
      let x = false;
      for (const v of a) {
        if (v === 1) return 1;
        if (v === "X") x = true;
      }
      return x ? "X" : 0;
    }
    case "xor": {
      let r = 0;
      for (const v of a) {
        if (v === "X") return "X";
        r ^= v;
      }
      return r as 0 | 1;
    }
    case "input":
      return "X";
  }
}

export interface StepResult {
  /** Output values in the graph's output order. */
  outputs: Tri[];
  /** True when every signal settled without an X forced by a race or an oscillation. */
  settled: boolean;
}

/**
 * A sequential simulator that applies input vectors one at a time and lets the circuit settle.
 * Every named signal (an assigned signal of the source, a net of a cell netlist) has one unit
 * of delay, so two loop signals that change together race as they do in the circuit; a race or
 * an oscillation that does not settle leaves the signals involved unknown (X). The state starts
 * unknown unless an initial state is given.
 */
export class StepSimulator {
  readonly cuts: number[];
  private readonly delayed: number[];
  private readonly order: number[];
  private state: Map<number, Tri>;
  private readonly values: Tri[];

  constructor(private readonly g: LogicGraph, initial?: ReadonlyMap<string, Tri>) {
    this.cuts = analyzeLoops(g).cuts;
    const delayed = new Set<number>(this.cuts);
    g.nodes.forEach((n, id) => {
      if (n.name !== undefined && n.op !== "input" && n.op !== "const0" && n.op !== "const1") delayed.add(id);
    });
    this.delayed = [...delayed].sort((a, b) => a - b);
    const order = evaluationOrder(g, delayed);
    if (!order) throw new Error("loop analysis left a loop uncut");
    this.order = order;
    this.values = new Array(g.nodes.length).fill("X");
    this.state = new Map(this.delayed.map((c) => [c, initial?.get(g.nodes[c]!.name ?? "") ?? "X"]));
  }

  /** Names of the state signals (loop cut points). */
  stateNames(): string[] {
    return this.cuts.map((c) => this.g.nodes[c]!.name ?? `#${c}`);
  }

  /** Current value of a named signal. */
  valueOf(name: string): Tri | undefined {
    const id = this.g.nodes.findIndex((n) => n.name === name);
    return id < 0 ? undefined : this.values[id];
  }

  /** The stored value of every named signal (what `initial` takes to start from here). */
  namedState(): Map<string, Tri> {
    const out = new Map<string, Tri>();
    for (const [id, v] of this.state) {
      const name = this.g.nodes[id]!.name;
      if (name !== undefined && !out.has(name)) out.set(name, v);
    }
    return out;
  }

  /** A copy of the stored state, to come back to with `restore`. */
  snapshot(): Map<number, Tri> {
    return new Map(this.state);
  }

  restore(snapshot: ReadonlyMap<number, Tri>): void {
    this.state = new Map(snapshot);
  }

  private evaluate(inputs: readonly (0 | 1)[]): void {
    const g = this.g;
    g.inputs.forEach((p, i) => (this.values[p.node] = inputs[i]!));
    for (const id of this.order) {
      const node = g.nodes[id]!;
      if (node.op === "input") continue;
      const st = this.state.get(id);
      if (st !== undefined) {
        this.values[id] = st;
        continue;
      }
      this.values[id] = evalTri(node.op, node.fanins.map((f) => this.values[f]!));
    }
  }

  private next(id: number): Tri {
    const node = this.g.nodes[id]!;
    return evalTri(node.op, node.fanins.map((f) => this.values[f]!));
  }

  /**
   * Applies an input vector and lets the circuit settle. Signals named in `hold` are held at the
   * given values meanwhile (as a simulator's initial condition holds a node while it finds the
   * operating point); the next step releases them.
   */
  step(inputs: readonly (0 | 1)[], hold?: ReadonlyMap<string, 0 | 1>): StepResult {
    const held = new Map<number, 0 | 1>();
    if (hold) {
      this.g.nodes.forEach((n, id) => {
        const v = n.name !== undefined ? hold.get(n.name) : undefined;
        if (v !== undefined && this.state.has(id)) held.set(id, v);
      });
      for (const [id, v] of held) this.state.set(id, v);
    }
    const limit = 4 * this.delayed.length + 8;
    let settled = true;
    const lastChange = new Map<number, number>();
    let iteration = 0;
    for (;; iteration++) {
      this.evaluate(inputs);
      const updates: [number, Tri][] = [];
      for (const c of this.delayed) {
        if (held.has(c)) continue;
        const v = this.next(c);
        if (v !== this.state.get(c)) updates.push([c, v]);
      }
      if (updates.length === 0) break;
      for (const [c, v] of updates) {
        this.state.set(c, v);
        lastChange.set(c, iteration);
      }
      if (iteration >= limit) {
        // Not settling: whatever changed in the last rounds oscillates or races.
        settled = false;
        for (const [c, it] of lastChange) if (it >= iteration - 2) this.state.set(c, "X");
        for (let k = 0; k < limit; k++) {
          this.evaluate(inputs);
          let again = false;
          for (const c of this.delayed) {
            if (this.state.get(c) === "X" || held.has(c)) continue;
            const v = this.next(c);
            if (v !== this.state.get(c)) {
              this.state.set(c, v === "X" ? "X" : v);
              again = true;
            }
          }
          if (!again) break;
        }
        this.evaluate(inputs);
        break;
      }
    }
    return { outputs: this.g.outputs.map((p) => this.values[p.node]!), settled };
  }
}

// ---------------------------------------------------------------------------------------------
// Three-valued evaluation of a loop-free graph, bit-parallel

/** Vectors evaluated at once by evaluateLoopFree (words of 32). */
const LOOP_FREE_CHUNK_WORDS = 8;

/**
 * The three-valued values of `nodes` after each input vector (values in the graph's input
 * order), for a graph without loops; undefined when it has one. This is what StepSimulator
 * settles to, vector after vector: without a loop the settled state does not depend on the
 * previous one, and every node's settled value is its operation on its operands' settled values
 * (in evaluation order, once). An input node that is no port reads X, as in StepSimulator.
 * Bit-parallel, dual rail (src/logic/words.ts), 256 vectors a pass.
 */
export function evaluateLoopFree(g: LogicGraph, vectors: readonly (readonly (0 | 1)[])[], nodes: readonly number[]): Tri[][] | undefined {
  const order = evaluationOrder(g, new Set());
  if (!order) return undefined;
  const n = g.inputs.length;
  const X = n; // the variable of an input node without a port
  const freeVar = new Int32Array(g.nodes.length).fill(-1);
  g.nodes.forEach((node, id) => {
    if (node.op === "input") freeVar[id] = X;
  });
  g.inputs.forEach((p, i) => (freeVar[p.node] = i));
  const slotOf = new Int32Array(g.nodes.length);
  for (let id = 0; id < g.nodes.length; id++) slotOf[id] = id;
  const p = wordProgram(g, order, slotOf, freeVar);
  const W = Math.max(1, Math.min(LOOP_FREE_CHUNK_WORDS, Math.ceil(vectors.length / 32)));
  const one = new Uint32Array(p.slots * W);
  const zero = new Uint32Array(p.slots * W);
  const out: Tri[][] = [];
  for (let v0 = 0; v0 < vectors.length; v0 += 32 * W) {
    const count = Math.min(32 * W, vectors.length - v0);
    for (let f = 0; f < p.freeSlots.length; f++) {
      const o = p.freeSlots[f]! * W;
      const i = p.freeVars[f]!;
      one.fill(0, o, o + W);
      zero.fill(0, o, o + W);
      if (i === X) continue;
      for (let j = 0; j < count; j++) {
        const bit = 1 << (j & 31);
        if (vectors[v0 + j]![i]) one[o + (j >>> 5)] |= bit;
        else zero[o + (j >>> 5)] |= bit;
      }
    }
    runTriWordProgram(p, one, zero, W);
    for (let j = 0; j < count; j++) {
      const w = j >>> 5;
      const bit = 1 << (j & 31);
      out.push(nodes.map((id) => (one[id * W + w]! & bit ? 1 : zero[id * W + w]! & bit ? 0 : "X")));
    }
  }
  return out;
}
