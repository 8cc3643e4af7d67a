// The logic graph: one node per operation, signals by name, loops allowed (stored state).
import type { Span } from "../diagnostics/index.js";

export type LogicOp = "input" | "const0" | "const1" | "buf" | "not" | "and" | "or" | "xor";

export interface LogicNode {
  op: LogicOp;
  /** Node ids of the operands. `buf` and `not` have one; `and`/`or`/`xor` two or more. */
  fanins: number[];
  /** Source signal name carried by this node (inputs, outputs, internal signals). */
  name?: string;
  /** Where the signal was assigned (or declared, for inputs). */
  span?: Span;
}

export interface Port {
  name: string;
  node: number;
  span?: Span;
}

/** Points where a named signal's value is free, as cubes over input names (see
 *  src/logic/dontcares.ts for when they may be used). */
export interface DontCareSet {
  /** Name of the assigned signal. */
  signal: string;
  /** Input names the cubes are written over (first = leftmost character). */
  variables: string[];
  /** One character per variable: '0', '1' or '-'. */
  cubes: string[];
}

export interface LogicGraph {
  name: string;
  file?: string;
  nodes: LogicNode[];
  inputs: Port[];
  outputs: Port[];
  /** Don't-cares of the source (absent when there are none). */
  dontCares?: DontCareSet[];
}

/** Number of operands each node is read by, and by which nodes. */
export function fanouts(g: LogicGraph): number[][] {
  const fo: number[][] = g.nodes.map(() => []);
  g.nodes.forEach((n, id) => {
    for (const f of n.fanins) fo[f]!.push(id);
  });
  return fo;
}

/** Ids of the nodes reachable backwards from `roots`, stopping at (and including) `stops`. */
export function coneOf(g: LogicGraph, roots: readonly number[], stops?: ReadonlySet<number>): number[] {
  const seen = new Uint8Array(g.nodes.length);
  const out: number[] = [];
  const stack = [...roots];
  while (stack.length) {
    const id = stack.pop()!;
    if (seen[id]) continue;
    seen[id] = 1;
    out.push(id);
    if (stops?.has(id) && !roots.includes(id)) continue;
    for (const f of g.nodes[id]!.fanins) if (!seen[f]) stack.push(f);
  }
  return out;
}
