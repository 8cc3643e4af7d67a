// Logic that feeds a loop stays hazard-free: a D latch written as a multiplexer with its
// consensus term, q = d&en | q&!en | d&q (the textbook hazard-free latch: without d&q, q can
// drop for a moment when en falls with d = q = 1, and the loop may latch the glitch; Unger,
// *Asynchronous Sequential Switching Circuits*; common practice). After optimization the mapped
// cells are simulated with one unit of delay per cell (a simulator written here, independent of
// src/logic): q must hold 1 through the fall of en. The same latch without the consensus term
// is the control: the simulator must see it fail.
import { describe, expect, it } from "vitest";
import type { CellNetlist } from "../../src/map/index.js";
import { DTL, NAND2, synth, type Target } from "./support.js";

/** Steps every net once per time unit from the previous values; returns the watched net's trace. */
function unitDelay(nl: CellNetlist, inputs: Record<string, 0 | 1>, values: Uint8Array, steps: number, watch: string): string {
  const w = nl.nets.findIndex((n) => n.name === watch);
  let trace = "";
  for (let s = 0; s < steps; s++) {
    const next = Uint8Array.from(values);
    for (const net of nl.nets) {
      if (net.driver.kind === "input") next[net.index] = inputs[net.name]!;
      else if (net.driver.kind === "tie") next[net.index] = net.driver.value;
      else {
        let v = 1;
        for (const ci of [net.driver.cell, ...(net.tiedCells ?? [])]) {
          const c = nl.cells[ci]!;
          const ins = c.inputs.map((x) => values[x]!);
          const conducts = c.fn === "nand" ? ins.every((x) => x === 1) : ins.some((x) => x === 1);
          if (conducts) v = 0;
        }
        next[net.index] = v;
      }
    }
    values.set(next);
    trace += String(values[w]);
  }
  return trace;
}

function enFalls(text: string, target: Target, level: 0 | 2) {
  const b = synth(text, target, level);
  expect(b.eq.equivalent).toBe(true);
  expect(b.stateNames).toEqual(["q"]);
  const values = new Uint8Array(b.netlist.nets.length);
  const settle = unitDelay(b.netlist, { d: 1, en: 1 }, values, 30, "q");
  expect(settle.endsWith("1111")).toBe(true); // transparent with d = 1: q = 1
  return { trace: unitDelay(b.netlist, { d: 1, en: 0 }, values, 30, "q"), b };
}

const LATCH = "input d, en; output q; q = d&en | q&!en | d&q;";
const BARE = "input d, en; output q; q = d&en | q&!en;";

describe("hazard-free logic in front of a loop (latch as a multiplexer)", () => {
  for (const [label, target] of [["two-input NANDs", NAND2], ["DTL mixed cells", DTL]] as const) {
    it(`keeps q at 1 while en falls, after optimization (${label})`, () => {
      const { trace } = enFalls(LATCH, target, 2);
      expect(trace).toBe("1".repeat(30));
    });

    it(`the control without the consensus term glitches, so the simulation can tell (${label})`, () => {
      const { trace } = enFalls(BARE, target, 0);
      expect(trace).toContain("0");
    });
  }

  it("keeps the consensus term: the optimized next-state logic still has three product terms' worth of cells", () => {
    const a = synth(LATCH, NAND2, 2);
    const b = synth(BARE, NAND2, 2);
    expect(a.netlist.cells.length).toBeGreaterThan(b.netlist.cells.length);
  });
});
