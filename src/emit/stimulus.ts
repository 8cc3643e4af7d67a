// Test vectors for a testbench and the values the logic says each output (and each state
// signal) must take after each.
//
// Combinational designs: up to `exhaustiveLimit` inputs every combination is walked in Gray-code
// order (one input changes a step); above the limit a seeded random sequence is used.
//
// Designs with state but no clock (latches, loops written as equations): the Gray sequence is
// walked once round its cycle and back, so each state is both entered and held, one input
// changing a step.
//
// Clocked designs (one input clocks every flip-flop; see src/sequential/clocking.ts): every
// clock cycle is four steps of equal length —
//   1. the data inputs change (clock low): the sample at its end is the state just before the
//      next rising edge, a full clock period after the previous one;
//   2. the clock rises;  3. the clock stays high;  4. the clock falls.
// So the data change a quarter period before a rising edge and three quarters after one: away
// from the edge, with setup and hold both respected. The data sequence visits every reachable
// state with every combination of the data inputs (a walk that goes, by known transitions, to
// the nearest state with a combination not yet tried), or is a seeded random sequence when the
// inputs or the states are too many.
//
// Every walk starts from the design's initial state (src/sequential/initial.ts): the values
// the testbench holds with `.ic`, released in the first step. The expected values come from the
// logic graph's own unit-delay simulation (StepSimulator), stepped exactly as the testbench is;
// for a graph without loops, from its bit-parallel evaluation, which gives the same values.
import type { LogicGraph } from "../logic/graph.js";
import { StepSimulator, evaluateLoopFree, seededRandom, type Tri } from "../logic/evaluate.js";

export interface ClockPlan {
  /** The clock input's name and position among the inputs. */
  input: string;
  index: number;
  /** Steps per clock cycle (4: data change, rise, high, fall). */
  stepsPerCycle: number;
  cycles: number;
  /** (state, data combination) pairs the walk tried, and how many it found in all. */
  pairsCovered: number;
  pairsFound: number;
  /** False when the walk stopped at its cycle budget before trying every pair it found. */
  complete: boolean;
}

export interface Stimulus {
  /** One vector per step, input values in declaration order. */
  vectors: (0 | 1)[][];
  /** Expected output values after each step (X where the logic does not decide). */
  expected: Tri[][];
  exhaustive: boolean;
  seed?: number;
  /** State signals sampled besides the outputs, and their expected values after each step. */
  stateSignals?: string[];
  stateExpected?: Tri[][];
  /** Values every named signal starts with (the testbench's `.ic`), when the design has state. */
  initial?: Record<string, Tri>;
  /** Signals held to reach that start, and which of them were defaults (no `init`). */
  held?: Record<string, 0 | 1>;
  defaults?: string[];
  clock?: ClockPlan;
  /** Steps whose sample comes just before a rising clock edge (clocked designs). */
  edgeSteps?: number[];
}

export function gray(i: number): number {
  return i ^ (i >> 1);
}

export interface StimulusOptions {
  sequential: boolean;
  exhaustiveLimit?: number;
  randomCount?: number;
  seed?: number;
  /** Starting values of named signals (src/sequential/initial.ts). */
  initial?: ReadonlyMap<string, Tri>;
  held?: ReadonlyMap<string, 0 | 1>;
  defaults?: readonly string[];
  /** State signals to sample besides the outputs. */
  stateSignals?: readonly string[];
  /** The clock input, for a clocked walk. */
  clock?: string;
  /** Names whose values make up "the state" when the clocked walk compares states. */
  stateKey?: readonly string[];
  /** Most clock cycles of a clocked walk (default 256). */
  maxCycles?: number;
  /** Fewest clock cycles: a walk that has tried every pair sooner goes on through the data
   *  combinations in order (default 8). */
  minCycles?: number;
  /** The vector to start with (the one the initial state was settled with); the Gray walk is
   *  rotated to begin there, a random walk starts with it. Default: every input 0. */
  firstVector?: readonly (0 | 1)[];
}

