// The worst-case engine: corners, temperature, loading, variants, modes, budgets, ratings.
import { describe, expect, it } from "vitest";
import { sizeDesign } from "../../src/electrical/size.js";
import type { SizedDesign } from "../../src/electrical/types.js";
import { c17, fanoutNet, netlistOf } from "./fixtures.js";

const allOk = (d: SizedDesign): void => {
  for (const t of d.cellTypes) for (const c of t.analysis.constraints) expect(c.ok, `${t.key} ${c.id} ${c.value} vs ${c.limit} at ${c.corner}`).toBe(true);
};
const worstPower = (d: SizedDesign): number => d.totals.staticPowerWatts;

describe("corners and temperature", () => {
  it("the NAND's low-state noise margin is taken at the hot corner, falling faster than the book's 4 mV/°C", () => {
    // The book's V_IL = 2·V_γ + V_γBE − V_D (Millman & Halkias ch. 6) with every drop moving
    // −2 mV/°C (Sedra & Smith) falls 4 mV/°C. The engine's V_IL comes from the model cards
    // (src/electrical/thresholds.ts); at the chain's microampere threshold currents it falls
    // about 5 mV/°C, as ngspice does (test/electrical/thresholds.ngspice.test.ts).
    const forced = { forcedValues: { nand: { rpOhms: 16000, rbOhms: 15000, rcOhms: 4300 } }, resistorTolerance: 0, supplyTolerance: 0 };
    const at = (t: number): { nm: number; corner: string } => {
      const a = sizeDesign(c17(), { supplyVolts: 5, tempMinC: 0, tempMaxC: t, ...forced }).value!.cellTypes[0]!.analysis;
      return { nm: a.noiseMarginLowVolts, corner: a.constraints.find((c) => c.id === "noise-margin-low")!.corner };
    };
    const n25 = at(25);
    const n70 = at(70);
    const n85 = at(85);
    expect(n70.corner).toMatch(/70 °C/);
    expect(n85.corner).toMatch(/85 °C/);
    const slope = (n85.nm - n25.nm) / 60;
    expect(slope).toBeLessThan(-0.0045);
    expect(slope).toBeGreaterThan(-0.0065);
    expect(n70.nm).toBeGreaterThan(n85.nm);
  });

  it("the industrial preset checks −40 and 85 °C, and saturation binds at the cold corner (gain falls)", () => {
    const r = sizeDesign(c17(), { supplyVolts: 5, temperaturePreset: "industrial" });
    const d = r.value!;
    expect(d.corners).toEqual(["4.75 V, -40 °C", "4.75 V, 85 °C", "5.25 V, -40 °C", "5.25 V, 85 °C"]);
    const sat = d.cellTypes[0]!.analysis.constraints.find((c) => c.id === "saturation")!;
    expect(sat.corner).toMatch(/-40 °C/);
    allOk(d);
    // Colder and hotter costs power against the commercial range.
    expect(worstPower(d)).toBeGreaterThanOrEqual(worstPower(sizeDesign(c17(), { supplyVolts: 5 }).value!));
  });

  it("resistor tolerance is taken at its worst: a wider tolerance never allows a smaller satisfied margin", () => {
    const tight = sizeDesign(fanoutNet(6), { supplyVolts: 5, series: "E96" }).value!;
    const loose = sizeDesign(fanoutNet(6), { supplyVolts: 5, series: "E12" }).value!;
    allOk(tight);
    allOk(loose);
    expect(loose.resistorTolerance).toBe(0.1);
    expect(worstPower(loose)).toBeGreaterThanOrEqual(worstPower(tight));
  });
});

describe("loading", () => {
  it("the driver's saturation counts every diode-AND load; the clamp of diode-OR loads shows in V_OH", () => {
    const r = sizeDesign(fanoutNet(5, 2), { supplyVolts: 5 });
    const d = r.value!;
    const driver = d.instances[0]!.analysis;
    expect(driver.andLoads).toBe(5);
    expect(driver.orLoads).toBe(2);
    // The NAND loads of that net see a clamped high level: their high-state noise margin is
    // the clamp (3 drops) less V_IH (2 drops + V_BE − cut-in), about 0.6 V less drift.
    const nandLoad = d.instances[1]!.analysis;
    expect(nandLoad.noiseMarginHighVolts).toBeLessThan(0.65);
    expect(nandLoad.noiseMarginHighVolts).toBeGreaterThan(0.4);
    allOk(d);
  });

  it("a forced fan-out sizes every output for that many loads", () => {
    const r = sizeDesign(c17(), { supplyVolts: 5, fanoutOverride: 8 });
    const d = r.value!;
    expect(d.cellTypes[0]!.analysis.andLoads).toBe(8);
    expect(d.parameters.find((p) => p.name === "fanoutOverride")).toMatchObject({ value: 8, source: "user" });
    allOk(d);
  });
});

