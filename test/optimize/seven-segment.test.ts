// The BCD-to-seven-segment decoder of examples/seven-segment.logic, with don't-cares for the
// codes 10-15, optimized and mapped: its cells give the standard segment pattern for every
// valid code (the usual digit shapes, 6 and 9 with tails; common practice, from memory), and
// the don't-cares make it smaller than the same table with 0 at codes 10-15.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { truthTable } from "../../src/logic/index.js";
import { cellsToLogic, tallyParts } from "../../src/map/index.js";
import { DTL, NAND2, synth } from "./support.js";

const text = readFileSync(new URL("../../examples/seven-segment.logic", import.meta.url), "utf8");

/** Segments a..g lit for each digit (common practice). */
const SEGMENTS: Record<number, string> = {
  0: "abcdef",
  1: "bc",
  2: "abdeg",
  3: "abcdg",
  4: "bcfg",
  5: "acdfg",
  6: "acdefg",
  7: "abc",
  8: "abcdefg",
  9: "abcdfg",
};

function checkDigits(netlist: Parameters<typeof cellsToLogic>[0]) {
  const logic = cellsToLogic(netlist);
  const names = logic.outputs.map((o) => o.name);
  expect(names).toEqual(["a", "b", "c", "d", "e", "f", "g"]);
  const inputs = logic.inputs.map((p) => p.name);
  expect(inputs).toEqual(["d3", "d2", "d1", "d0"]);
  const table = truthTable(logic);
  for (let digit = 0; digit <= 9; digit++) {
    // Input i is bit i of the point: d3 is input 0.
    const point = ((digit >> 3) & 1) | (((digit >> 2) & 1) << 1) | (((digit >> 1) & 1) << 2) | ((digit & 1) << 3);
    const lit = names.filter((_, k) => (table[k]![0]! >>> point) & 1).join("");
    expect(lit, `digit ${digit}`).toBe(SEGMENTS[digit]);
  }
}

describe("BCD to seven-segment decoder with don't-cares for codes 10-15", () => {
  for (const [label, target] of [["DTL parts, mixed cells", DTL], ["two-input NANDs", NAND2]] as const) {
    it(`shows every digit right after optimization and mapping (${label})`, () => {
      const b = synth(text, target);
      expect(b.eq.equivalent).toBe(true);
      expect(b.eq.complete).toBe(true);
      // The check left the codes 10-15 free for every segment: 6 points each.
      for (const c of b.eq.cones) expect(c.dontCarePoints).toBe(6);
      checkDigits(b.netlist);
    });
  }

  it("is cheaper than the same table without its don't-cares, and than --opt 0", () => {
    const free = synth(text, DTL);
    const zeros = synth(text.replace(/- - - - - - -/g, "0 0 0 0 0 0 0"), DTL);
    const direct = synth(text, DTL, 0);
    expect(zeros.eq.equivalent).toBe(true);
    const cost = (b: typeof free) => tallyParts(b.netlist, DTL.costModel).cost;
    expect(cost(free)).toBeLessThan(cost(zeros));
    expect(cost(free)).toBeLessThan(cost(direct));
    expect(free.report.twoLevel.exact).toBeGreaterThan(0);
  });
});
