// Feedback: find the loops of a logic graph and choose the signals that store state.
// A loop is cut at named signals only (every loop passes through an assigned signal), so the
// stored state is named exactly as the source names it.
import type { LogicGraph } from "./graph.js";

export interface LoopAnalysis {
  /** Node ids chosen as loop cut points (state signals), in ascending id order. */
  cuts: number[];
  /** Strongly connected groups of nodes that contain a loop, each listed by node id. */
  groups: number[][];
}

/** Tarjan's strongly connected components, iterative (the work stack in flat arrays). */
export function stronglyConnected(g: LogicGraph): number[][] {
  const n = g.nodes.length;
  const index = new Int32Array(n).fill(-1);
  const low = new Int32Array(n);
  const onStack = new Uint8Array(n);
  const stack = new Int32Array(n);
  let sp = 0;
  const comps: number[][] = [];
  let counter = 0;
  // The depth-first walk: node and next operand position per level.
  const workV = new Int32Array(n);
  const workI = new Int32Array(n);
  let wp = 0;
  for (let root = 0; root < n; root++) {
    if (index[root] !== -1) continue;
    workV[wp] = root;
    workI[wp++] = 0;
    index[root] = low[root] = counter++;
    stack[sp++] = root;
    onStack[root] = 1;
    while (wp > 0) {
      const v = workV[wp - 1]!;
      const fanins = g.nodes[v]!.fanins;
      const i = workI[wp - 1]!;
      if (i < fanins.length) {
        workI[wp - 1] = i + 1;
        const w = fanins[i]!;
        if (index[w] === -1) {
          index[w] = low[w] = counter++;
          stack[sp++] = w;
          onStack[w] = 1;
          workV[wp] = w;
          workI[wp++] = 0;
        } else if (onStack[w]) {
          low[v] = Math.min(low[v]!, index[w]!);
        }
      } else {
        wp--;
        if (wp > 0) {
          const parent = workV[wp - 1]!;
          low[parent] = Math.min(low[parent]!, low[v]!);
        }
        if (low[v] === index[v]) {
          const comp: number[] = [];
          let w: number;
          do {
            w = stack[--sp]!;
            onStack[w] = 0;
            comp.push(w);
          } while (w !== v);
          comps.push(comp);
        }
      }
    }
  }
  return comps;
}

/**
 * Chooses loop cut points: within each loop group, repeatedly breaks a remaining cycle at a
 * named node, preferring the signal assigned earliest in the source (then the lowest id).
 */
export function analyzeLoops(g: LogicGraph, preferred?: ReadonlySet<number>): LoopAnalysis {
  const groups = stronglyConnected(g).filter(
    (c) => c.length > 1 || g.nodes[c[0]!]!.fanins.includes(c[0]!),
  );
  const cuts = new Set<number>();
  for (const group of groups) {
    const inGroup = new Set(group);
    // Named candidates in a stable order: preferred first, then source order.
    const candidates = group
      .filter((id) => g.nodes[id]!.name !== undefined)
      .sort((a, b) => {
        const pa = preferred?.has(a) ? 0 : 1;
        const pb = preferred?.has(b) ? 0 : 1;
        if (pa !== pb) return pa - pb;
        const sa = g.nodes[a]!.span?.start ?? Infinity;
        const sb = g.nodes[b]!.span?.start ?? Infinity;
        return sa - sb || a - b;
      });
    for (const c of candidates) {
      if (!hasCycle(g, inGroup, cuts)) break;
      // Cut c only if c lies on a remaining cycle.
      if (onCycle(g, c, inGroup, cuts)) cuts.add(c);
    }
    if (hasCycle(g, inGroup, cuts)) {
      // Unnamed loop (cannot come from source text, only from a transformation): cut anywhere.
      for (const id of group) {
        if (!hasCycle(g, inGroup, cuts)) break;
        if (onCycle(g, id, inGroup, cuts)) cuts.add(id);
      }
    }
  }
  return { cuts: [...cuts].sort((a, b) => a - b), groups };
}

