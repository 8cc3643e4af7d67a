// The verify stage through a real simulator (ngspice compiled to WebAssembly, eecircuit-engine):
// the shipped examples pass at every corner; a deliberately weakened cell is caught at the
// right output and corners; measured levels agree with the electrical engine's analytic figures
// within stated tolerances; delays agree with ngspice's own .meas; the SVG plots are well formed
// XML (W3C XML 1.0, test/plot/xml.ts) with the expected series.
import { readdirSync, readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { synthesize, type Synthesis } from "../../src/pipeline/synthesize.js";
import { embeddedSimulator, type Simulator } from "../../src/simulate/engine.js";
import { verifyDesign, type VerifyResult } from "../../src/verify/verify.js";
import { cornerTexts, DUT_SUPPLY_VECTOR } from "../../src/verify/netlist-text.js";
import { verifyCorners } from "../../src/verify/corners.js";
import { sampleTime, spiceNamesOf } from "../../src/emit/index.js";
import { allElements, parseXml } from "../plot/xml.js";
import { diodeVoltageVolts } from "../simulate/physics.js";

let sim: Simulator;
const results = new Map<string, { s: Synthesis; r: VerifyResult }>();
// Every shipped example (examples/*.logic, examples/*.v).
const EXAMPLES = readdirSync("examples")
  .filter((f) => f.endsWith(".logic") || f.endsWith(".v"))
  .sort()
  .map((f) => `examples/${f}`);

function build(file: string, cells: "mixed" | "nand" = "mixed"): Synthesis {
  const s = synthesize(readFileSync(file, "utf8"), file, { maxFanin: 8, cells, cellsGiven: cells !== "mixed", sizing: { supplyVolts: 5 }, commandLine: "test" });
  expect(s.diagnostics.filter((d) => d.severity === "error").map((d) => `${d.code} ${d.message}`)).toEqual([]);
  return s;
}

beforeAll(async () => {
  sim = await embeddedSimulator();
  for (const f of EXAMPLES) {
    const s = build(f);
    results.set(f, { s, r: await verifyDesign(s, sim, { corners: true }) });
  }
}, 600_000);
afterAll(async () => {
  await sim?.close?.();
});

describe("the shipped examples pass at every corner", () => {
  it("there are examples of both input languages", () => {
    expect(EXAMPLES.some((f) => f.endsWith(".logic"))).toBe(true);
    expect(EXAMPLES.some((f) => f.endsWith(".v"))).toBe(true);
  });
  for (const f of EXAMPLES) {
    it(f, () => {
      const { r } = results.get(f)!;
      const failing = r.corners.filter((c) => !c.pass).map((c) => `${c.corner.label}: ${c.errors.join("; ")} ${c.comparison.failures.slice(0, 3).map((x) => `${x.output}@${x.step}=${x.volts.toFixed(2)}`).join(" ")} ${c.violations.map((v) => `${v.signal} ${v.state} ${v.marginVolts.toFixed(3)}`).join(" ")}`);
      expect(failing).toEqual([]);
      expect(r.pass).toBe(true);
      expect(r.corners).toHaveLength(9);
      for (const c of r.corners) expect(c.comparison.compared).toBeGreaterThan(0);
      expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
      expect(r.coverage!.missing).toEqual([]);
    });
  }

  it("the pump controller's stored state (its request latch) is compared too", () => {
    const { r } = results.get("examples/pump.logic")!;
    expect(r.statesCompared).toContain("req");
    const nominal = r.corners[0]!;
    expect(nominal.signals.find((s) => s.name === "req")!.kind).toBe("state");
  });
});

describe("a cell that no longer saturates is caught at the right output and corners", () => {
  it("XOR of four NANDs with the output cell's R_P raised to 56 kΩ fails at output y at the slow corners only", async () => {
    const s = build("test/fixtures/logic/xor2.logic", "nand");
    const cir = s.files!.find((f) => f.name === "xor2.cir")!.content;
    const sub = /\.subckt gw_nand2[\s\S]*?\.ends gw_nand2\n/.exec(cir)![0];
    // Millman & Halkias' NAND equations (ch. 6): I_1 = (V_CC − V_P)/R_P with the input node V_P
    // about 1.8 V in the netlist's models, less about 48 µA through R_B (15 kΩ), leaves
    // I_B ≈ (5 − 1.8)/56k − 0.048 mA ≈ 9 µA for I_C ≈ (5 − 0.1)/4.3k ≈ 1.1 mA: the transistor
    // needs β ≳ 120 (derived). It saturates with the typical (BF 300) and fast (BF 400) models
    // and not with the slow one (BF 30, the sizing's β_min).
    const weak = sub.replace(/gw_nand2/g, "gw_nand2_weak").replace(/^RP vcc p \S+$/m, "RP vcc p 56k");
    const broken = cir.replace(sub, `${sub}\n${weak}`).replace(/^(XU\d+ .* y vcc) gw_nand2$/m, "$1 gw_nand2_weak");
    expect(broken).toContain("y vcc gw_nand2_weak");
    // Transfer curves on (the default): at the hot slow corner the output's low level is caught
    // by the cells' measured input thresholds (y drives nothing, so it is read as any cell's
    // input would read it), which are stricter there than the sizing's.
    const r = await verifyDesign(s, sim, { corners: true, netlistText: broken, plots: false });
    expect(r.pass).toBe(false);
    for (const c of r.corners) {
      const bad = new Set([...c.comparison.failures.map((f) => f.output), ...c.violations.map((v) => v.signal)]);
      if (c.corner.gain === "min") {
        expect(c.pass, c.corner.label).toBe(false);
        expect([...bad]).toEqual(["y"]);
      } else {
        expect(c.pass, c.corner.label).toBe(true);
      }
    }
    // The weak output sits between the thresholds where it should be low.
    const slow = r.corners.find((c) => c.corner.id === "vlo-tlo-slow")!;
    expect(slow.comparison.failures.every((f) => f.expected === 0 && f.read !== 0)).toBe(true);
    expect(r.diagnostics.some((d) => d.code === "GW7002" && d.message.includes("'y'") && d.message.includes("slow"))).toBe(true);
    // The unmodified netlist passes everywhere (so the failures above are the weak cell's).
    const ok = await verifyDesign(s, sim, { corners: true, plots: false });
    expect(ok.pass).toBe(true);
  });
});

describe("measured levels agree with the electrical engine's analytic figures", () => {
  it("V_OL stays under the engine's V_CE(sat) figure of 0.2 V (Millman & Halkias) at every corner", () => {
    for (const f of EXAMPLES)
      for (const c of results.get(f)!.r.corners)
        for (const sg of c.signals) {
          if (!sg.analytic || !(sg.levels.lowSamples > 0)) continue;
          expect(sg.levels.lowMaxVolts, `${f} ${sg.name} ${c.corner.label}`).toBeLessThanOrEqual(sg.analytic.vOLWorstVolts);
          expect(sg.levels.lowMaxVolts).toBeGreaterThan(0);
        }
  });

  it("an unclamped high output sits at the supply, as the engine says (V_OH = V_CC through R_C), within 10 mV", () => {
    // Tolerance: the leakage of the reverse-biased input diodes of the loads and of the cut-off
    // transistor through R_C: below 1 µA × 10 kΩ = 10 mV (derived from the diode model's IS).
    for (const f of EXAMPLES) {
      const { r } = results.get(f)!;
      for (const c of r.corners)
        for (const sg of c.signals) {
          if (!sg.analytic || sg.highClamped || !(sg.levels.highSamples > 0)) continue;
          expect(Math.abs(sg.levels.highMinVolts - c.corner.supplyVolts), `${f} ${sg.name} ${c.corner.label}`).toBeLessThan(0.01);
          expect(sg.levels.highMinVolts).toBeGreaterThanOrEqual(sg.analytic.vOHWorstVolts - 0.01);
        }
      const nominal = r.corners[0]!;
      for (const sg of nominal.signals) if (sg.analytic && !sg.highClamped && sg.levels.highSamples > 0) expect(Math.abs(sg.levels.highMinVolts - sg.analytic.vOHNominalVolts)).toBeLessThan(0.01);
    }
  });

  it("a net clamped by a diode-OR input sits below the engine's clamp figure by no more than its three junctions allow", () => {
    // The engine's clamp is input diode + level-shift diode + V_BE at Millman & Halkias' round
    // 0.7 + 0.7 + 0.8 V = 2.2 V (nominal). The netlist's diode model (IS 3 nA, N 1.8) drops
    // N·V_T·ln(I/IS) at the ~0.7 mA a 4.3 kΩ collector resistor pushes: about 0.57 V (Shockley,
    // derived below), 0.13 V under 0.7 V; with V_BE also lower, the clamp may sit up to
    // 3 × 0.15 V = 0.45 V under the engine's figure, and not above it.
    const vDiode = diodeVoltageVolts(0.7e-3, 3e-9, 25, 1.8);
    expect(vDiode).toBeGreaterThan(0.55);
    expect(vDiode).toBeLessThan(0.6);
    const { r } = results.get("examples/pump.logic")!;
    const nominal = r.corners[0]!;
    const clamped = nominal.signals.filter((sg) => sg.highClamped && sg.analytic && sg.levels.highSamples > 0);
    expect(clamped.length).toBeGreaterThan(0);
    for (const sg of clamped) {
      const diff = sg.analytic!.vOHNominalVolts - sg.levels.highMinVolts;
      expect(diff, sg.name).toBeGreaterThan(0);
      expect(diff, sg.name).toBeLessThan(0.45);
    }
  });

  it("transfer curves: one per cell type and corner, with the output low under 0.2 V and high at its load's level", () => {
    for (const f of EXAMPLES) {
      const { s, r } = results.get(f)!;
      expect(r.transfer.map((t) => t.cellType).sort()).toEqual(s.design!.cellTypes.map((t) => t.key).sort());
      for (const t of r.transfer) {
        expect(t.curves).toHaveLength(9);
        for (const c of t.curves) {
          expect(c.points, `${t.cellType} ${c.corner}`).toBeDefined();
          expect(c.points!.vOlVolts).toBeLessThan(t.engine.vOLVolts);
          // Unity-gain V_IL below V_IH, both inside the swept range.
          expect(c.points!.vIlVolts).toBeLessThan(c.points!.vIhVolts);
        }
      }
    }
  });
});

describe("delays agree with ngspice's own measurement", () => {
  it("t_PHL and t_PLH of the XOR's output equal .meas TRIG/TARG at the same 50 % points within 0.1 %", async () => {
    const s = build("test/fixtures/logic/xor2.logic", "nand");
    const r = await verifyDesign(s, sim, { corners: false, plots: false, transfer: false });
    const c = r.corners[0]!;
    expect(c.delays.length).toBeGreaterThan(0);
    const names = spiceNamesOf(s.design!);
    const y = c.signals.find((x) => x.name === "y")!;
    const level50 = (y.levels.lowTypVolts + y.levels.highTypVolts) / 2;
    // Each input's 50 % point, as verify measured it: from its own sampled levels.
    const cir = s.files!.find((f) => f.name === "xor2.cir")!.content;
    const tb = s.files!.find((f) => f.name === "xor2.tb.cir")!.content;
    const corner = verifyCorners(s.design!, { corners: false })[0]!;
    const save = [...names.inputs.map((n) => `v(${n})`), "v(y)", DUT_SUPPLY_VECTOR];
    const texts = cornerTexts(cir, tb, corner, s.design!.models.npn.name, save);
    const run0 = await sim.run(texts.testbench, { files: new Map([["xor2.cir", texts.netlist]]) });
    const time = run0.vectors.get("time")!;
    const inputLevel = (node: string, k: number) => {
      const v = run0.vectors.get(`v(${node})`)!;
      const at = (bit: 0 | 1) => s.stimulus!.vectors.map((vec, i) => ({ vec, i })).filter((x) => x.vec[k] === bit).map((x) => interp(time, v, sampleTime(x.i, s.stepSeconds!)));
      const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1]!;
      return (median(at(0)) + median(at(1))) / 2;
    };
    const meas = c.delays.map((d, j) => {
      const k = names.inputs.findIndex((_, i) => s.graph!.inputs[i]!.name === d.fromInput);
      const node = names.inputs[k]!;
      const t0 = d.step * s.stepSeconds!;
      return `.meas tran d${j} TRIG v(${node}) VAL=${inputLevel(node, k)} CROSS=1 TD=${t0} TARG v(y) VAL=${level50} ${d.edge.toUpperCase()}=1 TD=${t0}`;
    });
    const withMeas = texts.testbench.replace(/^\.end\s*$/m, `${meas.join("\n")}\n.end`);
    const run = await sim.run(withMeas, { files: new Map([["xor2.cir", texts.netlist]]) });
    expect(run.errors).toEqual([]);
    c.delays.forEach((d, j) => {
      const m = run.measures.get(`d${j}`);
      expect(m, `d${j}`).toBeDefined();
      expect(Math.abs(m! - d.delaySeconds) / d.delaySeconds, `${d.edge} at step ${d.step}`).toBeLessThan(1e-3);
    });
  });
});

