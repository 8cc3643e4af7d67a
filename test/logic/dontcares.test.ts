// Don't-cares in the logic graph: carried from the design source by buildLogicGraph, used only
// where no other logic sees the value (an output read by nothing else), and treated as free
// points by the equivalence check. Reference: the meaning of a don't-care in an incompletely
// specified function (either value is acceptable there; common practice).
import { describe, expect, it } from "vitest";
import { buildLogicGraph, checkEquivalence, dontCareMask, dontCareUse, type LogicGraph } from "../../src/logic/index.js";
import { parseEquations } from "../../src/parse/equations.js";
import type { DesignSource } from "../../src/syntax/index.js";

function graph(text: string): LogicGraph {
  const p = parseEquations(text, "t.logic");
  expect(p.diagnostics).toEqual([]);
  return buildLogicGraph(p.value!).value!;
}

describe("don't-cares in the logic graph", () => {
  it("are carried over by name, over input names", () => {
    const g = graph("input a, b, c; output f; f(a, b, c) = m(1, 3, 5) + d(6, 7);");
    expect(g.dontCares).toEqual([{ signal: "f", variables: ["a", "b", "c"], cubes: ["110", "111"] }]);
  });

  it("built from a source whose variables are not inputs: GW2016", () => {
    const p = parseEquations("input a; output f; f = a;", "t.logic").value!;
    const src: DesignSource = { ...p, dontCares: [{ target: "f", targetSpan: { start: 0, length: 1 }, variables: [{ name: "zz", span: { start: 0, length: 0 } }], cubes: ["1"], span: { start: 0, length: 1 } }] };
    const r = buildLogicGraph(src);
    expect(r.diagnostics.map((d) => d.code)).toEqual(["GW2016"]);
    expect(r.value).toBeUndefined();
  });

  it("are usable only for outputs no logic reads", () => {
    const g = graph("input a, b; output f, g, h; f(a, b) = m(1) + d(3); g(a, b) = m(2) + d(0); h = g & a;");
    const use = dontCareUse(g, []);
    expect([...use.usable.keys()]).toEqual(["f"]);
    expect(use.ignored.map((x) => [x.set.signal, x.reason])).toEqual([["g", "other logic reads it"]]);
  });
});

describe("equivalence with don't-cares", () => {
  const spec = graph("input a, b, c; output f; f(a, b, c) = m(1, 3, 5) + d(7);");
  // c alone agrees with f everywhere except at the don't-care point 7 (a=b=c=1).
  const justC = graph("input a, b, c; output f; f = c & (a | !a) & (b | !b);");
  const wrong = graph("input a, b, c; output f; f = c & !a;");

  it("treats the don't-care points of the reference as free, and counts them", () => {
    const eq = checkEquivalence(spec, justC, { stateNames: [] });
    expect(eq.equivalent).toBe(true);
    expect(eq.complete).toBe(true);
    expect(eq.cones[0]!.dontCarePoints).toBe(1);
  });

  it("still finds a difference at a point that is specified, never at a don't-care point", () => {
    const eq = checkEquivalence(spec, wrong, { stateNames: [] });
    expect(eq.equivalent).toBe(false);
    // f = c & !a differs from Σm(1,3,5) at minterm 5 (a=1 b=0 c=1).
    expect(eq.counterexample).toMatchObject({ name: "f", assignment: { a: 1, b: 0, c: 1 }, expected: 1, actual: 0 });
  });

  it("with the don't-cares switched off, the point is compared", () => {
    expect(checkEquivalence(spec, justC, { stateNames: [], dontCares: new Map() }).equivalent).toBe(false);
  });

  it("also in the random check above the exhaustive limit", () => {
    expect(checkEquivalence(spec, justC, { stateNames: [], maxExhaustiveSupport: 2 }).equivalent).toBe(true);
    expect(checkEquivalence(spec, wrong, { stateNames: [], maxExhaustiveSupport: 2 }).equivalent).toBe(false);
  });

  it("marks the steps of a testbench where an output is free", () => {
    const mask = dontCareMask(spec, [], [[0, 0, 0], [1, 1, 1], [1, 0, 1]])!;
    expect(mask).toEqual([[false], [true], [false]]);
    expect(dontCareMask(graph("input a; output y; y = a;"), [], [[0]])).toBeUndefined();
  });
});
