// The high-fan-out DTL NAND against Millman & Halkias, Integrated Electronics, ch. 6,
// Example 6-6 (gain 30): supply → 1.75 kΩ → the level-shift transistor's collector; 2 kΩ from
// there to the input node, which drives its base; R_B 5 kΩ; R_C 2.2 kΩ as in Example 6-5.
import { describe, expect, it } from "vitest";
import { hifanInputLowAmps, nandHifanCell } from "../../src/cells/nand-hifan/index.js";
import { fanoutCapacity } from "../../src/cells/output-stage.js";
import type { CellEnv, InputDrive, OutputLoad } from "../../src/cells/types.js";
import { DEFAULT_DEVICES, devicesAt } from "../../src/electrical/devices.js";

const dev = { ...devicesAt(DEFAULT_DEVICES, 25), betaMin: 30, betaMax: 30 };
const env: CellEnv = { vccVolts: 5, dev, orShareFactor: 0.8 };
const noLoad: OutputLoad = { andLoads: 0, andSinkAmps: 0, orLoads: 0, orClampVolts: 2.2, capacitanceFarads: 0 };
const drive: InputDrive = { vLowMaxVolts: 0.2, vHighMinVolts: 5, orSourceAmps: 0, orSourceOhms: Infinity, orSourceMaxAmps: 0 };
const example = { rxOhms: 1750, rpOhms: 2000, rbOhms: 5000, rcOhms: 2200 };

describe("high-fan-out DTL NAND, Millman & Halkias Example 6-6", () => {
  const op = nandHifanCell.analyze(example, env, noLoad, drive);

  it("I_B1 ≈ 0.0498 mA, I_1 ≈ 1.543 mA, I_B2 ≈ 1.383 mA", () => {
    // Millman & Halkias, Example 6-6 (read).
    expect(op.extra.iB1Amps! * 1e3).toBeCloseTo(0.0498, 4);
    expect(op.i1Amps * 1e3).toBeCloseTo(1.543, 3);
    expect(op.iBAmps * 1e3).toBeCloseTo(1.383, 3);
  });

  it("1.0933 mA per driven input and fan-out 35 at gain 30", () => {
    // Millman & Halkias, Example 6-6 (read): (5 − 0.9)/(1.75 + 2) kΩ = 1.0933 mA; fan-out 35.
    const iLoad = hifanInputLowAmps(env, example.rxOhms, example.rpOhms);
    expect(iLoad * 1e3).toBeCloseTo(1.0933, 4);
    expect(fanoutCapacity(30, op.iBAmps, op.iCAmps, iLoad)).toBe(35);
  });

  it("the level-shift transistor stays active (its collector sits above its base)", () => {
    expect(op.extra.followerCollectorVolts!).toBeGreaterThan(op.vInputNodeVolts);
  });

  it("topology: the transistor stage replaces the first level-shift diode", () => {
    const names = nandHifanCell.topology(2).components.map((c) => c.name);
    expect(names).toEqual(["DIN1", "DIN2", "RX", "RP", "QLS", "DLS1", "RB", "RC", "Q1"]);
    const q = nandHifanCell.topology(2).components.find((c) => c.name === "QLS")!;
    expect(q.nodes).toEqual(["x", "p", "e"]);
  });
});
