// Which input vectors a verification run applies, so a run stays within minutes.
// - While the synthesized testbench's own walk fits the budget, it is used as it is (every
//   combination, or for designs with state the walk src/emit/stimulus.ts plans: initial state,
//   each state entered and held, clock cycles).
// - A combinational design too large for that: every combination when that fits after all,
//   otherwise a seeded random sequence plus vectors chosen so that every output takes both
//   values.
// - A design with state too large for that: the first steps of the planned walk (whole clock
//   cycles), which keeps its initial state and its expected values.
// The coverage is described so the summary can say what was and was not exercised.
import type { LogicGraph } from "../logic/graph.js";
import { StepSimulator, enumerationWords, seededRandom, simulateWords, type Tri } from "../logic/evaluate.js";
import { coneOf } from "../logic/graph.js";
import { evaluationOrder } from "../logic/loops.js";
import { dontCareMask } from "../logic/dontcares.js";
import { makeStimulus, type Stimulus } from "../emit/stimulus.js";

export interface Coverage {
  /** "exhaustive": every input combination (for designs with state: every state and input
   *  pair the walk found); "sampled": a selection. */
  kind: "exhaustive" | "sampled";
  steps: number;
  inputs: number;
  /** Distinct input vectors applied, and 2^inputs. */
  distinctVectors: number;
  combinations: number;
  randomVectors: number;
  /** Vectors added after the random ones so every output takes both values. */
  toggleVectors: number;
  /** When the run is the first steps of a longer planned walk: that walk's length. */
  prefixOf?: number;
  seed?: number;
  /** Signals (outputs, then sampled state signals) seen at 0 and at 1 in the expected values. */
  bothValues: string[];
  /** Signals never expected at one of the values, with the value missing. */
  missing: { signal: string; value: 0 | 1 }[];
  /** One sentence for the summary. */
  text: string;
}

export interface ChosenVectors {
  stimulus: Stimulus;
  coverage: Coverage;
  /** True when these are the synthesized testbench's own vectors (its file can be run as is). */
  fromSynthesis: boolean;
}

export interface VectorBudget {
  /** Most steps a run may take. */
  maxSteps: number;
  seed?: number;
}

/**
 * Steps a run may take: a verification may spend about 40 000 cell-steps (cells × steps, summed
 * over its runs; 80 000 with the system ngspice, which runs two at a time). Measured with
 * gatewright's testbenches on a desktop processor, a cell-step costs 1–3 ms in either ngspice
 * (the embedded engine after its first run is as fast as the system binary), so a verification
 * stays within about two minutes. Between 32 and 4096 steps a run.
 */
export function defaultMaxSteps(cells: number, runs: number, simulator: "embedded" | "system"): number {
  const cellSteps = simulator === "system" ? 80_000 : 40_000;
  const steps = Math.floor(cellSteps / Math.max(1, cells) / Math.max(1, runs));
  return Math.max(32, Math.min(4096, steps));
}

function signalsSeen(st: Stimulus, outputNames: readonly string[]) {
  const stateNames = st.stateSignals ?? [];
  const names = [...outputNames, ...stateNames];
  const seen = names.map(() => [false, false]);
  const mark = (row: readonly Tri[] | undefined, offset: number) =>
    row?.forEach((v, k) => {
      if (v === 0) seen[offset + k]![0] = true;
      else if (v === 1) seen[offset + k]![1] = true;
    });
  st.expected.forEach((r) => mark(r, 0));
  (st.stateExpected ?? []).forEach((r) => mark(r, outputNames.length));
  const both = names.filter((_, k) => seen[k]![0] && seen[k]![1]);
  const missing: { signal: string; value: 0 | 1 }[] = [];
  names.forEach((n, k) => {
    if (!seen[k]![0]) missing.push({ signal: n, value: 0 });
    if (!seen[k]![1]) missing.push({ signal: n, value: 1 });
  });
  return { both, missing };
}

