// Each optimization pass on its own (src/optimize/, one pass a file): on random expressions the
// result computes the same function (our equivalence check, and the syntax tree evaluated
// directly by test/support/exprs.ts; Boolean algebra, common practice), and each pass does its
// own job on a small case whose answer is known by hand.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { buildLogicGraph, checkEquivalence, truthTable, type LogicGraph } from "../../src/logic/index.js";
import {
  collapseTwoLevel,
  expandXors,
  extractCommon,
  factorNodes,
  flattenTrees,
  minimizeInverters,
  resubstitute,
  simplifyLogic,
  sweepEquivalent,
} from "../../src/optimize/index.js";
import { countInverters } from "../../src/optimize/inverters.js";
import { structuralCost } from "../../src/optimize/context.js";
import { evalExpr, exprArb, sourceOf } from "../support/exprs.js";
import { graphOf } from "./support.js";

const NAMES = ["a", "b", "c", "d", "e"];
const ctx = { stateNames: [] as string[] };

const PASSES: [string, (g: LogicGraph) => LogicGraph][] = [
  ["simplify", (g) => simplifyLogic(g, [])],
  ["flatten", (g) => flattenTrees(g, [], 8)],
  ["inverters", (g) => minimizeInverters(g, ctx)],
  ["sweep", (g) => sweepEquivalent(g, ctx)],
  ["collapse (cones)", (g) => collapseTwoLevel(g, ctx)],
  ["collapse (regions)", (g) => collapseTwoLevel(g, { ...ctx, mode: "regions" })],
  ["xor-expand", (g) => expandXors(g, ctx)],
  ["resubstitute", (g) => resubstitute(g, ctx)],
  ["extract", (g) => extractCommon(g, ctx)],
  ["factor", (g) => factorNodes(g, ctx)],
];

describe("every pass keeps the function (random expressions, checked against direct evaluation)", () => {
  for (const [name, pass] of PASSES) {
    it(name, () => {
      fc.assert(
        fc.property(fc.array(exprArb(NAMES), { minLength: 1, maxLength: 3 }), (exprs) => {
          const g = buildLogicGraph(sourceOf("t", NAMES, exprs.map((e, i) => [`y${i}`, e]))).value!;
          const out = pass(g);
          expect(checkEquivalence(g, out, { stateNames: [] }).equivalent).toBe(true);
          const table = truthTable(out);
          for (let v = 0; v < 32; v++) {
            const env: Record<string, number> = {};
            NAMES.forEach((n, i) => (env[n] = (v >> i) & 1));
            exprs.forEach((e, k) => expect((table[k]![v >> 5]! >>> (v & 31)) & 1).toBe(evalExpr(e, env)));
          }
        }),
        { numRuns: 60, seed: 7 },
      );
    });
  }
});

/** Live gate nodes of a kind. */
function count(g: LogicGraph, op: string): number {
  const live = new Uint8Array(g.nodes.length);
  const stack = g.outputs.map((p) => p.node);
  while (stack.length) {
    const id = stack.pop()!;
    if (live[id]) continue;
    live[id] = 1;
    stack.push(...g.nodes[id]!.fanins);
  }
  return g.nodes.filter((n, id) => live[id] && n.op === op).length;
}