describe("the high-fan-out variant (Millman & Halkias Example 6-6)", () => {
  it("is picked when the basic cell cannot meet the fan-out, and the report says so", () => {
    const r = sizeDesign(fanoutNet(20), { supplyVolts: 5 });
    const d = r.value!;
    const note = r.diagnostics.find((x) => x.code === "GW5005")!;
    expect(note.severity).toBe("note");
    expect(note.message).toMatch(/fan-out of 20/);
    const hi = d.cellTypes.find((t) => t.cellId === "nand-hifan")!;
    expect(hi.cells).toEqual([0]);
    expect(hi.key).toBe("gw_nandh2");
    expect(hi.analysis.satMargin).toBeGreaterThanOrEqual(1.2);
    // One more transistor (the level-shift stage) and one fewer diode than a basic cell.
    expect(d.totals.transistors).toBe(21 + 1);
    expect(d.instances[0]!.designators.QLS).toBe("Q1");
    allOk(d);
    // With the basic cell only, the same request fails with a saturation message.
    const basic = sizeDesign(fanoutNet(20), { supplyVolts: 5, variants: "basic" });
    expect(basic.value).toBeUndefined();
    expect(basic.diagnostics.find((x) => x.code === "GW5001")!.message).toMatch(/saturation/);
  });
});

describe("modes", () => {
  it("per-gate never costs more than uniform, and reports its distinct values", () => {
    const net = fanoutNet(6);
    const u = sizeDesign(net, { supplyVolts: 5 }).value!;
    const p = sizeDesign(net, { supplyVolts: 5, mode: "per-gate" }).value!;
    expect(p.mode).toBe("per-gate");
    expect(worstPower(p)).toBeLessThanOrEqual(worstPower(u) * (1 + 1e-12));
    expect(p.totals.distinctResistorValues).toBeGreaterThanOrEqual(u.totals.distinctResistorValues);
    expect(p.cellTypes.length).toBeGreaterThan(1);
    allOk(p);
    // Same topology, same designators.
    expect(p.components.map((c) => c.designator)).toEqual(u.components.map((c) => c.designator));
  });
});

describe("speed", () => {
  it("a gate-delay budget holds at every corner, replaces the speed floors and costs power as it tightens", () => {
    const b600 = sizeDesign(c17(), { supplyVolts: 5, gateDelayMaxSeconds: 600e-9 }).value!;
    const b400 = sizeDesign(c17(), { supplyVolts: 5, gateDelayMaxSeconds: 400e-9 }).value!;
    const b300 = sizeDesign(c17(), { supplyVolts: 5, gateDelayMaxSeconds: 300e-9 }).value!;
    for (const d of [b600, b400, b300]) {
      allOk(d);
      expect(d.cellTypes[0]!.analysis.constraints.map((c) => c.id)).not.toContain("collector-current");
      expect(d.parameters.map((p) => p.name)).not.toContain("turnOffRatioMin");
    }
    expect(b400.cellTypes[0]!.analysis.timing!.tPLHSeconds).toBeLessThanOrEqual(400e-9);
    expect(b300.cellTypes[0]!.analysis.timing!.tPLHSeconds).toBeLessThanOrEqual(300e-9);
    expect(b300.cellTypes[0]!.analysis.timing!.tPHLSeconds).toBeLessThanOrEqual(300e-9);
    expect(worstPower(b400)).toBeGreaterThanOrEqual(worstPower(b600));
    expect(worstPower(b300)).toBeGreaterThanOrEqual(worstPower(b400));
  });

  it("a clock gives a path budget; the critical path runs from an input to an output within it", () => {
    const r = sizeDesign(c17(), { supplyVolts: 5, clockHz: 1e6 });
    const d = r.value!;
    const p = d.criticalPath!;
    expect(p.budgetSeconds).toBeCloseTo(1e-6, 15);
    expect(p.delaySeconds).toBeLessThanOrEqual(1e-6);
    expect(p.depth).toBe(3); // c17: input → 11 → 16 → 22/23
    expect(p.cells).toHaveLength(3);
    expect(["1", "2", "3", "6", "7"]).toContain(p.nets[0]);
    expect(["22", "23"]).toContain(p.nets[p.nets.length - 1]);
  });

  it("an impossible delay says which constraint fails, how close a design gets, and what would relax it", () => {
    const chain = netlistOf("inv2", ["a"], ["y"], [{ fn: "nand", inputs: ["a"], output: "x" }, { fn: "nand", inputs: ["x"], output: "y" }]);
    // The basic cells' limit (the fast variants, which reach further, are checked in
    // test/electrical/fast-sizing.test.ts).
    const r = sizeDesign(chain, { supplyVolts: 5, gateDelayMaxSeconds: 20e-9, variants: "basic" });
    expect(r.value).toBeUndefined();
    const e = r.diagnostics.find((x) => x.code === "GW5001")!;
    expect(e.message).toMatch(/propagation delay, output rising \(t_PLH\) fails first: the best design reaches about (\d+) ns against at most 20 ns/);
    // Storage alone (τ_s ≈ 180 ns for these transit times) keeps any design above ~100 ns.
    const reached = Number(/reaches about (\d+) ns/.exec(e.message)![1]);
    expect(reached).toBeGreaterThan(100);
    expect(reached).toBeLessThan(400);
    expect(e.hint).toMatch(/slower budget/);
  });
});

