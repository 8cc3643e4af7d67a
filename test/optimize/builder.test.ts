// The graph builder cleans AND and OR operand lists two ways: short lists with plain arrays,
// long ones (more than 16 operands) with a set and a map. Both must give the same node for
// the same operands (structural hashing is only sound if equal gates meet), and the laws they
// apply (identity, absorbing constant, idempotence, x·x̄ = 0, x + x̄ = 1; common practice) are
// checked against the truth table of the operands.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { GraphBuilder } from "../../src/optimize/builder.js";
import { truthTable, type LogicGraph } from "../../src/logic/index.js";

/** Operand pools: four inputs, their complements and both constants. */
function pool(b: GraphBuilder): number[] {
  const ins = ["a", "b", "c", "d"].map((x) => b.input(x));
  return [...ins, ...ins.map((x) => b.not(x)), b.constant(0), b.constant(1)];
}

describe("graph builder: AND and OR operand lists", () => {
  it("a list and the same list repeated past the short-list size give the same node", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 9 }), { minLength: 1, maxLength: 12 }), fc.boolean(), (picks, isAnd) => {
        const b = new GraphBuilder();
        const p = pool(b);
        const args = picks.map((k) => p[k]!);
        const make = (xs: number[]) => (isAnd ? b.and(xs) : b.or(xs));
        const short = make(args);
        const long = make([...args, ...args, ...args].slice(0, Math.max(17, args.length))); // same set of operands
        const longer = make(Array.from({ length: 17 }, (_, i) => args[i % args.length]!));
        expect(long).toBe(short);
        expect(longer).toBe(short);
        // The node computes the AND / OR of the operands.
        const g: LogicGraph = { name: "t", nodes: b.nodes, inputs: p.slice(0, 4).map((node, i) => ({ name: "abcd"[i]!, node })), outputs: [{ name: "y", node: short }] };
        const table = truthTable(g)[0]!;
        const inputsOf = (v: number) => [0, 1, 2, 3].map((i) => (v >> i) & 1);
        const value = (k: number, v: number) => (k < 4 ? inputsOf(v)[k]! : k < 8 ? 1 - inputsOf(v)[k - 4]! : k === 8 ? 0 : 1);
        for (let v = 0; v < 16; v++) {
          const want = isAnd ? (picks.every((k) => value(k, v) === 1) ? 1 : 0) : picks.some((k) => value(k, v) === 1) ? 1 : 0;
          expect((table[v >> 5]! >>> (v & 31)) & 1).toBe(want);
        }
      }),
      { numRuns: 400, seed: 3 },
    );
  });
});
