// The optimization levels and the report: --opt 0 maps the logic as written, each level is no
// dearer than the one below (the optimizer keeps a pass's work only when it is cheaper), the
// report's figures are the mapped netlists' own, and the notes say where a heuristic was used,
// where a limit was reached and which don't-cares could not be used.
import { describe, expect, it } from "vitest";
import { checkEquivalence, seededRandom, type LogicGraph } from "../../src/logic/index.js";
import { optimizeDesign, optimizeLogic } from "../../src/optimize/index.js";
import { GraphBuilder } from "../../src/optimize/builder.js";
import { dtlCostModel, tallyParts } from "../../src/map/index.js";
import { DTL, graphOf, synth } from "./support.js";

const ADDER = "input a, b, cin; output s, cout; s = a ^ b ^ cin; cout = a & b | a & cin | b & cin;";

function randomFunction(n: number, seed: number): LogicGraph {
  const b = new GraphBuilder();
  const xs = Array.from({ length: n }, (_, i) => b.input(`x${i}`));
  const rand = seededRandom(seed);
  const terms: number[] = [];
  for (let p = 0; p < 2 ** n; p++) {
    if (rand() % 4 !== 0) continue; // a quarter of the points on
    terms.push(b.and(xs.map((x, i) => ((p >> i) & 1 ? x : b.not(x)))));
  }
  const y = b.or(terms);
  return { name: "r", nodes: b.nodes, inputs: xs.map((node, i) => ({ name: `x${i}`, node })), outputs: [{ name: "y", node: y }] };
}

describe("optimization levels", () => {
  it("level 0 is the logic as written; levels 1 and 2 are no dearer, and the report says so", () => {
    const costs: number[] = [];
    for (const level of [0, 1, 2] as const) {
      const b = synth(ADDER, DTL, level);
      expect(b.eq.equivalent).toBe(true);
      expect(b.report.level).toBe(level);
      const own = tallyParts(b.netlist, DTL.costModel);
      expect(b.report.after).toEqual(own);
      costs.push(own.cost);
      if (level === 0) {
        expect(b.report.before).toEqual(b.report.after);
        expect(b.report.passes).toEqual([]);
      }
      expect(b.report.after.cost).toBeLessThanOrEqual(b.report.before.cost);
      for (const p of b.report.passes) if (p.accepted) expect(p.costAfter).toBeLessThanOrEqual(p.costBefore);
    }
    expect(costs[1]).toBeLessThanOrEqual(costs[0]!);
    expect(costs[2]).toBeLessThanOrEqual(costs[1]!);
    expect(costs[2]).toBeLessThan(costs[0]!);
  });

  it("optimizeLogic still returns just the graph", () => {
    const { g } = graphOf(ADDER);
    const out = optimizeLogic(g, { stateNames: [], maxFanin: 8 });
    expect(checkEquivalence(g, out, { stateNames: [] }).equivalent).toBe(true);
  });

  it("reports parts: a NAND-k has k + 2 diodes, three resistors and a transistor; a NOR-k k + 1 diodes and two resistors (Millman & Halkias ch. 6 topology; src/cells/nor)", () => {
    const b = synth("input a, b, c; output y; y = !(a & b & c);", { ...DTL, cells: "nand" }, 0);
    expect(b.report.before).toMatchObject({ cells: 1, transistors: 1, diodes: 5, resistors: 3, parts: 9 });
    const n = synth("input a, b; output y; y = !(a | b);", { ...DTL, cells: "nor" }, 0);
    expect(n.report.before).toMatchObject({ cells: 1, transistors: 1, diodes: 3, resistors: 2, parts: 6 });
  });
});

describe("notes: heuristics, limits, unused don't-cares", () => {
  it("a function beyond the exact limit is minimized by the heuristic, with a note; the result is equivalent", () => {
    // The limit lowered to 6 variables so that a small function crosses it.
    const g = randomFunction(8, 3);
    const r = optimizeDesign(g, { stateNames: [], maxFanin: 8, limits: { exactMaxVariables: 6 } });
    expect(r.report.twoLevel.heuristic).toBe(1);
    expect(r.report.notes.some((n) => n.kind === "heuristic" && n.signal === "y")).toBe(true);
    expect(r.diagnostics.some((d) => d.code === "GW3006")).toBe(true);
    expect(r.report.after.cost).toBeLessThan(r.report.before.cost);
    expect(checkEquivalence(g, r.graph, { stateNames: [] }).equivalent).toBe(true);
  });

  it("an output of more than 16 variables is not collapsed, with a note", () => {
    const names = Array.from({ length: 18 }, (_, i) => `x${i}`);
    const { g } = graphOf(`input ${names.join(", ")}; output y; y = ${names.join(" ^ ")};`);
    const r = optimizeDesign(g, { stateNames: [], maxFanin: 8 });
    expect(r.report.twoLevel.keptAsWritten).toBe(1);
    expect(r.report.notes.some((n) => n.kind === "limit" && n.signal === "y")).toBe(true);
    expect(checkEquivalence(g, r.graph, { stateNames: [] }).equivalent).toBe(true);
  });

  it("don't-cares of an output that other logic reads are not used (GW3005), and the value as written stands", () => {
    const { g } = graphOf("input a, b; output f, z; f(a, b) = m(1) + d(3); z = f & a;");
    const r = optimizeDesign(g, { stateNames: [], maxFanin: 8, costModel: dtlCostModel() });
    expect(r.diagnostics.map((d) => d.code)).toContain("GW3005");
    // Checked with no don't-cares at all: equal everywhere.
    expect(checkEquivalence(g, r.graph, { stateNames: [], dontCares: new Map() }).equivalent).toBe(true);
  });
});
