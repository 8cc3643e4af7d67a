// Test support: text → logic graph → optimized → mapped, with the pieces the pipeline uses.
import { expect } from "vitest";
import { parseEquations } from "../../src/parse/equations.js";
import { analyzeLoops, buildLogicGraph, checkEquivalence, type EquivalenceResult, type LogicGraph } from "../../src/logic/index.js";
import { optimizeDesign, type OptimizationReport, type OptLevel } from "../../src/optimize/index.js";
import { dtlCostModel, mapToCells, nand2CostModel, tallyParts, type CellChoice, type CellNetlist, type CostModel, cellsToLogic } from "../../src/map/index.js";

export interface Target {
  cells: CellChoice;
  maxFanin: number;
  costModel: CostModel;
  maxFanout?: number;
  wiredAnd?: boolean;
}

/** Two-input NAND cells only, priced as a two-input-NAND count. */
export const NAND2: Target = { cells: "nand", maxFanin: 2, costModel: nand2CostModel() };
/** The tool's defaults: mixed NAND/NOR, fan-in 8, DTL parts. */
export const DTL: Target = { cells: "mixed", maxFanin: 8, costModel: dtlCostModel() };

export interface Built {
  g: LogicGraph;
  stateNames: string[];
  optimized: LogicGraph;
  netlist: CellNetlist;
  report: OptimizationReport;
  eq: EquivalenceResult;
}

export function graphOf(text: string, file = "t.logic"): { g: LogicGraph; stateNames: string[] } {
  const p = parseEquations(text, file);
  expect(p.diagnostics.filter((d) => d.severity === "error"), JSON.stringify(p.diagnostics)).toEqual([]);
  const b = buildLogicGraph(p.value!);
  expect(b.value, JSON.stringify(b.diagnostics)).toBeDefined();
  const g = b.value!;
  return { g, stateNames: analyzeLoops(g).cuts.map((c) => g.nodes[c]!.name!) };
}

export function synth(text: string, target: Target, level: OptLevel = 2): Built {
  const { g, stateNames } = graphOf(text);
  const opts = { stateNames, maxFanin: target.maxFanin, cells: target.cells, costModel: target.costModel, ...(target.maxFanout !== undefined ? { maxFanout: target.maxFanout } : {}), wiredAnd: !!target.wiredAnd };
  const r = optimizeDesign(g, { ...opts, level });
  const m = mapToCells(r.graph, opts);
  expect(m.value).toBeDefined();
  const netlist = m.value!;
  const eq = checkEquivalence(g, cellsToLogic(netlist), { stateNames });
  return { g, stateNames, optimized: r.graph, netlist, report: r.report, eq };
}

export function partsOf(b: Built, model: CostModel): number {
  return tallyParts(b.netlist, model).cost;
}
