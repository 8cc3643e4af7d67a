// Test vectors for a testbench and the values the logic says each output must take after each.
// Up to `exhaustiveLimit` inputs every combination is walked in Gray-code order (one input
// changes a step, so a latch never sees two inputs race); designs that store state walk the
// Gray sequence forward and back, so each state is both entered and held. Above the limit a
// seeded random sequence is used.
import type { LogicGraph } from "../logic/graph.js";
import { StepSimulator, seededRandom, type Tri } from "../logic/evaluate.js";

export interface Stimulus {
  /** One vector per step, input values in declaration order. */
  vectors: (0 | 1)[][];
  /** Expected output values after each step (X where the logic does not decide). */
  expected: Tri[][];
  exhaustive: boolean;
  seed?: number;
}

export function gray(i: number): number {
  return i ^ (i >> 1);
}

export function makeStimulus(g: LogicGraph, opts: { sequential: boolean; exhaustiveLimit?: number; randomCount?: number; seed?: number }): Stimulus {
  const n = g.inputs.length;
  const limit = opts.exhaustiveLimit ?? 10;
  const vectors: (0 | 1)[][] = [];
  const bits = (v: number): (0 | 1)[] => Array.from({ length: n }, (_, i) => ((v >>> i) & 1) as 0 | 1);
  let exhaustive = true;
  let seed: number | undefined;
  if (n <= limit) {
    const count = 2 ** n;
    for (let i = 0; i < count; i++) vectors.push(bits(gray(i)));
    if (opts.sequential && count > 1) for (let i = count - 2; i >= 0; i--) vectors.push(bits(gray(i)));
  } else {
    exhaustive = false;
    seed = opts.seed ?? 1;
    const rand = seededRandom(seed);
    const count = opts.randomCount ?? 256;
    for (let i = 0; i < count; i++) vectors.push(Array.from({ length: n }, () => (rand() & 1) as 0 | 1));
  }
  const sim = new StepSimulator(g);
  const expected = vectors.map((v) => sim.step(v).outputs);
  const s: Stimulus = { vectors, expected, exhaustive };
  if (seed !== undefined) s.seed = seed;
  return s;
}
