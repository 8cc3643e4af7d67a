// The embedded ngspice (eecircuit-engine) against circuit laws, device equations and its own
// failure modes.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { embeddedSimulator, type Simulator } from "../../src/simulate/engine.js";
import { crossings, sampleAt, unityGainPoints } from "../../src/simulate/waveform.js";
import { diodeSaturationCurrentAmps, diodeVoltageVolts, thermalVoltageVolts } from "./physics.js";

let sim: Simulator;
// Engine start and worker restarts take seconds, more when test files run side by side.
const SLOW_MS = 60_000;

beforeAll(async () => {
  sim = await embeddedSimulator();
}, SLOW_MS);

afterAll(async () => {
  await sim.close?.();
});

function vector(run: { vectors: Map<string, Float64Array> }, name: string): Float64Array {
  const v = run.vectors.get(name);
  if (!v) throw new Error(`no vector ${name}; have ${[...run.vectors.keys()].join(", ")}`);
  return v;
}

const DIVIDER = `resistor divider
V1 in 0 DC 10
R1 in out 1k
R2 out 0 3k
.op
.end
`;

describe("embedded ngspice: circuit laws", { timeout: SLOW_MS }, () => {
  it("reports its ngspice version and shares one instance", async () => {
    expect(sim.version).toMatch(/^\d+/);
    const again = await embeddedSimulator();
    expect(again).toBe(sim);
  });

  it("solves a resistor divider by Ohm's law", async () => {
    const run = await sim.run(DIVIDER);
    expect(run.errors).toEqual([]);
    expect(run.analysis).toBe("Operating Point");
    // Ohm's law: V_out = 10 V · 3k/(1k + 3k) = 7.5 V; I = 10 V / 4k = 2.5 mA, flowing out of the
    // source's + terminal, which ngspice reports as negative.
    expect(vector(run, "v(out)")[0]).toBeCloseTo(7.5, 9);
    expect(vector(run, "v(in)")[0]).toBeCloseTo(10, 9);
    expect(vector(run, "i(v1)")[0]).toBeCloseTo(-2.5e-3, 12);
  });

  it("charges an RC to 1 − 1/e (63.2 %) after one time constant, and .meas reads the same", async () => {
    // R 1 kΩ, C 1 nF: τ = 1 µs. v(t) = 1 − e^(−t/τ) for a unit step (common practice).
    const run = await sim.run(`rc step
V1 in 0 PWL(0 0 1p 1)
R1 in out 1k
C1 out 0 1n
.tran 1n 5u 0 5n
.meas tran v_at_tau FIND v(out) AT=1u
.meas tran t_half WHEN v(out)=0.5 RISE=1
.end
`);
    expect(run.errors).toEqual([]);
    expect(run.scale).toBe("time");
    const t = vector(run, "time");
    const v = vector(run, "v(out)");
    const expected = 1 - Math.exp(-1);
    expect(expected).toBeCloseTo(0.632, 3);
    expect(Math.abs(sampleAt(t, v, 1e-6) - expected)).toBeLessThan(1e-5);
    expect(Math.abs(run.measures.get("v_at_tau")! - expected)).toBeLessThan(1e-5);
    // Half-way at t = τ · ln 2.
    expect(Math.abs(run.measures.get("t_half")! / 1e-6 - Math.LN2)).toBeLessThan(1e-5);
    expect(Math.abs(crossings(t, v, 0.5, "rise")[0]! / 1e-6 - Math.LN2)).toBeLessThan(1e-5);
  });

  it("puts a default-model diode at 1 mA where the Shockley equation says (27 °C)", async () => {
    // Default diode: IS 1e-14 A, N 1 (REFERENCES.md, ngspice model defaults);
    // V = N·V_T·ln(I/IS + 1), V_T = kT/q with CODATA constants at 300.15 K.
    const run = await sim.run(`diode at 1 mA
I1 0 a DC 1m
D1 a 0 DDEF
.model DDEF D
.op
.end
`);
    expect(run.errors).toEqual([]);
    const expected = diodeVoltageVolts(1e-3, 1e-14, 27);
    expect(thermalVoltageVolts(27)).toBeCloseTo(0.025865, 6);
    expect(expected).toBeCloseTo(0.6551, 4);
    expect(Math.abs(vector(run, "v(a)")[0]! - expected)).toBeLessThan(10e-6);
  });

  it("moves the diode drop by about −2 mV/°C between 0 °C and 70 °C", async () => {
    const at = async (celsius: number) => {
      const run = await sim.run(`diode at ${celsius} C
I1 0 a DC 1m
D1 a 0 DDEF
.model DDEF D
.temp ${celsius}
.op
.end
`);
      expect(run.errors).toEqual([]);
      return vector(run, "v(a)")[0]!;
    };
    const v0 = await at(0);
    const v70 = await at(70);
    // The SPICE temperature law for IS (ngspice diotemp.c) with EG 1.11 eV, XTI 3.
    expect(Math.abs(v0 - diodeVoltageVolts(1e-3, diodeSaturationCurrentAmps(1e-14, 0), 0))).toBeLessThan(10e-6);
    expect(Math.abs(v70 - diodeVoltageVolts(1e-3, diodeSaturationCurrentAmps(1e-14, 70), 70))).toBeLessThan(10e-6);
    // Sedra & Smith: about −2 mV per °C at constant current; REFERENCES.md derives −1.79 mV/K
    // near 0.65 V for these parameters.
    const slopeVoltsPerC = (v70 - v0) / 70;
    expect(slopeVoltsPerC).toBeLessThan(-1.5e-3);
    expect(slopeVoltsPerC).toBeGreaterThan(-2.3e-3);
  });

  it("runs a bipolar inverter whose output is low for a high input, with unity-gain points from hand analysis", async () => {
    // Default NPN (IS 1e-16 A, BF 100; REFERENCES.md). Forward active: I_C = BF·I_B and
    // V_in = V_BE + I_B·R_B, so dV_out/dV_in = −BF·R_C/(V_T/I_B + R_B) (derived, Ebers–Moll).
    // Slope −1 at V_T/I_B = BF·R_C − R_B = 90 kΩ → I_B = 0.287 µA, V_BE = V_T·ln(BF·I_B/IS),
    // V_IL = V_BE + I_B·R_B ≈ 0.685 V.
    const run = await sim.run(`npn inverter
VCC vcc 0 DC 5
VIN in 0 DC 0
RB in b 10k
RC vcc out 1k
Q1 out b 0 QDEF
.model QDEF NPN
.dc VIN 0 5 1m
.end
`);
    expect(run.errors).toEqual([]);
    expect(run.analysis).toBe("DC transfer characteristic");
    const vin = vector(run, "v(in)");
    const vout = vector(run, "v(out)");
    expect(sampleAt(vin, vout, 0)).toBeGreaterThan(4.99);
    // Saturated: V_CE(sat) under the 0.2 V of Millman & Halkias' device assumptions.
    expect(sampleAt(vin, vout, 5)).toBeLessThan(0.2);
    const vt = thermalVoltageVolts(27);
    const ib = vt / (100 * 1e3 - 10e3);
    const vIlHand = vt * Math.log((100 * ib) / 1e-16 + 1) + ib * 10e3;
    const points = unityGainPoints(vin, vout)!;
    expect(points).toBeDefined();
    expect(Math.abs(points.vIlVolts - vIlHand)).toBeLessThan(0.5e-3);
    // Saturation sets in near I_C ≈ 4.9 mA: V_BE(4.9 mA) + (4.9 mA/BF)·R_B ≈ 0.82 V + 0.49 V ≈ 1.3 V
    // (hand estimate, so a loose window).
    expect(points.vIhVolts).toBeGreaterThan(1.15);
    expect(points.vIhVolts).toBeLessThan(1.45);
    expect(points.vOhVolts).toBeGreaterThan(4.99);
    expect(points.vOlVolts).toBeLessThan(0.2);
  });
});

