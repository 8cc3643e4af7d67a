// The sequential parts of a synthesis run, as the pipeline calls them: the hazard check of the
// logic that feeds loops (after mapping), and the testbench plan for a sized design — initial
// state, clocked or stepped walk, step length — with the timing estimate. Pure functions.
import { diag, type Diagnostic } from "../diagnostics/index.js";
import type { SizedDesign } from "../electrical/types.js";
import { makeStimulus, type Stimulus, type StimulusOptions } from "../emit/stimulus.js";
import { findStaticHazards, termText, type StaticHazard } from "../logic/hazards.js";
import type { LogicGraph } from "../logic/graph.js";
import { initialState, type InitialState } from "./initial.js";
import type { StateAnalysis } from "./state.js";
import { clockedStepSeconds, estimateSequentialTiming, type SequentialTiming } from "./timing.js";

/**
 * Static hazards in the logic feeding each loop, as built (the mapped cells) and as written (the
 * source): a GW3011 warning for each state signal and changing variable, saying whether the
 * source has the hazard too (then the hint gives the consensus term to add) or the optimization
 * brought it in.
 */
export function checkFeedbackHazards(source: LogicGraph, built: LogicGraph, state: StateAnalysis | undefined, keptNames: readonly string[]): { hazards: StaticHazard[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  if (!state || state.loops.length === 0) return { hazards: [], diagnostics };
  const kept = new Set(keptNames);
  const onLoops = [...new Set(state.loops.flatMap((l) => l.signals))].filter((s) => kept.has(s));
  const boundary = [...keptNames];
  const builtReport = findStaticHazards(built, onLoops, boundary);
  const sourceReport = findStaticHazards(source, onLoops, boundary);
  const inSource = new Set(sourceReport.hazards.map((h) => `${h.signal}|${h.variable}`));
  const firstByName = new Map<string, number>();
  source.nodes.forEach((n, id) => {
    if (n.name !== undefined && !firstByName.has(n.name)) firstByName.set(n.name, id);
  });
  const spanOf = (name: string) => {
    const id = firstByName.get(name);
    return id === undefined ? undefined : source.nodes[id]!.span;
  };
  for (const h of builtReport.hazards) {
    const held = Object.entries(h.held).map(([k, v]) => `${k} = ${v}`).join(", ");
    const fromSource = inSource.has(`${h.signal}|${h.variable}`);
    const span = spanOf(h.signal);
    const where = span ? (source.file !== undefined ? { file: source.file, span } : { span }) : source.file !== undefined ? { file: source.file } : undefined;
    diagnostics.push(
      diag(
        "GW3011",
        `'${h.signal}' can glitch when '${h.variable}' changes while ${held || "nothing else changes"} (a static-${h.value} hazard in the logic that feeds its loop${fromSource ? "" : ", brought in by optimization"}): the loop may catch the glitch and lose its value`,
        where,
        {
          hint: h.cover
            ? `${fromSource ? "add" : "keep"} the consensus term '${termText(h.cover)}' in the expression of '${h.signal}', which covers both sides of the change`
            : `cover both sides of the change with one term of the expression of '${h.signal}'`,
        },
      ),
    );
  }
  return { hazards: builtReport.hazards, diagnostics };
}

/** Vectors a walk may start with, in the walk's own order: Gray order over the inputs (over
 *  the data inputs with the clock low, for a clocked walk); at most 1024. */
function startCandidates(g: LogicGraph, clock: string | undefined, limit: number): (0 | 1)[][] {
  const n = g.inputs.length;
  const clockIndex = clock === undefined ? -1 : g.inputs.findIndex((p) => p.name === clock);
  const free = g.inputs.map((_, i) => i).filter((i) => i !== clockIndex);
  const count = Math.min(2 ** Math.min(free.length, limit), 1024);
  const out: (0 | 1)[][] = [];
  for (let k = 0; k < count; k++) {
    const code = k ^ (k >> 1);
    const v: (0 | 1)[] = new Array(n).fill(0);
    free.forEach((pos, j) => (v[pos] = ((code >>> j) & 1) as 0 | 1));
    out.push(v);
  }
  return out;
}

export interface TestbenchPlan {
  stimulus: Stimulus;
  stepSeconds: number;
  initial?: InitialState;
  timing?: SequentialTiming;
  notes: string[];
  diagnostics: Diagnostic[];
}

export interface PlanOptions {
  exhaustiveLimit?: number;
  randomVectors?: number;
  seed?: number;
  /** Testbench step from the combinational timing (the pipeline's default). */
  baseStepSeconds: number;
  /** Use this step instead (a clock period is four steps). */
  stepSeconds?: number;
  maxCycles?: number;
  minCycles?: number;
}

export function planTestbench(g: LogicGraph, design: SizedDesign, state: StateAnalysis | undefined, stateNames: readonly string[], opts: PlanOptions): TestbenchPlan {
  const diagnostics: Diagnostic[] = [];
  const notes: string[] = [];
  const sequential = stateNames.length > 0;
  const stimOpts: StimulusOptions = { sequential };
  if (opts.exhaustiveLimit !== undefined) stimOpts.exhaustiveLimit = opts.exhaustiveLimit;
  if (opts.randomVectors !== undefined) stimOpts.randomCount = opts.randomVectors;
  if (opts.seed !== undefined) stimOpts.seed = opts.seed;
  if (opts.maxCycles !== undefined) stimOpts.maxCycles = opts.maxCycles;
  if (opts.minCycles !== undefined) stimOpts.minCycles = opts.minCycles;
  let initial: InitialState | undefined;
  let timing: SequentialTiming | undefined;
  if (sequential && state) {
    // The walk starts with the first vector (in its own order, the clock low) under which the
    // initial values hold.
    initial = initialState(g, { initials: state.initials, stateNames, candidates: startCandidates(g, state.clocking.clock, opts.exhaustiveLimit ?? 10) });
    for (const each of initial.diagnostics) diagnostics.push(each);
    stimOpts.firstVector = initial.firstVector;
    stimOpts.initial = initial.values;
    stimOpts.held = initial.held;
    stimOpts.defaults = initial.defaults;
    stimOpts.stateSignals = state.observed;
    stimOpts.stateKey = state.stateKey;
    if (state.clocking.clock !== undefined) stimOpts.clock = state.clocking.clock;
    if (initial.defaults.length) {
      notes.push(
        `No init declaration sets ${initial.defaults.join(", ")}: the testbench starts ${initial.defaults.length > 1 ? "them" : "it"} at 0. A built circuit powers up in either state; give an init (or a reset input) where that matters.`,
      );
    }
    timing = estimateSequentialTiming(design, state.elements, {
      ...(state.clocking.clock !== undefined ? { clock: state.clocking.clock } : {}),
      clocked: state.clocking.clocked,
    });
    if (timing) for (const each of timing.notes) notes.push(each);
  }
  const stimulus = makeStimulus(g, stimOpts);
  let stepSeconds = opts.stepSeconds ?? (stimulus.clock ? clockedStepSeconds(opts.baseStepSeconds, timing) : opts.baseStepSeconds);
  if (!Number.isFinite(stepSeconds) || stepSeconds <= 0) stepSeconds = opts.baseStepSeconds;
  if (stimulus.clock && !stimulus.clock.complete) {
    notes.push(
      stimulus.seed !== undefined
        ? `The clocked testbench applies ${stimulus.clock.cycles} cycles of seeded random data (seed ${stimulus.seed}), not every combination in every state.`
        : `The clocked testbench stopped at its budget of ${stimulus.clock.cycles} cycles, after ${stimulus.clock.pairsCovered} of the ${stimulus.clock.pairsFound} state and input pairs it found.`,
    );
  }
  const plan: TestbenchPlan = { stimulus, stepSeconds, notes, diagnostics };
  if (initial) plan.initial = initial;
  if (timing) plan.timing = timing;
  return plan;
}
