// The state a design starts in, for the testbench and for the logic's own simulation alike.
//
// The testbench sets initial conditions (ngspice `.ic`) on the state nets: the simulator holds
// those nodes at the given voltages while it finds the operating point, then lets them go at
// t = 0. The logic does the same: the signals given values are held while the rest settles
// (StepSimulator.step with `hold`), and the first step of the walk releases them.
//
// Which signals are held: every `init` declaration; then, while some loop state signal is
// still unknown, the first such signal (in source order) is held at 0. So every loop starts in
// a defined state, and the report says which ones were chosen by default.
import { diag, type Diagnostic } from "../diagnostics/index.js";
import { StepSimulator, type Tri } from "../logic/evaluate.js";
import type { LogicGraph } from "../logic/graph.js";

export interface InitialState {
  /** Signals held while settling, and their values: the `init` ones, then defaults. */
  held: Map<string, 0 | 1>;
  /** State signals held at 0 because no `init` decided them. */
  defaults: string[];
  /** Every named signal's value after settling with the holds (what `.ic` sets). */
  values: Map<string, Tri>;
  /** The input vector the walk starts with (all the settling is done with it). */
  firstVector: (0 | 1)[];
  diagnostics: Diagnostic[];
}

export interface InitialOptions {
  /** `init` values by signal name. */
  initials: ReadonlyMap<string, 0 | 1>;
  /** The loop state signals, in the order to give defaults. */
  stateNames: readonly string[];
  /** Input vectors the testbench may start with, in order of preference (inputs in
   *  declaration order). Taken: the one under which the initial values hold once released
   *  and the inputs leave the most state signals to the loops (unknown without a hold), so an
   *  SR latch starts with both inputs idle rather than with a reset that happens to agree; else
   *  the first under which the values hold at all; else the first. */
  candidates: readonly (readonly (0 | 1)[])[];
}

/** Start vectors tried at most. */
const MAX_CANDIDATES = 256;

export function initialState(g: LogicGraph, opts: InitialOptions): InitialState {
  const candidates = (opts.candidates.length ? opts.candidates : [g.inputs.map(() => 0 as const)]).slice(0, MAX_CANDIDATES);
  // One simulator for every trial, set back to its unknown start each time.
  const sim = new StepSimulator(g);
  const unknownStart = sim.snapshot();
  let first: InitialState | undefined;
  let best: { r: InitialState; free: number } | undefined;
  let bestFree = -1;
  let bestFreeVector: readonly (0 | 1)[] | undefined;
  for (const v of candidates) {
    // How many state signals these inputs leave undecided on their own.
    sim.restore(unknownStart);
    sim.step(v);
    const free = opts.stateNames.filter((s) => sim.valueOf(s) === "X").length;
    if (free > bestFree) {
      bestFree = free;
      bestFreeVector = v;
    }
    const r = settleWith(g, sim, unknownStart, opts, v);
    first ??= r;
    if (r.diagnostics.length === 0 && (!best || free > best.free)) best = { r, free };
    if (best && best.free === opts.stateNames.length) break;
  }
  if (best && best.free < bestFree && bestFreeVector && opts.initials.size) {
    // The values hold only while the inputs force them: say so.
    const forced = settleWith(g, sim, unknownStart, opts, bestFreeVector);
    if (forced.moved) {
      best.r.diagnostics.push(
        diag(
          "GW3013",
          `the initial values do not hold by themselves (with ${vectorText(g, bestFreeVector)}: ${forced.moved}); they hold only while the inputs force them (${vectorText(g, best.r.firstVector)}), which is where the testbench starts`,
          g.file !== undefined ? { file: g.file } : undefined,
          { hint: "give values that agree with each other (a latch's q and its complement)" },
        ),
      );
    }
  }
  return best?.r ?? first!;
}

function vectorText(g: LogicGraph, v: readonly (0 | 1)[]): string {
  return g.inputs.map((p, i) => `${p.name} = ${v[i]}`).join(", ") || "no inputs";
}

function settleWith(
  g: LogicGraph,
  sim: StepSimulator,
  unknownStart: ReturnType<StepSimulator["snapshot"]>,
  opts: InitialOptions,
  vector: readonly (0 | 1)[],
): InitialState & { moved?: string } {
  const diagnostics: Diagnostic[] = [];
  const firstVector = [...vector];
  sim.restore(unknownStart);
  const held = new Map<string, 0 | 1>(opts.initials);
  const defaults: string[] = [];
  sim.step(firstVector, held);
  for (;;) {
    const unknown = opts.stateNames.find((s) => !held.has(s) && sim.valueOf(s) === "X");
    if (unknown === undefined) break;
    held.set(unknown, 0);
    defaults.push(unknown);
    sim.step(firstVector, held);
  }
  const values = sim.namedState();
  // Released with the same inputs, the given values must hold.
  const released = sim;
  released.step(firstVector);
  const moved = [...opts.initials].filter(([name, v]) => released.valueOf(name) !== v);
  if (moved.length) {
    const text = moved.map(([n, v]) => `${n} = ${v} becomes ${released.valueOf(n) === "X" ? "unknown" : released.valueOf(n)}`).join(", ");
    diagnostics.push(
      diag("GW3013", `the initial values do not hold once released with the testbench's first inputs (${vectorText(g, firstVector)}): ${text}`, g.file !== undefined ? { file: g.file } : undefined, {
        hint: "give values that agree with each other (a latch's q and its complement), or that the first inputs do not override",
      }),
    );
    return { held, defaults, values, firstVector, diagnostics, moved: text };
  }
  return { held, defaults, values, firstVector, diagnostics };
}
