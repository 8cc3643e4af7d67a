// Charge-control switching times (Moll, Proc. IRE 42, 1954; Millman & Taub, Pulse, Digital and
// Switching Waveforms — formulas from memory, checks derived from them).
import { describe, expect, it } from "vitest";
import { nandCell } from "../../src/cells/nand/index.js";
import { analytic } from "./fast-harness.js";
import {
  diodeStorageSeconds,
  fallTimeSeconds,
  inputStoredShare,
  loadDischargeSeconds,
  meanJunctionCapacitanceFarads,
  storageTimeConstantSeconds,
  storageTimeSeconds,
  turnOnTimeSeconds,
} from "../../src/electrical/timing.js";

describe("charge control", () => {
  it("storage time: τ_s 10 ns, I_B1 2 mA, I_B2 1 mA, I_C 10 mA, β 50 → 9.163 ns (derived from Moll's formula)", () => {
    expect(storageTimeSeconds(10e-9, 2e-3, 1e-3, 10e-3, 50) * 1e9).toBeCloseTo(9.163, 3);
  });

  it("no storage when the transistor is not overdriven", () => {
    expect(storageTimeSeconds(10e-9, 0.1e-3, 1e-3, 10e-3, 50)).toBe(0);
  });

  it("turn-on and fall 10–90 % (derived): ln(9) τ at the edge of saturation drive is the limit", () => {
    // β·I_B1 = 0.9·I_C makes the turn-on infinite; heavy overdrive makes it short.
    expect(turnOnTimeSeconds(100e-9, (0.9 * 10e-3) / 50, 10e-3, 50)).toBe(Infinity);
    expect(turnOnTimeSeconds(100e-9, 2e-3, 10e-3, 50) * 1e9).toBeCloseTo(100 * Math.log((100 - 1) / (100 - 9)), 9);
    // With no reverse drive the collector current decays freely: τ·ln(9).
    expect(fallTimeSeconds(100e-9, 0, 10e-3, 50) * 1e9).toBeCloseTo(100 * Math.log(9), 9);
  });

  it("storage time constant from SPICE transit times (Ebers–Moll charge control, derived)", () => {
    // TF → 0, BF → ∞: τ_s = α_R·TR·(1 + BR) = BR·TR.
    expect(storageTimeConstantSeconds({ TF: 0, TR: 100e-9, BF: 1e12, BR: 1 })).toBeCloseTo(100e-9, 15);
  });

  it("forward bias above FC·VJ: SPICE's linear extension of the junction capacitance, continuous at FC·VJ", () => {
    // SPICE 3f5 junction capacitance (ngspice manual, diode model): for V ≥ FC·VJ,
    // C = CJ0/(1 − FC)^(1+M)·(1 − FC·(1 + M) + M·V/VJ); FC 0.5. CJ0 2 pF, VJ 0.75, M 0.33 at 0.6 V:
    // 2 pF/0.5^1.33·(1 − 0.665 + 0.264) = 3.019 pF.
    expect(meanJunctionCapacitanceFarads(2e-12, 0.75, 0.33, 0.6, 0.6) * 1e12).toBeCloseTo((2 / 0.5 ** 1.33) * (1 - 0.5 * 1.33 + (0.33 * 0.6) / 0.75), 9);
    // Just below and just above the knee the graded formula and the extension agree:
    // CJ0/(1 − FC)^M on both sides.
    const below = meanJunctionCapacitanceFarads(2e-12, 0.75, 0.33, 0.375 - 1e-7, 0.375 - 1e-7);
    const above = meanJunctionCapacitanceFarads(2e-12, 0.75, 0.33, 0.375 + 1e-7, 0.375 + 1e-7);
    expect(above / below).toBeCloseTo(1, 5);
    // The mean over a range spanning the knee is the charge difference over the voltage.
    const m = meanJunctionCapacitanceFarads(2e-12, 0.75, 0.33, 0, 0.6);
    expect(m).toBeGreaterThan(2e-12);
    expect(m).toBeLessThan(3.019e-12);
  });

  it("stored charge reaching the node: (I_R/I_F)·ln(1 + I_F/I_R) behind a pull-up, e^(−t_e/τ_T) behind a step (charge control of reverse recovery, derived)", () => {
    // I_R = I_F (3 V across 3 kΩ, 1 mA): ln 2 of τ_T·I_F arrives, the rest recombines while it
    // is cleared.
    expect(inputStoredShare(4e-9, 1e-3, 3 / 3000, undefined)).toBeCloseTo(Math.log(2), 12);
    // A stiff source clears it at once: all of it; with a 1 ns rise over τ_T 4 ns, e^(−1/4).
    expect(inputStoredShare(4e-9, 1e-3, undefined, undefined)).toBe(1);
    expect(inputStoredShare(4e-9, 1e-3, undefined, 1e-9)).toBeCloseTo(Math.exp(-0.25), 12);
  });

  it("mean depletion capacitance is CJ0 at zero bias and smaller under reverse bias", () => {
    expect(meanJunctionCapacitanceFarads(2e-12, 0.75, 0.33, 0, 0)).toBeCloseTo(2e-12, 18);
    const c = meanJunctionCapacitanceFarads(2e-12, 0.75, 0.33, -5, 0);
    expect(c).toBeLessThan(2e-12);
    expect(c).toBeGreaterThan(2e-12 / (1 + 5 / 0.75) ** 0.33);
  });
});

