// Facts about a logic graph that the passes share: the state signals (loop cut points), an
// evaluation order, the readers of each node, the free variables each node depends on, and
// truth tables of nodes over a chosen set of variables (bit-parallel simulation).
import type { LogicGraph } from "../logic/graph.js";
import { evaluationOrder } from "../logic/loops.js";
import { enumerationWords } from "../logic/evaluate.js";
import { runWordProgram, wordProgram } from "../logic/words.js";
import { DC, OFF, ON, type Spec } from "./sop/cube.js";

export interface GraphFacts {
  g: LogicGraph;
  /** Node ids of the state signals. */
  cuts: Set<number>;
  /** Inputs and state signals: the free variables of every cone. */
  free: Set<number>;
  order: number[];
  readers: number[][];
  /** Number of readers of each node (the lengths of `readers`, without the lists). */
  readerCounts: Int32Array;
  /** Position of each node in `order` (made when first needed). */
  pos?: Int32Array;
}

const scratch = new WeakMap<GraphFacts, { slotOf: Int32Array; freeVar: Int32Array }>();

/** Per-node arrays simulateOver reuses (freeVar all -1 between calls). */
function scratchOf(f: GraphFacts): { slotOf: Int32Array; freeVar: Int32Array } {
  let s = scratch.get(f);
  if (!s) scratch.set(f, (s = { slotOf: new Int32Array(f.g.nodes.length), freeVar: new Int32Array(f.g.nodes.length).fill(-1) }));
  return s;
}

function positions(f: GraphFacts): Int32Array {
  if (!f.pos) {
    const pos = new Int32Array(f.g.nodes.length);
    f.order.forEach((id, k) => (pos[id] = k));
    f.pos = pos;
  }
  return f.pos;
}

/** The facts of `g`. The evaluation order and the readers are worked out when first read (a
 *  pass that needs neither, such as one that asks only which nodes feed a state signal, does
 *  not pay for them): reading `order` of a graph whose loops are not broken at the state
 *  signals throws. */
export function graphFacts(g: LogicGraph, stateNames: readonly string[]): GraphFacts {
  const states = new Set(stateNames);
  const cuts = new Set<number>();
  if (states.size) {
    g.nodes.forEach((n, id) => {
      if (n.name !== undefined && states.has(n.name) && n.op !== "input") cuts.add(id);
    });
  }
  const free = new Set<number>(cuts);
  for (const p of g.inputs) free.add(p.node);
  let order: number[] | undefined;
  let readers: number[][] | undefined;
  let readerCounts: Int32Array | undefined;
  return {
    g,
    cuts,
    free,
    get order(): number[] {
      if (!order) {
        order = evaluationOrder(g, cuts);
        if (!order) throw new Error("a loop is not broken at the state signals");
      }
      return order;
    },
    get readers(): number[][] {
      return (readers ??= readersOf(g, cuts));
    },
    get readerCounts(): Int32Array {
      return (readerCounts ??= readerCountsOf(g));
    },
  };
}

/** The lengths of readersOf's lists: every operand of every node once per time it is read (a
 *  state signal's operands too, which readersOf lists last). */
function readerCountsOf(g: LogicGraph): Int32Array {
  const nodes = g.nodes;
  const count = new Int32Array(nodes.length);
  for (let id = 0; id < nodes.length; id++) {
    const fanins = nodes[id]!.fanins;
    for (let i = 0; i < fanins.length; i++) count[fanins[i]!]!++;
  }
  return count;
}

function readersOf(g: LogicGraph, cuts: ReadonlySet<number>): number[][] {
  const nodes = g.nodes;
  const readers: number[][] = new Array(nodes.length);
  for (let id = 0; id < nodes.length; id++) readers[id] = [];
  for (let id = 0; id < nodes.length; id++) {
    if (cuts.has(id)) continue; // a state signal's operand is read at the next step, not now
    const fanins = nodes[id]!.fanins;
    for (let i = 0; i < fanins.length; i++) readers[fanins[i]!]!.push(id);
  }
  // A state signal's operand is read (by the state); count it so that it is never taken as
  // unread.
  for (const c of cuts) for (const f of nodes[c]!.fanins) readers[f]!.push(c);
  return readers;
}

/**
 * The leaves a node depends on: free variables, and nodes of `stops` (other than the root
 * itself), in ascending id order. Undefined when there are more than `limit`.
 */
export function supportOf(f: GraphFacts, root: number, stops?: ReadonlySet<number>, limit = Infinity): number[] | undefined {
  const nodes = f.g.nodes;
  const w = walkOf(f);
  const seen = w.seen;
  const stack = w.stack;
  const mark = ++w.epoch;
  const free = w.free;
  let sp = 0;
  // A node goes on the stack once, when first seen (so the stack never exceeds the nodes).
  const push = (id: number) => {
    if (seen[id] === mark) return;
    seen[id] = mark;
    stack[sp++] = id;
  };
  if (free[root] && !f.cuts.has(root)) push(root);
  else for (const each of nodes[root]!.fanins) push(each);
  const out: number[] = [];
  while (sp > 0) {
    const id = stack[--sp]!;
    if (free[id] || (stops !== undefined && id !== root && stops.has(id))) {
      out.push(id);
      if (out.length > limit) return undefined;
      continue;
    }
    const n = nodes[id]!;
    if (n.op === "const0" || n.op === "const1") continue;
    const fanins = n.fanins;
    for (let i = 0; i < fanins.length; i++) push(fanins[i]!);
  }
  return out.sort((a, b) => a - b);
}