function interp(t: Float64Array, v: Float64Array, x: number): number {
  let i = 0;
  while (i + 1 < t.length && t[i + 1]! < x) i++;
  if (i + 1 >= t.length) return v[v.length - 1]!;
  return v[i]! + ((v[i + 1]! - v[i]!) * (x - t[i]!)) / (t[i + 1]! - t[i]!);
}

describe("plots", () => {
  it("are well-formed SVG with the expected series: waveforms, supply current per corner, a transfer curve per cell type", () => {
    const { s, r } = results.get("examples/pump.logic")!;
    const byName = new Map(r.files.map((f) => [f.name, f.content]));
    const series = (svg: string) => allElements(parseXml(svg)).filter((e) => e.name === "path" && e.attributes.get("class") === "series").map((e) => e.attributes.get("data-series"));
    const wave = byName.get("pump.wave.svg")!;
    expect(parseXml(wave).name).toBe("svg");
    const ws = series(wave);
    for (const i of s.graph!.inputs) expect(ws).toContain(i.name);
    for (const o of s.graph!.outputs) expect(ws).toContain(o.name);
    expect(ws).toContain("req (state)");
    const thresholds = allElements(parseXml(wave)).filter((e) => e.attributes.get("class") === "threshold");
    expect(thresholds.length).toBeGreaterThanOrEqual(s.graph!.outputs.length);
    const supply = byName.get("pump.supply.svg")!;
    expect(series(supply)).toEqual(r.corners.map((c) => c.corner.shortLabel));
    for (const t of s.design!.cellTypes) {
      const svg = byName.get(`pump.transfer.${t.key}.svg`);
      expect(svg, t.key).toBeDefined();
      expect(series(svg!)).toHaveLength(9);
      const markers = allElements(parseXml(svg!)).filter((e) => e.attributes.get("class") === "marker");
      expect(markers.map((m) => m.attributes.get("data-marker"))).toEqual([expect.stringMatching(/^V_IL/), expect.stringMatching(/^V_IH/)]);
    }
    // Axis titles carry units.
    const titles = allElements(parseXml(wave)).filter((e) => (e.attributes.get("class") ?? "").includes("axis-title")).map((e) => e.text);
    expect(titles).toContain("Time (ms)");
    expect(titles.some((x) => /Voltage \((m?V)\)/.test(x))).toBe(true);
  });
});
