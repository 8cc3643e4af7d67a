// The open-collector form of every cell (a cell tied onto a wired-AND net has no R_C of its own)
// and the output stage's corrections on a wired net, against the basic NAND of Millman &
// Halkias, Integrated Electronics, ch. 6, Example 6-5 (V_CC 5 V, R_P 5 kΩ, R_B 5 kΩ, R_C 2.2 kΩ:
// I_1 0.56 mA, I_C 2.18 mA; one input low draws (5 − 0.7 − 0.2)/5 kΩ = 0.82 mA, derived).
import { describe, expect, it } from "vitest";
import { CELLS } from "../../src/cells/registry.js";
import { nandCell } from "../../src/cells/nand/index.js";
import { onWiredNet, openCollectorTopology, wiredHighVolts } from "../../src/cells/output-stage.js";
import type { CellEnv, InputDrive, OutputLoad } from "../../src/cells/types.js";
import { DEFAULT_DEVICES, devicesAt } from "../../src/electrical/devices.js";

const env: CellEnv = { vccVolts: 5, dev: devicesAt(DEFAULT_DEVICES, 25), orShareFactor: 0.8 };
const noLoad: OutputLoad = { andLoads: 0, andSinkAmps: 0, orLoads: 0, orClampVolts: 2.2, capacitanceFarads: 0 };
const drive: InputDrive = { vLowMaxVolts: 0.2, vHighMinVolts: 5, orSourceAmps: 0, orSourceOhms: Infinity, orSourceMaxAmps: 0 };
const example = { rpOhms: 5000, rbOhms: 5000, rcOhms: 2200 };

describe("open-collector form of every registered cell", () => {
  for (const def of CELLS)
    it(`${def.id}: the same parts without R_C, same ports`, () => {
      const t = def.topology(2);
      const oc = openCollectorTopology(t);
      // Every DTL output stage here has exactly one collector resistor (common practice).
      expect(t.components.filter((c) => c.role === "RC")).toHaveLength(1);
      expect(oc.pins).toEqual(t.pins);
      expect(oc.components.map((c) => c.name)).toEqual(t.components.filter((c) => c.role !== "RC").map((c) => c.name));
      // The transistor's collector is still the output pin.
      expect(oc.components.some((c) => c.kind === "Q" && c.nodes[0] === "out")).toBe(true);
    });
});

describe("output stage on a wired net (derived from Millman & Halkias Example 6-5)", () => {
  const op = nandCell.analyze(example, env, noLoad, drive);
  const iC = 4.8 / 2200;
  const i1 = 0.56e-3;
  const inLow = 4.1 / 5000;

  it("a tied cell draws no R_C current: low state I_1 only, high state one input's current", () => {
    const t = onWiredNet(op, env, noLoad, 2200, { ownsPullUp: false, collectors: 3, highLeakageAmps: 0 });
    expect(t.supplyCurrentLowAmps).toBeCloseTo(i1, 9);
    expect(t.supplyCurrentHighAmps).toBeCloseTo(inLow, 9);
    expect(t.powerLowWatts).toBeCloseTo(5 * i1, 9);
    // Its transistor still sinks R_C's whole current when it is the one on.
    expect(t.iCAmps).toBeCloseTo(iC, 9);
    expect(t.satMargin).toBe(op.satMargin);
  });

  it("the driver's R_C draws I_C also while its own transistor is off", () => {
    const d = onWiredNet(op, env, noLoad, 2200, { ownsPullUp: true, collectors: 3, highLeakageAmps: 0 });
    expect(d.supplyCurrentLowAmps).toBeCloseTo(i1 + iC, 9);
    expect(d.supplyCurrentHighAmps).toBeCloseTo(inLow + iC, 9);
  });

  it("high level: V_CC less leakage through R_C, never above a diode-OR clamp", () => {
    expect(wiredHighVolts(env, noLoad, 2200, 10e-6)).toBeCloseTo(5 - 0.022, 12);
    const clamped = { ...noLoad, orLoads: 2 };
    expect(wiredHighVolts(env, clamped, 2200, 10e-6)).toBeCloseTo(2.2, 12);
    const d = onWiredNet(op, env, noLoad, 2200, { ownsPullUp: true, collectors: 3, highLeakageAmps: 10e-6 });
    expect(d.vOHVolts).toBeCloseTo(5 - 0.022, 12);
  });

  it("a cell with an output of its own is left as it is", () => {
    const same = onWiredNet(op, env, noLoad, 2200, { ownsPullUp: true, collectors: 1, highLeakageAmps: 0 });
    expect(same.supplyCurrentHighAmps).toBeCloseTo(op.supplyCurrentHighAmps, 12);
    expect(same.vOHVolts).toBe(op.vOHVolts);
  });
});
