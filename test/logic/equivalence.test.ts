// The equivalence check against a reference written independently here: each output of both
// graphs evaluated vector by vector, by recursion over the nodes, over every input combination
// (the definition of combinational equivalence; common practice). Random graphs and random
// one-gate mutations of them (fast-check); cones above the exhaustive limit or beyond the work
// budget are reported as partial.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { checkEquivalence, partialCheckText } from "../../src/logic/equivalence.js";
import type { LogicGraph, LogicNode, LogicOp } from "../../src/logic/graph.js";

interface Spec {
  inputs: number;
  gates: { op: LogicOp; fanins: number[] }[];
  outputs: number[];
}

function toGraph(s: Spec): LogicGraph {
  const nodes: LogicNode[] = [];
  for (let i = 0; i < s.inputs; i++) nodes.push({ op: "input", fanins: [], name: `x${i}` });
  for (const g of s.gates) nodes.push({ op: g.op, fanins: g.fanins });
  return {
    name: "t",
    nodes,
    inputs: Array.from({ length: s.inputs }, (_, i) => ({ name: `x${i}`, node: i })),
    outputs: s.outputs.map((n, i) => ({ name: `y${i}`, node: n })),
  };
}

/** Value of node `id` for input vector `v` (bit i = input i), by plain recursion. */
function valueAt(g: LogicGraph, id: number, v: number, memo: Map<number, 0 | 1>): 0 | 1 {
  const hit = memo.get(id);
  if (hit !== undefined) return hit;
  const n = g.nodes[id]!;
  const ins = n.fanins.map((f) => valueAt(g, f, v, memo));
  let r: 0 | 1;
  switch (n.op) {
    case "input":
      r = ((v >>> id) & 1) as 0 | 1;
      break;
    case "const0":
      r = 0;
      break;
    case "const1":
      r = 1;
      break;
    case "buf":
      r = ins[0]!;
      break;
    case "not":
      r = ins[0] ? 0 : 1;
      break;
    case "and":
      r = ins.every((x) => x === 1) ? 1 : 0;
      break;
    case "or":
      r = ins.some((x) => x === 1) ? 1 : 0;
      break;
    case "xor":
      r = (ins.reduce<number>((a, x) => a ^ x, 0) & 1) as 0 | 1;
      break;
  }
  memo.set(id, r);
  return r;
}

function outputsAt(g: LogicGraph, v: number): (0 | 1)[] {
  const memo = new Map<number, 0 | 1>();
  return g.outputs.map((p) => valueAt(g, p.node, v, memo));
}

function referenceEquivalent(a: LogicGraph, b: LogicGraph): boolean {
  for (let v = 0; v < 2 ** a.inputs.length; v++) if (outputsAt(a, v).join() !== outputsAt(b, v).join()) return false;
  return true;
}

const ops: LogicOp[] = ["and", "or", "xor", "not", "buf"];

const specArb: fc.Arbitrary<Spec> = fc.integer({ min: 1, max: 7 }).chain((inputs) =>
  fc
    .array(fc.record({ op: fc.constantFrom(...ops), a: fc.nat(), b: fc.nat(), c: fc.nat(), wide: fc.boolean() }), { minLength: 1, maxLength: 14 })
    .chain((raw) => {
      const gates = raw.map((r, k) => {
        const avail = inputs + k;
        const one = r.a % avail;
        if (r.op === "not" || r.op === "buf") return { op: r.op, fanins: [one] };
        const fanins = [one, r.b % avail];
        if (r.wide) fanins.push(r.c % avail);
        return { op: r.op, fanins };
      });
      const total = inputs + gates.length;
      return fc.array(fc.integer({ min: 0, max: total - 1 }), { minLength: 1, maxLength: 4 }).map((outputs) => ({ inputs, gates, outputs }));
    }),
);

/** One gate changed: its operation or one operand. */
function mutate(s: Spec, which: number, to: number): Spec {
  const gates = s.gates.map((g) => ({ op: g.op, fanins: [...g.fanins] }));
  const k = which % gates.length;
  const g = gates[k]!;
  if (g.fanins.length >= 2 && to % 2 === 0) g.op = g.op === "and" ? "or" : g.op === "or" ? "xor" : "and";
  else g.fanins[to % g.fanins.length] = (to >>> 1) % (s.inputs + k);
  return { ...s, gates };
}