export function makeStimulus(g: LogicGraph, opts: StimulusOptions): Stimulus {
  if (opts.clock !== undefined) {
    const index = g.inputs.findIndex((p) => p.name === opts.clock);
    if (index >= 0) return clockedStimulus(g, index, opts);
  }
  const n = g.inputs.length;
  const limit = opts.exhaustiveLimit ?? 10;
  const vectors: (0 | 1)[][] = [];
  const bits = (v: number): (0 | 1)[] => Array.from({ length: n }, (_, i) => ((v >>> i) & 1) as 0 | 1);
  let exhaustive = true;
  let seed: number | undefined;
  const startCode = (opts.firstVector ?? []).reduce<number>((acc, b, i) => acc | (b << i), 0);
  if (n <= limit) {
    const count = 2 ** n;
    // The Gray sequence is cyclic (its last and first codes differ in one bit too), so it may
    // start anywhere.
    let offset = 0;
    while (offset < count && gray(offset) !== startCode) offset++;
    if (offset === count) offset = 0;
    const code = (i: number) => gray((i + offset) % count);
    for (let i = 0; i < count; i++) vectors.push(bits(code(i)));
    // With state: round the cycle back to the start, then walk it backwards, so every change
    // of one input is made in both directions from both sides (each state entered and held).
    if (opts.sequential && count > 1) for (let i = count; i >= 0; i--) vectors.push(bits(code(i)));
  } else {
    exhaustive = false;
    seed = opts.seed ?? 1;
    const rand = seededRandom(seed);
    const count = opts.randomCount ?? 256;
    // A design with state starts from its initial state, found with the first vector.
    if (opts.initial) vectors.push(opts.firstVector ? [...opts.firstVector] : new Array(n).fill(0));
    for (let i = 0; i < count; i++) vectors.push(Array.from({ length: n }, () => (rand() & 1) as 0 | 1));
  }
  const stateSignals = opts.stateSignals ?? [];
  const { expected, stateExpected } = settle(g, vectors, stateSignals, opts.initial);
  const s: Stimulus = { vectors, expected, exhaustive };
  if (seed !== undefined) s.seed = seed;
  decorate(s, opts, stateExpected);
  return s;
}

/**
 * The values the logic gives each output and state signal after each vector, stepped as the
 * testbench steps. A graph without loops is evaluated bit-parallel (evaluateLoopFree: the same
 * values StepSimulator settles to); a graph with loops is stepped through StepSimulator.
 */
function settle(g: LogicGraph, vectors: readonly (0 | 1)[][], stateSignals: readonly string[], initial: ReadonlyMap<string, Tri> | undefined): { expected: Tri[][]; stateExpected: Tri[][] } {
  const outputs = g.outputs.length;
  const stateNodes = stateSignals.map((name) => g.nodes.findIndex((n) => n.name === name));
  const fast = evaluateLoopFree(g, vectors, [...g.outputs.map((p) => p.node), ...stateNodes.map((id) => Math.max(0, id))]);
  if (fast) {
    return {
      expected: fast.map((row) => row.slice(0, outputs)),
      stateExpected: fast.map((row) => row.slice(outputs).map((x, k) => (stateNodes[k]! < 0 ? "X" : x))),
    };
  }
  const sim = new StepSimulator(g, initial);
  const expected: Tri[][] = [];
  const stateExpected: Tri[][] = [];
  for (const v of vectors) {
    expected.push(sim.step(v).outputs);
    stateExpected.push(stateSignals.map((s) => sim.valueOf(s) ?? "X"));
  }
  return { expected, stateExpected };
}

function decorate(s: Stimulus, opts: StimulusOptions, stateExpected: Tri[][]): void {
  if (opts.stateSignals?.length) {
    s.stateSignals = [...opts.stateSignals];
    s.stateExpected = stateExpected;
  }
  if (opts.initial) s.initial = Object.fromEntries(opts.initial);
  if (opts.held) s.held = Object.fromEntries(opts.held);
  if (opts.defaults) s.defaults = [...opts.defaults];
}

