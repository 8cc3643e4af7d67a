// A logic-graph builder with structural hashing and local simplification: constants folded,
// double inversions removed, duplicate and complementary operands resolved. Every optimization
// pass rebuilds through it, so no pass can leave a trivially reducible node behind.
import type { LogicGraph, LogicNode, LogicOp, Port } from "../logic/graph.js";
import { evaluationOrder } from "../logic/loops.js";
import { buildForm, type Form } from "./form.js";

/** Operand lists up to this long are cleaned with plain arrays (quadratic, but short). */
const SMALL_GATE = 16;

/** What the builder's simplifications ask of a node, one byte a node (read without going to
 *  the node itself): a constant, a NOT, or anything else. */
const OTHER = 0;
const CONST0 = 1;
const CONST1 = 2;
const NOT = 3;

/** Slots of a new builder's hash table (a power of two; it doubles when half full). */
const FIRST_TABLE_SLOTS = 16;
/** Nodes a new builder's per-node arrays hold (they double when full). */
const FIRST_NODES = 16;

/** The first k operands as a list of their own. Short lists are written out, so that each
 *  length is made at one place in the code (the engine then learns that these lists live long
 *  and makes them where long-lived objects go, instead of copying them later). */
function copyOperands(f: Int32Array, k: number): number[] {
  switch (k) {
    case 1:
      return [f[0]!];
    case 2:
      return [f[0]!, f[1]!];
    case 3:
      return [f[0]!, f[1]!, f[2]!];
    case 4:
      return [f[0]!, f[1]!, f[2]!, f[3]!];
    default: {
      const list: number[] = [];
      for (let i = 0; i < k; i++) list.push(f[i]!);
      return list;
    }
  }
}

export class GraphBuilder {
  readonly nodes: LogicNode[] = [];
  /** Structural hashing: an open-addressed table, each slot a node id (-1: empty) and the hash
   *  of its gate side by side (one memory read a probe); a hit is confirmed by comparing op and
   *  operands. */
  private slots = new Int32Array(2 * FIRST_TABLE_SLOTS).fill(-1);
  private entries = 0;
  /** Operands of the gate being made (copied into a list of its own only when a new node is
   *  made); grown for wide gates. */
  private work = new Int32Array(SMALL_GATE);
  /** Per node: OTHER, CONST0, CONST1 or NOT, and a NOT's operand. */
  private kind = new Uint8Array(FIRST_NODES);
  private notOperand = new Int32Array(FIRST_NODES);
  private c0 = -1;
  private c1 = -1;

  /** Adds a node and its kind. */
  private add(n: LogicNode, kind: number, operand = -1): number {
    const id = this.nodes.push(n) - 1;
    if (id >= this.kind.length) {
      const kinds = new Uint8Array(this.kind.length * 2);
      kinds.set(this.kind);
      this.kind = kinds;
      const operands = new Int32Array(this.notOperand.length * 2);
      operands.set(this.notOperand);
      this.notOperand = operands;
    }
    this.kind[id] = kind;
    this.notOperand[id] = operand;
    return id;
  }

  input(name: string, span?: LogicNode["span"]): number {
    const n: LogicNode = { op: "input", fanins: [], name };
    if (span) n.span = span;
    return this.add(n, OTHER);
  }

  constant(v: 0 | 1): number {
    if (v) return this.c1 >= 0 ? this.c1 : (this.c1 = this.add({ op: "const1", fanins: [] }, CONST1));
    return this.c0 >= 0 ? this.c0 : (this.c0 = this.add({ op: "const0", fanins: [] }, CONST0));
  }

  /** A named buffer whose operand is bound later (a state signal in a loop). */
  placeholder(name: string, span?: LogicNode["span"]): number {
    const n: LogicNode = { op: "buf", fanins: [], name };
    if (span) n.span = span;
    return this.add(n, OTHER);
  }

  bind(placeholder: number, operand: number): void {
    this.nodes[placeholder]!.fanins = [operand];
  }

