// Device data: temperature behaviour and the parts-file override.
import { describe, expect, it } from "vitest";
import {
  betaTempFactor,
  DEFAULT_DEVICES,
  devicesAt,
  junctionDropAt,
  parsePartsFile,
  resolveDevices,
  validatePartsFile,
} from "../../src/electrical/devices.js";

describe("temperature", () => {
  it("junction drops fall about 2 mV per °C (Sedra & Smith, diode chapter)", () => {
    expect(junctionDropAt(0.7, 75, DEFAULT_DEVICES.junctionTempCoVoltsPerC)).toBeCloseTo(0.6, 9);
    const hot = devicesAt(DEFAULT_DEVICES, 70);
    const cold = devicesAt(DEFAULT_DEVICES, 0);
    expect((hot.vDiodeOnVolts - cold.vDiodeOnVolts) / 70).toBeCloseTo(-0.002, 9);
    expect((hot.vBESatVolts - cold.vBESatVolts) / 70).toBeCloseTo(-0.002, 9);
  });

  it("the −2 mV/°C figure agrees with the SPICE diode equation near 0.6 V (derived: −1.96 mV/K)", () => {
    // d(V_D)/dT at constant current from I = IS(T)·exp(V/(n·V_T)), IS ∝ T^XTI·exp(−EG/V_T·(1 − T/T0)):
    // dV/dT = (V − (EG + XTI·V_T))/T for n = 1 (REFERENCES: −1.96 mV/K at 0.60 V, 300 K).
    const vt = (1.380649e-23 * 300) / 1.602176634e-19;
    const slope = (0.6 - (1.11 + 3 * vt)) / 300;
    expect(slope * 1e3).toBeCloseTo(-1.96, 2);
    expect(Math.abs(slope - DEFAULT_DEVICES.junctionTempCoVoltsPerC)).toBeLessThan(0.1e-3);
  });

  it("gain scales as (T/T_ref)^XTB: +0.5 %/K near room temperature for XTB 1.5 (derived)", () => {
    expect(betaTempFactor(26, 1.5) - 1).toBeCloseTo(0.005, 3);
    expect(betaTempFactor(0, 1.5)).toBeLessThan(1);
    expect(devicesAt(DEFAULT_DEVICES, 0).betaMin).toBeCloseTo(30 * (273.15 / 298.15) ** 1.5, 9);
  });
});

describe("default device data", () => {
  it("uses Millman & Halkias ch. 6 DC assumptions", () => {
    const d = DEFAULT_DEVICES;
    expect([d.vDiodeOnVolts, d.vDiodeCutInVolts, d.vBECutInVolts, d.vBESatVolts, d.vCESatVolts]).toEqual([0.7, 0.6, 0.5, 0.8, 0.2]);
  });

  it("model parameters lie in the ranges typical of public model libraries", () => {
    const dp = d().diode.params;
    expect(dp.IS).toBeGreaterThanOrEqual(2.5e-9);
    expect(dp.IS).toBeLessThanOrEqual(5e-9);
    expect(dp.N).toBeGreaterThanOrEqual(1.75);
    expect(dp.N).toBeLessThanOrEqual(2);
    expect(dp.CJO).toBeGreaterThanOrEqual(0.7e-12);
    expect(dp.CJO).toBeLessThanOrEqual(4e-12);
    expect(dp.TT).toBeGreaterThanOrEqual(3e-9);
    expect(dp.TT).toBeLessThanOrEqual(6e-9);
    const qp = d().npn.params;
    expect(qp.BF).toBeGreaterThanOrEqual(200);
    expect(qp.BF).toBeLessThanOrEqual(420);
    expect(qp.TF).toBeCloseTo(0.3e-9, 15);
    expect(qp.TR).toBeCloseTo(240e-9, 15);
    expect(d().diode.name).toBe("D_GW_SW");
    expect(d().npn.name).toBe("Q_GW_NPN");
  });
  const d = () => DEFAULT_DEVICES;
});

