// Pass: functional constant propagation and merging of equivalent nodes. Nodes are simulated
// on seeded random vectors; nodes with the same signature (or complementary ones), and nodes
// that look constant, are compared exhaustively over their joint support (up to
// sweepMaxVariables variables) and merged into the earlier one (or its complement, or the
// constant) when they agree everywhere. This finds what structural hashing cannot see, such as
// (a & b) | (a & !b) and a. Logic that feeds a loop is not merged (its terms may be there to
// cover hazards).
import type { LogicGraph } from "../logic/graph.js";
import { seededRandom } from "../logic/evaluate.js";
import { runWordProgram, wordProgram } from "../logic/words.js";
import { rebuildWith, type Replacement } from "./builder.js";
import { limitsOf, type PassContext } from "./context.js";
import { constant, lit } from "./form.js";
import { graphFacts, simulateOver, stateConeNodes, supportOf } from "./tables.js";

const WORDS = 32;
/** Most candidate pairs proved exhaustively per pass (when the signatures are random ones). */
const MAX_PROOFS = 300;

export function sweepEquivalent(g: LogicGraph, ctx: PassContext): LogicGraph {
  const L = limitsOf(ctx);
  const f = graphFacts(g, ctx.stateNames);
  const inState = stateConeNodes(f);
  // With few free variables the signatures are the functions themselves (every point):
  // equal signatures need no further proof.
  const exact = f.free.size <= L.sweepMaxVariables;
  const freeIds = [...f.free].sort((a, b) => a - b);
  let words = WORDS;
  let values: (Uint32Array | undefined)[];
  if (exact) {
    const sim = simulateOver(f, freeIds, [...g.outputs.map((p) => p.node), ...f.cuts]);
    words = sim.words;
    values = sim.values;
    // Only the first 2^n points mean anything when n < 5: the rest repeat them.
    if (freeIds.length < 5) {
      const mask = (2 ** (2 ** freeIds.length) - 1) >>> 0;
      values = values.map((w) => (w ? Uint32Array.from(w, (x) => (x & mask) >>> 0) : w));
    }
  } else {
    // One flat buffer for the whole graph (src/logic/words.ts); each node's words a view.
    const rand = seededRandom(0x51eed);
    const slotOf = new Int32Array(g.nodes.length);
    for (let id = 0; id < g.nodes.length; id++) slotOf[id] = id;
    const freeVar = new Int32Array(g.nodes.length).fill(-1);
    for (const id of f.free) freeVar[id] = 0;
    const program = wordProgram(g, f.order, slotOf, freeVar);
    const buf = new Uint32Array(g.nodes.length * WORDS);
    for (const id of f.free) for (let k = 0; k < WORDS; k++) buf[id * WORDS + k] = rand();
    runWordProgram(program, buf, WORDS);
    values = g.nodes.map((_, id) => buf.subarray(id * WORDS, (id + 1) * WORDS));
  }
  let proofs = 0;
  const classes = new Map<string, number>();
  const replacements = new Map<number, Replacement>();
  const isGate = (id: number) => {
    const op = g.nodes[id]!.op;
    return op === "and" || op === "or" || op === "xor" || op === "not";
  };
  const smallMask = exact && freeIds.length < 5 ? (2 ** (2 ** freeIds.length) - 1) >>> 0 : 0xffffffff;
  const keyOf = (w: Uint32Array, flip: boolean) => Array.from(w, (x) => ((flip ? ~x : x) & smallMask) >>> 0).join(",");
  const zeroKey = keyOf(new Uint32Array(words), false);
  for (const id of f.order) {
    const w = values[id];
    if (!w) continue;
    const flip = (w[0]! & 1) === 1;
    const key = keyOf(w, flip);
    const rep = classes.get(key);
    const isCandidate = isGate(id) && !inState[id] && !f.cuts.has(id);
    if (isCandidate && exact && (rep !== undefined || key === zeroKey)) {
      // Exhaustive signatures: equal means equivalent.
      if (key === zeroKey) replacements.set(id, { form: constant(flip ? 1 : 0), leaves: [] });
      else replacements.set(id, { form: lit(0, flip !== ((values[rep!]![0]! & 1) === 1)), leaves: [rep!] });
      continue;
    }
    if (isCandidate && !exact && proofs < MAX_PROOFS && (rep !== undefined || key === zeroKey)) {
      proofs++;
      const target = key === zeroKey ? undefined : rep!;
      const sup = new Set(supportOf(f, id, undefined, L.sweepMaxVariables) ?? []);
      const sup2 = target !== undefined ? supportOf(f, target, undefined, L.sweepMaxVariables) : [];
      if (supportOf(f, id, undefined, L.sweepMaxVariables) && sup2) {
        for (const v of sup2) sup.add(v);
        if (sup.size <= L.sweepMaxVariables) {
          const vars = [...sup].sort((a, b) => a - b);
          const roots = target !== undefined ? [id, target] : [id];
          const sim = simulateOver(f, vars, roots);
          const a = sim.values[id]!;
          const mask = vars.length < 5 ? (2 ** (2 ** vars.length) - 1) >>> 0 : 0xffffffff;
          let same = true;
          if (target === undefined) {
            const c = flip ? 0xffffffff : 0;
            for (let k = 0; k < sim.words && same; k++) if (((a[k]! ^ c) & mask) >>> 0) same = false;
            if (same) {
              replacements.set(id, { form: constant(flip ? 1 : 0), leaves: [] });
              continue;
            }
          } else {
            const bw = sim.values[target]!;
            const repFlip = (values[target]![0]! & 1) === 1;
            const neg = flip !== repFlip;
            for (let k = 0; k < sim.words && same; k++) if (((a[k]! ^ (neg ? ~bw[k]! : bw[k]!)) & mask) >>> 0) same = false;
            if (same) {
              replacements.set(id, { form: lit(0, neg), leaves: [target] });
              continue;
            }
          }
        }
      }
    }
    if (rep === undefined) classes.set(key, id);
  }
  if (replacements.size === 0) return g;
  return rebuildWith(g, ctx.stateNames, replacements);
}
