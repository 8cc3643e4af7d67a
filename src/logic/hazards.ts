// Static hazards in the logic that feeds a loop, by ternary simulation (Eichelberger, "Hazard
// detection in combinational and sequential switching circuits", IBM J. Res. Dev. 9, 1965):
// for two input vectors that differ in one variable and give the same value, the changing
// variable is set to X (unknown, "in transition") and the network evaluated in three-valued
// logic; an X at the output means some gate delays let the output glitch. In a loop a glitch
// can be captured: a latch written as a multiplexer, q = d·en + q·!en, drops its 1 when en
// falls unless the consensus term d·q is there (Unger, Asynchronous Switching Circuits;
// common practice).
import type { LogicGraph, LogicOp } from "./graph.js";
import { evaluationOrder } from "./loops.js";
import { evalTri, type Tri } from "./evaluate.js";

/** Largest support of one cone checked (2^n vectors, n variables each). */
export const MAX_HAZARD_SUPPORT = 14;

export interface StaticHazard {
  /** The signal whose next value may glitch (a loop's state signal or a kept net). */
  signal: string;
  /** The variable whose change causes it. */
  variable: string;
  /** The other variables of the cone, held during the change. */
  held: Record<string, 0 | 1>;
  /** The value the signal should keep. */
  value: 0 | 1;
  /** For a static-1 hazard: a product term (prime implicant of the next-value function) that
   *  covers both vectors, literals as [name, value]. */
  cover?: [string, 0 | 1][];
}

export interface HazardReport {
  hazards: StaticHazard[];
  /** Signals whose cones were too large to check. */
  skipped: string[];
}

/**
 * Checks the next-value cone of each signal in `signals` (names of nodes that are cut points:
 * their values are read from the previous state). The cone's variables are the primary inputs
 * and every node named in `boundary` (all cut points and kept nets). At most one hazard per
 * (signal, variable) pair is reported.
 */
export function findStaticHazards(g: LogicGraph, signals: readonly string[], boundary: readonly string[]): HazardReport {
  const byName = new Map<string, number>();
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined && !byName.has(n.name)) byName.set(n.name, id);
  });
  const boundaryIds = new Set<number>();
  for (const b of boundary) {
    const id = byName.get(b);
    if (id !== undefined && g.nodes[id]!.op !== "input") boundaryIds.add(id);
  }
  const order = evaluationOrder(g, boundaryIds);
  if (!order) throw new Error("findStaticHazards: a loop is not broken at the boundary");
  const pos = new Int32Array(g.nodes.length);
  order.forEach((id, k) => (pos[id] = k));
  // One scratch array of values for all cones: each cone writes its own nodes before reading.
  const values: Tri[] = new Array(g.nodes.length).fill("X");
  const inputIds = new Set(g.inputs.map((p) => p.node));
  const hazards: StaticHazard[] = [];
  const skipped: string[] = [];

  for (const s of signals) {
    const root = byName.get(s);
    if (root === undefined || !boundaryIds.has(root)) continue;
    // The cone of the root's operation, stopping at inputs and boundary nodes.
    const inCone = new Set<number>();
    const vars: number[] = [];
    const stack = [...g.nodes[root]!.fanins];
    while (stack.length) {
      const id = stack.pop()!;
      if (inCone.has(id)) continue;
      inCone.add(id);
      if (inputIds.has(id) || boundaryIds.has(id)) {
        vars.push(id);
        continue;
      }
      for (const each of g.nodes[id]!.fanins) stack.push(each);
    }
    vars.sort((a, b) => a - b);
    if (vars.length > MAX_HAZARD_SUPPORT) {
      skipped.push(s);
      continue;
    }
    const varIndex = new Map(vars.map((v, i) => [v, i]));
    const coneOrder = [...inCone].filter((id) => !varIndex.has(id)).sort((a, b) => pos[a]! - pos[b]!);
    const evaluate = (assign: (i: number) => Tri): Tri => {
      vars.forEach((v, i) => (values[v] = assign(i)));
      for (const id of coneOrder) {
        const n = g.nodes[id]!;
        values[id] = evalTri(n.op, n.fanins.map((f) => values[f]!));
      }
      const r = g.nodes[root]!;
      return evalTri(r.op, r.fanins.map((f) => values[f]!));
    };
    const count = 2 ** vars.length;
    const f = new Uint8Array(count);
    for (let v = 0; v < count; v++) f[v] = evaluate((i) => ((v >>> i) & 1) as 0 | 1) === 1 ? 1 : 0;
    const reported = new Set<number>();
    for (let i = 0; i < vars.length; i++) {
      if (reported.has(i)) continue;
      for (let v = 0; v < count; v++) {
        if ((v >>> i) & 1) continue;
        const w = v | (1 << i);
        if (f[v] !== f[w]) continue;
        const t = evaluate((j) => (j === i ? "X" : (((v >>> j) & 1) as 0 | 1)));
        if (t !== "X") continue;
        const held: Record<string, 0 | 1> = {};
        vars.forEach((id, j) => {
          if (j !== i) held[g.nodes[id]!.name ?? `#${id}`] = ((v >>> j) & 1) as 0 | 1;
        });
        const h: StaticHazard = { signal: s, variable: g.nodes[vars[i]!]!.name ?? `#${vars[i]}`, held, value: f[v] as 0 | 1 };
        if (f[v] === 1) h.cover = primeCover(f, vars.length, v, i).map(([j, b]) => [g.nodes[vars[j]!]!.name ?? `#${vars[j]}`, b]);
        hazards.push(h);
        reported.add(i);
        break;
      }
    }
  }
  return { hazards, skipped };
}

/** A prime implicant of the ON-set `f` containing vectors v and v with bit i flipped: the cube
 *  of v without variable i, with literals dropped while the cube stays inside the ON-set. */
function primeCover(f: Uint8Array, n: number, v: number, i: number): [number, 0 | 1][] {
  let care = ((1 << n) - 1) & ~(1 << i);
  const inside = (careMask: number): boolean => {
    const free: number[] = [];
    for (let j = 0; j < n; j++) if (!((careMask >>> j) & 1)) free.push(j);
    for (let k = 0; k < 2 ** free.length; k++) {
      let x = v & careMask;
      free.forEach((j, b) => {
        if ((k >>> b) & 1) x |= 1 << j;
      });
      if (!f[x]) return false;
    }
    return true;
  };
  for (let j = 0; j < n; j++) {
    if (!((care >>> j) & 1)) continue;
    const trial = care & ~(1 << j);
    if (inside(trial)) care = trial;
  }
  const lits: [number, 0 | 1][] = [];
  for (let j = 0; j < n; j++) if ((care >>> j) & 1) lits.push([j, ((v >>> j) & 1) as 0 | 1]);
  return lits;
}

/** A product term as an expression of the equation language: `d & q`, `!a & b`. */
export function termText(lits: readonly [string, 0 | 1][]): string {
  return lits.length ? lits.map(([n, b]) => (b ? n : `!${n}`)).join(" & ") : "1";
}