function describe(c: Omit<Coverage, "text">, st: Stimulus, hasState: boolean): string {
  const seen =
    c.missing.length === 0
      ? `every output${st.stateSignals?.length ? " and state signal" : ""} took both values`
      : `never expected: ${c.missing.slice(0, 8).map((m) => `${m.signal}=${m.value}`).join(", ")}${c.missing.length > 8 ? ` and ${c.missing.length - 8} more` : ""}`;
  const pct = (100 * c.distinctVectors) / c.combinations;
  const pctText = pct >= 1 ? `${Math.round(pct)} %` : `${pct.toPrecision(2)} %`;
  if (st.clock) {
    const k = st.clock;
    const walk = k.complete && c.prefixOf === undefined ? `every input combination in every state reached (${k.pairsCovered} state and input pairs)` : c.prefixOf !== undefined ? `the first ${c.steps} of the planned ${c.prefixOf} steps` : `${k.pairsCovered} of the ${k.pairsFound} state and input pairs found`;
    return `${k.cycles} clock cycles on ${k.input} (${c.steps} steps): ${walk}; ${seen}`;
  }
  if (c.prefixOf !== undefined) return `the first ${c.steps} of the ${c.prefixOf} steps the testbench plans (${c.distinctVectors} of the ${c.combinations} input combinations, ${pctText}); ${seen}`;
  if (c.kind === "exhaustive") {
    return `every combination of the ${c.inputs} input${c.inputs === 1 ? "" : "s"} (${c.steps} steps${hasState ? ", forward and back so each state is entered and held" : ""}); ${seen}`;
  }
  return (
    `${c.randomVectors} seeded random vectors (seed ${c.seed})` +
    (c.toggleVectors ? ` and ${c.toggleVectors} chosen to toggle outputs` : "") +
    `: ${c.distinctVectors} of the ${c.combinations} input combinations (${pctText}); ${seen}`
  );
}

/** Inputs of an output's cone up to which a vector giving a wanted value is searched outright. */
export const CONE_SEARCH_INPUTS_MAX = 20;

/**
 * A vector for which output `k` of a combinational graph is `value`: the output's cone is
 * evaluated bit-parallel over every assignment of its inputs (up to CONE_SEARCH_INPUTS_MAX of
 * them) and the first assignment giving the value is taken; inputs outside the cone come from
 * `rand`. Undefined when no assignment gives it (a constant output) or the cone is too wide.
 */
export function vectorGiving(g: LogicGraph, k: number, value: 0 | 1, rand: () => number): (0 | 1)[] | undefined {
  const root = g.outputs[k]!.node;
  const cone = new Set(coneOf(g, [root]));
  const support = g.inputs.map((p, i) => ({ node: p.node, i })).filter((x) => cone.has(x.node));
  if (support.length > CONE_SEARCH_INPUTS_MAX) return undefined;
  const order = evaluationOrder(g, new Set());
  if (!order) return undefined;
  const words = Math.max(1, 2 ** support.length / 32);
  const free = new Map(support.map((x, j) => [x.node, enumerationWords(j, words)] as [number, Uint32Array]));
  const needed = new Uint8Array(g.nodes.length);
  for (const id of cone) needed[id] = 1;
  const out = simulateWords(g, order, free, words, needed)[root];
  if (!out) return undefined;
  const count = 2 ** support.length;
  for (let idx = 0; idx < count; idx++) {
    const bit = (out[idx >>> 5]! >>> (idx & 31)) & 1;
    if (bit !== value) continue;
    const v = g.inputs.map(() => (rand() & 1) as 0 | 1);
    support.forEach((x, j) => (v[x.i] = ((idx >>> j) & 1) as 0 | 1));
    return v;
  }
  return undefined;
}

/** The first `steps` steps of a planned walk (whole clock cycles for a clocked one). */
export function prefixStimulus(st: Stimulus, steps: number): Stimulus {
  let k = Math.max(1, Math.min(steps, st.vectors.length));
  if (st.clock) k = Math.max(1, 1 + Math.floor((k - 1) / st.clock.stepsPerCycle) * st.clock.stepsPerCycle);
  const out: Stimulus = { ...st, vectors: st.vectors.slice(0, k), expected: st.expected.slice(0, k), exhaustive: false };
  if (st.stateExpected) out.stateExpected = st.stateExpected.slice(0, k);
  if (st.edgeSteps) out.edgeSteps = st.edgeSteps.filter((i) => i < k);
  if (st.clock) out.clock = { ...st.clock, cycles: Math.floor((k - 1) / st.clock.stepsPerCycle), complete: false };
  return out;
}

export interface VectorContext {
  graph: LogicGraph;
  /** Loop state signals of the source. */
  stateNames: readonly string[];
  /** Names kept through optimization (for the don't-care points), default the state names. */
  keptNames?: readonly string[];
  /** The synthesized testbench's own stimulus. */
  synthesized: Stimulus;
}

