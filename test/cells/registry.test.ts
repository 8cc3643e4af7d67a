import { describe, expect, it } from "vitest";
import { basicCellFor, CELLS, cellById, variantsFor } from "../../src/cells/registry.js";

describe("cell registry", () => {
  it("has the basic NAND, the NOR and the high-fan-out NAND first (then the fast variants), with unique ids and prefixes", () => {
    expect(CELLS.map((c) => c.id).slice(0, 3)).toEqual(["nand", "nor", "nand-hifan"]);
    expect(new Set(CELLS.map((c) => c.keyPrefix)).size).toBe(CELLS.length);
    expect(basicCellFor("nand").id).toBe("nand");
    expect(basicCellFor("nor").id).toBe("nor");
    expect(variantsFor("nand").filter((c) => !c.speedUp).map((c) => c.id)).toEqual(["nand-hifan"]);
    expect(cellById("nope")).toBeUndefined();
  });

  it("every topology names its components uniquely, with SPICE-valid element letters", () => {
    for (const c of CELLS)
      for (const k of [1, 2, 5]) {
        const t = c.topology(k);
        const names = t.components.map((x) => x.name);
        expect(new Set(names).size).toBe(names.length);
        for (const x of t.components) expect(x.name[0]).toBe(x.kind);
        expect(t.pins.slice(0, k)).toEqual(Array.from({ length: k }, (_, i) => `in${i + 1}`));
        expect(t.pins.slice(k)).toEqual(["out", "vcc"]);
        expect(t.components.filter((x) => x.role === "DIN").length).toBe(k);
        // Every resistor names a parameter of the cell.
        for (const x of t.components.filter((y) => y.kind === "R")) expect(c.parameters.map((p) => p.key)).toContain(x.valueKey);
      }
  });
});
