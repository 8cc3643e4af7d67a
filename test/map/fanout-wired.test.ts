// Fan-out legalization, wired-AND and the DTL part model of the mapper.
//   - No net drives more loads than the limit after mapping; the cells still compute the logic
//     (equivalence check), and loops keep their state signals.
//   - Wired-AND (open-collector outputs tied to one collector resistor, so the node is the AND
//     of the tied outputs: "collector dotting", common practice for DTL): equivalent, and
//     never dearer than without.
//   - Part counts of the basic cells as the textbook draws them (Millman & Halkias, Integrated
//     Electronics, ch. 6, ex. 6-5: k input diodes, two level-shift diodes, R_P, R_B, R_C and one
//     transistor for a NAND-k); NOR-k as src/cells/nor draws it (k input diodes, one level-shift
//     diode, R_B, R_C, one transistor).
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { analyzeLoops, buildLogicGraph, checkEquivalence } from "../../src/logic/index.js";
import { parseEquations } from "../../src/parse/equations.js";
import { cellParts, cellsToLogic, dtlCostModel, mapToCells, nand2CostModel, tallyParts, type MapOptions } from "../../src/map/index.js";
import { exprArb, sourceOf } from "../support/exprs.js";

function graphOf(text: string) {
  const g = buildLogicGraph(parseEquations(text, "t.logic").value!).value!;
  return { g, stateNames: analyzeLoops(g).cuts.map((c) => g.nodes[c]!.name!) };
}

function maxLoads(nl: { nets: { loads: unknown[] }[] }): number {
  return Math.max(0, ...nl.nets.map((n) => n.loads.length));
}

describe("fan-out legalization", () => {
  const wide = (k: number) => {
    const names = Array.from({ length: k }, (_, i) => `b${i}`);
    return `input a, ${names.join(", ")}; output ${names.map((_, i) => `y${i}`).join(", ")};\n${names.map((b, i) => `y${i} = !(a & ${b});`).join("\n")}`;
  };

  it("buffers an input read by 20 cells so that no net has more than 8 loads", () => {
    const { g } = graphOf(wide(20));
    const m = mapToCells(g, { stateNames: [], maxFanin: 8, cells: "nand" });
    const nl = m.value!;
    expect(maxLoads(nl)).toBeLessThanOrEqual(8);
    expect(nl.maxFanout).toBe(8);
    expect(m.diagnostics.map((d) => d.code)).toContain("GW4003");
    expect(checkEquivalence(g, cellsToLogic(nl), { stateNames: [] }).equivalent).toBe(true);
    // Without a limit the input drives all 20.
    const free = mapToCells(g, { stateNames: [], maxFanin: 8, cells: "nand", maxFanout: 0 }).value!;
    expect(maxLoads(free)).toBe(20);
  });

  it("duplicates a cell when a copy is cheaper than buffers (two-input-NAND count)", () => {
    // t = !(a & b) read by 20 cells: one more NAND2 (1) per 8 loads beats two inverters (2).
    const names = Array.from({ length: 20 }, (_, i) => `c${i}`);
    const text = `input a, b, ${names.join(", ")}; output ${names.map((_, i) => `y${i}`).join(", ")};\nt = !(a & b);\n${names.map((c, i) => `y${i} = !(t & ${c});`).join("\n")}`;
    const { g } = graphOf(text);
    const nl = mapToCells(g, { stateNames: [], maxFanin: 2, cells: "nand", costModel: nand2CostModel() }).value!;
    expect(maxLoads(nl)).toBeLessThanOrEqual(8);
    const copies = nl.cells.filter((c) => c.inputs.length === 2 && c.inputs.every((x) => ["a", "b"].includes(nl.nets[x]!.name)));
    expect(copies.length).toBe(3);
    expect(checkEquivalence(g, cellsToLogic(nl), { stateNames: [] }).equivalent).toBe(true);
  });

  it("keeps a latch's state signal while buffering its loads", () => {
    const names = Array.from({ length: 12 }, (_, i) => `y${i}`);
    const text = `input s_n, r_n, ${names.map((_, i) => `e${i}`).join(", ")}; output q, ${names.join(", ")};\nq = !(s_n & qn);\nqn = !(r_n & q);\n${names.map((y, i) => `${y} = !(q & e${i});`).join("\n")}`;
    const { g, stateNames } = graphOf(text);
    expect(stateNames).toEqual(["q"]);
    const nl = mapToCells(g, { stateNames, maxFanin: 8, cells: "nand", maxFanout: 4 }).value!;
    expect(maxLoads(nl)).toBeLessThanOrEqual(4);
    expect(nl.nets[nl.stateNets[0]!]!.name).toBe("q");
    expect(checkEquivalence(g, cellsToLogic(nl), { stateNames }).equivalent).toBe(true);
  });

  it("refuses a limit of 1 (GW4002)", () => {
    const { g } = graphOf("input a; output y; y = !a;");
    expect(mapToCells(g, { stateNames: [], maxFanin: 8, maxFanout: 1 }).diagnostics.map((d) => d.code)).toEqual(["GW4002"]);
  });
});

