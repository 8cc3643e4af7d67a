// A logic-graph builder with structural hashing and local simplification: constants folded,
// double inversions removed, duplicate and complementary operands resolved. Every optimization
// pass rebuilds through it, so no pass can leave a trivially reducible node behind.
import type { LogicGraph, LogicNode, LogicOp, Port } from "../logic/graph.js";
import { evaluationOrder } from "../logic/loops.js";
import { buildForm, type Form } from "./form.js";

/** Operand lists up to this long are cleaned with plain arrays (quadratic, but short). */
const SMALL_GATE = 16;

export class GraphBuilder {
  readonly nodes: LogicNode[] = [];
  /** Structural hashing: nodes by a hash of (op, operands); equal hashes are compared. */
  private readonly table = new Map<number, number | number[]>();
  private c0 = -1;
  private c1 = -1;

  input(name: string, span?: LogicNode["span"]): number {
    const n: LogicNode = { op: "input", fanins: [], name };
    if (span) n.span = span;
    return this.nodes.push(n) - 1;
  }

  constant(v: 0 | 1): number {
    if (v) return this.c1 >= 0 ? this.c1 : (this.c1 = this.nodes.push({ op: "const1", fanins: [] }) - 1);
    return this.c0 >= 0 ? this.c0 : (this.c0 = this.nodes.push({ op: "const0", fanins: [] }) - 1);
  }

  /** A named buffer whose operand is bound later (a state signal in a loop). */
  placeholder(name: string, span?: LogicNode["span"]): number {
    const n: LogicNode = { op: "buf", fanins: [], name };
    if (span) n.span = span;
    return this.nodes.push(n) - 1;
  }

  bind(placeholder: number, operand: number): void {
    this.nodes[placeholder]!.fanins = [operand];
  }

  isConst(id: number): 0 | 1 | undefined {
    const op = this.nodes[id]!.op;
    return op === "const0" ? 0 : op === "const1" ? 1 : undefined;
  }

  private hashed(op: LogicOp, fanins: number[]): number {
    let h = op === "and" ? 0x3c6ef372 : op === "or" ? 0x5be0cd19 : op === "xor" ? 0x1f83d9ab : 0x6a09e667;
    const k = fanins.length;
    for (let i = 0; i < k; i++) h = Math.imul(h ^ fanins[i]!, 0x01000193) ^ (h >>> 13);
    const hit = this.table.get(h);
    if (hit !== undefined) {
      if (typeof hit === "number") {
        if (this.same(hit, op, fanins)) return hit;
      } else for (let j = 0; j < hit.length; j++) if (this.same(hit[j]!, op, fanins)) return hit[j]!;
    }
    const id = this.nodes.push({ op, fanins }) - 1;
    if (hit === undefined) this.table.set(h, id);
    else if (typeof hit === "number") this.table.set(h, [hit, id]);
    else hit.push(id);
    return id;
  }

  private same(id: number, op: LogicOp, fanins: readonly number[]): boolean {
    const n = this.nodes[id]!;
    if (n.op !== op || n.fanins.length !== fanins.length) return false;
    for (let i = 0; i < fanins.length; i++) if (n.fanins[i] !== fanins[i]) return false;
    return true;
  }

  not(a: number): number {
    const c = this.isConst(a);
    if (c !== undefined) return this.constant(c ? 0 : 1);
    const n = this.nodes[a]!;
    if (n.op === "not") return n.fanins[0]!;
    return this.hashed("not", [a]);
  }

  /** The operand and whether it is inverted: not(x) → (x, true). */
  private literal(id: number): [number, boolean] {
    const n = this.nodes[id]!;
    return n.op === "not" ? [n.fanins[0]!, true] : [id, false];
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
    // Few operands (the usual case): plain arrays instead of a set and a map.
    const list: number[] = [];
    for (let i = 0; i < args.length; i++) {
      const a = args[i]!;
      const c = this.isConst(a);
      if (c === absorbing) return this.constant(absorbing);
      if (c !== undefined) continue; // identity element
      if (!list.includes(a)) list.push(a);
    }
    // x op !x
    for (let i = 0; i < list.length; i++) {
      const n = this.nodes[list[i]!]!;
      if (n.op !== "not") continue;
      if (list.includes(n.fanins[0]!)) return this.constant(absorbing);
    }
    if (list.length === 0) return this.constant(absorbing ? 0 : 1);
    if (list.length === 1) return list[0]!;
    // Ascending (insertion sort: a few elements).
    for (let i = 1; i < list.length; i++) {
      const x = list[i]!;
      let j = i - 1;
      while (j >= 0 && list[j]! > x) {
        list[j + 1] = list[j]!;
        j--;
      }
      list[j + 1] = x;
    }
    return this.hashed(op, list);
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
    return this.hashed(op, list);
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
    else r = this.hashed("xor", list);
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
  // scratch list serves every node.
  const scratch: number[] = [];
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
      scratch.length = fanins.length;
      for (let i = 0; i < fanins.length; i++) scratch[i] = map[fanins[i]!]!;
      r = b.op(n.op, scratch);
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
  // Depth-first, post-order, without recursion.
  const state = new Uint8Array(g.nodes.length); // 0 new, 1 on the stack, 2 built
  const build = (root: number) => {
    if (map[root]! >= 0) return;
    const stack: { id: number; i: number }[] = [{ id: root, i: 0 }];
    state[root] = 1;
    while (stack.length) {
      const top = stack[stack.length - 1]!;
      const ds = deps(top.id);
      if (top.i < ds.length) {
        const d = ds[top.i++]!;
        if (map[d]! >= 0) continue;
        if (state[d] === 1) throw new Error("rebuildWith: a replacement depends on the node it replaces");
        state[d] = 1;
        stack.push({ id: d, i: 0 });
        continue;
      }
      stack.pop();
      const id = top.id;
      const n = g.nodes[id]!;
      let r: number;
      const rep = replacements.get(id);
      if (rep) r = buildForm(b, rep.form, (v) => map[rep.leaves[v]!]!);
      else if (n.op === "input") r = b.input(n.name ?? `in${id}`);
      else r = b.op(n.op, n.fanins.map((f) => map[f]!));
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
  // A node goes on the stack once, when first marked (so the stack never exceeds the nodes).
  const stack = new Int32Array(nodes.length);
  let sp = 0;
  const mark = (id: number) => {
    if (live[id]) return;
    live[id] = 1;
    stack[sp++] = id;
  };
  for (const p of g.outputs) mark(p.node);
  for (const id of cutIds) mark(id);
  while (sp > 0) {
    const fanins = nodes[stack[--sp]!]!.fanins;
    for (let i = 0; i < fanins.length; i++) mark(fanins[i]!);
  }
  for (const p of g.inputs) live[p.node] = 1;
  return live;
}