function onCycle(g: LogicGraph, start: number, within: Set<number>, cuts: Set<number>): boolean {
  // Is `start` reachable from itself through nodes of `within` that are not cut?
  const seen = new Set<number>();
  const stack = [...g.nodes[start]!.fanins];
  while (stack.length) {
    const v = stack.pop()!;
    if (v === start) return true;
    if (!within.has(v) || cuts.has(v) || seen.has(v)) continue;
    seen.add(v);
    for (const each of g.nodes[v]!.fanins) stack.push(each);
  }
  return false;
}

function hasCycle(g: LogicGraph, within: Set<number>, cuts: Set<number>): boolean {
  // Kahn's algorithm on the sub-graph with cut nodes' fanin edges removed.
  const indeg = new Map<number, number>();
  for (const v of within) indeg.set(v, 0);
  for (const v of within) {
    if (cuts.has(v)) continue;
    for (const f of g.nodes[v]!.fanins) if (within.has(f)) indeg.set(v, indeg.get(v)! + 1);
  }
  // Edge direction here: fanin f -> v. Count of v's in-group fanins.
  const users = new Map<number, number[]>();
  for (const v of within) {
    if (cuts.has(v)) continue;
    for (const f of g.nodes[v]!.fanins) if (within.has(f)) {
      if (!users.has(f)) users.set(f, []);
      users.get(f)!.push(v);
    }
  }
  const queue = [...within].filter((v) => indeg.get(v) === 0);
  let removed = 0;
  while (queue.length) {
    const v = queue.pop()!;
    removed++;
    for (const u of users.get(v) ?? []) {
      const d = indeg.get(u)! - 1;
      indeg.set(u, d);
      if (d === 0) queue.push(u);
    }
  }
  return removed < within.size;
}

/**
 * Evaluation order of all nodes with the cut nodes' incoming loop edges ignored: every node
 * comes after its fanins, except that a cut node's value is read from the state.
 * Returns undefined if the graph still has a loop (cuts insufficient).
 */
export function evaluationOrder(g: LogicGraph, cuts: ReadonlySet<number>): number[] | undefined {
  const nodes = g.nodes;
  const n = nodes.length;
  const indeg = new Int32Array(n);
  // Readers of each node as flat lists (start[f] .. start[f + 1]), in ascending reader order.
  const start = new Int32Array(n + 1);
  const isCut = new Uint8Array(n);
  for (const c of cuts) if (c >= 0 && c < n) isCut[c] = 1;
  for (let v = 0; v < n; v++) {
    if (isCut[v]) continue;
    const fanins = nodes[v]!.fanins;
    indeg[v] = fanins.length;
    for (let i = 0; i < fanins.length; i++) start[fanins[i]! + 1]!++;
  }
  for (let f = 0; f < n; f++) start[f + 1]! += start[f]!;
  const fill = start.slice(0, n);
  const users = new Int32Array(start[n]!);
  for (let v = 0; v < n; v++) {
    if (isCut[v]) continue;
    const fanins = nodes[v]!.fanins;
    for (let i = 0; i < fanins.length; i++) users[fill[fanins[i]!]!++] = v;
  }
  const queue = new Int32Array(n);
  let tail = 0;
  for (let v = 0; v < n; v++) if (indeg[v] === 0) queue[tail++] = v;
  let head = 0;
  while (head < tail) {
    const v = queue[head++]!;
    const end = start[v + 1]!;
    for (let k = start[v]!; k < end; k++) {
      const u = users[k]!;
      if (--indeg[u]! === 0) queue[tail++] = u;
    }
  }
  if (tail !== n) return undefined;
  const order: number[] = new Array(n);
  for (let k = 0; k < n; k++) order[k] = queue[k]!;
  return order;
}
