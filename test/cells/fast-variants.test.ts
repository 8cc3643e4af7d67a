// The fast variants (src/cells/fast-kit and the folders built on it): topology, DC equations and
// the clamp's low level. Switching against ngspice is in test/electrical/fast.ngspice.test.ts.
import { describe, expect, it } from "vitest";
import { nandCell } from "../../src/cells/nand/index.js";
import { norCell } from "../../src/cells/nor/index.js";
import { nandHifanCell } from "../../src/cells/nand-hifan/index.js";
import { CELLS, fastVariantsOf } from "../../src/cells/registry.js";
import { capacitorVoltageRating, clampedLowVolts, clampedLowVoltsAt } from "../../src/cells/fast-kit/index.js";
import type { CellDefinition, CellEnv, InputDrive, OutputLoad } from "../../src/cells/types.js";
import { DEFAULT_DEVICES, DEFAULT_SCHOTTKY, devicesAt, schottkyAt } from "../../src/electrical/devices.js";

const envAt = (t: number, vcc = 5): CellEnv => ({ vccVolts: vcc, dev: devicesAt(DEFAULT_DEVICES, t), orShareFactor: 0.8, schottky: schottkyAt(DEFAULT_SCHOTTKY, t) });
const load: OutputLoad = { andLoads: 4, andSinkAmps: 4e-3, orLoads: 0, orClampVolts: 2.2, capacitanceFarads: 20e-12 };
const andDrive: InputDrive = { vLowMaxVolts: 0.2, vHighMinVolts: 5, orSourceAmps: 0, orSourceOhms: Infinity, orSourceMaxAmps: 0 };
const orDrive: InputDrive = { vLowMaxVolts: 0.2, vHighMinVolts: 2.2, orSourceAmps: 1.2e-3, orSourceOhms: 2200, orSourceMaxAmps: 1.5e-3 };
const byId = (id: string): CellDefinition => CELLS.find((c) => c.id === id)!;

describe("fast variants: topology", () => {
  it("each is its base cell plus a speed-up capacitor into the base and/or a Schottky from base to collector", () => {
    const expected: Record<string, [CellDefinition, boolean, boolean]> = {
      "nand-cap": [nandCell, true, false],
      "nand-clamp": [nandCell, false, true],
      "nand-fast": [nandCell, true, true],
      "nor-cap": [norCell, true, false],
      "nor-clamp": [norCell, false, true],
      "nor-fast": [norCell, true, true],
      "nand-hifan-clamp": [nandHifanCell, false, true],
      "nand-hifan-fast": [nandHifanCell, true, true],
    };
    for (const [id, [base, cap, clamp]] of Object.entries(expected)) {
      const def = byId(id);
      expect(def.speedUp).toMatchObject({ baseId: base.id, clamp });
      expect(def.speedUp!.capacitorKey !== undefined).toBe(cap);
      for (const k of [1, 3]) {
        const t = def.topology(k);
        const b = base.topology(k);
        expect(t.pins).toEqual(b.pins);
        expect(t.components.slice(0, b.components.length)).toEqual(b.components);
        const added = t.components.slice(b.components.length);
        const caps = added.filter((c) => c.kind === "C");
        // NAND: one capacitor from the input node to the base; NOR: one per input (a falling
        // input cannot reach the common node through its diode-OR diode).
        if (!cap) expect(caps).toHaveLength(0);
        else if (base.inputKind === "and") expect(caps.map((c) => c.nodes)).toEqual([["p", "b"]]);
        else expect(caps.map((c) => c.nodes)).toEqual(Array.from({ length: k }, (_, i) => [`in${i + 1}`, "b"]));
        const dsc = added.filter((c) => c.kind === "D");
        // Baker clamp (common practice): anode at the base, cathode at the collector.
        expect(dsc.map((c) => [c.nodes, c.model])).toEqual(clamp ? [[["b", "out"], "schottky"]] : []);
      }
    }
    expect(fastVariantsOf("nand").map((c) => c.id)).toEqual(["nand-cap", "nand-clamp", "nand-fast"]);
    expect(fastVariantsOf("nor").map((c) => c.id)).toEqual(["nor-cap", "nor-clamp", "nor-fast"]);
  });
});