  isConst(id: number): 0 | 1 | undefined {
    const k = this.kind[id]!;
    return k === CONST0 ? 0 : k === CONST1 ? 1 : undefined;
  }

  /** The node (op, work[0 .. k)), found in the table or made. */
  private hashed(op: LogicOp, k: number): number {
    const fanins = this.work;
    let h = op === "and" ? 0x3c6ef372 : op === "or" ? 0x5be0cd19 : op === "xor" ? 0x1f83d9ab : 0x6a09e667;
    for (let i = 0; i < k; i++) h = Math.imul(h ^ fanins[i]!, 0x01000193) ^ (h >>> 13);
    const slots = this.slots;
    const mask = (slots.length >>> 1) - 1;
    let at = h & mask;
    for (;;) {
      const id = slots[2 * at]!;
      if (id < 0) break;
      if (slots[2 * at + 1] === h && this.same(id, op, k)) return id;
      at = (at + 1) & mask;
    }
    const id = this.add({ op, fanins: copyOperands(fanins, k) }, op === "not" ? NOT : OTHER, op === "not" ? fanins[0]! : -1);
    slots[2 * at] = id;
    slots[2 * at + 1] = h;
    if (++this.entries * 4 > slots.length) this.grow();
    return id;
  }

  /** Operands of a list (sorted, or an XOR's) as the gate being made. */
  private hashedList(op: LogicOp, list: readonly number[]): number {
    const k = list.length;
    if (this.work.length < k) this.work = new Int32Array(Math.max(k, this.work.length * 2));
    const w = this.work;
    for (let i = 0; i < k; i++) w[i] = list[i]!;
    return this.hashed(op, k);
  }

  private grow(): void {
    const old = this.slots;
    const slots = new Int32Array(2 * old.length).fill(-1);
    const mask = (slots.length >>> 1) - 1;
    for (let i = 0; i < old.length; i += 2) {
      const id = old[i]!;
      if (id < 0) continue;
      const h = old[i + 1]!;
      let at = h & mask;
      while (slots[2 * at]! >= 0) at = (at + 1) & mask;
      slots[2 * at] = id;
      slots[2 * at + 1] = h;
    }
    this.slots = slots;
  }

  private same(id: number, op: LogicOp, k: number): boolean {
    const fanins = this.work;
    const n = this.nodes[id]!;
    const have = n.fanins;
    if (n.op !== op || have.length !== k) return false;
    for (let i = 0; i < k; i++) if (have[i] !== fanins[i]) return false;
    return true;
  }

  not(a: number): number {
    const k = this.kind[a]!;
    if (k === CONST0) return this.constant(1);
    if (k === CONST1) return this.constant(0);
    if (k === NOT) return this.notOperand[a]!;
    this.work[0] = a;
    return this.hashed("not", 1);
  }

  /** The operand and whether it is inverted: not(x) → (x, true). */
  private literal(id: number): [number, boolean] {
    return this.kind[id] === NOT ? [this.notOperand[id]!, true] : [id, false];
  }

  and(args: number[]): number {
    return this.andOr("and", args);
  }

  or(args: number[]): number {
    return this.andOr("or", args);
  }

  private andOr(op: "and" | "or", args: number[]): number {
    const absorbing = op === "and" ? 0 : 1;
    if (args.length > SMALL_GATE) return this.andOrWide(op, args);
    // Few operands (the usual case): the builder's work list instead of a set and a map.
    const list = this.work;
    let k = 0;
    for (let i = 0; i < args.length; i++) {
      const a = args[i]!;
      const c = this.isConst(a);
      if (c === absorbing) return this.constant(absorbing);
      if (c !== undefined) continue; // identity element
      let seen = false;
      for (let j = 0; j < k; j++) if (list[j] === a) seen = true;
      if (!seen) list[k++] = a;
    }
    // x op !x
    const kind = this.kind;
    for (let i = 0; i < k; i++) {
      const y = list[i]!;
      if (kind[y] !== NOT) continue;
      const x = this.notOperand[y]!;
      for (let j = 0; j < k; j++) if (list[j] === x) return this.constant(absorbing);
    }
    if (k === 0) return this.constant(absorbing ? 0 : 1);
    if (k === 1) return list[0]!;
    // Ascending (insertion sort: a few elements).
    for (let i = 1; i < k; i++) {
      const x = list[i]!;
      let j = i - 1;
      while (j >= 0 && list[j]! > x) {
        list[j + 1] = list[j]!;
        j--;
      }
      list[j + 1] = x;
    }
    return this.hashed(op, k);
  }