describe("what each pass does (worked by hand)", () => {
  it("simplify: constants fold and equal sub-expressions become one node", () => {
    const { g } = graphOf("input a, b, c; output y, z; y = (a & 1) | (b & 0) | (a & c); z = (c & a) | b;");
    const s = simplifyLogic(g, []);
    // y = a | (a & c) stays an OR of a and one AND; z's c & a is the same AND node.
    expect(count(s, "and")).toBe(1);
  });

  it("inverters: and(!a, !b, !c) needs one NOT instead of three (De Morgan)", () => {
    const { g } = graphOf("input a, b, c; output y; y = !a & !b & !c;");
    expect(countInverters(simplifyLogic(g, []))).toBe(3);
    expect(countInverters(minimizeInverters(g, ctx))).toBe(1);
  });

  it("sweep: (a & b) | (a & !b) is a, found by simulation and proved exhaustively", () => {
    const { g } = graphOf("input a, b; output y; y = (a & b) | (a & !b);");
    const s = sweepEquivalent(g, ctx);
    expect(s.nodes[s.outputs[0]!.node]!.op).toBe("input");
  });

  it("sweep, many variables: a constant found first folds its readers, which are then merged in the same pass", () => {
    // 22 inputs, more than sweepMaxVariables: the random-vector way. k = (a & b) & (a & !b) is 0
    // (Boolean algebra, common practice) over {a, b}; q = (k & w) | (x & y) | (x & !y), with w an
    // AND of 18 inputs, is x, but over all 22 variables it cannot be compared exhaustively:
    // only once k has been replaced by 0 (and k & w folded away) is q over {x, y}.
    const wide = Array.from({ length: 18 }, (_, i) => `i${i}`);
    const { g } = graphOf(
      `input a, b, x, y, ${wide.join(", ")}; output q; k = (a & b) & (a & !b); w = ${wide.join(" & ")}; q = (k & w) | (x & y) | (x & !y);`,
    );
    const s = sweepEquivalent(g, ctx);
    expect(s.inputs.find((p) => p.node === s.outputs[0]!.node)?.name).toBe("x");
    expect(checkEquivalence(g, s, { stateNames: [] }).equivalent).toBe(true);
  });

  it("collapse: a canonical sum becomes its minimum; don't-cares of an output are used", () => {
    const { g } = graphOf("input a, b; output y; y(a, b) = m(1, 3);"); // y = b
    const s = collapseTwoLevel(g, ctx);
    expect(s.nodes[s.outputs[0]!.node]!.op).toBe("input");
    expect(s.inputs.find((p) => p.node === s.outputs[0]!.node)!.name).toBe("b");
    // F(a,b,c) = Σm(1,3,5) + d(7) is c (a textbook case: the don't-care completes the cube).
    const dc = graphOf("input a, b, c; output f; f(a, b, c) = Σm(1, 3, 5) + d(7);");
    const dcs = new Map(dc.g.dontCares!.map((s) => [s.signal, s]));
    const out = collapseTwoLevel(dc.g, { stateNames: [], dontCares: dcs });
    const node = out.nodes[out.outputs[0]!.node]!;
    expect(node.op).toBe("input");
    expect(out.inputs.find((p) => p.node === out.outputs[0]!.node)!.name).toBe("c");
    expect(checkEquivalence(dc.g, out, { stateNames: [] }).equivalent).toBe(true);
    // Without the don't-care the point 7 must stay 0.
    expect(checkEquivalence(dc.g, out, { stateNames: [], dontCares: new Map() }).equivalent).toBe(false);
  });

  it("xor-expand: no XOR is left, four NAND-shaped ANDs for each two-input XOR", () => {
    const { g } = graphOf("input a, b, c; output y; y = a ^ b ^ c;");
    const s = expandXors(g, ctx);
    expect(count(s, "xor")).toBe(0);
    expect(count(s, "and")).toBe(8);
  });

  it("resubstitute: an output is rebuilt from a node another output already has", () => {
    // t = a ^ b is there; y = a'b + ab' + c is t + c.
    const { g } = graphOf("input a, b, c; output t, y; t = a ^ b; y = !a & b | a & !b | c;");
    const s = resubstitute(simplifyLogic(g, []), ctx);
    const y = s.nodes[s.outputs[1]!.node]!;
    expect(y.fanins).toContain(s.outputs[0]!.node);
    expect(structuralCost(s)).toBeLessThan(structuralCost(simplifyLogic(g, [])));
  });

  it("extract: the kernel a + b common to two sums becomes one node", () => {
    const { g } = graphOf("input a, b, c, d, e; output y, z; y = a & c | b & c | d; z = a & e | b & e;");
    const s = extractCommon(simplifyLogic(g, []), ctx);
    // One OR of a and b, read by both outputs' logic.
    const ors = s.nodes.map((n, id) => ({ n, id })).filter(({ n }) => n.op === "or" && n.fanins.length === 2 && n.fanins.every((f) => s.nodes[f]!.op === "input"));
    expect(ors.length).toBe(1);
    expect(structuralCost(s)).toBeLessThan(structuralCost(simplifyLogic(g, [])));
  });

  it("factor: ab + ac + ad becomes a(b + c + d)", () => {
    const { g } = graphOf("input a, b, c, d; output y; y = a & b | a & c | a & d;");
    const s = factorNodes(simplifyLogic(g, []), ctx);
    const y = s.nodes[s.outputs[0]!.node]!;
    expect(y.op).toBe("and");
    expect(count(s, "or")).toBe(1);
  });
});
