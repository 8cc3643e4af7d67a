// Charge-control switching times (Moll, Proc. IRE 42, 1954; Millman & Taub, Pulse, Digital and
// Switching Waveforms — formulas from memory, checks derived from them).
import { describe, expect, it } from "vitest";
import {
  fallTimeSeconds,
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

  it("mean depletion capacitance is CJ0 at zero bias and smaller under reverse bias", () => {
    expect(meanJunctionCapacitanceFarads(2e-12, 0.75, 0.33, 0, 0)).toBeCloseTo(2e-12, 18);
    const c = meanJunctionCapacitanceFarads(2e-12, 0.75, 0.33, -5, 0);
    expect(c).toBeLessThan(2e-12);
    expect(c).toBeGreaterThan(2e-12 / (1 + 5 / 0.75) ** 0.33);
  });
});