  private andOrWide(op: "and" | "or", args: number[]): number {
    const absorbing = op === "and" ? 0 : 1;
    const set = new Set<number>();
    for (const a of args) {
      const c = this.isConst(a);
      if (c === absorbing) return this.constant(absorbing);
      if (c !== undefined) continue; // identity element
      set.add(a);
    }
    // x op !x
    const seen = new Map<number, boolean>();
    for (const a of set) {
      const [v, inv] = this.literal(a);
      const prev = seen.get(v);
      if (prev !== undefined && prev !== inv) return this.constant(absorbing);
      seen.set(v, inv);
    }
    const list = [...set].sort((x, y) => x - y);
    if (list.length === 0) return this.constant(absorbing ? 0 : 1);
    if (list.length === 1) return list[0]!;
    return this.hashedList(op, list);
  }

  xor(args: number[]): number {
    let parity = 0;
    const count = new Map<number, number>();
    for (const a of args) {
      const c = this.isConst(a);
      if (c !== undefined) {
        parity ^= c;
        continue;
      }
      const [v, inv] = this.literal(a);
      if (inv) parity ^= 1;
      count.set(v, (count.get(v) ?? 0) + 1);
    }
    const list = [...count].filter(([, k]) => k % 2 === 1).map(([v]) => v).sort((x, y) => x - y);
    let r: number;
    if (list.length === 0) r = this.constant(0);
    else if (list.length === 1) r = list[0]!;
    else r = this.hashedList("xor", list);
    return parity ? this.not(r) : r;
  }

  op(op: LogicOp, fanins: number[]): number {
    switch (op) {
      case "not":
        return this.not(fanins[0]!);
      case "buf":
        return fanins[0]!;
      case "and":
        return this.and(fanins);
      case "or":
        return this.or(fanins);
      case "xor":
        return this.xor(fanins);
      case "const0":
        return this.constant(0);
      case "const1":
        return this.constant(1);
      case "input":
        throw new Error("inputs are made with input()");
    }
  }

  /** Gives a node a source name if it has none (names are annotations, not structure). */
  nameNode(id: number, name: string | undefined, span?: LogicNode["span"]): void {
    if (name === undefined) return;
    const n = this.nodes[id]!;
    if (n.name !== undefined || n.op === "const0" || n.op === "const1") return;
    n.name = name;
    if (span && !n.span) n.span = span;
  }
}

/** Scratch operand lists, one of each length (a list's length is never changed, which costs
 *  more than writing its elements). */
class OperandLists {
  private readonly lists: number[][] = [];
  of(length: number): number[] {
    let list = this.lists[length];
    if (!list) {
      list = [];
      for (let i = 0; i < length; i++) list.push(0);
      this.lists[length] = list;
    }
    return list;
  }
}

/**
 * Rebuilds a graph through a GraphBuilder, keeping inputs, outputs and the named state signals.
 * `rewrite` may replace the construction of any non-input node; by default the node's own op.
 * Nodes not reachable from an output or a state signal are dropped.
 */