/**
 * The vectors of a verification run (see the head of this file). Random vectors come from the
 * same seeded generator as the testbench's; for each output value not yet seen, 256 further
 * random vectors are tried, then the output's cone is searched outright (vectorGiving), within
 * a reserve of the budget.
 */
export function chooseVectors(ctx: VectorContext, budget: VectorBudget): ChosenVectors {
  const g = ctx.graph;
  const st0 = ctx.synthesized;
  const n = g.inputs.length;
  const outputNames = g.outputs.map((o) => o.name);
  const combinations = 2 ** n;
  const hasState = ctx.stateNames.length > 0 || st0.clock !== undefined || st0.initial !== undefined;
  const distinct = (vs: (0 | 1)[][]) => new Set(vs.map((v) => v.join(""))).size;
  const describeAs = (st: Stimulus, fromSynthesis: boolean, extra: Partial<Coverage> = {}): ChosenVectors => {
    const seen = signalsSeen(st, outputNames);
    const c: Omit<Coverage, "text"> = {
      kind: st.exhaustive ? "exhaustive" : "sampled",
      steps: st.vectors.length,
      inputs: n,
      distinctVectors: distinct(st.vectors),
      combinations,
      randomVectors: st.exhaustive || st.clock ? 0 : st.vectors.length,
      toggleVectors: 0,
      bothValues: seen.both,
      missing: seen.missing,
      ...extra,
    };
    if (st.seed !== undefined && c.seed === undefined) c.seed = st.seed;
    return { stimulus: st, coverage: { ...c, text: describe(c, st, hasState) }, fromSynthesis };
  };

  if (st0.vectors.length <= budget.maxSteps) {
    const own = describeAs(st0, true);
    if (st0.exhaustive || hasState || own.coverage.missing.length === 0) return own;
  } else if (hasState) {
    return describeAs(prefixStimulus(st0, budget.maxSteps), false, { prefixOf: st0.vectors.length });
  }

  // Combinational from here on.
  const kept = ctx.keptNames ?? ctx.stateNames;
  const masked = (st: Stimulus): Stimulus => {
    const free = dontCareMask(g, kept, st.vectors);
    if (free) st.expected = st.expected.map((row, i) => row.map((x, k) => (free[i]![k] ? "X" : x)));
    return st;
  };
  if (!st0.exhaustive && n <= 20 && combinations <= budget.maxSteps) {
    return describeAs(masked(makeStimulus(g, { sequential: false, exhaustiveLimit: n })), false);
  }
  const target = Math.min(budget.maxSteps, Math.max(st0.vectors.length, 32) + 2 * outputNames.length);
  const seed = budget.seed ?? st0.seed ?? 1;
  const rand = seededRandom(seed);
  const randomVector = (): (0 | 1)[] => Array.from({ length: n }, () => (rand() & 1) as 0 | 1);
  const reserve = Math.min(Math.max(2 * outputNames.length, 8), Math.floor(target / 4));
  const randomCount = Math.max(1, target - reserve);
  const vectors: (0 | 1)[][] = [];
  for (let i = 0; i < randomCount; i++) vectors.push(randomVector());
  const sim = new StepSimulator(g);
  const evaluate = (v: (0 | 1)[]): Tri[] => {
    const out = sim.step(v).outputs;
    const free = dontCareMask(g, kept, [v])?.[0];
    return free ? out.map((x, k) => (free[k] ? "X" : x)) : out;
  };
  const expected = vectors.map(evaluate);
  const seenValue = outputNames.map((_, k) => [expected.some((r) => r[k] === 0), expected.some((r) => r[k] === 1)]);
  let toggles = 0;
  outputNames.forEach((_, k) => {
    for (const value of [0, 1] as const) {
      if (seenValue[k]![value] || toggles >= reserve) continue;
      // Random tries first (cheap), then the cone searched outright.
      for (let tries = 0; tries < 256 + 1; tries++) {
        const v = tries < 256 ? randomVector() : vectorGiving(g, k, value, rand);
        if (!v) break;
        const e = evaluate(v);
        if (e[k] !== value) continue;
        vectors.push(v);
        expected.push(e);
        e.forEach((x, j) => {
          if (x === 0) seenValue[j]![0] = true;
          else if (x === 1) seenValue[j]![1] = true;
        });
        toggles++;
        break;
      }
    }
  });
  const st: Stimulus = { vectors, expected, exhaustive: false, seed };
  return describeAs(st, false, { randomVectors: randomCount, toggleVectors: toggles, seed });
}