describe("embedded ngspice: a typical testbench", { timeout: SLOW_MS }, () => {
  const cells = `* cell library
.subckt inv a y vcc
RB a b 10k
RC vcc y 1k
Q1 y b 0 QSW
.ends inv
.model QSW NPN(IS=1e-16 BF=100 TF=0.3n TR=240n CJE=4.5p CJC=3.6p)
.end
`;
  const bench = `inverter chain testbench
.include "cells.cir"
.options reltol=1e-4 abstol=1e-12
.temp 27
VCC vcc 0 DC 5
VA a 0 PWL(0 0 1u 0 1.01u 5 3u 5 3.01u 0 5u 0)
X1 a y1 vcc inv
X2 y1 y2 vcc inv
CL y2 0 10p
.tran 5n 5u
.meas tran tphl TRIG v(a) VAL=2.5 RISE=1 TARG v(y1) VAL=2.5 FALL=1
.meas tran vlow FIND v(y1) AT=2.5u
.end
`;

  it("runs with .subckt, .model, PWL, .tran, .meas, .options and an inlined include", async () => {
    const run = await sim.run(bench, { files: new Map([["cells.cir", cells]]) });
    expect(run.errors).toEqual([]);
    const t = vector(run, "time");
    const y1 = vector(run, "v(y1)");
    const y2 = vector(run, "v(y2)");
    // Input high from 1 µs to 3 µs: first inverter low, second high; inverted otherwise.
    expect(sampleAt(t, y1, 0.5e-6)).toBeGreaterThan(4.5);
    expect(sampleAt(t, y1, 2.5e-6)).toBeLessThan(0.3);
    expect(sampleAt(t, y2, 2.5e-6)).toBeGreaterThan(4.5);
    expect(sampleAt(t, y2, 4.9e-6)).toBeLessThan(0.3);
    // Nodes inside subcircuits are reachable as v(x1.b).
    expect(run.vectors.has("v(x1.b)")).toBe(true);
    expect(run.measures.get("vlow")).toBeCloseTo(sampleAt(t, y1, 2.5e-6), 3);
    expect(run.measures.get("tphl")).toBeGreaterThan(0);
  });

  it("refuses an include it was not given, without losing the engine", async () => {
    const missing = await sim.run(bench);
    expect(missing.vectors.size).toBe(0);
    expect(missing.errors.join("\n")).toMatch(/cells\.cir/);
    const after = await sim.run(DIVIDER);
    expect(after.errors).toEqual([]);
    expect(vector(after, "v(out)")[0]).toBeCloseTo(7.5, 9);
  });
});