describe("power", () => {
  it("a power ceiling below what any design reaches gives GW5001 with the best figure", () => {
    const r = sizeDesign(c17(), { supplyVolts: 5, powerCeilingWatts: 2e-3 });
    const e = r.diagnostics.find((x) => x.code === "GW5001")!;
    expect(e.message).toMatch(/static power per gate fails first: the best design reaches about [78]\.\d+ mW against at most 2 mW/);
    expect(e.hint).toMatch(/higher power ceiling/);
  });

  it("a ceiling that fits is met by every gate", () => {
    const d = sizeDesign(c17(), { supplyVolts: 5, powerCeilingWatts: 9e-3 }).value!;
    for (const t of d.cellTypes) expect(Math.max(t.analysis.powerLowWatts, t.analysis.powerHighWatts)).toBeLessThanOrEqual(9e-3);
  });
});

describe("higher supplies and ratings", () => {
  for (const v of [5, 12, 15]) {
    it(`${v} V: every resistor runs at no more than half its rating (common practice)`, () => {
      const r = sizeDesign(fanoutNet(6, 2), { supplyVolts: v });
      const d = r.value!;
      allOk(d);
      for (const c of d.components.filter((x) => x.kind === "R")) {
        expect(c.powerRatingWatts).toBeDefined();
        expect(c.worstPowerWatts!).toBeLessThanOrEqual(0.5 * c.powerRatingWatts!);
      }
      expect(r.diagnostics.some((x) => x.code === "GW5003")).toBe(v > 5.5 / 1.05);
    });
  }

  it("a part rated below the supply is flagged (GW5002)", () => {
    const r = sizeDesign(c17(), { supplyVolts: 15, parts: { npn: { partNumber: "LV-NPN", vceMaxVolts: 10 } } });
    const w = r.diagnostics.filter((x) => x.code === "GW5002");
    expect(w.length).toBeGreaterThan(0);
    expect(w[0]!.message).toMatch(/LV-NPN.*collector-emitter voltage 15\.8 V > 10 V/);
    expect(r.value!.components.find((c) => c.kind === "Q")!.valueText).toBe("LV-NPN");
  });
});

describe("search", () => {
  it("E96 values are used when asked, and each is in the IEC 60063 E96 table", () => {
    const d = sizeDesign(netlistOf("inv2", ["a"], ["y"], [{ fn: "nand", inputs: ["a"], output: "x" }, { fn: "nand", inputs: ["x"], output: "y" }]), { supplyVolts: 5, series: "E96" }).value!;
    const e96 = [100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154, 158, 162, 165, 169, 174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243, 249, 255, 261, 267, 274, 280, 287, 294, 301, 309, 316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549, 562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953, 976];
    for (const c of d.components.filter((x) => x.kind === "R")) {
      const m = Math.round(c.value / 10 ** (Math.floor(Math.log10(c.value)) - 2));
      expect(e96).toContain(m);
      expect(c.tolerance).toBe(0.01);
    }
    allOk(d);
  });

  it("no cheaper standard value set exists among the neighbours of the chosen one (local optimality)", () => {
    // Each of R_P and R_C one E24 step up (less power) must break some constraint.
    const base = sizeDesign(c17(), { supplyVolts: 5 }).value!.cellTypes[0]!.values;
    const up = (x: number): number => {
      const e24 = [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91, 100];
      const dec = 10 ** (Math.floor(Math.log10(x)) - 1);
      const i = e24.indexOf(Math.round(x / dec));
      return e24[i + 1]! * dec;
    };
    for (const k of ["rpOhms", "rcOhms"] as const) {
      const forced = { nand: { ...base, [k]: up(base[k]!) } };
      const r = sizeDesign(c17(), { supplyVolts: 5, forcedValues: forced });
      const fails = r.value!.cellTypes.flatMap((t) => t.analysis.constraints.filter((c) => !c.ok));
      expect(fails.length, `${k} one step up`).toBeGreaterThan(0);
    }
  });
});
