// sizeDesign: Millman & Halkias Example 6-5 reproduced with forced values, supply changes that
// keep designators, infeasible requests.
import { describe, expect, it } from "vitest";
import { eachComponent, sizeDesign } from "../../src/electrical/size.js";
import { c17, fanoutNet, netlistOf } from "./fixtures.js";

// One NAND-2 driving `n` NAND-2 loads, sized at exactly the book's conditions.
const bookConditions = {
  supplyTolerance: 0,
  tempMinC: 25,
  tempMaxC: 25,
  resistorTolerance: 0,
  saturationMarginMin: 1,
  betaMin: 30,
};

describe("forced values reproduce Millman & Halkias Example 6-5", () => {
  it("I_B 0.40 mA, I_C 2.18 mA, minimum gain 5.45 with no load; fan-out 11 holds and 12 fails", () => {
    const forced = { nand: { rpOhms: 5000, rbOhms: 5000, rcOhms: 2200 } };
    const r11 = sizeDesign(fanoutNet(11), { supplyVolts: 5, ...bookConditions, forcedValues: forced });
    expect(r11.value).toBeDefined();
    const leaf = r11.value!.instances[1]!.analysis; // a load gate with no load of its own
    expect(leaf.iBAmps * 1e3).toBeCloseTo(0.4, 9);
    expect(leaf.iCAmps * 1e3).toBeCloseTo(2.18, 2);
    expect(leaf.betaNeeded).toBeCloseTo(4.8 / 2.2 / 0.4, 9); // 5.45 in the book
    // The book's low-state margin is 0.8 V (cut-in sum); the engine's V_IL comes from the model
    // cards (src/electrical/thresholds.ts, within 10 mV of ngspice): 0.78 V here.
    expect(leaf.noiseMarginLowVolts).toBeGreaterThan(0.75);
    expect(leaf.noiseMarginLowVolts).toBeLessThan(0.8);
    const driver = r11.value!.instances[0]!.analysis;
    expect(driver.andLoads).toBe(11);
    expect(driver.satMargin).toBeGreaterThanOrEqual(1);
    expect(driver.maxFanout).toBe(11);
    expect(r11.diagnostics.filter((d) => d.code === "GW5004")).toEqual([]);
    const r12 = sizeDesign(fanoutNet(12), { supplyVolts: 5, ...bookConditions, forcedValues: forced });
    expect(r12.value!.instances[0]!.analysis.satMargin).toBeLessThan(1);
    expect(r12.diagnostics.some((d) => d.code === "GW5004")).toBe(true);
  });
});