// The output's fall under charge control with the Miller current (loadDischargeSeconds): the
// limits of τ_F·di/dt = I_B1 − (C_μ/C_L)·i, worked by hand from the charge-control equation
// (Millman & Halkias, Integrated Electronics, ch. 15, charge-control description of switching).
describe("load discharge against the Miller current", () => {
  const tf = 0.3e-9;
  it("no collector junction: a ramp at I_B1/τ_F, t = √(2·τ_F·Q/I_B1)", () => {
    // 1 mA of base drive, 100 pC to take off the load: √(2 · 0.3 ns · 100 pC / 1 mA) = 7.75 ns.
    expect(loadDischargeSeconds(100e-12, 20e-12, 0, 0, tf, 1e-3, 1)).toBeCloseTo(Math.sqrt((2 * tf * 100e-12) / 1e-3), 12);
  });
  it("the ramp stops at the gain's limit and the rest goes at that current", () => {
    // iMax 5 mA reached after 5 mA·τ_F/I_B1 = 1.5 ns, having moved 3.75 pC; 96.25 pC at 5 mA more.
    expect(loadDischargeSeconds(100e-12, 20e-12, 0, 0, tf, 1e-3, 5e-3)).toBeCloseTo(1.5e-9 + 96.25e-12 / 5e-3, 12);
  });
  it("slow drive: the Miller-limited slew C_μ·ΔV/I_B1 plus the build-up τ_F·C_L/C_μ", () => {
    // C_L 20 pF, C_μ 1 pF, ΔV 5 V: q = 100 pC, i_∞ = 20 mA, τ = 6 ns; t ≫ τ gives 5 ns + 6 ns.
    // Q(t) = i_∞·t − i_∞·τ·(1 − e^(−t/τ)); at t = 11 ns: 220 pC − 120·(1 − e^(−11/6)) pC.
    const t = loadDischargeSeconds(100e-12, 20e-12, 1e-12, 5e-12, tf, 1e-3, 1);
    const q = (x: number) => 20e-3 * x - 20e-3 * 6e-9 * (1 - Math.exp(-x / 6e-9));
    expect(q(t)).toBeCloseTo(100e-12, 15);
    expect(t).toBeGreaterThan(5e-9 + 6e-9 * (1 - Math.exp(-t / 6e-9)) - 1e-12);
    expect(t).toBeLessThan(11e-9);
  });
  it("charge already in the base starts the current and shortens the fall", () => {
    const cold = loadDischargeSeconds(100e-12, 20e-12, 1e-12, 5e-12, tf, 1e-3, 1);
    const warm = loadDischargeSeconds(100e-12, 20e-12, 1e-12, 5e-12, tf, 1e-3, 1, 3e-12);
    expect(warm).toBeLessThan(cold);
    // i(0) = 3 pC / 0.3 ns = 10 mA, half of i_∞: Q(t) = i_∞·t − 10 mA·τ·(1 − e^(−t/τ)).
    const q = (x: number) => 20e-3 * x - 10e-3 * 6e-9 * (1 - Math.exp(-x / 6e-9));
    expect(q(warm)).toBeCloseTo(100e-12, 15);
  });
});

// The input diode's reverse recovery, t_s = τ_T·ln(1 + I_F/I_R) (charge control of a junction
// diode's stored charge; Millman & Halkias, Integrated Electronics, ch. 3, from memory): the kick
// a rising diode-AND input hands to the base waits for it.
describe("input diode recovery", () => {
  it("τ_T 4 ns, I_F = I_R: 4 ns·ln 2 = 2.77 ns; I_R = 10·I_F: 4 ns·ln 1.1 = 0.381 ns", () => {
    expect(diodeStorageSeconds(4e-9, 1e-3, 1e-3)).toBeCloseTo(2.7726e-9, 12);
    expect(diodeStorageSeconds(4e-9, 1e-3, 10e-3)).toBeCloseTo(0.38124e-9, 12);
  });
  it("a DTL driver's pull-up behind the input delays the fall by at least the recovery; a stiff step does not", () => {
    const c = { def: nandCell, values: { rpOhms: 4300, rbOhms: 5100, rcOhms: 2000 }, vcc: 5, loads: 6 };
    const stiff = analytic(c).tPHLSeconds;
    const driven = analytic({ ...c, andSourceOhms: 4300 }).tPHLSeconds;
    // I_F ≈ (5 − 0.75 − 0.2)/4.3k ≈ 0.94 mA, I_R ≈ (5 − 2.2)/4.3k ≈ 0.65 mA: t_s ≈ 4 ns·ln 2.4 ≈ 3.5 ns.
    expect(driven).toBeGreaterThanOrEqual(3e-9);
    expect(driven).toBeGreaterThan(stiff);
  });
});
