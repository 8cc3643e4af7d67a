// Benchmark of the worst-case sizing (run: npx tsx test/bench/size.bench.ts [runs]). Prints:
//   1. a full search for one cell: a NAND-2 sized alone, over the E24 and the E96 series
//      (IEC 60063), for 1 and 8 loads, and with a gate delay budget (timing checked at every
//      candidate) for 1 load;
//   2. per-gate sizing of a generated 1,000-gate network (test/bench/designs.ts, randomNetwork),
//      read, optimized at level 0 (as written) and mapped onto NAND cells, then sized uniform and
//      per gate, E24 and E96;
//   3. the fast-variant plan search under a gate delay budget (src/electrical/size.ts,
//      attemptFast): a two-input XOR (test/fixtures/logic/xor2.logic) mapped onto mixed cells as
//      synth maps it, at budgets the basic cells miss: met, narrowly refused, far out of reach
//      (refused by the delay screen). One run each (tens of seconds).
// Figures are medians of several runs; nothing is asserted (the tests check correctness).
// Exported as `sizeBench(runs)` so a driver can run it and collect its tables.
import { pathToFileURL } from "node:url";
import { sizeDesign } from "../../src/electrical/size.js";
import type { SizingOptions } from "../../src/electrical/types.js";
import type { CellNetlist } from "../../src/map/types.js";
import { mapToCells } from "../../src/map/index.js";
import { optimizeDesign } from "../../src/optimize/index.js";
import { readDesign } from "../../src/pipeline/front.js";
import { netlistOf } from "../electrical/fixtures.js";
import { randomNetwork } from "./designs.js";
import { median, table } from "./format.js";
import { readFileSync } from "node:fs";


function timeSizing(netlist: CellNetlist, options: SizingOptions, runs: number) {
  const times: number[] = [];
  let result = sizeDesign(netlist, options);
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    result = sizeDesign(netlist, options);
    times.push(performance.now() - t0);
  }
  const d = result.value;
  return {
    ms: median(times),
    ok: d !== undefined,
    watts: d?.totals.staticPowerWatts ?? NaN,
    distinct: d?.totals.distinctResistorValues ?? NaN,
    values: d ? d.cellTypes.map((t) => Object.entries(t.values).map(([k, v]) => `${k.replace(/Ohms$/, "")}=${v}`).join(" ")).slice(0, 1).join("") : "",
  };
}

/** A 1,000-gate random network mapped onto NAND cells, as written (no optimization). */
export function thousandGateNetlist(): CellNetlist {
  const text = randomNetwork(1000, { seed: 11 });
  const front = readDesign(text, "rnd1000.v");
  if (!front.graph) throw new Error(front.diagnostics.map((x) => x.message).join("; "));
  const stateNames = front.keptNames ?? front.stateNames;
  const opt = optimizeDesign(front.graph, { stateNames, maxFanin: 8, level: 0, cells: "nand" });
  const mapped = mapToCells(opt.graph, { stateNames, maxFanin: 8, cells: "nand" });
  if (!mapped.value) throw new Error(mapped.diagnostics.map((x) => x.message).join("; "));
  return mapped.value;
}

export function sizeBench(runs = 5): string {
  const out: string[] = [];
  // ---- 1. one cell ----------------------------------------------------------------------------
  const one = netlistOf("one", ["a", "b"], ["y"], [{ fn: "nand", inputs: ["a", "b"], output: "y" }]);
  const oneRows: (string | number)[][] = [];
  for (const series of ["E24", "E96"] as const) {
    for (const budget of [undefined, 300e-9]) {
      // With a budget and fan-out 8 the search moves to the high-fan-out variant and checks the
      // timing of every candidate of its four resistors: about 10 s (E24) and 2 min (E96) a run
      // when this was written, too long for a routine benchmark.
      for (const fanout of budget === undefined ? [1, 8] : [1]) {
        const o: SizingOptions = { supplyVolts: 5, series, fanoutOverride: fanout, ...(budget !== undefined ? { gateDelayMaxSeconds: budget } : {}) };
        const r = timeSizing(one, o, runs);
        oneRows.push([series, budget !== undefined ? "300 ns" : "none", fanout, r.ok ? r.values : "infeasible", r.ms.toFixed(1)]);
      }
    }
  }
  out.push(`Full search for one NAND-2 cell at 5 V ±5 %, 0–70 °C (median of ${runs})\n`);
  out.push(table(["series", "gate budget", "fan-out", "values chosen", "ms"], oneRows));

  // ---- 2. 1,000 gates -------------------------------------------------------------------------
  const t0 = performance.now();
  const big = thousandGateNetlist();
  const prepMs = performance.now() - t0;
  const bigRows: (string | number)[][] = [];
  const bigRuns = Math.max(3, Math.min(runs, 5));
  for (const series of ["E24", "E96"] as const) {
    for (const mode of ["uniform", "per-gate"] as const) {
      const r = timeSizing(big, { supplyVolts: 5, series, mode }, bigRuns);
      bigRows.push([series, mode, r.ok ? "yes" : "no", (r.watts * 1e3).toFixed(1), r.distinct, r.ms.toFixed(0)]);
    }
  }
  out.push(`\nSizing a generated 1,000-gate network (${big.cells.length} NAND cells after mapping, ${big.nets.length} nets; built in ${prepMs.toFixed(0)} ms; median of ${bigRuns})\n`);
  out.push(table(["series", "mode", "sized", "worst-case mW", "distinct R", "ms"], bigRows));

  // ---- 3. fast-variant plan search --------------------------------------------------------------
  const file = "test/fixtures/logic/xor2.logic";
  const front = readDesign(readFileSync(file, "utf8"), file);
  if (!front.graph) throw new Error(front.diagnostics.map((x) => x.message).join("; "));
  const names = front.keptNames ?? front.stateNames;
  const xorOpt = optimizeDesign(front.graph, { stateNames: names, maxFanin: 8, level: 2, cells: "mixed" });
  const xor = mapToCells(xorOpt.graph, { stateNames: names, maxFanin: 8, cells: "mixed" }).value!;
  const planRows: (string | number)[][] = [];
  for (const budget of [60e-9, 8e-9, 2e-9, 0.5e-9]) {
    const t1 = performance.now();
    const r = sizeDesign(xor, { supplyVolts: 5, gateDelayMaxSeconds: budget });
    const ms = performance.now() - t1;
    const fast = r.diagnostics.find((d) => d.code === "GW5010");
    const chosen = r.value ? [...new Set(r.value.cellTypes.map((t) => t.cellId))].join(", ") : "refused (GW5001)";
    planRows.push([`${Number((budget * 1e9).toPrecision(3))} ns`, chosen + (r.value && !fast ? " (basic cells meet it)" : ""), (ms / 1e3).toFixed(1)]);
  }
  out.push(`\nFast-variant plan search: ${file}, ${xor.cells.length} mixed cells, 5 V ±5 %, 0–70 °C (one run each)\n`);
  out.push(table(["gate budget", "cells chosen", "s"], planRows));
  return out.join("\n");
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  console.log(sizeBench(Number(process.argv[2] ?? 5)));
}