describe("checkEquivalence against vector-by-vector evaluation", () => {
  it("gives the reference's verdict on random graphs and one-gate mutations (exhaustive cones)", () => {
    fc.assert(
      fc.property(specArb, fc.nat(), fc.nat(), (spec, which, to) => {
        const a = toGraph(spec);
        const b = toGraph(mutate(spec, which, to));
        const eq = checkEquivalence(a, b, { stateNames: [] });
        expect(eq.equivalent).toBe(referenceEquivalent(a, b));
        if (eq.equivalent) expect(eq.complete).toBe(true);
        else {
          // The counterexample is a real difference at the vector it names.
          const cx = eq.counterexample!;
          const v = Object.entries(cx.assignment).reduce((acc, [name, bit]) => acc | (bit << Number(name.slice(1))), 0);
          const k = Number(cx.name.slice(1));
          expect(outputsAt(a, v)[k]).toBe(cx.expected);
          expect(outputsAt(b, v)[k]).toBe(cx.actual);
          expect(cx.expected).not.toBe(cx.actual);
        }
      }),
      { numRuns: 400, seed: 7 },
    );
  });

  it("finds the same differences with the shared random vectors when every cone is above the exhaustive limit", () => {
    // At most 7 variables: 128 points against 16,384 random vectors, so a difference at one
    // point is missed with probability (127/128)^16384 ≈ e^-128.
    fc.assert(
      fc.property(specArb, fc.nat(), fc.nat(), (spec, which, to) => {
        const a = toGraph(spec);
        const b = toGraph(mutate(spec, which, to));
        const eq = checkEquivalence(a, b, { stateNames: [], maxExhaustiveSupport: 0 });
        expect(eq.equivalent).toBe(referenceEquivalent(a, b));
        if (!eq.equivalent) {
          const cx = eq.counterexample!;
          const v = Object.entries(cx.assignment).reduce((acc, [name, bit]) => acc | (bit << Number(name.slice(1))), 0);
          expect(outputsAt(b, v)[Number(cx.name.slice(1))]).toBe(cx.actual);
          expect(cx.expected).not.toBe(cx.actual);
        }
      }),
      { numRuns: 200, seed: 11 },
    );
  });
});

describe("partial checks are reported", () => {
  // y0 = parity of 24 inputs: 24 free variables, above the exhaustive limit of 20.
  const wide: Spec = { inputs: 24, gates: [{ op: "xor", fanins: Array.from({ length: 24 }, (_, i) => i) }, { op: "and", fanins: [0, 1] }], outputs: [24, 25] };
  const g = toGraph(wide);

  it("a cone with more than 20 free variables is checked with random vectors and marked partial", () => {
    const eq = checkEquivalence(g, g, { stateNames: [] });
    expect(eq.equivalent).toBe(true);
    expect(eq.complete).toBe(false);
    expect(eq.cones.map((c) => [c.name, c.support, c.exhaustive])).toEqual([
      ["y0", 24, false],
      ["y1", 2, true],
    ]);
    expect(eq.cones[0]!.limitedBy).toBeUndefined();
    expect(partialCheckText(eq)).toBe("the logic check was partial: 1 output or state cone has more than 20 free variables and was checked with 16384 random vectors each");
  });

  it("a cone beyond the work budget is checked with random vectors and says so", () => {
    const eq = checkEquivalence(g, g, { stateNames: [], maxExhaustiveWork: 0 });
    expect(eq.cones.map((c) => [c.name, c.exhaustive, c.limitedBy])).toEqual([
      ["y0", false, undefined],
      ["y1", false, "work"],
    ]);
    expect(partialCheckText(eq)).toMatch(/1 output or state cone has more than 20 free variables, and 1 output or state cone was not enumerated because the exhaustive check's work budget was spent and were checked with 16384 random vectors each/);
  });

  it("a difference in a wide cone is still found by the random vectors", () => {
    const wrong = toGraph({ ...wide, gates: [{ op: "xor", fanins: Array.from({ length: 23 }, (_, i) => i) }, wide.gates[1]!] });
    const eq = checkEquivalence(g, wrong, { stateNames: [] });
    expect(eq.equivalent).toBe(false);
    expect(eq.counterexample!.name).toBe("y0");
    // x23 alone tells the two apart: the parities differ exactly when it is 1.
    expect(eq.counterexample!.assignment.x23).toBe(1);
  });
});