describe("fast variants: DC equations", () => {
  it("keep the base cell's equations (reference: the base cell's own analysis); only the clamp raises V_OL", () => {
    for (const def of CELLS.filter((c) => c.speedUp)) {
      const base = CELLS.find((c) => c.id === def.speedUp!.baseId)!;
      const drive = base.inputKind === "and" ? andDrive : orDrive;
      for (const t of [0, 70]) {
        const env = envAt(t);
        const values = { ...base.exampleValues, csuFarads: 47e-12 };
        const a = def.analyze(values, env, load, drive);
        const b = base.analyze(values, env, load, drive);
        for (const k of ["iBAmps", "iCAmps", "satMargin", "vILVolts", "vIHVolts", "noiseMarginLowVolts", "noiseMarginHighVolts", "powerLowWatts", "powerHighWatts"] as const) {
          expect(a[k], `${def.id} ${k}`).toBeCloseTo(b[k], 12);
        }
        if (def.speedUp!.clamp && b.satMargin >= 1) expect(a.vOLVolts).toBeCloseTo(clampedLowVoltsAt(env, b.iCAmps + b.iLoadAmps, b.iBAmps, b.satMargin), 12);
        else expect(a.vOLVolts).toBeCloseTo(b.vOLVolts, 12);
      }
    }
  });

  it("clamped low level V_BE − V_F: a few tenths of a volt for a Schottky-clamped transistor (Sedra & Smith, Schottky-clamped transistor, from memory), from the model cards (reference implementation here)", () => {
    const env = envAt(25);
    // Written out independently: V_BE = V_T·ln(I_C·(1 + I_C/IKF)/IS) + RB·I_B for the NPN card,
    // V_F = n·V_T·ln(I/IS + 1) + RS·I for the Schottky at the diverted current I_B·(1 − 1/margin).
    const vt = (1.380649e-23 * 298.15) / 1.602176634e-19;
    const q = DEFAULT_DEVICES.npn.params;
    const s = DEFAULT_SCHOTTKY.card.params;
    const [ic, ib, m] = [5e-3, 0.4e-3, 2];
    const vbe = vt * Math.log((ic * (1 + ic / q.IKF!)) / q.IS!) + q.RB! * ib;
    const idiv = ib * (1 - 1 / m);
    const vf = s.N! * vt * Math.log(idiv / s.IS! + 1) + s.RS! * idiv;
    const v25 = clampedLowVoltsAt(env, ic, ib, m);
    expect(v25).toBeCloseTo(vbe - vf, 9);
    expect(v25).toBeGreaterThan(0.3);
    expect(v25).toBeLessThan(0.5);
    // The bound every load is checked against (at the card's knee current IKF) lies above.
    expect(clampedLowVolts(env)).toBeGreaterThan(v25);
    expect(clampedLowVolts(env)).toBeLessThan(0.6);
    // Both drops fall with temperature, the silicon junction faster: V_OL falls 0.5 mV/°C.
    expect((clampedLowVolts(envAt(70)) - clampedLowVolts(envAt(0))) / 70).toBeCloseTo(-0.0005, 4);
  });

  it("the Schottky data agree with its own model card (SPICE diode equation, derived)", () => {
    const p = DEFAULT_SCHOTTKY.card.params;
    const vt = (1.380649e-23 * 298.15) / 1.602176634e-19;
    const drop = (amps: number): number => p.N! * vt * Math.log(amps / p.IS! + 1) + amps * p.RS!;
    // Forward drop at 1 mA inside the typical..least range; the least drop at about 0.07 mA.
    expect(drop(1e-3)).toBeGreaterThan(DEFAULT_SCHOTTKY.vForwardMinVolts);
    expect(drop(1e-3)).toBeLessThan(DEFAULT_SCHOTTKY.vForwardVolts);
    expect(drop(0.07e-3)).toBeCloseTo(DEFAULT_SCHOTTKY.vForwardMinVolts, 2);
    // dV/dT at constant current = (V − (EG + XTI·n·V_T))/T (from I = IS(T)·exp(V/(n·V_T)) with
    // IS ∝ T^(XTI/n)·exp(−EG/(n·V_T)·(1 − T/T0))): about −1.5 mV/K at 0.3 V for EG 0.69, XTI 2.
    const slope = (0.3 - (p.EG! + p.XTI! * p.N! * vt)) / 298.15;
    expect(Math.abs(slope - DEFAULT_SCHOTTKY.tempCoVoltsPerC)).toBeLessThan(0.1e-3);
  });

  it("the clamp diode's stress: reverse voltage up to the supply (plus the capacitor's kick), forward current the base drive", () => {
    const env = envAt(25, 12);
    const values = { ...nandCell.exampleValues, rpOhms: 12000, csuFarads: 47e-12 };
    const clampOnly = byId("nand-clamp").stresses(values, env, load, { ...andDrive, vHighMinVolts: 12 }, 2).find((s) => s.name === "DSC")!;
    expect(clampOnly.voltageVolts).toBeCloseTo(12, 9);
    const op = nandCell.analyze(values, env, load, andDrive);
    expect(clampOnly.currentAmps).toBeCloseTo(op.i1Amps, 12);
    const both = byId("nand-fast").stresses(values, env, load, andDrive, 2).find((s) => s.name === "DSC")!;
    expect(both.voltageVolts!).toBeGreaterThan(12);
  });

  it("capacitor voltage rating: the next standard rating at least twice the supply (common practice)", () => {
    expect(capacitorVoltageRating(5.25)).toBe(16);
    expect(capacitorVoltageRating(12.6)).toBe(50);
    expect(capacitorVoltageRating(15.75)).toBe(50);
    expect(capacitorVoltageRating(3.15)).toBe(6.3);
    expect(capacitorVoltageRating(3.3)).toBe(10);
  });
});
