// Don't-cares of a logic graph: which of them may be used, and their points as words.
//
// A signal's don't-care points are free only where nothing else sees the value: the signal is a
// primary output, it is not a state signal, no node of the graph reads it and no other output is
// the same node. Don't-cares of any other signal are ignored (its value as written stands),
// because a changed value there would change the signals that read it. Optimizers may change a
// usable output's value at its don't-care points; the equivalence check treats them as free.
import type { DontCareSet, LogicGraph } from "./graph.js";

export interface DontCareUse {
  /** Usable don't-cares by output name. */
  usable: Map<string, DontCareSet>;
  /** Don't-cares that cannot be used, with the reason. */
  ignored: { set: DontCareSet; reason: string }[];
}

/** Sorts the graph's don't-cares into usable (by output name) and ignored ones. */
export function dontCareUse(g: LogicGraph, stateNames: readonly string[]): DontCareUse {
  const usable = new Map<string, DontCareSet>();
  const ignored: DontCareUse["ignored"] = [];
  if (!g.dontCares?.length) return { usable, ignored };
  const readers = new Int32Array(g.nodes.length);
  for (const n of g.nodes) for (const f of n.fanins) readers[f]!++;
  const portsOfNode = new Map<number, number>();
  for (const p of g.outputs) portsOfNode.set(p.node, (portsOfNode.get(p.node) ?? 0) + 1);
  const inputNames = new Set(g.inputs.map((p) => p.name));
  const states = new Set(stateNames);
  for (const set of g.dontCares) {
    const port = g.outputs.find((p) => p.name === set.signal);
    let reason: string | undefined;
    if (!port) reason = "it is not an output";
    else if (states.has(set.signal)) reason = "it stores state";
    else if (readers[port.node]! > 0) reason = "other logic reads it";
    else if (portsOfNode.get(port.node)! > 1) reason = "another output is the same signal";
    else if (!set.variables.every((v) => inputNames.has(v))) reason = "its variables are not all inputs";
    if (reason !== undefined) {
      ignored.push({ set, reason });
      continue;
    }
    const prev = usable.get(set.signal);
    if (prev && prev.variables.join(",") === set.variables.join(",")) {
      usable.set(set.signal, { ...prev, cubes: [...prev.cubes, ...set.cubes] });
    } else if (prev) {
      ignored.push({ set, reason: "it has don't-cares over two different variable lists" });
    } else usable.set(set.signal, set);
  }
  return { usable, ignored };
}

/** Usable don't-cares by output name (see dontCareUse). */
export function usableDontCares(g: LogicGraph, stateNames: readonly string[]): Map<string, DontCareSet> {
  return dontCareUse(g, stateNames).usable;
}

/**
 * Words (32 points each) with a 1 at every don't-care point, given the words of each variable.
 * A variable without words reads as 0.
 */
export function dontCareWords(set: DontCareSet, wordsOf: (name: string) => Uint32Array | undefined, words: number): Uint32Array {
  const out = new Uint32Array(words);
  const zero = new Uint32Array(words);
  const vars = set.variables.map((v) => wordsOf(v) ?? zero);
  const term = new Uint32Array(words);
  for (const cube of set.cubes) {
    term.fill(0xffffffff);
    for (let i = 0; i < vars.length; i++) {
      const c = cube.charCodeAt(i);
      if (c === 45 /* - */) continue;
      const x = vars[i]!;
      if (c === 49 /* 1 */) for (let w = 0; w < words; w++) term[w] = term[w]! & x[w]!;
      else for (let w = 0; w < words; w++) term[w] = term[w]! & ~x[w]!;
    }
    for (let w = 0; w < words; w++) out[w] = (out[w]! | term[w]!) >>> 0;
  }
  return out;
}

/** Is the point given by input values a don't-care point of the set? */
export function isDontCarePoint(set: DontCareSet, valueOf: (name: string) => 0 | 1): boolean {
  const vals = set.variables.map(valueOf);
  return set.cubes.some((cube) => {
    for (let i = 0; i < vals.length; i++) {
      const c = cube[i];
      if (c === "-") continue;
      if ((c === "1" ? 1 : 0) !== vals[i]) return false;
    }
    return true;
  });
}

/**
 * For each input vector (values in the graph's input order), which outputs are at a usable
 * don't-care point there (their value is free: a testbench should not check it). Undefined when
 * the graph has no usable don't-cares.
 */
export function dontCareMask(g: LogicGraph, stateNames: readonly string[], vectors: readonly (readonly (0 | 1)[])[]): boolean[][] | undefined {
  const usable = usableDontCares(g, stateNames);
  if (usable.size === 0) return undefined;
  const index = new Map(g.inputs.map((p, i) => [p.name, i]));
  return vectors.map((v) => g.outputs.map((p) => {
    const set = usable.get(p.name);
    return set ? isDontCarePoint(set, (name) => v[index.get(name)!] ?? 0) : false;
  }));
}
