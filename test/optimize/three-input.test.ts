// All 256 functions of three inputs, each written as its list of minterms: after optimization
// and mapping the cells compute the function (checked two ways: our equivalence check, and the
// cells' truth table against the minterm list itself), and the DTL part count is never worse
// than mapping the canonical sum directly (--opt 0) — both with every part counting one and
// with the default weights. (Boolean algebra: every function of three variables is the sum of
// its minterms; common practice.)
import { describe, expect, it } from "vitest";
import { truthTable } from "../../src/logic/index.js";
import { cellsToLogic, dtlCostModel, PART_COUNT_WEIGHTS, tallyParts } from "../../src/map/index.js";
import { DTL, synth, type Target } from "./support.js";

function source(f: number): string {
  const on = Array.from({ length: 8 }, (_, k) => k).filter((k) => (f >> k) & 1);
  return `input a, b, c; output y; y(a, b, c) = m(${on.join(", ")});`;
}

function check(target: Target, label: string) {
  it(`every function equivalent and no dearer than --opt 0 (${label})`, () => {
    let saved = 0;
    for (let f = 0; f < 256; f++) {
      const text = source(f);
      const direct = synth(text, target, 0);
      const opt = synth(text, target, 2);
      expect(opt.eq.equivalent, `function ${f}`).toBe(true);
      // The cells' own truth table against the minterms: minterm k is a = bit 2, b = bit 1, c = bit 0.
      const table = truthTable(cellsToLogic(opt.netlist))[0]!;
      for (let k = 0; k < 8; k++) {
        const a = (k >> 2) & 1, b = (k >> 1) & 1, c = k & 1;
        const point = a | (b << 1) | (c << 2); // input order a, b, c: a is variable 0
        expect((table[0]! >>> point) & 1, `function ${f}, minterm ${k}`).toBe((f >> k) & 1);
      }
      const before = tallyParts(direct.netlist, target.costModel).cost;
      const after = tallyParts(opt.netlist, target.costModel).cost;
      expect(after, `function ${f}`).toBeLessThanOrEqual(before);
      saved += before - after;
    }
    expect(saved).toBeGreaterThan(0);
  });
}

describe("all 256 three-input functions", () => {
  check({ ...DTL, costModel: dtlCostModel(PART_COUNT_WEIGHTS) }, "plain part count");
  check(DTL, "default weights");
});