export function rebuild(
  g: LogicGraph,
  stateNames: readonly string[],
  rewrite?: (b: GraphBuilder, node: LogicNode, operands: number[], id: number) => number,
): LogicGraph {
  const b = new GraphBuilder();
  const map = new Int32Array(g.nodes.length).fill(-1);
  const stateSet = new Set(stateNames);
  const cutIds = new Set<number>();
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined && stateSet.has(n.name) && n.op !== "input") cutIds.add(id);
  });
  for (const p of g.inputs) map[p.node] = b.input(p.name, g.nodes[p.node]!.span);
  for (const id of cutIds) map[id] = b.placeholder(g.nodes[id]!.name!, g.nodes[id]!.span);
  const order = evaluationOrder(g, cutIds);
  if (!order) throw new Error("rebuild: a loop is not broken at the state signals");
  const live = liveNodes(g, cutIds);
  // Without a rewrite the operands go straight to the builder, which copies what it keeps: one
  // scratch list of each length serves every node.
  const scratch = new OperandLists();
  for (const id of order) {
    if (map[id]! >= 0 || !live[id]) continue;
    const n = g.nodes[id]!;
    if (n.op === "input") {
      map[id] = b.input(n.name ?? `in${id}`);
      continue;
    }
    let r: number;
    if (rewrite) r = rewrite(b, n, n.fanins.map((f) => map[f]!), id);
    else {
      const fanins = n.fanins;
      const operands = scratch.of(fanins.length);
      for (let i = 0; i < fanins.length; i++) operands[i] = map[fanins[i]!]!;
      r = b.op(n.op, operands);
    }
    map[id] = r;
    b.nameNode(r, n.name, n.span);
  }
  for (const id of cutIds) {
    const n = g.nodes[id]!;
    const operands = n.fanins.map((f) => map[f]!);
    b.bind(map[id]!, rewrite && n.op !== "buf" ? rewrite(b, n, operands, id) : n.op === "buf" ? operands[0]! : b.op(n.op, operands));
  }
  const outputs: Port[] = g.outputs.map((p) => {
    const q: Port = { name: p.name, node: map[p.node]! };
    if (p.span) q.span = p.span;
    return q;
  });
  const inputs: Port[] = g.inputs.map((p) => {
    const q: Port = { name: p.name, node: map[p.node]! };
    if (p.span) q.span = p.span;
    return q;
  });
  const out: LogicGraph = { name: g.name, nodes: b.nodes, inputs, outputs };
  if (g.file !== undefined) out.file = g.file;
  if (g.dontCares) out.dontCares = g.dontCares;
  return out;
}

/** A new construction for a node: a form over leaves that are nodes of the same graph. */
export interface Replacement {
  form: Form;
  /** Node ids (of the graph being rebuilt) of the form's leaves 0, 1, ... */
  leaves: readonly number[];
}

/**
 * Rebuilds a graph through a GraphBuilder with some nodes built from new forms instead of
 * their own operations. Each replacement must compute the same function as the node it
 * replaces (or, for an output no logic reads, agree with it outside its don't-cares), and its
 * leaves must not depend on the node. Only what outputs and state signals need is built; names
 * are kept as annotations. A replacement of a state signal (a cut node) gives its next value.
 */
