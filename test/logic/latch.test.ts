// Stored state: a cross-coupled NAND SR latch (the textbook latch; common practice) is found as
// a loop, cut at its named signals, mapped onto two NAND-2 cells, and simulated step by step.
import { describe, expect, it } from "vitest";
import { analyzeLoops, buildLogicGraph, checkEquivalence, StepSimulator } from "../../src/logic/index.js";
import { optimizeLogic } from "../../src/optimize/index.js";
import { cellsToLogic, mapToCells } from "../../src/map/index.js";
import type { Expr } from "../../src/syntax/index.js";
import { sourceOf } from "../support/exprs.js";

const s = { start: 0, length: 0 };
const ref = (name: string): Expr => ({ kind: "ref", name, span: s });
const nand = (...args: Expr[]): Expr => ({ kind: "not", arg: { kind: "and", args, span: s }, span: s });

function latch() {
  const src = sourceOf("sr", ["s_n", "r_n"], [
    ["q", nand(ref("s_n"), ref("qn"))],
    ["qn", nand(ref("r_n"), ref("q"))],
  ]);
  // Give the two assignments distinct positions so the cut order is defined by the source.
  src.assignments[0]!.targetSpan = { start: 10, length: 1 };
  src.assignments[1]!.targetSpan = { start: 20, length: 2 };
  return buildLogicGraph(src).value!;
}

describe("SR latch from cross-coupled NANDs", () => {
  it("finds one loop and cuts it at a named signal", () => {
    const g = latch();
    const loops = analyzeLoops(g);
    expect(loops.groups.length).toBe(1);
    expect(loops.cuts.map((c) => g.nodes[c]!.name)).toEqual(["q"]);
  });

  it("maps onto two NAND-2 cells, equivalent at the state signal", () => {
    const g = latch();
    const stateNames = analyzeLoops(g).cuts.map((c) => g.nodes[c]!.name!);
    const opt = optimizeLogic(g, { stateNames, maxFanin: 8 });
    const m = mapToCells(opt, { stateNames, maxFanin: 8, cells: "nand" }).value!;
    expect(m.cells.length).toBe(2);
    expect(m.cells.every((c) => c.fn === "nand" && c.inputs.length === 2)).toBe(true);
    expect(m.nets[m.stateNets[0]!]!.name).toBe("q");
    const eq = checkEquivalence(g, cellsToLogic(m), { stateNames });
    expect(eq.equivalent).toBe(true);
    expect(eq.complete).toBe(true);
  });

  it("sets, holds, resets and holds; both inputs low forces q = qn = 1 (active-low SR latch, common practice)", () => {
    const sim = new StepSimulator(latch());
    expect(sim.step([1, 1]).outputs).toEqual(["X", "X"]); // unknown until set or reset
    expect(sim.step([0, 1]).outputs).toEqual([1, 0]); // set
    expect(sim.step([1, 1]).outputs).toEqual([1, 0]); // hold
    expect(sim.step([1, 0]).outputs).toEqual([0, 1]); // reset
    expect(sim.step([1, 1]).outputs).toEqual([0, 1]); // hold
    expect(sim.step([0, 0]).outputs).toEqual([1, 1]); // both active
    // Releasing both at once is a race: the simulator must not claim a value.
    const r = sim.step([1, 1]);
    expect(r.outputs).toEqual(["X", "X"]);
    expect(r.settled).toBe(false);
  });
});
