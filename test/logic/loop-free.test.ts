// Bit-parallel three-valued evaluation of loop-free graphs (evaluateLoopFree, which the
// testbench's expected values use) against the unit-delay StepSimulator, vector after vector,
// on random graphs (fast-check): without a loop the settled values of a step do not depend on
// the previous state, so both must agree on every output and every named signal. Three-valued
// logic as in Kleene's strong logic of indeterminacy (an unknown operand decides nothing unless
// another operand does); common practice in logic simulation.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { StepSimulator, evaluateLoopFree } from "../../src/logic/evaluate.js";
import type { LogicGraph, LogicNode, LogicOp } from "../../src/logic/graph.js";
import { makeStimulus } from "../../src/emit/stimulus.js";

const ops: LogicOp[] = ["and", "or", "xor", "not", "buf", "const0", "const1"];

interface Raw {
  op: LogicOp;
  a: number;
  b: number;
  c: number;
  arity: number;
  named: boolean;
}

/** A loop-free graph: ports x0.., maybe an input node without a port (reads X), then gates
 *  over earlier nodes, some named (delayed in StepSimulator). */
function build(inputs: number, floating: boolean, raw: Raw[], outs: number[]): LogicGraph {
  const nodes: LogicNode[] = [];
  for (let i = 0; i < inputs; i++) nodes.push({ op: "input", fanins: [], name: `x${i}` });
  if (floating) nodes.push({ op: "input", fanins: [], name: "floating" });
  raw.forEach((r, k) => {
    const avail = nodes.length;
    const pick = (x: number) => x % avail;
    let fanins: number[];
    if (r.op === "const0" || r.op === "const1") fanins = [];
    else if (r.op === "not" || r.op === "buf") fanins = [pick(r.a)];
    else fanins = [pick(r.a), pick(r.b), pick(r.c)].slice(0, 2 + (r.arity % 2));
    const node: LogicNode = { op: r.op, fanins };
    if (r.named) node.name = `s${k}`;
    nodes.push(node);
  });
  return {
    name: "t",
    nodes,
    inputs: Array.from({ length: inputs }, (_, i) => ({ name: `x${i}`, node: i })),
    outputs: outs.map((o, i) => ({ name: `y${i}`, node: o % nodes.length })),
  };
}

const graphArb = fc
  .record({
    inputs: fc.integer({ min: 1, max: 6 }),
    floating: fc.boolean(),
    raw: fc.array(fc.record({ op: fc.constantFrom(...ops), a: fc.nat(), b: fc.nat(), c: fc.nat(), arity: fc.nat(), named: fc.boolean() }), { minLength: 1, maxLength: 20 }),
    outs: fc.array(fc.nat(), { minLength: 1, maxLength: 5 }),
  })
  .map(({ inputs, floating, raw, outs }) => build(inputs, floating, raw, outs));

const withVectors = graphArb.chain((g) =>
  fc.tuple(fc.constant(g), fc.array(fc.array(fc.constantFrom<0 | 1>(0, 1), { minLength: g.inputs.length, maxLength: g.inputs.length }), { minLength: 1, maxLength: 300 })),
);

describe("evaluateLoopFree equals the step simulator on loop-free graphs", () => {
  it("every output and named signal, after every vector of a random sequence", () => {
    fc.assert(
      fc.property(withVectors, ([g, vectors]) => {
        const named = g.nodes.map((n, id) => [n.name, id] as const).filter(([name]) => name !== undefined && !name.startsWith("x"));
        const fast = evaluateLoopFree(g, vectors, [...g.outputs.map((p) => p.node), ...named.map(([, id]) => id)])!;
        const sim = new StepSimulator(g);
        vectors.forEach((v, i) => {
          const step = sim.step(v);
          expect(step.settled).toBe(true);
          expect(fast[i]!.slice(0, g.outputs.length)).toEqual(step.outputs);
          expect(fast[i]!.slice(g.outputs.length)).toEqual(named.map(([name]) => sim.valueOf(name!)));
        });
      }),
      { numRuns: 300, seed: 3 },
    );
  });

  it("makeStimulus gives the step simulator's expected values (random walk above the exhaustive limit)", () => {
    fc.assert(
      fc.property(graphArb, fc.integer({ min: 0, max: 3 }), (g, limit) => {
        const st = makeStimulus(g, { sequential: false, exhaustiveLimit: limit, randomCount: 100, stateSignals: ["s0", "s1"] });
        const sim = new StepSimulator(g);
        st.vectors.forEach((v, i) => {
          expect(st.expected[i]).toEqual(sim.step(v).outputs);
          expect(st.stateExpected?.[i]).toEqual(["s0", "s1"].map((s) => sim.valueOf(s) ?? "X"));
        });
      }),
      { numRuns: 200, seed: 5 },
    );
  });

  it("a graph with a loop is left to the step simulator", () => {
    const g: LogicGraph = {
      name: "latch",
      nodes: [
        { op: "input", fanins: [], name: "s" },
        { op: "or", fanins: [0, 1], name: "q" },
      ],
      inputs: [{ name: "s", node: 0 }],
      outputs: [{ name: "q", node: 1 }],
    };
    expect(evaluateLoopFree(g, [[0]], [1])).toBeUndefined();
  });
});