/** Per-node arrays the walks of supportOf reuse: a visit stamp (one mark per walk), a stack,
 *  and which nodes are free variables. */
const walks = new WeakMap<GraphFacts, { seen: Int32Array; stack: Int32Array; free: Uint8Array; epoch: number }>();

function walkOf(f: GraphFacts): { seen: Int32Array; stack: Int32Array; free: Uint8Array; epoch: number } {
  let w = walks.get(f);
  if (!w) {
    const size = f.g.nodes.length;
    const free = new Uint8Array(size);
    for (const id of f.free) free[id] = 1;
    walks.set(f, (w = { seen: new Int32Array(size), stack: new Int32Array(size), free, epoch: 0 }));
  }
  return w;
}

/** Nodes whose value feeds a state signal (the logic inside loops and in front of them). */
export function stateConeNodes(f: GraphFacts): Uint8Array {
  const mark = new Uint8Array(f.g.nodes.length);
  const stack: number[] = [];
  for (const c of f.cuts) for (const each of f.g.nodes[c]!.fanins) stack.push(each);
  while (stack.length) {
    const id = stack.pop()!;
    if (mark[id] || f.free.has(id)) continue;
    mark[id] = 1;
    for (const each of f.g.nodes[id]!.fanins) stack.push(each);
  }
  return mark;
}

/**
 * Words of the given nodes with `vars` enumerated (variable i = vars[i]: point p has bit i),
 * every other free variable at 0. `vars` may hold any nodes (they are forced); nodes between
 * must not depend on free variables outside `vars` for the result to mean anything.
 */
export function simulateOver(f: GraphFacts, vars: readonly number[], roots: readonly number[]): { words: number; values: (Uint32Array | undefined)[] } {
  const n = vars.length;
  const words = Math.max(1, 2 ** Math.max(0, n - 5));
  const forced = new Map<number, Uint32Array>();
  vars.forEach((v, i) => forced.set(v, enumerationWords(i, words)));
  // The cone's nodes alone, in evaluation order (work in proportion to the cone, not the graph).
  const needed = new Set<number>();
  const stack: number[] = [];
  // A state signal as a root stands for its next value: its operands are what is needed.
  for (const r of roots) {
    if (f.cuts.has(r)) for (const each of f.g.nodes[r]!.fanins) stack.push(each);
    else stack.push(r);
  }
  while (stack.length) {
    const id = stack.pop()!;
    if (needed.has(id)) continue;
    needed.add(id);
    if (forced.has(id) || f.free.has(id)) continue;
    for (const each of f.g.nodes[id]!.fanins) stack.push(each);
  }
  const pos = positions(f);
  const order = [...needed].sort((a, b) => pos[a]! - pos[b]!);
  // One flat buffer for the cone (src/logic/words.ts): forced and free nodes hold their words
  // (free variables outside `vars` read 0), the others are computed; each node's words a view.
  const { slotOf, freeVar } = scratchOf(f);
  order.forEach((id, k) => {
    slotOf[id] = k;
    if (forced.has(id) || f.free.has(id)) freeVar[id] = 0;
  });
  const program = wordProgram(f.g, order, slotOf, freeVar);
  const buf = new Uint32Array(order.length * words);
  for (const [id, w] of forced) if (needed.has(id)) buf.set(w, slotOf[id]! * words);
  runWordProgram(program, buf, words);
  for (const id of order) freeVar[id] = -1;
  // Indexed by node id but filled only for the cone (a sparse array: no work per graph node).
  const values: (Uint32Array | undefined)[] = [];
  order.forEach((id, k) => (values[id] = buf.subarray(k * words, (k + 1) * words)));
  return { words, values };
}

/** The words of a state signal's next value (its operation on its operands' words). */
export function nextStateWords(f: GraphFacts, cut: number, values: (Uint32Array | undefined)[]): Uint32Array {
  const n = f.g.nodes[cut]!;
  if (n.op === "buf") return values[n.fanins[0]!]!;
  throw new Error("nextStateWords: a state signal that is not a buffer");
}

/** A specification (ON/OFF) from words over n variables. */
export function specOfWords(w: Uint32Array, n: number): Spec {
  const size = 2 ** n;
  const s = new Uint8Array(size);
  for (let p = 0; p < size; p++) s[p] = (w[p >>> 5]! >>> (p & 31)) & 1 ? ON : OFF;
  return s;
}

/** Marks the points where `dc` words have a 1 as DC. */
export function markDontCares(spec: Spec, dc: Uint32Array): void {
  for (let p = 0; p < spec.length; p++) if ((dc[p >>> 5]! >>> (p & 31)) & 1) spec[p] = DC;
}
