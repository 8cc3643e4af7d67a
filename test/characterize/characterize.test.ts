// Characterization of sized cells in a real simulator (ngspice 45 compiled to WebAssembly,
// eecircuit-engine): each cell type with its worst-case load at the sizing's corners. Checked
// against Millman & Halkias (Integrated Electronics, Example 6-5), against ngspice's own `.meas`,
// against N separate load cells, and for the run failing loudly when the simulation and the
// sizing disagree.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { characterizationPlan, characterizeDesign, readCharacterization, worstDrives, worstLoads } from "../../src/characterize/index.js";
import type { Characterization } from "../../src/characterize/types.js";
import type { Diagnostic } from "../../src/diagnostics/index.js";
import { sizeDesign } from "../../src/electrical/size.js";
import type { SizedDesign } from "../../src/electrical/types.js";
import { embeddedSimulator, type Simulator } from "../../src/simulate/engine.js";
import { sampleAt } from "../../src/simulate/waveform.js";
import { c17, fanoutNet } from "../electrical/fixtures.js";

let sim: Simulator;
beforeAll(async () => {
  sim = await embeddedSimulator();
}, 120_000);
afterAll(async () => {
  await sim?.close?.();
});

/** Largest forced fan-out the sizing accepts (its own claim), by bisection in [lo, hi]. Each
 *  sizing is synchronous; a failing one skips the search for what blocks it (quickFailure: only
 *  yes or no is wanted here), and the bisection lets the event loop turn between them, since a
 *  test worker blocked for a minute loses its link to the runner. */
async function largestFanout(supplyVolts: number, variants: "basic" | "auto", lo: number, hi: number): Promise<number> {
  const ok = async (f: number) => {
    await new Promise((r) => setImmediate(r));
    return sizeDesign(fanoutNet(2), { supplyVolts, fanoutOverride: f, variants, quickFailure: true }).value !== undefined;
  };
  expect(await ok(lo)).toBe(true);
  while (hi - lo > 1) {
    const m = (lo + hi) >> 1;
    if (await ok(m)) lo = m;
    else hi = m;
  }
  return lo;
}

const errors = (ds: Diagnostic[]) => ds.filter((d) => d.severity === "error");

interface Sampled {
  supplyVolts: number;
  fanout: number;
  design: SizedDesign;
  ch: Characterization;
  diagnostics: Diagnostic[];
}
const sampled: Sampled[] = [];

describe("every sized cell keeps its logic levels in ngspice at the corners it claims", () => {
  // For each supply: fan-out 1, half the basic cell's limit, the limit, one more (the sizing then
  // moves to the high-fan-out variant, Millman & Halkias Example 6-6) and the variant's limit.
  // Forced fan-outs load every output with that many of the design's heaviest diode-AND cells.
  for (const v of [5, 12, 15]) {
    it(`${v} V supply, fan-outs 1 to the sizing's largest`, async () => {
      const basicMax = await largestFanout(v, "basic", 1, 200);
      const autoMax = await largestFanout(v, "auto", basicMax + 1, 1000);
      const cases: [number, "basic" | "auto"][] = [
        ...[...new Set([1, Math.ceil(basicMax / 2), basicMax])].map((f) => [f, "basic"] as [number, "basic"]),
        [basicMax + 1, "auto"],
        [autoMax, "auto"],
      ];
      for (const [f, variants] of cases) {
        const s = sizeDesign(fanoutNet(2), { supplyVolts: v, fanoutOverride: f, variants });
        expect(s.value, `${v} V, fan-out ${f}`).toBeDefined();
        const r = await characterizeDesign(s.value!, sim, { transient: false });
        const ch = r.value!;
        sampled.push({ supplyVolts: v, fanout: f, design: s.value!, ch, diagnostics: r.diagnostics });
        if (variants === "auto") expect(ch.cells.map((c) => c.cellId)).toContain("nand-hifan");
        for (const cell of ch.cells) {
          expect(cell.corners).toHaveLength(4); // supply min/max × 0 °C and 70 °C, the sizing's corners
          for (const k of cell.corners) {
            const at = `${cell.key} at ${v} V, fan-out ${f}, ${k.corner}`;
            // Saturated: V_OL at most the V_CE(sat) of 0.2 V the sizing assumes (Millman &
            // Halkias ch. 6 device assumptions) with the worst-case load.
            expect(k.vOLVolts, at).toBeLessThanOrEqual(0.2);
            expect(k.checks.find((c) => c.id === "saturation")!.ok, at).toBe(true);
            // Logic levels: every V_OL below the V_IL of the inputs it drives and every V_OH above
            // their V_IH (unity-gain points, common practice), so both noise margins are positive.
            expect(k.noiseMarginLowVolts, at).toBeGreaterThan(0);
            expect(k.noiseMarginHighVolts, at).toBeGreaterThan(0);
          }
        }
        expect(errors(r.diagnostics)).toEqual([]);
      }
    });
  }

  // The sizing's V_IL comes from the model cards' junction equations (src/electrical/
  // thresholds.ts): the input diode's drop grows with its current (small R_P, 12-15 V) and the
  // chain's microampere threshold currents drift about −5 mV/°C. The book's cut-in sum
  // (2·V_γ + V_γBE − V_D, −2 mV/°C per drop) claimed 0.62 V where ngspice gave 0.16-0.38 V.
  it("the low-state noise margin the sizing claims holds in ngspice at every sampled fan-out", () => {
    const short = sampled.flatMap((s) =>
      s.ch.cells.flatMap((c) => c.corners.filter((k) => !k.checks.find((x) => x.id === "noise-margin-low")!.ok).map((k) => `${s.supplyVolts} V fan-out ${s.fanout} ${c.key} ${k.corner}: ${k.noiseMarginLowVolts.toFixed(3)} V`)),
    );
    expect(short).toEqual([]);
  });

  it("a noise margin short of the sizing's claim stops the run with GW7020 (never a silent pass)", () => {
    for (const s of sampled) {
      const short = s.ch.cells.some((c) => !c.pass);
      expect(s.ch.pass).toBe(!short);
      expect(s.diagnostics.some((d) => d.code === "GW7020" && d.severity === "error")).toBe(short);
    }
  });
});

