// The mapping's parts counted without building the netlist (src/map/tally.ts) against the
// netlist the mapper builds (src/map/map.ts) tallied part by part (tallyParts): the optimizer
// prices graphs by the count, so it must be the mapping's exactly, for every family, fan-in
// and fan-out limit and cost model, including designs with heavy fan-out (cells duplicated and
// buffers added) and outputs that share a net or are inputs or constants.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { buildLogicGraph, seededRandom, type LogicGraph } from "../../src/logic/index.js";
import { optimizeLogic } from "../../src/optimize/index.js";
import { GraphBuilder } from "../../src/optimize/builder.js";
import { dtlCostModel, mapToCells, nand2CostModel, tallyMapping, tallyParts, type CellChoice, type CostModel, type MapOptions } from "../../src/map/index.js";
import { limitFanin } from "../../src/map/fanin.js";
import { exprArb, sourceOf } from "../support/exprs.js";

const NAMES = ["a", "b", "c", "d", "e"];
const MODELS: CostModel[] = [dtlCostModel(), nand2CostModel(), dtlCostModel({ transistor: 3, diode: 2, resistor: 1 })];

function expectSameTally(g: LogicGraph, opts: MapOptions): void {
  const m = mapToCells(g, opts);
  expect(m.value).toBeDefined();
  const counted = tallyMapping(g, opts);
  expect(counted).toEqual(tallyParts(m.value!, opts.costModel));
}

/** A layered random graph with heavy fan-out (a few early nodes read by many), some outputs
 *  on inputs, on constants and on the same node twice. */
function fanoutGraph(seed: number, gates: number): LogicGraph {
  const rand = seededRandom(seed);
  const b = new GraphBuilder();
  const ins = Array.from({ length: 6 }, (_, i) => b.input(`i${i}`));
  const pool = [...ins];
  for (let k = 0; k < gates; k++) {
    const fanin = 2 + (rand() % 5);
    const args: number[] = [];
    for (let j = 0; j < fanin; j++) {
      const hot = rand() % 3 === 0;
      const x = pool[hot ? rand() % Math.min(pool.length, 8) : rand() % pool.length]!;
      args.push(rand() % 4 === 0 ? b.not(x) : x);
    }
    const kind = rand() % 5;
    pool.push(kind === 0 ? b.xor(args.slice(0, 2)) : kind % 2 ? b.and(args) : b.or(args));
  }
  const outs = pool.slice(-5);
  const outputs = [...outs, outs[0]!, ins[1]!, b.constant(1), b.not(ins[2]!)].map((node, i) => ({ name: `y${i}`, node }));
  return { name: "fanout", nodes: b.nodes, inputs: ins.map((node, i) => ({ name: `i${i}`, node })), outputs };
}

describe("counted tally equals the built netlist's tally", () => {
  it("random expressions, every family, fan-in and fan-out limit", () => {
    fc.assert(
      fc.property(fc.array(exprArb(NAMES), { minLength: 1, maxLength: 4 }), fc.constantFrom<CellChoice>("mixed", "nand", "nor"), fc.constantFrom(2, 3, 8), fc.constantFrom(0, 2, 3, 8), fc.constantFrom(0, 1, 2), (exprs, cells, maxFanin, maxFanout, model) => {
        const g = buildLogicGraph(sourceOf("t", NAMES, exprs.map((e, i) => [`y${i}`, e]))).value!;
        const opts: MapOptions = { stateNames: [], maxFanin, maxFanout, cells, costModel: MODELS[model]! };
        expectSameTally(g, opts);
        expectSameTally(optimizeLogic(g, { stateNames: [], maxFanin }), opts);
      }),
      { numRuns: 200, seed: 5 },
    );
  });

  it("graphs with heavy fan-out (duplicated cells and buffers), small and above the family-trial size", () => {
    for (const [seed, gates] of [
      [1, 60],
      [2, 300],
      [3, 4000],
    ] as const) {
      const g = fanoutGraph(seed, gates);
      for (const cells of ["mixed", "nand", "nor"] as const)
        for (const maxFanout of [0, 2, 4, 8])
          for (const costModel of MODELS) expectSameTally(g, { stateNames: [], maxFanin: gates > 1000 ? 8 : 3, maxFanout, cells, costModel });
    }
  });

  it("a copy of a cell adds loads to the nets it reads, which may then be split in turn", () => {
    // x is read by three gates (over a limit of 2): a copy of x is cheaper than a buffer, and
    // the copy reads a and b once more, which puts a over the limit.
    const b = new GraphBuilder();
    const [a, bb, c, d] = ["a", "b", "c", "d"].map((x) => b.input(x)) as [number, number, number, number];
    const x = b.and([a, bb]);
    const outs = [b.or([x, c]), b.or([x, d]), b.xor([x, c]), b.and([a, d])];
    const g: LogicGraph = { name: "copies", nodes: b.nodes, inputs: [a, bb, c, d].map((node, i) => ({ name: "abcd"[i]!, node })), outputs: outs.map((node, i) => ({ name: `y${i}`, node })) };
    const opts: MapOptions = { stateNames: [], maxFanin: 4, maxFanout: 2, cells: "nand", costModel: dtlCostModel() };
    const m = mapToCells(g, opts);
    expect(m.diagnostics.map((d) => d.message).join(" ")).toMatch(/[1-9]\d* cells? duplicated/);
    expectSameTally(g, opts);
  });

  it("a graph split again under another fan-in limit gets that limit's split, not the last one", () => {
    // limitFanin hands out its last split of a graph again; the oracle is the split of a fresh
    // copy of the graph (nothing kept for it) and, for the tally, the full mapping.
    const g = fanoutGraph(5, 200);
    for (const maxFanin of [3, 8, 3, 2]) {
      const split = limitFanin(g, [], maxFanin);
      expect(split).toEqual(limitFanin({ ...g }, [], maxFanin));
      expect(Math.max(...split.nodes.map((n) => n.fanins.length))).toBeLessThanOrEqual(maxFanin);
      expectSameTally(g, { stateNames: [], maxFanin, maxFanout: 4, cells: "mixed", costModel: dtlCostModel() });
    }
  });

  it("is not counted where the count could differ from the mapping: wired-AND, state signals, fractional weights", () => {
    const g = fanoutGraph(4, 40);
    expect(tallyMapping(g, { stateNames: [], maxFanin: 4, wiredAnd: true })).toBeUndefined();
    expect(tallyMapping(g, { stateNames: [], maxFanin: 4, costModel: dtlCostModel({ transistor: 4.1, diode: 1, resistor: 1 }) })).toBeUndefined();
    const b = new GraphBuilder();
    const a = b.input("a");
    const q = b.placeholder("q");
    b.bind(q, b.or([a, b.not(q)]));
    const looped: LogicGraph = { name: "loop", nodes: b.nodes, inputs: [{ name: "a", node: a }], outputs: [{ name: "y", node: q }] };
    expect(tallyMapping(looped, { stateNames: ["q"], maxFanin: 4 })).toBeUndefined();
  });
});