export function rebuildWith(g: LogicGraph, stateNames: readonly string[], replacements: ReadonlyMap<number, Replacement>): LogicGraph {
  const b = new GraphBuilder();
  const map = new Int32Array(g.nodes.length).fill(-1);
  const stateSet = new Set(stateNames);
  const cutIds: number[] = [];
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined && stateSet.has(n.name) && n.op !== "input") cutIds.push(id);
  });
  for (const p of g.inputs) map[p.node] = b.input(p.name, g.nodes[p.node]!.span);
  for (const id of cutIds) map[id] = b.placeholder(g.nodes[id]!.name!, g.nodes[id]!.span);
  const deps = (id: number): readonly number[] => replacements.get(id)?.leaves ?? g.nodes[id]!.fanins;
  // Depth-first, post-order, without recursion: per level the node, the next dependency to
  // visit and the node's dependencies (looked up once, when the node is entered).
  const state = new Uint8Array(g.nodes.length); // 0 new, 1 on the stack, 2 built
  const stackId = new Int32Array(g.nodes.length);
  const stackNext = new Int32Array(g.nodes.length);
  const stackDeps: (readonly number[])[] = [];
  // The builder copies what it keeps: one scratch operand list of each length serves every node.
  const scratch = new OperandLists();
  const build = (root: number) => {
    if (map[root]! >= 0) return;
    stackId[0] = root;
    stackNext[0] = 0;
    stackDeps[0] = deps(root);
    let sp = 1;
    state[root] = 1;
    while (sp > 0) {
      const top = sp - 1;
      const ds = stackDeps[top]!;
      const i = stackNext[top]!;
      if (i < ds.length) {
        stackNext[top] = i + 1;
        const d = ds[i]!;
        if (map[d]! >= 0) continue;
        if (state[d] === 1) throw new Error("rebuildWith: a replacement depends on the node it replaces");
        state[d] = 1;
        stackId[sp] = d;
        stackNext[sp] = 0;
        stackDeps[sp] = deps(d);
        sp++;
        continue;
      }
      sp--;
      const id = stackId[top]!;
      const n = g.nodes[id]!;
      let r: number;
      const rep = replacements.size ? replacements.get(id) : undefined;
      if (rep) r = buildForm(b, rep.form, (v) => map[rep.leaves[v]!]!);
      else if (n.op === "input") r = b.input(n.name ?? `in${id}`);
      else {
        const fanins = n.fanins;
        const operands = scratch.of(fanins.length);
        for (let k = 0; k < fanins.length; k++) operands[k] = map[fanins[k]!]!;
        r = b.op(n.op, operands);
      }
      map[id] = r;
      state[id] = 2;
      b.nameNode(r, n.name, n.span);
    }
  };
  for (const p of g.outputs) build(p.node);
  for (const id of cutIds) for (const f of deps(id)) build(f);
  for (const id of cutIds) {
    const n = g.nodes[id]!;
    const rep = replacements.get(id);
    if (rep) {
      b.bind(map[id]!, buildForm(b, rep.form, (v) => map[rep.leaves[v]!]!));
      continue;
    }
    const operands = n.fanins.map((f) => map[f]!);
    b.bind(map[id]!, n.op === "buf" ? operands[0]! : b.op(n.op, operands));
  }
  return assembleGraph(g, b.nodes, map);
}

/** The graph of `nodes` that stands for `g`: its ports moved through `map` (old node → new),
 *  its name, source file and don't-cares carried over. */
export function assembleGraph(g: LogicGraph, nodes: LogicNode[], map: ArrayLike<number>): LogicGraph {
  const port = (p: Port): Port => {
    const q: Port = { name: p.name, node: map[p.node]! };
    if (p.span) q.span = p.span;
    return q;
  };
  const out: LogicGraph = { name: g.name, nodes, inputs: g.inputs.map(port), outputs: g.outputs.map(port) };
  if (g.file !== undefined) out.file = g.file;
  if (g.dontCares) out.dontCares = g.dontCares;
  return out;
}

/** Nodes that reach an output or a state signal. */
export function liveNodes(g: LogicGraph, cutIds: ReadonlySet<number>): Uint8Array {
  const nodes = g.nodes;
  const live = new Uint8Array(nodes.length);
  // Operands mostly have smaller ids than their readers (every builder makes operands first),
  // so one sweep from the last node down marks almost everything in memory order. An operand
  // with a larger id than its reader (a state signal's, bound after it was made) has been passed
  // already: its cone is marked depth-first from a stack (each node pushed once, when marked).
  const stack = new Int32Array(nodes.length);
  let sp = 0;
  for (const p of g.outputs) live[p.node] = 1;
  for (const id of cutIds) live[id] = 1;
  for (let id = nodes.length - 1; id >= 0; id--) {
    if (!live[id]) continue;
    const fanins = nodes[id]!.fanins;
    for (let i = 0; i < fanins.length; i++) {
      const f = fanins[i]!;
      if (live[f]) continue;
      live[f] = 1;
      if (f > id) stack[sp++] = f;
    }
    while (sp > 0) {
      const inner = nodes[stack[--sp]!]!.fanins;
      for (let i = 0; i < inner.length; i++) {
        const f = inner[i]!;
        if (live[f]) continue;
        live[f] = 1;
        if (f > id) stack[sp++] = f;
      }
    }
  }
  for (const p of g.inputs) live[p.node] = 1;
  return live;
}
