// What a design stores, gathered for the pipeline: the loops and their state signals (with the
// oscillator check), the built-in state elements, the initial values the source gives, and the
// clock. Pure: a design source and its logic graph in, facts and diagnostics out.
import { diag, type Diagnostic } from "../diagnostics/index.js";
import { analyzeFeedback, type LoopInfo } from "../logic/feedback.js";
import type { LogicGraph } from "../logic/graph.js";
import { nearestName } from "../logic/names.js";
import type { DesignSource } from "../syntax/index.js";
import { analyzeClocking, type Clocking } from "./clocking.js";
import type { StateElement } from "./expand.js";

export interface StateAnalysis {
  /** Loop cut points by name: the signals that store state. */
  stateNames: string[];
  /** Names to keep as nets of their own through optimization and mapping: the state signals
   *  and every net of the built-in state elements. */
  keptNames: string[];
  loops: LoopInfo[];
  elements: StateElement[];
  clocking: Clocking;
  /** `init` values that name a signal of the design. */
  initials: Map<string, 0 | 1>;
  /** Signals sampled in the testbench as state: loop state signals outside the elements,
   *  and each element's output and complement. */
  observed: string[];
  /** Names whose values make up the state (for the clocked walk). */
  stateKey: string[];
  /** The element each element net belongs to (its gates and its own argument nets). */
  elementOfNet: Map<string, string>;
  /** Loops not inside a single element, described for people. */
  loopTexts: { loop: LoopInfo; through: string; stateSignals: string[] }[];
  diagnostics: Diagnostic[];
}

export function analyzeState(src: DesignSource, g: LogicGraph, elements: StateElement[], expansionKept: readonly string[]): StateAnalysis {
  const diagnostics: Diagnostic[] = [];
  const file = src.file;
  const byName = new Map<string, number>();
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined && !byName.has(n.name)) byName.set(n.name, id);
  });
  // Prefer each element's output as the cut of its output latch.
  const preferred = new Set<number>();
  for (const e of elements) {
    const id = byName.get(e.name);
    if (id !== undefined) preferred.add(id);
  }
  const fb = analyzeFeedback(g, { ...(src.oscillators ? { oscillators: src.oscillators } : {}), preferred });
  for (const each of fb.diagnostics) diagnostics.push(each);

  // Loops inside one element are the element's business; the others are reported as loops.
  const elementOf = new Map<string, string>();
  for (const e of elements) {
    for (const n of Object.values(e.nets)) elementOf.set(n, e.name);
    // An argument written as an expression is the element's own net too (q.d in q = dff(!q, clk)).
    for (const pin of Object.values(e.pins)) if ("signal" in pin && pin.signal.startsWith(`${e.name}.`)) elementOf.set(pin.signal, e.name);
  }
  const inside = (l: LoopInfo) => {
    const owners = new Set(l.signals.map((s) => elementOf.get(s)));
    return owners.size === 1 && !owners.has(undefined);
  };
  const plainLoops = fb.loops.filter((l) => !inside(l));
  // A loop through several elements is named by them, and by the other signals on it.
  const loopTexts = plainLoops.map((l) => {
    const owners = [...new Set(l.signals.map((x) => elementOf.get(x)).filter((x): x is string => x !== undefined))];
    const others = l.signals.filter((x) => !elementOf.has(x));
    const group = (kind: "dff" | "dlatch", word: string) => {
      const list = owners.filter((o) => elements.find((e) => e.name === o)!.kind === kind);
      return list.length ? [`the ${word}${list.length > 1 ? "s" : ""} ${list.join(", ")}`] : [];
    };
    const through = [...others, ...group("dff", "flip-flop"), ...group("dlatch", "latch")].join(", ");
    return { loop: l, through, stateSignals: l.stateSignals.filter((x) => !elementOf.has(x)) };
  });
  if (fb.stateNames.length) {
    const parts: string[] = [];
    for (const kind of ["dff", "dlatch"] as const) {
      const list = elements.filter((e) => e.kind === kind).map((e) => e.name);
      if (list.length) parts.push(`${list.length} ${kind === "dff" ? "D flip-flop" : "D latch"}${list.length > 1 ? "s" : ""} (${list.join(", ")})`);
    }
    for (const t of loopTexts) parts.push(`the loop through ${t.through}${t.stateSignals.length ? ` (state signal${t.stateSignals.length > 1 ? "s" : ""} ${t.stateSignals.join(", ")})` : ""}`);
    const firstId = byName.get(fb.stateNames[0]!);
    const first = firstId !== undefined ? g.nodes[firstId]! : undefined;
    diagnostics.push(
      diag(
        "GW3001",
        `the design stores state in ${fb.loops.length} feedback loop${fb.loops.length > 1 ? "s" : ""}, kept as written: ${parts.join("; ")}`,
        first?.span ? { file, span: first.span } : { file },
      ),
    );
  }

  // Initial values.
  const initials = new Map<string, 0 | 1>();
  const seen = new Map<string, { start: number; length: number }>();
  const inputs = new Set(src.inputs.map((d) => d.name));
  const onLoop = new Set(fb.loops.flatMap((l) => l.signals));
  for (const init of src.initials ?? []) {
    const at = { file, span: init.span };
    const prev = seen.get(init.name);
    if (prev) {
      diagnostics.push(
        diag("GW2031", `'${init.name}' is given an initial value twice`, at, {
          related: [{ message: "first given here", file, start: prev.start, length: prev.length }],
        }),
      );
      continue;
    }
    seen.set(init.name, init.span);
    if (inputs.has(init.name)) {
      diagnostics.push(diag("GW2030", `'${init.name}' is an input: the testbench drives it, it has no initial value`, at));
      continue;
    }
    if (!byName.has(init.name)) {
      const near = nearestName(init.name, byName.keys());
      diagnostics.push(diag("GW2001", `'${init.name}' is not an input and is never assigned`, at, near ? { hint: `did you mean '${near}'?` } : { hint: "init names a signal that stores state" }));
      continue;
    }
    if (!onLoop.has(init.name)) {
      diagnostics.push(
        diag("GW2033", `'${init.name}' stores no state (it lies on no loop), so an initial value does nothing`, at, {
          hint: "give the initial value to a latch's or flip-flop's output",
        }),
      );
      continue;
    }
    initials.set(init.name, init.value);
  }

  const clocking = analyzeClocking(src, elements);
  for (const each of clocking.diagnostics) diagnostics.push(each);

  const kept: string[] = [];
  const keptSet = new Set<string>();
  for (const n of [...fb.stateNames, ...expansionKept]) {
    if (!keptSet.has(n) && byName.has(n) && !inputs.has(n)) {
      keptSet.add(n);
      kept.push(n);
    }
  }
  const observed: string[] = [];
  const stateKey: string[] = [];
  const add = (list: string[], n: string) => {
    if (!list.includes(n) && byName.has(n)) list.push(n);
  };
  for (const e of elements) {
    add(observed, e.name);
    add(observed, e.complement);
    add(stateKey, e.name);
    add(stateKey, e.complement);
  }
  for (const l of plainLoops) for (const s of l.stateSignals) {
    add(observed, s);
    add(stateKey, s);
  }
  return { stateNames: fb.stateNames, keptNames: kept, loops: fb.loops, elements, clocking, initials, observed, stateKey, elementOfNet: elementOf, loopTexts, diagnostics };
}
