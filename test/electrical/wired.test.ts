// Wired-AND sizing: several open-collector NAND outputs tied onto one net with ONE collector
// resistor. The hand calculation is derived from Millman & Halkias, Integrated Electronics
// (McGraw-Hill), ch. 6, Example 6-5 (the basic DTL NAND: V_CC 5 V, R_P 5 kΩ, R_B 5 kΩ,
// R_C 2.2 kΩ, diode 0.7 V, V_BE(sat) 0.8 V, V_CE(sat) 0.2 V; I_1 0.56 mA, I_2 0.16 mA,
// I_B 0.40 mA, I_C 2.18 mA, 0.82 mA per driven input, fan-out 11 at gain 30), extended to N tied
// transistors:
//   - low: the fewest transistors on is one, and it alone sinks R_C's current and every load's:
//     β_min·I_B ≥ I_C + F·0.82 mA, the single gate's condition whatever N is (sharing the
//     current among N would wrongly allow (I_C + F·0.82 mA)/N each). So the fan-out stays 11
//     at gain 30 for N = 1, 2, 4, 8;
//   - high: all N off, V_OH = V_CC − (N·I_CBO + F·I_R)·R_C, with I_CBO and the diode reverse
//     current I_R at the corner's temperature;
//   - supply: R_C draws its 2.18 mA whenever any transistor is on, so the driver (which holds
//     R_C) draws I_C in both of its own states, and a tied cell only its input stage.
import { describe, expect, it } from "vitest";
import { sizeDesign } from "../../src/electrical/size.js";
import type { SizedDesign, SizingOptions } from "../../src/electrical/types.js";
import { DEFAULT_DIODE_MODEL } from "../../src/electrical/devices.js";
import { wiredNet } from "./wired-fixtures.js";

const BOOK = { rpOhms: 5000, rbOhms: 5000, rcOhms: 2200 };
/** One corner, 25 °C, exact parts: the textbook's conditions. */
const AT_25C: SizingOptions = { supplyVolts: 5, supplyTolerance: 0, tempMinC: 25, tempMaxC: 25, resistorTolerance: 0, saturationMarginMin: 1, forcedValues: { nand: BOOK } };