describe("parts file", () => {
  it("accepts the documented shape, with numbers or quantity strings", () => {
    const r = parsePartsFile(
      JSON.stringify({
        diode: { partNumber: "SW-100", model: { IS: 2.5e-9, n: 1.9, CJO: "1.5p" }, vForwardVolts: 0.7, vReverseMaxVolts: "75 V", iForwardMaxAmps: 0.2 },
        npn: { partNumber: "NPN-40", model: { BF: 250 }, betaMin: 40, vceMaxVolts: 40, icMaxAmps: "200 mA" },
      }),
    );
    expect(r.diagnostics).toEqual([]);
    expect(r.value!.diode!.model).toEqual({ IS: 2.5e-9, N: 1.9, CJO: 1.5e-12 });
    expect(r.value!.diode!.vReverseMaxVolts).toBe(75);
    expect(r.value!.npn!.icMaxAmps).toBeCloseTo(0.2, 12);
    const dev = resolveDevices(r.value);
    expect(dev.betaMin).toBe(40);
    expect(dev.npn.params.BF).toBe(250);
    expect(dev.npn.params.TR).toBe(DEFAULT_DEVICES.npn.params.TR);
    expect(dev.diode.partNumber).toBe("SW-100");
    expect(dev.diodeReverseMaxVolts).toBe(75);
  });

  it("names the JSON key path of every problem (GW6005)", () => {
    const r = validatePartsFile({ diode: { model: { ISS: 1 }, vForwardVolts: "0.7 A" }, npn: { betaMin: -3, colour: "red" }, extra: 1 }, "parts.json");
    expect(r.value).toBeUndefined();
    expect(r.diagnostics.every((x) => x.code === "GW6005" && x.file === "parts.json")).toBe(true);
    const msgs = r.diagnostics.map((x) => x.message);
    expect(msgs.some((m) => m.includes("extra: unknown entry"))).toBe(true);
    expect(msgs.some((m) => m.includes("diode.model.ISS: unknown diode model parameter"))).toBe(true);
    expect(msgs.some((m) => m.includes("diode.vForwardVolts:") && m.includes("expected a voltage"))).toBe(true);
    expect(msgs.some((m) => m.includes("npn.betaMin: must be greater than zero"))).toBe(true);
    expect(msgs.some((m) => m.includes("npn.colour: unknown field"))).toBe(true);
  });

  it("reports bad JSON with its position", () => {
    const r = parsePartsFile('{ "diode": { "partNumber": } }', "p.json");
    expect(r.diagnostics).toHaveLength(1);
    expect(r.diagnostics[0]!.code).toBe("GW6005");
    expect(r.diagnostics[0]!.start).toBe('{ "diode": { "partNumber": '.length);
  });
});

describe("parts file: the fast cells' Schottky clamp diode", () => {
  it("a \"schottky\" entry overrides the generic model, part number and drops; bad fields name their JSON path (GW6005)", () => {
    const r = parsePartsFile(JSON.stringify({ schottky: { partNumber: "SCH-1", model: { CJO: "2p", IS: 5e-9 }, vForwardMinVolts: "0.3 V", vReverseMaxVolts: 70 } }));
    expect(r.diagnostics).toEqual([]);
    const s = resolveDevices(r.value).schottky!;
    expect(s.card.params.CJO).toBeCloseTo(2e-12, 18);
    expect(s.card.params.IS).toBe(5e-9);
    expect(s.card.params.N).toBe(1.05); // the rest of the generic card stays
    expect(s.card.partNumber).toBe("SCH-1");
    expect(s.partNumber).toBe("SCH-1");
    expect(s.vForwardMinVolts).toBeCloseTo(0.3, 12);
    expect(s.vReverseMaxVolts).toBe(70);
    const bad = validatePartsFile({ schottky: { vForwardVolts: -1, model: { XYZ: 1 } } });
    expect(bad.diagnostics.map((d) => d.code)).toEqual(["GW6005", "GW6005"]);
    expect(bad.diagnostics.map((d) => d.message).join("\n")).toMatch(/schottky\.model\.XYZ: unknown diode model parameter/);
    expect(bad.diagnostics.map((d) => d.message).join("\n")).toMatch(/schottky\.vForwardVolts: must be greater than zero/);
  });
});