function clockedStimulus(g: LogicGraph, clockIndex: number, opts: StimulusOptions): Stimulus {
  const n = g.inputs.length;
  const dataPositions = g.inputs.map((_, i) => i).filter((i) => i !== clockIndex);
  const m = dataPositions.length;
  const limit = opts.exhaustiveLimit ?? 10;
  const maxCycles = opts.maxCycles ?? 256;
  // A data combination: a number (bit j is the j-th data input) in the covering walk, bits in
  // the random sequence.
  const vectorOf = (data: number | (0 | 1)[], clk: 0 | 1): (0 | 1)[] => {
    const v: (0 | 1)[] = new Array(n).fill(0);
    dataPositions.forEach((pos, j) => (v[pos] = typeof data === "number" ? (((data >>> j) & 1) as 0 | 1) : data[j]!));
    v[clockIndex] = clk;
    return v;
  };
  const sim = new StepSimulator(g, opts.initial);
  const keyNames = opts.stateKey ?? [];
  const key = (): string => keyNames.map((k) => String(sim.valueOf(k) ?? "X")).join("");
  const cycle = (data: number | (0 | 1)[]) => [vectorOf(data, 0), vectorOf(data, 1), vectorOf(data, 1), vectorOf(data, 0)];

  // Step 0: the first data vector with the clock low (releases the initial state).
  const first = dataPositions.reduce((acc, pos, j) => acc | ((opts.firstVector?.[pos] ?? 0) << j), 0);
  const dataSequence: (number | (0 | 1)[])[] = [];
  sim.step(vectorOf(first, 0));
  let exhaustive = true;
  let seed: number | undefined;
  let pairsCovered = 0;
  let pairsFound = 0;
  let complete = true;
  if (m <= limit) {
    // Covering walk over (state, data) pairs.
    const combos = 2 ** m;
    // Data combinations in Gray order, starting from the first vector's.
    let offset = 0;
    while (offset < combos && gray(offset) !== first) offset++;
    const order = Array.from({ length: combos }, (_, i) => gray((i + (offset % combos)) % combos));
    // The simulation always continues from where the walk is; a path to another state is
    // walked, not jumped.
    const tried = new Map<string, Map<number, string>>();
    let here = key();
    tried.set(here, new Map());
    const run = (data: number): string => {
      for (const v of cycle(data)) sim.step(v);
      return key();
    };
    while (dataSequence.length < maxCycles) {
      const untried = order.find((d) => !tried.get(here)!.has(d));
      let data: number;
      if (untried !== undefined) data = untried;
      else {
        // Shortest known path to a state with an untried combination.
        const prev = new Map<string, [string, number]>([[here, ["", -1]]]);
        const queue = [here];
        let goal: string | undefined;
        while (queue.length && goal === undefined) {
          const s = queue.shift()!;
          for (const [d, t] of tried.get(s)!) {
            if (prev.has(t)) continue;
            prev.set(t, [s, d]);
            if (order.some((x) => !tried.get(t)!.has(x))) {
              goal = t;
              break;
            }
            queue.push(t);
          }
        }
        if (goal === undefined) break; // every reachable pair tried
        let s = goal;
        const path: number[] = [];
        while (s !== here) {
          const [p, d] = prev.get(s)!;
          path.push(d);
          s = p;
        }
        data = path[path.length - 1]!;
      }
      const next = run(data);
      dataSequence.push(data);
      tried.get(here)!.set(data, next);
      if (!tried.has(next)) tried.set(next, new Map());
      here = next;
    }
    // Go on to the minimum length, through the combinations in order.
    const minCycles = Math.min(opts.minCycles ?? 8, maxCycles);
    for (let k = 0; dataSequence.length < minCycles; k++) {
      const data = order[k % combos]!;
      const next = run(data);
      dataSequence.push(data);
      tried.get(here)!.set(data, next);
      if (!tried.has(next)) tried.set(next, new Map());
      here = next;
    }
    pairsFound = tried.size * combos;
    pairsCovered = [...tried.values()].reduce((s, t) => s + t.size, 0);
    complete = pairsCovered === pairsFound;
    exhaustive = complete;
  } else {
    exhaustive = false;
    seed = opts.seed ?? 1;
    const rand = seededRandom(seed);
    const count = Math.min(opts.randomCount ?? 256, maxCycles);
    for (let i = 0; i < count; i++) dataSequence.push(Array.from({ length: m }, () => (rand() & 1) as 0 | 1));
    complete = false;
  }

  // The walk found; now the testbench's steps and the values expected after each.
  const vectors: (0 | 1)[][] = [vectorOf(first, 0)];
  for (const d of dataSequence) vectors.push(...cycle(d));
  const replay = new StepSimulator(g, opts.initial);
  const stateSignals = opts.stateSignals ?? [];
  const expected: Tri[][] = [];
  const stateExpected: Tri[][] = [];
  for (const v of vectors) {
    expected.push(replay.step(v).outputs);
    stateExpected.push(stateSignals.map((s) => replay.valueOf(s) ?? "X"));
  }
  const s: Stimulus = { vectors, expected, exhaustive };
  if (seed !== undefined) s.seed = seed;
  s.clock = {
    input: g.inputs[clockIndex]!.name,
    index: clockIndex,
    stepsPerCycle: 4,
    cycles: dataSequence.length,
    pairsCovered,
    pairsFound,
    complete,
  };
  // Samples just before each rising edge: step 0 and each data-change step.
  s.edgeSteps = vectors.map((_, i) => i).filter((i) => i === 0 || (i - 1) % 4 === 0);
  decorate(s, opts, stateExpected);
  return s;
}
