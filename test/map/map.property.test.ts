// Property: for random expressions, the mapped NAND/NOR cell netlist computes the same function
// as the expression, checked two ways: by our equivalence checker, and by a direct evaluation
// of the syntax tree written independently in test/support (Boolean algebra, common practice).
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { buildLogicGraph, checkEquivalence, truthTable } from "../../src/logic/index.js";
import { optimizeLogic } from "../../src/optimize/index.js";
import { cellsToLogic, mapToCells, type CellChoice } from "../../src/map/index.js";
import { evalExpr, exprArb, sourceOf } from "../support/exprs.js";

const NAMES = ["a", "b", "c", "d", "e"];

function mapped(outputs: [string, ReturnType<typeof evalExpr> extends number ? any : never][], cells: CellChoice, maxFanin: number) {
  const built = buildLogicGraph(sourceOf("t", NAMES, outputs));
  expect(built.value).toBeDefined();
  const g = built.value!;
  const opt = optimizeLogic(g, { stateNames: [], maxFanin });
  const m = mapToCells(opt, { stateNames: [], maxFanin, cells });
  expect(m.value).toBeDefined();
  return { g, netlist: m.value! };
}

describe("mapping is equivalent to the source", () => {
  for (const cells of ["mixed", "nand", "nor"] as const) {
    for (const maxFanin of [2, 3, 8]) {
      it(`random expressions, cells=${cells}, max fan-in ${maxFanin}`, () => {
        fc.assert(
          fc.property(fc.array(exprArb(NAMES), { minLength: 1, maxLength: 3 }), (exprs) => {
            const outs = exprs.map((e, i) => [`y${i}`, e] as [string, any]);
            const { g, netlist } = mapped(outs, cells, maxFanin);
            const impl = cellsToLogic(netlist);
            const eq = checkEquivalence(g, impl, { stateNames: [] });
            expect(eq.problem).toBeUndefined();
            expect(eq.equivalent).toBe(true);
            // Independent evaluation of the syntax tree on all 32 vectors.
            const table = truthTable(impl);
            for (let v = 0; v < 32; v++) {
              const env: Record<string, number> = {};
              NAMES.forEach((n, i) => (env[n] = (v >> i) & 1));
              exprs.forEach((e, k) => {
                const bit = (table[k]![v >> 5]! >>> (v & 31)) & 1;
                expect(bit).toBe(evalExpr(e, env));
              });
            }
            // Fan-in limit honoured; only the allowed families used.
            for (const c of netlist.cells) {
              expect(c.inputs.length).toBeLessThanOrEqual(maxFanin);
              if (cells !== "mixed") expect(c.fn).toBe(cells);
            }
          }),
          { numRuns: 150, seed: 42 },
        );
      });
    }
  }
});
