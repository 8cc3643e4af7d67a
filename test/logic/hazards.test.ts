// Static hazards by ternary simulation (Eichelberger, IBM J. Res. Dev. 9, 1965), and the
// hazard cover of logic that feeds a loop kept through optimization and mapping.
//
// Textbook facts (common practice; e.g. Unger, Asynchronous Switching Circuits, and the
// hazard chapter of Roth, Fundamentals of Logic Design):
// - f = a·b + !a·c has a static-1 hazard when a changes with b = c = 1; the consensus term b·c
//   removes it.
// - A latch written as a multiplexer, q = d·en + q·!en, has that hazard when en changes with
//   d = q = 1, and can drop its 1 when en falls; the consensus term d·q keeps it.
// - A two-level sum of products has no static-0 hazard for a single input change.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { buildLogicGraph, findStaticHazards, termText, type LogicGraph } from "../../src/logic/index.js";
import { parseEquations } from "../../src/parse/equations.js";
import { cellsToLogic } from "../../src/map/index.js";
import { synthesize } from "../../src/pipeline/synthesize.js";

function graphOf(text: string): LogicGraph {
  return buildLogicGraph(parseEquations(text, "t.logic").value!).value!;
}

describe("findStaticHazards", () => {
  it("a·b + !a·c: static-1 hazard on a with b = c = 1, covered by b·c; none once b·c is added", () => {
    const g = graphOf("input a, b, c; output f; f = a & b | !a & c;");
    const r = findStaticHazards(g, ["f"], ["f"]);
    expect(r.hazards).toHaveLength(1);
    const h = r.hazards[0]!;
    expect([h.variable, h.held, h.value]).toEqual(["a", { b: 1, c: 1 }, 1]);
    expect(termText(h.cover!)).toBe("b & c");
    const fixed = graphOf("input a, b, c; output f; f = a & b | !a & c | b & c;");
    expect(findStaticHazards(fixed, ["f"], ["f"]).hazards).toEqual([]);
  });

  it("the multiplexer latch: hazard on en with d = q = 1 without d·q, none with it", () => {
    const bad = findStaticHazards(graphOf("input d, en; output q; q = d & en | q & !en;"), ["q"], ["q"]);
    expect(bad.hazards.map((h) => [h.variable, h.held, termText(h.cover!)])).toEqual([["en", { d: 1, q: 1 }, "d & q"]]);
    const good = findStaticHazards(graphOf("input d, en; output q; q = d & en | q & !en | d & q;"), ["q"], ["q"]);
    expect(good.hazards).toEqual([]);
  });

  it("finds no static-0 hazard in a two-level sum of products, and does find the dual one in a product of sums", () => {
    const sop = findStaticHazards(graphOf("input a, b, c; output f; f = a & b | !a & c | b & c;"), ["f"], ["f"]);
    expect(sop.hazards.filter((h) => h.value === 0)).toEqual([]);
    // (a + b)(!a + c): static-0 hazard on a with b = c = 0 (the dual of the first example).
    const pos = findStaticHazards(graphOf("input a, b, c; output f; f = (a | b) & (!a | c);"), ["f"], ["f"]);
    expect(pos.hazards.map((h) => [h.variable, h.held, h.value])).toEqual([["a", { b: 0, c: 0 }, 0]]);
  });
});

describe("hazard cover kept for logic that feeds a loop", () => {
  const build = (file: string, cells: "mixed" | "nand" | "nor") =>
    synthesize(readFileSync(file, "utf8"), file, { maxFanin: 8, cells, sizing: { supplyVolts: 5 }, commandLine: "test" });

  for (const cells of ["mixed", "nand", "nor"] as const) {
    it(`the multiplexer latch with its consensus term stays hazard-free through optimization and mapping (cells ${cells})`, () => {
      const s = build("test/sequential/fixtures/mux_latch.logic", cells);
      expect(s.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
      expect(s.diagnostics.filter((d) => d.code === "GW3011")).toEqual([]);
      // Checked on the cells as built, independently of the pipeline's own check.
      const built = cellsToLogic(s.netlist!);
      expect(findStaticHazards(built, ["q"], s.keptNames!).hazards).toEqual([]);
    });
  }

  it("without the consensus term the pipeline warns (GW3011) and names the term to add", () => {
    const s = build("test/sequential/fixtures/mux_latch_hazard.logic", "nand");
    const w = s.diagnostics.filter((d) => d.code === "GW3011");
    expect(w).toHaveLength(1);
    expect(w[0]!.severity).toBe("warning");
    expect(w[0]!.message).toContain("'q' can glitch when 'en' changes while d = 1, q = 1");
    expect(w[0]!.hint).toContain("add the consensus term 'd & q'");
  });
});
