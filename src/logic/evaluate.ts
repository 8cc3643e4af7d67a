// Evaluation of a logic graph: bit-parallel two-valued (32 vectors a word) for equivalence and
// truth tables, and three-valued (0, 1, X) step-by-step for designs that store state.
import type { LogicGraph, LogicOp } from "./graph.js";
import { analyzeLoops, evaluationOrder } from "./loops.js";

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

function evalTri(op: LogicOp, a: Tri[]): Tri {
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
  /** Stored state after the step, by cut node id. */
  state: Map<number, Tri>;
  /** True when the state settled without an X forced by a race or an oscillation. */
  settled: boolean;
}

/**
 * A sequential simulator that applies input vectors one at a time and lets the loops settle,
 * starting from an unknown (X) state unless an initial state is given. Signals whose value
 * depends on a race between loop signals, or that oscillate, become X.
 */
export class StepSimulator {
  readonly cuts: number[];
  private readonly order: number[];
  private state: Map<number, Tri>;
  private readonly values: Tri[];

  constructor(private readonly g: LogicGraph, initial?: Map<string, 0 | 1>) {
    this.cuts = analyzeLoops(g).cuts;
    const order = evaluationOrder(g, new Set(this.cuts));
    if (!order) throw new Error("loop analysis left a loop uncut");
    this.order = order;
    this.values = new Array(g.nodes.length).fill("X");
    this.state = new Map(this.cuts.map((c) => [c, initial?.get(g.nodes[c]!.name ?? "") ?? "X"]));
  }

  /** Names of the state signals (loop cut points). */
  stateNames(): string[] {
    return this.cuts.map((c) => this.g.nodes[c]!.name ?? `#${c}`);
  }

  private evaluate(inputs: readonly (0 | 1)[]): void {
    const g = this.g;
    g.inputs.forEach((p, i) => (this.values[p.node] = inputs[i]!));
    for (const id of this.order) {
      const node = g.nodes[id]!;
      if (node.op === "input") continue;
      if (this.state.has(id)) {
        this.values[id] = this.state.get(id)!;
        continue;
      }
      this.values[id] = evalTri(node.op, node.fanins.map((f) => this.values[f]!));
    }
  }

  private next(id: number): Tri {
    const node = this.g.nodes[id]!;
    return evalTri(node.op, node.fanins.map((f) => this.values[f]!));
  }

  step(inputs: readonly (0 | 1)[]): StepResult {
    const limit = 2 * this.cuts.length + 4;
    let settled = true;
    let iterations = 0;
    const changes = new Map<number, number>();
    for (;;) {
      this.evaluate(inputs);
      let changed = false;
      const nextState = new Map<number, Tri>();
      for (const c of this.cuts) {
        const v = this.next(c);
        nextState.set(c, v);
        if (v !== this.state.get(c)) {
          changed = true;
          changes.set(c, (changes.get(c) ?? 0) + 1);
        }
      }
      if (!changed) break;
      this.state = nextState;
      if (++iterations > limit) {
        // Oscillation or race: the signals that kept changing are unknown.
        settled = false;
        for (const [c, n] of changes) if (n > 1) this.state.set(c, "X");
        // With X absorbing, a few more passes reach a fixed point.
        for (let k = 0; k < limit; k++) {
          this.evaluate(inputs);
          let again = false;
          for (const c of this.cuts) {
            const v = this.next(c);
            const merged: Tri = this.state.get(c) === "X" ? "X" : v;
            if (merged !== this.state.get(c)) {
              this.state.set(c, merged);
              again = true;
            }
          }
          if (!again) break;
        }
        this.evaluate(inputs);
        break;
      }
    }
    return {
      outputs: this.g.outputs.map((p) => this.values[p.node]!),
      state: new Map(this.state),
      settled,
    };
  }
}
