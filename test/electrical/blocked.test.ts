// The shortcut that settles a mixed NAND/NOR design that cannot be sized with one search of the
// blocking kind (blockedKind in src/electrical/size.ts): the cell fact it rests on, and its
// verdict against the full search over every kind at each shared R_C (the structural oracle).
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { nandCell } from "../../src/cells/nand/index.js";
import { norCell, norInputClampVolts } from "../../src/cells/nor/index.js";
import type { CellEnv, InputDrive, OutputLoad } from "../../src/cells/types.js";
import { DEFAULT_DEVICES, devicesAt } from "../../src/electrical/devices.js";
import { sizeDesign } from "../../src/electrical/size.js";
import { buildLogicGraph } from "../../src/logic/index.js";
import { dtlCostModel, mapToCells } from "../../src/map/index.js";
import { parseVerilog } from "../../src/parse/verilog.js";
import { randomNetwork } from "../bench/designs.js";

describe("a diode-AND load's current never eases a driver's static constraints", () => {
  // Derived from the output stage of Millman & Halkias, Integrated Electronics, ch. 6 (as
  // modelled in src/cells): a low diode-AND input's current flows into the driver's collector on
  // top of R_C's, so the transistor needs more base current to stay saturated.
  const ohms = fc.constantFrom(330, 1000, 2200, 4700, 10_000, 47_000, 220_000);
  it("saturation margin, low and high noise margins, sink current and power, for NAND and NOR", () => {
    fc.assert(
      fc.property(
        fc.record({ rp: ohms, rb: ohms, rc: ohms, supply: fc.constantFrom(4.5, 5, 12, 15), temp: fc.constantFrom(-40, 25, 85), loads: fc.integer({ min: 0, max: 20 }), orLoads: fc.integer({ min: 0, max: 6 }), low: fc.double({ min: 0, max: 0.02, noNaN: true }), more: fc.double({ min: 0, max: 0.02, noNaN: true }), nor: fc.boolean() }),
        ({ rp, rb, rc, supply, temp, loads, orLoads, low, more, nor }) => {
          const env: CellEnv = { vccVolts: supply, dev: devicesAt(DEFAULT_DEVICES, temp), orShareFactor: 0.8 };
          const clamp = norInputClampVolts(env);
          const drive: InputDrive = nor
            ? { vLowMaxVolts: 0.2, vHighMinVolts: clamp, orSourceAmps: (supply - clamp) / rc, orSourceOhms: rc, orSourceMaxAmps: (supply - clamp) / rc }
            : { vLowMaxVolts: 0.2, vHighMinVolts: supply, orSourceAmps: 0, orSourceOhms: Infinity, orSourceMaxAmps: 0 };
          const load = (sink: number): OutputLoad => ({ andLoads: loads, andSinkAmps: sink, orLoads, orClampVolts: clamp, capacitanceFarads: 0 });
          const cell = nor ? norCell : nandCell;
          const values = nor ? { rbOhms: rb, rcOhms: rc } : { rpOhms: rp, rbOhms: rb, rcOhms: rc };
          const a = cell.analyze(values, env, load(low), drive);
          const b = cell.analyze(values, env, load(low + more), drive);
          expect(b.satMargin).toBeLessThanOrEqual(a.satMargin);
          expect(b.vOLVolts).toBeGreaterThanOrEqual(a.vOLVolts);
          expect(b.noiseMarginLowVolts).toBeLessThanOrEqual(a.noiseMarginLowVolts);
          expect(b.noiseMarginHighVolts).toBeLessThanOrEqual(a.noiseMarginHighVolts);
          expect(b.iCAmps + b.iLoadAmps).toBeGreaterThanOrEqual(a.iCAmps + a.iLoadAmps);
          expect(Math.max(b.powerLowWatts, b.powerHighWatts)).toBeGreaterThanOrEqual(Math.max(a.powerLowWatts, a.powerHighWatts));
          expect(b.iTurnOffAmps / b.iCAmps).toBeLessThanOrEqual(a.iTurnOffAmps / a.iCAmps);
        },
      ),
      { numRuns: 2000, seed: 7 },
    );
  });
});

describe("the shortcut gives the full search's verdict", () => {
  // Random layered networks of our own (test/bench/designs.ts) mapped to mixed NAND/NOR cells:
  // heavily loaded nets defeat the NOR's diode-OR inputs on the larger ones.
  const cases = [100, 300, 1000].flatMap((gates) => [5, 12].map((supply) => ({ gates, supply })));
  it.each(cases)("$gates gates at $supply V: the same outcome, the same kind named", ({ gates, supply }) => {
    const text = randomNetwork(gates);
    const g = buildLogicGraph(parseVerilog(text, "random.v").value!).value!;
    const mapped = mapToCells(g, { stateNames: [], maxFanin: 8, cells: "mixed", costModel: dtlCostModel(), wiredAnd: false }).value!;
    const quick = { supplyVolts: supply, mode: "uniform" as const, quickFailure: true };
    const short = sizeDesign(mapped, quick);
    const full = sizeDesign(mapped, { ...quick, fullSearch: true });
    expect(!!short.value).toBe(!!full.value);
    const kindOf = (r: typeof short) => r.diagnostics.filter((d) => d.code === "GW5001").map((d) => d.message.split(":")[0]);
    expect(kindOf(short)).toEqual(kindOf(full));
    if (short.value) expect(short.value.cellTypes.map((t) => t.values)).toEqual(full.value!.cellTypes.map((t) => t.values));
  });

  it("some of these cases are blocked and some are sized (the check above is not empty)", () => {
    const outcomes = [300, 100].map((gates) => {
      const g = buildLogicGraph(parseVerilog(randomNetwork(gates), "random.v").value!).value!;
      const mapped = mapToCells(g, { stateNames: [], maxFanin: 8, cells: "mixed", costModel: dtlCostModel(), wiredAnd: false }).value!;
      return !!sizeDesign(mapped, { supplyVolts: 12, mode: "uniform", quickFailure: true }).value;
    });
    expect(outcomes).toEqual([false, true]);
  });
});