function sized(n: number, f: number, o: Partial<SizingOptions> = {}): SizedDesign {
  const r = sizeDesign(wiredNet(n, f), { ...AT_25C, ...o });
  expect(r.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  return r.value!;
}

/** Cells on net w: the driver and the tied ones (cells 0..n−1 of wiredNet). */
const onNet = (d: SizedDesign, n: number) => d.instances.slice(0, n);

// Reverse saturation current of the diode card at 25 °C by SPICE's temperature law (ngspice
// manual, diode model: IS(T) = IS·(T/Tnom)^(XTI/N)·exp((T/Tnom − 1)·EG/(N·kT/q)), Tnom 27 °C),
// written out here independently of src/electrical/leakage.ts.
function diodeIsAt(tempC: number): number {
  const p = DEFAULT_DIODE_MODEL.params;
  const t = tempC + 273.15;
  const r = t / 300.15;
  const vt = (1.380649e-23 * t) / 1.602176634e-19;
  return p.IS! * r ** (p.XTI! / p.N!) * Math.exp(((r - 1) * p.EG!) / (p.N! * vt));
}
/** The documented default collector leakage I_CBO at 25 °C (src/electrical/leakage.ts; a
 *  datasheet-class maximum, from memory). */
const ICBO_25C = 50e-9;

describe("wired-AND: Millman & Halkias Example 6-5 extended to N tied transistors (derived from)", () => {
  const iB = 0.56e-3 - 0.16e-3; // I_1 − I_2 (read)
  const iC = (5 - 0.2) / 2200; // 2.18 mA (read, the book rounds)
  const iLoad = (5 - 0.7 - 0.2) / 5000; // 0.82 mA per driven input (derived)

  for (const n of [1, 2, 4, 8])
    it(`N = ${n}: each transistor on the net alone sinks R_C's current and all 3 loads`, () => {
      const d = sized(n, 3);
      for (const inst of onNet(d, n)) {
        const a = inst.analysis;
        expect(a.iBAmps).toBeCloseTo(iB, 9);
        expect(a.iCAmps).toBeCloseTo(iC, 9);
        expect(a.iLoadAmps).toBeCloseTo(3 * iLoad, 9);
        // Gain needed (I_C + 3·0.82 mA)/0.40 mA = 11.6, the same as one gate alone.
        expect(a.betaNeeded).toBeCloseTo((iC + 3 * iLoad) / iB, 6);
        expect(a.satMargin).toBeCloseTo((30 * iB) / (iC + 3 * iLoad), 6);
        // Fan-out 11 at gain 30: 30·0.40 ≥ 2.18 + 11·0.82, not 12 (the book's fan-out).
        expect(a.maxFanout).toBe(11);
      }
    });

  it("the high level droops by (N·I_CBO + F·I_R)·R_C: N = 4 tied, F = 3 diode-AND loads", () => {
    const d = sized(4, 3);
    const droop = (4 * ICBO_25C + 3 * diodeIsAt(25)) * 2200;
    for (const inst of onNet(d, 4)) expect(inst.analysis.vOHVolts).toBeCloseTo(5 - droop, 9);
    // The loads see that level: their high-state noise margin is smaller by the droop than
    // with the same loads on an output of its own.
    const plain = sized(1, 3);
    const nmh = (x: SizedDesign, n: number) => x.instances[n]!.analysis.noiseMarginHighVolts;
    expect(nmh(plain, 1) - nmh(d, 4)).toBeCloseTo(droop, 9);
    // The report's figure of the net's leakage at this corner.
    expect(d.instances[0]!.analysis.wired!.highLeakageAmps).toBeCloseTo(4 * ICBO_25C + 3 * diodeIsAt(25), 15);
  });

  it("the leakage is taken at the hot corner: at 70 °C I_CBO has doubled 4.5 times (every 10 °C, common practice)", () => {
    const d = sized(4, 0, { tempMinC: 70, tempMaxC: 70 });
    const leak = 4 * ICBO_25C * 2 ** 4.5;
    expect(d.instances[0]!.analysis.wired!.highLeakageAmps).toBeCloseTo(leak, 12);
    expect(d.instances[0]!.analysis.vOHVolts).toBeCloseTo(5 - leak * 2200, 9);
  });

  it("supply current: R_C's 2.18 mA counted once per net, in the driver, in both its states", () => {
    // Inputs high: a cell draws I_1 = 0.56 mA; one input low: (5 − 0.7 − 0.2)/5 kΩ = 0.82 mA.
    // Driver: max(0.56 + 2.18, 0.82 + 2.18) = 3.00 mA; each tied cell max(0.56, 0.82) = 0.82 mA.
    const n = 4;
    const d = sized(n, 0);
    const driver = d.instances[0]!.analysis;
    expect(driver.supplyCurrentAmps).toBeCloseTo(iLoad + iC, 9);
    for (const inst of d.instances.slice(1)) expect(inst.analysis.supplyCurrentAmps).toBeCloseTo(iLoad, 9);
    expect(d.totals.supplyCurrentAmps).toBeCloseTo(iLoad + iC + (n - 1) * iLoad, 9);
    // Without wired-AND each of the four gates would carry its own R_C: max(2.74, 0.82) mA each.
    const own = 0.56e-3 + iC;
    expect(d.totals.supplyCurrentAmps).toBeLessThan(n * own);
  });

  it("parts: one R_C for the net, in the driver; the tied cells have R_P and R_B only", () => {
    const n = 4;
    const d = sized(n, 3);
    const rc = d.components.filter((c) => c.role === "RC" && c.instance < n);
    expect(rc.map((c) => c.instance)).toEqual([0]);
    for (let i = 1; i < n; i++) {
      expect(d.components.filter((c) => c.instance === i && c.kind === "R").map((c) => c.role)).toEqual(["RP", "RB"]);
      expect(d.instances[i]!.designators.RC).toBeUndefined();
    }
    // Hand count (Millman & Halkias ex. 6-5 parts per NAND-2: 4 diodes, 3 resistors, 1
    // transistor), less one resistor per tied output.
    const cells = n + 3;
    expect(d.totals.resistors).toBe(3 * cells - (n - 1));
    expect(d.totals.diodes).toBe(4 * cells);
    expect(d.totals.transistors).toBe(cells);
    const types = d.cellTypes.map((t) => `${t.key}${t.openCollector ? " oc" : ""}`);
    expect(types).toContain("gw_nand2_oc oc");
    expect(d.cellTypes.find((t) => t.openCollector)!.elements.some((e) => e.name === "RC")).toBe(false);
  });
});

describe("wired-AND: the tied transistors stay off against their own leakage", () => {
  it("GW5006 when I_CBO·R_B reaches the base-emitter cut-in at the hot corner, not otherwise", () => {
    // I_CBO 50 nA at 25 °C doubles 4.5 times by 70 °C: 1.13 µA; through R_B 1 MΩ (+5 %) that is
    // 1.2 V, above the cut-in (0.5 V − 2 mV/°C × 45 °C = 0.41 V): the base is not held off.
    const high = sizeDesign(wiredNet(3, 1), { supplyVolts: 5, forcedValues: { nand: { ...BOOK, rbOhms: 1e6 } } });
    expect(high.diagnostics.map((x) => x.code)).toContain("GW5006");
    // R_B 5 kΩ: 6 mV, far below it.
    const book = sizeDesign(wiredNet(3, 1), { supplyVolts: 5, forcedValues: { nand: BOOK } });
    expect(book.diagnostics.map((x) => x.code)).not.toContain("GW5006");
  });
});

describe("wired-AND: the net's capacitance in the switching times", () => {
  // SPICE depletion charge of a junction (ngspice manual, BJT model, reverse bias):
  // Q(V) = CJ0·VJ/(1 − M)·(1 − (1 − V/VJ)^(1 − M)); its mean capacitance over v1..v2 is
  // ΔQ/ΔV. The card gives CJC 3.6 pF and leaves VJC, MJC at ngspice's defaults 0.75 V, 0.33.
  const q = (v: number) => ((3.6e-12 * 0.75) / (1 - 0.33)) * (1 - (1 - v / 0.75) ** (1 - 0.33));
  const meanC = (v1: number, v2: number) => Math.abs((q(v1) - q(v2)) / (v1 - v2));

  it("every other tied collector adds its collector junction to the capacitance R_C charges", () => {
    const one = sized(1, 2).instances[0]!.analysis;
    const eight = sized(8, 2).instances[0]!.analysis;
    // The off transistors' bases sit near ground: each junction is reverse biased by the
    // output, from V_OL to the 50 % level on the rise.
    const vOL = 0.2;
    const v50 = (vOL + eight.vOHVolts) / 2;
    const extra = eight.timing!.loadCapacitanceFarads - one.timing!.loadCapacitanceFarads;
    expect(extra).toBeCloseTo(7 * meanC(-vOL, -v50), 15);
    // The one transistor that turns on discharges all of it: t_PHL grows.
    expect(eight.timing!.tPHLSeconds).toBeGreaterThan(one.timing!.tPHLSeconds);
  });

  it("with many tied collectors the R_C rise (t_PLH) slows", () => {
    const t = (n: number) => sized(n, 2).instances[0]!.analysis.timing!;
    // Past the Miller-limited start the rise is R_C·C: 16 collectors on 2.2 kΩ add ~30 pF.
    expect(t(16).tRiseSeconds).toBeGreaterThan(t(1).tRiseSeconds * 1.2);
    expect(t(16).tPLHSeconds).toBeGreaterThan(t(1).tPLHSeconds);
  });
});

describe("wired-AND: uniform and per-gate sizing", () => {
  const allOk = (d: SizedDesign): void => {
    for (const t of d.cellTypes) for (const c of t.analysis.constraints) expect(c.ok, `${t.key} ${c.id} ${c.value} vs ${c.limit} at ${c.corner}`).toBe(true);
  };
  for (const mode of ["uniform", "per-gate"] as const)
    it(`${mode}: every constraint met at every corner, and the net keeps one R_C value`, () => {
      const n = 4;
      const r = sizeDesign(wiredNet(n, 3), { supplyVolts: 5, mode });
      expect(r.diagnostics.filter((x) => x.severity === "error")).toEqual([]);
      const d = r.value!;
      allOk(d);
      const rcOf = (cell: number) => d.cellTypes[d.instances[cell]!.cellType]!.values.rcOhms;
      for (let i = 1; i < n; i++) expect(rcOf(i)).toBe(rcOf(0));
      expect(d.components.filter((c) => c.role === "RC" && c.instance < n)).toHaveLength(1);
      expect(d.notes.some((x) => x.startsWith("Wired-AND:"))).toBe(true);
    });

  it("per-gate never costs more power than uniform with wired nets", () => {
    const u = sizeDesign(wiredNet(3, 2), { supplyVolts: 5 }).value!;
    const p = sizeDesign(wiredNet(3, 2), { supplyVolts: 5, mode: "per-gate" }).value!;
    expect(p.totals.staticPowerWatts).toBeLessThanOrEqual(u.totals.staticPowerWatts * (1 + 1e-9));
  });
});

describe("wired-AND: GW5001 says when the wired nets are what makes a design infeasible", () => {
  it("a collector junction leakage (ISC) so large that tied collectors collapse the high level", () => {
    // ISC 30 µA on the transistor card: each off collector leaks tens of µA (more when hot);
    // 12 of them on one net pull the high level through R_C below what the loads need unless
    // R_C is tiny, and then no base drive saturates against R_C's current. The same cells
    // with each output on its own net fit.
    const parts = { npn: { model: { ISC: 3e-5 } } };
    const wired = sizeDesign(wiredNet(12, 2), { supplyVolts: 5, series: "E12", parts, powerCeilingWatts: 0.05 });
    const e = wired.diagnostics.find((x) => x.code === "GW5001");
    expect(e, JSON.stringify(wired.diagnostics)).toBeDefined();
    expect(e!.message).toMatch(/wired-AND nets make it infeasible/);
    expect(e!.hint).toMatch(/build without --wired-and/);
    // And the message is not given where the wired nets are not the reason.
    const plain = sizeDesign(wiredNet(1, 2), { supplyVolts: 5, series: "E12", parts, powerCeilingWatts: 0.05 });
    expect(plain.value).toBeDefined();
    const tooHot = sizeDesign(wiredNet(2, 2), { supplyVolts: 5, series: "E12", powerCeilingWatts: 1e-5 });
    const e2 = tooHot.diagnostics.find((x) => x.code === "GW5001")!;
    expect(e2.message).not.toMatch(/wired-AND/);
  });
});