describe("wired-AND", () => {
  it("ties three NAND outputs for an AND of NANDs: three cells and two resistors fewer", () => {
    const { g } = graphOf("input a, b, c, d, e, f; output y; y = !(a & b) & !(c & d) & !(e & f);");
    const opts: MapOptions = { stateNames: [], maxFanin: 8, cells: "nand" };
    const plain = mapToCells(g, opts).value!;
    const m = mapToCells(g, { ...opts, wiredAnd: true });
    const wired = m.value!;
    expect(m.diagnostics.map((d) => d.code)).toContain("GW4004");
    expect(wired.cells.length).toBe(3);
    expect(wired.cells.filter((c) => c.tiedOutput).length).toBe(2);
    const y = wired.nets[wired.outputs[0]!.net]!;
    expect(y.tiedCells?.length).toBe(2);
    expect(checkEquivalence(g, cellsToLogic(wired), { stateNames: [] }).equivalent).toBe(true);
    const tp = tallyParts(plain);
    const tw = tallyParts(wired);
    expect(tw.parts).toBeLessThan(tp.parts);
    expect(tw.resistors).toBe(3 * 3 - 2);
  });

  it("random expressions stay equivalent with wired-AND, and never cost more", () => {
    const NAMES = ["a", "b", "c", "d", "e"];
    for (const cells of ["nand", "mixed"] as const) {
      fc.assert(
        fc.property(fc.array(exprArb(NAMES), { minLength: 1, maxLength: 3 }), (exprs) => {
          const g = buildLogicGraph(sourceOf("t", NAMES, exprs.map((e, i) => [`y${i}`, e]))).value!;
          const opts: MapOptions = { stateNames: [], maxFanin: 3, cells };
          const a = mapToCells(g, opts).value!;
          const b = mapToCells(g, { ...opts, wiredAnd: true }).value!;
          expect(checkEquivalence(g, cellsToLogic(b), { stateNames: [] }).equivalent).toBe(true);
          expect(tallyParts(b).cost).toBeLessThanOrEqual(tallyParts(a).cost);
        }),
        { numRuns: 80, seed: 11 },
      );
    }
  });
});

describe("part model of the basic cells", () => {
  it("NAND-k: k + 2 diodes, 3 resistors, 1 transistor (Millman & Halkias ex. 6-5); NOR-k: k + 1 diodes, 2 resistors, 1 transistor", () => {
    for (const k of [1, 2, 3, 8]) {
      expect(cellParts("nand", k)).toEqual({ transistors: 1, diodes: k + 2, resistors: 3 });
      expect(cellParts("nor", k)).toEqual({ transistors: 1, diodes: k + 1, resistors: 2 });
    }
    // Default weights: a transistor four parts' worth (ours).
    expect(dtlCostModel().cellCost("nand", 2)).toBe(4 + 4 + 3);
    expect(dtlCostModel({ transistor: 1, diode: 1, resistor: 1 }).cellCost("nor", 3)).toBe(1 + 4 + 2);
    // Two-input-NAND count: a k-input cell is k - 1 two-input gates, an inverter one.
    expect(nand2CostModel().cellCost("nand", 1)).toBe(1);
    expect(nand2CostModel().cellCost("nand", 4)).toBe(3);
  });
});
