// The graph builder cleans AND and OR operand lists two ways: short lists with plain arrays,
// long ones (more than 16 operands) with a set and a map. Both must give the same node for
// the same operands (structural hashing is only sound if equal gates meet), and the laws they
// apply (identity, absorbing constant, idempotence, x·x̄ = 0, x + x̄ = 1; common practice) are
// checked against the truth table of the operands.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { GraphBuilder, liveNodes } from "../../src/optimize/builder.js";
import { graphFacts, supportOf } from "../../src/optimize/tables.js";
import { seededRandom, truthTable, type LogicGraph } from "../../src/logic/index.js";

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

// The builder's table of gates grows as the graph does, and the passes walk graphs whose state
// signals read nodes made after them (a placeholder bound later). The references below are
// written independently in the test: a table of gates keyed by their text, and a plain
// depth-first reachability walk.
describe("graph builder: structural hashing at size, and the walks over what it builds", () => {
  it("a gate made again (operands in any order) is the node made first, however large the table has grown", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), (seed) => {
        const rand = seededRandom(seed);
        const b = new GraphBuilder();
        const ids = Array.from({ length: 6 }, (_, i) => b.input(`i${i}`));
        const made: { op: "and" | "or" | "xor" | "not"; args: number[]; id: number }[] = [];
        for (let k = 0; k < 3000; k++) {
          const op = (["and", "or", "xor", "not"] as const)[rand() % 4]!;
          const count = op === "not" ? 1 : 2 + (rand() % 3);
          const args = Array.from({ length: count }, () => ids[rand() % ids.length]!);
          const id = op === "not" ? b.not(args[0]!) : b[op](args);
          made.push({ op, args, id });
          ids.push(id);
        }
        for (const m of made) {
          const again = [...m.args].reverse();
          expect(m.op === "not" ? b.not(again[0]!) : b[m.op](again)).toBe(m.id);
        }
        // No two gates alike.
        const seen = new Map<string, number>();
        b.nodes.forEach((n, id) => {
          if (n.op !== "and" && n.op !== "or" && n.op !== "xor" && n.op !== "not") return;
          const key = `${n.op}(${n.fanins.join(",")})`;
          expect(seen.get(key)).toBeUndefined();
          seen.set(key, id);
        });
      }),
      { numRuns: 8, seed: 11 },
    );
  });

  it("liveNodes and supportOf agree with plain walks when state signals read later nodes", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), (seed) => {
        const rand = seededRandom(seed);
        const b = new GraphBuilder();
        const ids = Array.from({ length: 4 }, (_, i) => b.input(`i${i}`));
        const states = Array.from({ length: 3 }, (_, i) => b.placeholder(`s${i}`));
        ids.push(...states);
        for (let k = 0; k < 60; k++) {
          const args = [ids[rand() % ids.length]!, ids[rand() % ids.length]!];
          ids.push(rand() % 5 === 0 ? b.not(args[0]!) : rand() % 2 ? b.and(args) : b.or(args));
        }
        // Each state signal's next value: a node made after it (some of it reachable only so).
        for (const s of states) b.bind(s, ids[ids.length - 1 - (rand() % 20)]!);
        const outputs = [ids[ids.length - 1 - (rand() % 30)]!];
        const g: LogicGraph = {
          name: "t",
          nodes: b.nodes,
          inputs: ids.slice(0, 4).map((node, i) => ({ name: `i${i}`, node })),
          outputs: outputs.map((node, k) => ({ name: `y${k}`, node })),
        };
        const cuts = new Set(states);
        // Reference reachability: from the outputs and the state signals, through every operand.
        const reach = new Set<number>();
        const visit = (id: number) => {
          if (reach.has(id)) return;
          reach.add(id);
          for (const f of g.nodes[id]!.fanins) visit(f);
        };
        for (const p of g.outputs) visit(p.node);
        for (const s of states) visit(s);
        for (const p of g.inputs) reach.add(p.node);
        const live = liveNodes(g, cuts);
        g.nodes.forEach((_, id) => expect(live[id] === 1).toBe(reach.has(id)));
        // Reference support: the inputs and state signals (and nodes of `stops`) a node's
        // operands lead to, without passing through them.
        const f = graphFacts(g, ["s0", "s1", "s2"]);
        const stops = new Set(ids.filter(() => rand() % 4 === 0));
        for (let root = 0; root < g.nodes.length; root++) {
          if (f.free.has(root)) continue;
          const leaves = new Set<number>();
          const seen = new Set<number>();
          const walk = (id: number) => {
            if (seen.has(id)) return;
            seen.add(id);
            if (f.free.has(id) || (stops.has(id) && id !== root)) {
              leaves.add(id);
              return;
            }
            for (const x of g.nodes[id]!.fanins) walk(x);
          };
          for (const x of g.nodes[root]!.fanins) walk(x);
          const want = [...leaves].sort((p, q) => p - q);
          expect(supportOf(f, root, stops)).toEqual(want);
          expect(supportOf(f, root, stops, want.length)).toEqual(want);
          if (want.length > 0) expect(supportOf(f, root, stops, want.length - 1)).toBeUndefined();
        }
      }),
      { numRuns: 40, seed: 5 },
    );
  });
});