describe("embedded ngspice: errors", { timeout: SLOW_MS }, () => {
  it("reports a netlist error as errors and no vectors", async () => {
    const run = await sim.run(`bad card
V1 in 0 DC 1
Q1 c b 0 NOSUCHMODEL
.op
.end
`);
    expect(run.vectors.size).toBe(0);
    expect(run.errors.some((e) => /nosuchmodel/i.test(e))).toBe(true);
    expect(run.errors.some((e) => /circuit not parsed/i.test(e))).toBe(true);
  });

  it("reports a failed analysis and never hands back the previous run's vectors", async () => {
    const good = await sim.run(DIVIDER);
    expect(good.vectors.size).toBeGreaterThan(0);
    const run = await sim.run(`no operating point
V1 in 0 1
B1 out 0 V=sqrt(-1-v(in)*v(in))
R1 out 0 1k
.tran 1n 10n
.end
`);
    expect(run.vectors.size).toBe(0);
    expect(run.errors.join("\n")).toMatch(/timestep too small/i);
    // Repeated messages are folded into one with a count.
    expect(run.errors.filter((e) => /out of range for sqrt/.test(e))).toHaveLength(1);
  });

  it("reports a netlist without an analysis", async () => {
    const run = await sim.run(`nothing to do
V1 in 0 1
R1 in 0 1k
.end
`);
    expect(run.vectors.size).toBe(0);
    expect(run.errors.join("\n")).toMatch(/no analysis/i);
  });

  it("keeps the vectors but lists a failed .meas as an error", async () => {
    const run = await sim.run(`failing measure
V1 in 0 PWL(0 0 1u 1)
R1 in out 1k
C1 out 0 1n
.tran 10n 2u
.meas tran vgood FIND v(out) AT=1u
.meas tran vbad FIND v(nowhere) AT=1u
.end
`);
    expect(run.vectors.size).toBeGreaterThan(0);
    expect(run.measures.has("vgood")).toBe(true);
    expect(run.measures.has("vbad")).toBe(false);
    expect(run.errors.join("\n")).toMatch(/vbad.*failed/i);
  });

  it("ignores a .control section with a warning", async () => {
    const run = await sim.run(`with control
V1 in 0 DC 2
R1 in out 1k
R2 out 0 1k
.op
.control
run
print v(out)
.endc
.end
`);
    expect(run.errors).toEqual([]);
    expect(run.warnings.join("\n")).toMatch(/\.control/);
    expect(vector(run, "v(out)")[0]).toBeCloseTo(1, 9);
  });

  it("stops a run that exceeds its time limit and starts afresh for the next", async () => {
    const run = await sim.run(
      `long transient
V1 in 0 PULSE(0 1 0 1n 1n 50n 100n)
R1 in out 1k
C1 out 0 10p
.tran 0.1n 2m
.end
`,
      { timeoutMs: 300 },
    );
    expect(run.vectors.size).toBe(0);
    expect(run.errors.join("\n")).toMatch(/did not finish within 0\.3 s/);
    const after = await sim.run(DIVIDER);
    expect(after.errors).toEqual([]);
    expect(vector(after, "v(out)")[0]).toBeCloseTo(7.5, 9);
  });

  it("queues runs started together and gives each its own result", async () => {
    const divider = (top: number, bottom: number) =>
      `divider ${top} ${bottom}\nV1 in 0 DC 1\nR1 in out ${top}\nR2 out 0 ${bottom}\n.op\n.end\n`;
    const runs = await Promise.all([sim.run(divider(1, 1)), sim.run(divider(1, 3)), sim.run(divider(3, 1))]);
    expect(runs.map((r) => vector(r, "v(out)")[0])).toEqual([
      expect.closeTo(0.5, 9),
      expect.closeTo(0.75, 9),
      expect.closeTo(0.25, 9),
    ]);
  });
});