describe("Millman & Halkias, Integrated Electronics, Example 6-5, in ngspice", () => {
  // The book's gate (V_CC 5 V, R_P 5 kΩ, R_B 5 kΩ, R_C 2.2 kΩ, two level-shift diodes) at its
  // own conditions: 25 °C, no tolerances, gain 30.
  const book = { supplyTolerance: 0, tempMinC: 25, tempMaxC: 25, resistorTolerance: 0, saturationMarginMin: 1, betaMin: 30 };
  const forced = { nand: { rpOhms: 5000, rbOhms: 5000, rcOhms: 2200 } };

  it("at the book's fan-out of 11 the output stays saturated and the low-state margin is about the book's 0.8 V", async () => {
    const s = sizeDesign(fanoutNet(11), { supplyVolts: 5, ...book, forcedValues: forced });
    const r = await characterizeDesign(s.value!, sim, { transient: false });
    expect(errors(r.diagnostics)).toEqual([]);
    const k = r.value!.cells[0]!.corners[0]!;
    expect(k.corner).toBe("5 V, 25 °C");
    expect(k.vOLVolts).toBeLessThan(0.2);
    // Book: one input low puts the node at 0.9 V against 1.7 V needed, a 0.8 V margin. The
    // unity-gain V_IL with the model's junctions gives within 0.1 V of it.
    expect(k.noiseMarginLowVolts).toBeGreaterThan(0.7);
    expect(k.noiseMarginLowVolts).toBeLessThan(0.9);
  });

  it("beyond it (14 loads) the weakened drive is caught loudly: saturation lost, GW7021, no pass", async () => {
    // Book equation with the model's own drops (V_D ≈ 0.65 V, V_BE ≈ 0.75 V): 30·0.44 mA ≥
    // 2.2 mA + N·0.84 mA holds up to N = 13.
    const s = sizeDesign(fanoutNet(14), { supplyVolts: 5, ...book, forcedValues: forced });
    expect(s.diagnostics.some((d) => d.code === "GW5004")).toBe(true);
    const r = await characterizeDesign(s.value!, sim, { transient: false });
    expect(r.value!.pass).toBe(false);
    expect(r.value!.cells[0]!.corners[0]!.vOLVolts).toBeGreaterThan(0.2);
    const e = r.diagnostics.find((d) => d.code === "GW7021");
    expect(e?.severity).toBe("error");
    expect(e?.message).toContain("saturation");
  });
});

describe("a deliberately weakened cell fails loudly", () => {
  it("R_B forced to 100 Ω: the base current all goes to R_B, the output never falls (GW7021)", async () => {
    // I_2 = V_BE/R_B ≈ 8 mA against I_1 = (V_CC − 2.2 V)/R_P ≈ 0.15 mA (Ohm's law): no base drive.
    const s = sizeDesign(c17(), { supplyVolts: 5, forcedValues: { nand: { rpOhms: 18000, rbOhms: 100, rcOhms: 4300 } } });
    const r = await characterizeDesign(s.value!, sim, { transient: false });
    expect(r.value!.pass).toBe(false);
    for (const k of r.value!.cells[0]!.corners) expect(k.vOLVolts).toBeGreaterThan(0.9 * k.supplyVolts);
    expect(r.diagnostics.filter((d) => d.code === "GW7021").every((d) => d.severity === "error")).toBe(true);
    expect(r.diagnostics.some((d) => d.code === "GW7021" && /saturation/.test(d.message))).toBe(true);
    // The curve never reaches a slope of −1, so the thresholds are not measured: said, not guessed.
    expect(r.diagnostics.some((d) => d.code === "GW7022")).toBe(true);
  });

  it("values weakened behind the sizing's back (its analysis still claims a pass): GW7020", async () => {
    const d = structuredClone(sizeDesign(c17(), { supplyVolts: 5 }).value!);
    expect(d.cellTypes[0]!.analysis.constraints.find((c) => c.id === "saturation")!.ok).toBe(true);
    for (const t of d.cellTypes) t.values.rbOhms = 600;
    const r = await characterizeDesign(d, sim, { transient: false });
    expect(r.value!.pass).toBe(false);
    const e = r.diagnostics.find((x) => x.code === "GW7020" && /saturation/.test(x.message));
    expect(e?.severity).toBe("error");
    expect(e?.message).toMatch(/where the sizing claims saturation margin/);
  });
});

