// The diode-OR DTL NOR. Its equations are derived here (src/cells/nor) with the device
// assumptions of Millman & Halkias, Integrated Electronics, ch. 6; the checks below are derived
// by hand from those assumptions.
import { describe, expect, it } from "vitest";
import { norCell, norInputClampVolts } from "../../src/cells/nor/index.js";
import { orDrivePerLoadAmps } from "../../src/cells/output-stage.js";
import type { CellEnv, InputDrive, OutputLoad } from "../../src/cells/types.js";
import { DEFAULT_DEVICES, devicesAt } from "../../src/electrical/devices.js";

const env: CellEnv = { vccVolts: 5, dev: devicesAt(DEFAULT_DEVICES, 25), orShareFactor: 0.8 };
const noLoad: OutputLoad = { andLoads: 0, andSinkAmps: 0, orLoads: 0, orClampVolts: 2.2, capacitanceFarads: 0 };

describe("DTL NOR with diode-OR inputs", () => {
  it("a high input clamps its driver at V_D + V_D + V_BE(sat) = 2.2 V (derived)", () => {
    expect(norInputClampVolts(env)).toBeCloseTo(2.2, 9);
  });

  it("one driver with R_C 2.2 kΩ feeding one NOR: I_in = 2.8/2.2k, I_B = I_in − 0.8/R_B (derived)", () => {
    const iIn = orDrivePerLoadAmps(env, 2200, 1, 2.2);
    expect(iIn).toBeCloseTo(2.8 / 2200, 12);
    const drive: InputDrive = { vLowMaxVolts: 0.2, vHighMinVolts: 2.2, orSourceAmps: iIn, orSourceOhms: 2200, orSourceMaxAmps: iIn };
    const op = norCell.analyze({ rbOhms: 5000, rcOhms: 2200 }, env, noLoad, drive);
    expect(op.iBAmps).toBeCloseTo(2.8 / 2200 - 0.16e-3, 12);
    expect(op.iCAmps).toBeCloseTo(4.8 / 2200, 12);
    expect(op.betaNeeded).toBeCloseTo(4.8 / 2200 / (2.8 / 2200 - 0.16e-3), 9);
    // Low-state noise margin with the book's drops: 0.6 + 0.6 + 0.5 − 0.2 = 1.5 V. The
    // engine's own V_IL comes from the model cards (src/electrical/thresholds.ts, checked
    // against ngspice): the chain conducts at microamperes, about 0.15 V below the cut-in sum.
    expect(op.extra.vILBookVolts! - 0.2).toBeCloseTo(1.5, 9);
    expect(op.noiseMarginLowVolts).toBeGreaterThan(1.25);
    expect(op.noiseMarginLowVolts).toBeLessThan(1.5);
  });

  it("N loads on one driver share its current: the weakest gets share·I/N (derived)", () => {
    const one = orDrivePerLoadAmps(env, 2200, 1, 2.2);
    const four = orDrivePerLoadAmps(env, 2200, 4, 2.2);
    expect(four).toBeCloseTo((0.8 * one) / 4, 12);
  });

  it("the high-state noise margin is the series voltage that would starve the base (derived)", () => {
    const iIn = 1e-3;
    const drive: InputDrive = { vLowMaxVolts: 0.2, vHighMinVolts: 2.2, orSourceAmps: iIn, orSourceOhms: 2800, orSourceMaxAmps: iIn };
    const op = norCell.analyze({ rbOhms: 8000, rcOhms: 4800 }, env, noLoad, drive);
    const needed = 1e-3 / 30 + 0.1e-3;
    expect(op.noiseMarginHighVolts).toBeCloseTo((iIn - needed) * 2800, 12);
  });

  it("draws no current from a low driver", () => {
    expect(norCell.inputLowAmpsWorst({ rbOhms: 5000, rcOhms: 2200 }, 0.05, env)).toBe(0);
  });
});