describe("sizing by search", () => {
  it("5 V and 12 V both fit c17, with different values and identical designators", () => {
    const a = sizeDesign(c17(), { supplyVolts: 5 });
    const b = sizeDesign(c17(), { supplyVolts: 12 });
    expect(a.value).toBeDefined();
    expect(b.value).toBeDefined();
    const da = a.value!;
    const db = b.value!;
    expect(da.components.map((c) => c.designator)).toEqual(db.components.map((c) => c.designator));
    expect(da.instances.map((i) => i.designators)).toEqual(db.instances.map((i) => i.designators));
    expect(da.cellTypes[0]!.values).not.toEqual(db.cellTypes[0]!.values);
    // 6 NAND-2 cells: 6 transistors, 6·(2 + 2) diodes, 6·3 resistors; R1.. in cell order.
    expect(da.totals).toMatchObject({ transistors: 6, diodes: 24, resistors: 18, capacitors: 0 });
    expect(da.instances[0]!.designators).toEqual({ DIN1: "D1", DIN2: "D2", RP: "R1", DLS1: "D3", DLS2: "D4", RB: "R2", RC: "R3", Q1: "Q1" });
    expect(da.instances[5]!.designators.RC).toBe("R18");
    // The parts list, the cells' designators and the totals tell the same story: every part of
    // cell U(k+1) is on the list once, in cell order, numbered on from the cells before it.
    // Common practice: reference designators are a class letter (R, D, Q, C, as in IEEE 315,
    // from memory) and a number running 1..N per letter, each used once.
    const listed = da.components;
    const walked: string[] = [];
    eachComponent(da, (part, designator, cell) => {
      walked.push(`${cell}:${designator}:${part.kind}:${part.value}`);
    });
    expect(walked).toEqual(listed.map((c) => `${c.instance}:${c.designator}:${c.kind}:${c.value}`));
    expect(listed.map((c) => c.designator).sort()).toEqual(da.instances.flatMap((i) => Object.values(i.designators)).sort());
    for (const [kind, total] of [["Q", da.totals.transistors], ["D", da.totals.diodes], ["R", da.totals.resistors]] as const) {
      const numbers = listed.filter((c) => c.kind === kind).map((c) => Number(c.designator.slice(1)));
      expect(numbers).toEqual(Array.from({ length: total }, (_, k) => k + 1));
    }
    // 12 V carries the high-supply caution, 5 V does not.
    expect(b.diagnostics.some((d) => d.code === "GW5003")).toBe(true);
    expect(a.diagnostics.some((d) => d.code === "GW5003")).toBe(false);
  });

  it("every chosen value is an E24 value and every constraint holds at every corner", () => {
    const r = sizeDesign(c17(), { supplyVolts: 5 });
    const e24 = [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91];
    for (const c of r.value!.components.filter((x) => x.kind === "R")) {
      const m = c.value / 10 ** (Math.floor(Math.log10(c.value)) - 1);
      expect(e24).toContain(Math.round(m));
      expect(c.powerRatingWatts).toBe(0.125);
    }
    for (const t of r.value!.cellTypes) {
      expect(t.analysis.constraints.length).toBeGreaterThan(3);
      for (const c of t.analysis.constraints) expect(c.ok, `${t.key} ${c.id}`).toBe(true);
      expect(t.analysis.satMargin).toBeGreaterThanOrEqual(1.2);
    }
    expect(r.value!.corners).toEqual(["4.75 V, 0 °C", "4.75 V, 70 °C", "5.25 V, 0 °C", "5.25 V, 70 °C"]);
  });

  it("records which parameters the user gave", () => {
    const r = sizeDesign(c17(), { supplyVolts: 5, betaMin: 40 });
    const p = (n: string) => r.value!.parameters.find((x) => x.name === n)!;
    expect(p("supplyVolts").source).toBe("user");
    expect(p("betaMin")).toMatchObject({ value: 40, source: "user" });
    expect(p("supplyTolerance")).toMatchObject({ value: 0.05, source: "default" });
    expect(p("tempMaxC")).toMatchObject({ value: 70, source: "default" });
  });

  it("sizes a design mixing NAND and NOR loads on one net", () => {
    const r = sizeDesign(fanoutNet(4, 3), { supplyVolts: 5 });
    expect(r.value).toBeDefined();
    const nor = r.value!.cellTypes.find((t) => t.fn === "nor")!;
    expect(nor.pins).toEqual(["in1", "in2", "out", "vcc"]);
    for (const t of r.value!.cellTypes) for (const c of t.analysis.constraints) expect(c.ok, `${t.key} ${c.id}`).toBe(true);
    // The driver of the NOR loads is clamped high at about 2.2 V minus the hot-corner drift.
    const driver = r.value!.instances[0]!.analysis;
    expect(driver.vOHVolts).toBeLessThan(2.3);
  });

  it("an impossible request gives GW5001 naming the constraint and what would relax it", () => {
    const r = sizeDesign(fanoutNet(20), { supplyVolts: 5, betaMin: 2 });
    expect(r.value).toBeUndefined();
    const d = r.diagnostics.find((x) => x.code === "GW5001")!;
    expect(d).toBeDefined();
    expect(d.severity).toBe("error");
    expect(d.message).toMatch(/saturation/);
    expect(d.hint).toMatch(/more transistor gain/);
  });

  it("bad options are diagnostics, not exceptions", () => {
    expect(sizeDesign(c17(), { supplyVolts: -5 }).diagnostics[0]!.code).toBe("GW6003");
    expect(sizeDesign(c17(), { supplyVolts: 5, series: "E7" as never }).diagnostics[0]!.code).toBe("GW6006");
    const empty = netlistOf("empty", ["a"], [], []);
    expect(sizeDesign(empty, { supplyVolts: 5 }).diagnostics[0]!.code).toBe("GW5001");
  });
});