describe("the measurement itself", () => {
  it("N alike loads simulated as one cell scaled N times give what N separate cells give", async () => {
    // N identical circuits in parallel are one circuit with N times every conductance and
    // junction area (common practice; the SPICE area factor scales IS, CJO, IKF, and divides RS).
    const d = sizeDesign(fanoutNet(2), { supplyVolts: 5, fanoutOverride: 8, variants: "basic" }).value!;
    const one = characterizationPlan(d, { transient: false })[0]!;
    const many = characterizationPlan(d, { transient: false, separateLoads: true })[0]!;
    expect(many.text.split("\n").filter((l) => l.startsWith("XL")).length).toBe(8 * one.text.split("\n").filter((l) => l.startsWith("XL")).length);
    const a = await sim.run(one.text);
    const b = await sim.run(many.text);
    expect(a.errors).toEqual([]);
    expect(b.errors).toEqual([]);
    for (const c of one.copies) {
      const sw = a.vectors.get("v(sw)")!;
      for (const x of [0.2, 1.2, 5]) {
        expect(Math.abs(sampleAt(sw, a.vectors.get(c.outVector)!, x) - sampleAt(sw, b.vectors.get(c.outVector)!, x))).toBeLessThan(2e-3);
      }
    }
  });

  it("delays read from the waveforms agree with ngspice's own .meas, and with the estimate's stated accuracy", async () => {
    const d = sizeDesign(c17(), { supplyVolts: 5 }).value!;
    const plan = characterizationPlan(d);
    const dc = plan.filter((p) => p.kind === "dc");
    const tran = plan.filter((p) => p.kind === "tran");
    const runDc = await Promise.all(dc.map((p) => sim.run(p.text)));
    const runTran: Awaited<ReturnType<Simulator["run"]>>[] = [];
    const measured: { phl: number; plh: number }[][] = [];
    for (const p of tran) {
      // Independent levels: the input's are the step's (0.2 V and the supply), the output's
      // are sampled by ngspice just before each edge; the crossings are ngspice's TRIG/TARG.
      const meas: string[] = [];
      p.copies.forEach((c, i) => {
        meas.push(`.meas tran hi${i} FIND ${c.outVector} AT=${p.riseAtSeconds! * 0.95}`, `.meas tran lo${i} FIND ${c.outVector} AT=${p.fallAtSeconds! * 0.95}`);
      });
      const first = await sim.run(p.text.replace(/\.end\s*$/, `${meas.join("\n")}\n.end\n`));
      const inMid = (d.inputDriver.vLowVolts + p.corner.supplyVolts) / 2;
      const delays: string[] = [];
      p.copies.forEach((c, i) => {
        const mid = (first.measures.get(`hi${i}`)! + first.measures.get(`lo${i}`)!) / 2;
        delays.push(
          `.meas tran phl${i} TRIG v(vin) VAL=${inMid} RISE=1 TARG ${c.outVector} VAL=${mid} FALL=1`,
          `.meas tran plh${i} TRIG v(vin) VAL=${inMid} FALL=1 TARG ${c.outVector} VAL=${mid} RISE=1`,
        );
      });
      const second = await sim.run(p.text.replace(/\.end\s*$/, `${delays.join("\n")}\n.end\n`));
      expect(second.errors).toEqual([]);
      runTran.push(second);
      measured.push(p.copies.map((_, i) => ({ phl: second.measures.get(`phl${i}`)!, plh: second.measures.get(`plh${i}`)! })));
    }
    const read = readCharacterization(d, worstLoads(d), worstDrives(d), {
      dc: dc.map((setup, i) => ({ setup, run: runDc[i]! })),
      tran: tran.map((setup, i) => ({ setup, run: runTran[i]! })),
    });
    expect(errors(read.diagnostics)).toEqual([]);
    const cell = read.cells[0]!;
    cell.corners.forEach((k, ci) => {
      const phl = Math.max(...measured[ci]!.map((m) => m.phl));
      const plh = Math.max(...measured[ci]!.map((m) => m.plh));
      expect(k.tPHLSeconds! / phl).toBeCloseTo(1, 1);
      expect(k.tPLHSeconds! / plh).toBeCloseTo(1, 1);
    });
    // The charge-control estimate (src/electrical/timing.ts, Moll 1954) holds t_PLH to ±30 % and
    // t_PHL to a factor of 2 of ngspice (its stated accuracy), worst case against worst case.
    const rise = cell.analytic.tPLHSeconds! / cell.worst.tPLHSeconds!;
    const fall = cell.analytic.tPHLSeconds! / cell.worst.tPHLSeconds!;
    expect(rise).toBeGreaterThan(0.7);
    expect(rise).toBeLessThan(1.3);
    expect(fall).toBeGreaterThan(0.5);
    expect(fall).toBeLessThan(2);
  });
});
