// The large-design way of the optimizer (src/optimize/index.ts): above a node count the passes
// are priced by a structural estimate and the result is mapped once and kept only if it costs no
// more than the logic as written; the passes that search by whole-graph pricing are left out
// when their work budget allows too few evaluations. Checked here with the threshold
// lowered, on a generated random network: the optimized logic computes the source's logic (the
// equivalence check, itself checked against vector-by-vector evaluation in
// test/logic/equivalence.test.ts), it is no dearer than the logic as written, and the report
// says the large-design way was taken.
import { describe, expect, it } from "vitest";
import { buildLogicGraph, checkEquivalence } from "../../src/logic/index.js";
import { optimizeDesign } from "../../src/optimize/index.js";
import { dtlCostModel } from "../../src/map/index.js";
import { parseVerilog } from "../../src/parse/verilog.js";
import { randomNetwork } from "../bench/designs.js";

function network(gates: number) {
  const p = parseVerilog(randomNetwork(gates, { inputs: 10, seed: 3 }), "rnd.v");
  expect(p.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  return buildLogicGraph(p.value!).value!;
}

describe("large designs", () => {
  const g = network(150);
  const opts = { stateNames: [], maxFanin: 8, cells: "mixed" as const, costModel: dtlCostModel(), wiredAnd: false };

  it("above the threshold: every pass priced structurally, the result mapped once, no dearer, and said so", () => {
    const r = optimizeDesign(g, { ...opts, largeDesignNodes: 100 });
    expect(g.nodes.length).toBeGreaterThan(100);
    expect(r.report.after.cost).toBeLessThanOrEqual(r.report.before.cost);
    expect(r.report.passes.map((p) => p.pass)).toContain("resubstitute");
    const note = r.report.notes.find((n) => n.kind === "heuristic" && n.pass === "optimize");
    expect(note?.message).toMatch(/^a large design \(\d+ nodes, more than 100\): the passes were priced by a structural estimate/);
    expect(checkEquivalence(g, r.graph, { stateNames: [] }).equivalent).toBe(true);
  });

  it("too small a work budget: the searching passes are left out, the local ones run, and said so", () => {
    const r = optimizeDesign(g, { ...opts, workPerPass: 100 });
    expect(r.report.passes.map((p) => p.pass)).toEqual(["simplify", "inverters", "flatten", "sweep", "collapse regions", "xor-expand", "factor", "flatten"]);
    const note = r.report.notes.find((n) => n.kind === "limit" && n.message.includes("left out"));
    expect(note?.message).toMatch(/collapse, resubstitute, extract left out/);
    expect(checkEquivalence(g, r.graph, { stateNames: [] }).equivalent).toBe(true);
  });

  it("below it: every pass, priced by mapping, and no such note", () => {
    const r = optimizeDesign(g, opts);
    expect(r.report.passes.map((p) => p.pass)).toContain("resubstitute");
    expect(r.report.notes.some((n) => n.message.includes("priced by a structural estimate"))).toBe(false);
    expect(checkEquivalence(g, r.graph, { stateNames: [] }).equivalent).toBe(true);
  });

  // The NAND-only fallback of synthesize() takes the mixed run's passes when they did not look
  // at the cell families. The shortcut must give what a whole second run gives.
  it("priced again for other families: the same graph, report and diagnostics as a second run", () => {
    for (const extra of [{ largeDesignNodes: 100 }, { level: 0 as const }]) {
      const mixed = optimizeDesign(g, { ...opts, ...extra });
      expect(mixed.forCells).toBeDefined();
      const again = mixed.forCells!("nand");
      const fresh = optimizeDesign(g, { ...opts, ...extra, cells: "nand" });
      expect(again.graph).toEqual(fresh.graph);
      expect(again.report).toEqual(fresh.report);
      expect(again.diagnostics).toEqual(fresh.diagnostics);
      expect(again.report.mapping.cells).toBe("nand");
      // The prices are the NAND mapping's, not the mixed one's.
      expect(again.report.before).not.toEqual(mixed.report.before);
    }
  });

  it("below the threshold the passes priced by mapping onto the families: no shortcut", () => {
    expect(optimizeDesign(g, opts).forCells).toBeUndefined();
  });
});
