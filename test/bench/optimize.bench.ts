// Benchmark of the optimizer (run: npx tsx test/bench/optimize.bench.ts [runs]). Prints tables:
//   1. two-level minimization of seeded random functions of 8, 12 and 16 inputs (45 % of the
//      points on, 10 % don't-care): time and size of the result, exact and heuristic;
//   2. a generated 1,000-gate structural netlist (test/bench/designs.ts) and a few example
//      designs: DTL parts before and after each optimization level, and the time it took.
// Figures are medians of several runs. No assertion: the tests check correctness.
import { readFileSync } from "node:fs";
import { seededRandom } from "../../src/logic/index.js";
import { minimizeOne, DEFAULT_TWO_LEVEL_LIMITS } from "../../src/optimize/sop/minimize.js";
import { minimizeHeuristic } from "../../src/optimize/sop/heuristic.js";
import { coverMeetsSpec, coverSize, DC, OFF, ON, type Spec } from "../../src/optimize/sop/cube.js";
import { optimizeDesign, type OptLevel } from "../../src/optimize/index.js";
import { readDesign } from "../../src/pipeline/front.js";
import { arrayMultiplier, carryLookaheadAdder, randomNetwork } from "./designs.js";
import { checkEquivalence } from "../../src/logic/index.js";
import { cellsToLogic, mapToCells } from "../../src/map/index.js";
import { median, table } from "./format.js";

const RUNS = Number(process.argv[2] ?? 3);


function randomSpec(n: number, seed: number): Spec {
  const rand = seededRandom(seed);
  const s = new Uint8Array(2 ** n);
  for (let p = 0; p < s.length; p++) {
    const r = rand() % 100;
    s[p] = r < 10 ? DC : r < 55 ? ON : OFF;
  }
  return s;
}

// ---- 1. two-level minimization -------------------------------------------------------------
const twoLevelRows: (string | number)[][] = [];
for (const n of [8, 12, 16]) {
  for (const how of ["dispatch", "heuristic"] as const) {
    const times: number[] = [];
    const terms: number[] = [];
    const lits: number[] = [];
    let method = "";
    for (let r = 0; r < RUNS; r++) {
      const spec = randomSpec(n, 1000 * n + r);
      const t0 = performance.now();
      const res = how === "dispatch" ? minimizeOne(spec, n)! : { cover: minimizeHeuristic(spec, n).cover, method: "heuristic" };
      times.push(performance.now() - t0);
      if (!coverMeetsSpec(res.cover, spec, n)) throw new Error("wrong cover");
      const sz = coverSize(res.cover);
      terms.push(sz.terms);
      lits.push(sz.literals);
      method = res.method;
    }
    twoLevelRows.push([`${n} inputs`, how === "dispatch" ? "as chosen" : "heuristic only", method, median(times).toFixed(1), median(terms), median(lits)]);
  }
}
console.log(`Two-level minimization of random functions (45 % on, 10 % don't-care; median of ${RUNS}; exact up to ${DEFAULT_TWO_LEVEL_LIMITS.exactMaxVariables} variables within budget)\n`);
console.log(table(["function", "minimizer", "method used", "ms", "terms", "literals"], twoLevelRows));

// ---- 2. designs through the optimizer --------------------------------------------------------
const designs: { name: string; text: string; file: string }[] = [
  { name: "random 1,000 gates", text: randomNetwork(1000, { seed: 11 }), file: "rnd1000.v" },
  { name: "8x8 multiplier", text: arrayMultiplier(8), file: "mul8.v" },
  { name: "32-bit CLA adder", text: carryLookaheadAdder(32), file: "cla32.v" },
  { name: "seven-segment", text: readFileSync(new URL("../../examples/seven-segment.logic", import.meta.url), "utf8"), file: "seven-segment.logic" },
  { name: "decoder", text: readFileSync(new URL("../../examples/decoder.logic", import.meta.url), "utf8"), file: "decoder.logic" },
  { name: "full adder (eqs)", text: "input a, b, cin; output s, cout; s = a ^ b ^ cin; cout = a & b | a & cin | b & cin;", file: "fa.logic" },
];
const designRows: (string | number)[][] = [];
for (const d of designs) {
  const front = readDesign(d.text, d.file);
  if (!front.graph) throw new Error(`${d.name}: ${front.diagnostics.map((x) => x.message).join("; ")}`);
  const g = front.graph;
  for (const level of [0, 1, 2] as OptLevel[]) {
    const times: number[] = [];
    let report: ReturnType<typeof optimizeDesign>["report"] | undefined;
    let graph = g;
    const stateNames = front.keptNames ?? front.stateNames;
    for (let r = 0; r < (level === 2 ? RUNS : 1); r++) {
      const t0 = performance.now();
      const res = optimizeDesign(g, { stateNames, maxFanin: 8, level });
      times.push(performance.now() - t0);
      report = res.report;
      graph = res.graph;
    }
    const eq = checkEquivalence(g, cellsToLogic(mapToCells(graph, { stateNames, maxFanin: 8 }).value!), { stateNames });
    const b = report!.before;
    const a = report!.after;
    designRows.push([
      d.name,
      `${g.inputs.length}/${g.outputs.length}`,
      level,
      `${b.cells} → ${a.cells}`,
      `${b.parts} → ${a.parts}`,
      `${b.transistors} → ${a.transistors}`,
      `${b.cost} → ${a.cost}`,
      `${b.nand2} → ${a.nand2}`,
      median(times).toFixed(0),
      eq.equivalent ? (eq.complete ? "yes" : "yes (random)") : "NO",
    ]);
  }
}
console.log(`\nDesigns through the optimizer (DTL cost: transistor 4, diode 1, resistor 1; mixed cells, fan-in 8, fan-out 8; median of ${RUNS} at level 2)\n`);
console.log(table(["design", "in/out", "--opt", "cells", "parts", "transistors", "cost", "NAND2 eq.", "ms", "equivalent"], designRows));
