// A wired-AND design end to end through a real simulator (ngspice compiled to WebAssembly,
// eecircuit-engine): two open-collector NAND outputs tied onto net w with one collector resistor,
// w an output and the input of a third NAND. The generated testbench walks every input vector
// (Gray code) and runs, unmodified but for the corner's supply, temperature and transistor gain,
// at the nominal point and at every corner the sizing claims (supply min/max × temperature
// min/max × β_min/β_max). Checked at each, for every vector:
//   - w is low whenever at least one of its transistors conducts, in particular when ONLY ONE
//     does (that one alone sinks R_C's current and the load's: the wired-AND worst case), and
//     then at least the required noise margin below the V_IL of the cell it drives;
//   - w is high, at least the required noise margin above that cell's V_IH, when all are off;
//   - every output agrees with the logic (the verify stage's comparison);
//   - each cell type, the open-collector one with its net's pull-up, meets the sizing's levels
//     and delays in ngspice with its worst-case load (synth --characterize).
// The wired-AND function itself is common practice for DTL ("collector dotting").
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { synthesize, type Synthesis } from "../../src/pipeline/synthesize.js";
import { embeddedSimulator, type Simulator } from "../../src/simulate/engine.js";
import { verifyDesign } from "../../src/verify/verify.js";
import { verifyCorners } from "../../src/verify/corners.js";
import { cornerTexts } from "../../src/verify/netlist-text.js";
import { fileNamesOf, sampleTime, spiceNamesOf } from "../../src/emit/index.js";
import { netLevels } from "../../src/emit/spice.js";
import { characterizeDesign } from "../../src/characterize/index.js";

const SOURCE = "input a, b, c, d, e;\noutput w, z;\nw = !(a & b) & !(c & d);\nz = !(w & e);\n";

let sim: Simulator;
let s: Synthesis;
beforeAll(async () => {
  sim = await embeddedSimulator();
  s = synthesize(SOURCE, "wired.logic", { maxFanin: 8, cells: "nand", cellsGiven: true, wiredAnd: true, sizing: { supplyVolts: 5 }, commandLine: "test" });
});
afterAll(async () => {
  await sim?.close?.();
});

/** Linear interpolation of a sampled waveform. */
function at(time: Float64Array, v: Float64Array, t: number): number {
  let i = 1;
  while (i < time.length - 1 && time[i]! < t) i++;
  const t0 = time[i - 1]!;
  const t1 = time[i]!;
  return t1 > t0 ? v[i - 1]! + ((v[i]! - v[i - 1]!) * (t - t0)) / (t1 - t0) : v[i]!;
}

describe("wired-AND in ngspice at every corner the sizing claims", () => {
  it("builds: w has two tied open-collector outputs and one collector resistor", () => {
    expect(s.diagnostics.filter((d) => d.severity === "error").map((d) => `${d.code} ${d.message}`)).toEqual([]);
    const nl = s.netlist!;
    const w = nl.nets[nl.outputs[0]!.net]!;
    expect(w.name).toBe("w");
    expect(w.tiedCells).toHaveLength(1);
    expect(s.design!.components.filter((c) => c.role === "RC" && (c.instance === (w.driver as { cell: number }).cell || w.tiedCells!.includes(c.instance)))).toHaveLength(1);
    expect(s.stimulus!.exhaustive).toBe(true);
  });

  it("every vector at every corner: logic levels of the wired net with the required margins", async () => {
    const d = s.design!;
    const nl = d.netlist;
    const names = spiceNamesOf(d);
    const files = fileNamesOf(nl.name);
    const cir = s.files!.find((f) => f.name === files.netlist)!.content;
    const tb = s.files!.find((f) => f.name === files.testbench)!.content;
    const wNet = nl.outputs[0]!.net;
    const wNode = names.net[wNet]!;
    const lv = netLevels(d, wNet);
    const margin = d.parameters.find((p) => p.name === "noiseMarginMinVolts")!.value;
    const idx = (n: string) => s.graph!.inputs.findIndex((x) => x.name === n);
    const [ia, ib, ic, id] = ["a", "b", "c", "d"].map(idx) as [number, number, number, number];
    const corners = verifyCorners(d, { corners: true });
    expect(corners).toHaveLength(9);
    let oneOn = 0;
    for (const corner of corners) {
      const texts = cornerTexts(cir, tb, corner, d.models.npn.name, [`v(${wNode})`]);
      expect(texts.problems).toEqual([]);
      const run = await sim.run(texts.testbench, { files: new Map([[files.netlist, texts.netlist]]) });
      expect(run.errors, corner.label).toEqual([]);
      const time = run.vectors.get("time")!;
      const v = run.vectors.get(`v(${wNode})`)!;
      s.stimulus!.vectors.forEach((vec, i) => {
        const on1 = vec[ia] === 1 && vec[ib] === 1;
        const on2 = vec[ic] === 1 && vec[id] === 1;
        const volts = at(time, v, sampleTime(i, s.stepSeconds!));
        const where = `${corner.label}, step ${i} (${vec.join("")}): w = ${volts.toFixed(3)} V`;
        if (on1 || on2) {
          expect(volts, where).toBeLessThanOrEqual(lv.vilVolts - margin);
          if (on1 !== on2) oneOn++;
        } else expect(volts, where).toBeGreaterThanOrEqual(lv.vihVolts + margin);
      });
    }
    // 12 of the 32 vectors have exactly one of the two transistors on (2 · 1/4 · 3/4), at each of
    // the 9 conditions.
    expect(oneOn).toBe(9 * 12);
  }, 300_000);

  it("the verify stage passes at every corner: outputs agree with the logic, no margin violations", async () => {
    const r = await verifyDesign(s, sim, { corners: true, plots: false });
    const failing = r.corners.filter((c) => !c.pass).map((c) => `${c.corner.label}: ${c.errors.join("; ")} ${c.violations.map((x) => `${x.signal} ${x.state} ${x.marginVolts.toFixed(3)}`).join(" ")}`);
    expect(failing).toEqual([]);
    expect(r.pass).toBe(true);
    for (const c of r.corners) expect(c.comparison.compared).toBeGreaterThan(0);
    // The open-collector type's transfer curve is taken with its net's pull-up.
    expect(r.transfer.every((t) => t.errors.length === 0 && t.curves.every((c) => c.points !== undefined))).toBe(true);
  }, 300_000);

  it("synth --characterize: the open-collector type, measured with its net's R_C, meets the sizing's figures", async () => {
    const r = await characterizeDesign(s.design!, sim, {});
    expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    const c = r.value!;
    const oc = c.cells.find((x) => x.key.endsWith("_oc"));
    expect(oc).toBeDefined();
    expect(c.cells.map((x) => `${x.key} ${x.pass}`)).toEqual(c.cells.map((x) => `${x.key} true`));
    expect(c.pass).toBe(true);
  }, 300_000);
});
