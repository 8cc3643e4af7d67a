// The report's "Stored state and clocking" section as a view model (no arithmetic in the
// template), and the same facts for the JSON file.
import { eng } from "../emit/format.js";
import type { Stimulus } from "../emit/stimulus.js";
import { STATE_ELEMENT_SIGNATURES } from "./elements.js";
import type { StateAnalysis } from "./state.js";
import type { SequentialTiming } from "./timing.js";

export interface StateView {
  summary: string;
  loops: { signals: string; stateSignals: string; stability: string }[];
  elements: { name: string; title: string; clock: string; tCQ: string; tSU: string; tH: string; pulse: string }[];
  elementSource: string;
  clockLines: string[];
  initialText: string;
}

const stabilityText = {
  always: "holds a value for every input",
  sometimes: "oscillates for some inputs",
  never: "has no stable state (oscillator)",
} as const;

export function stateView(state: StateAnalysis | undefined, timing: SequentialTiming | undefined, stimulus: Stimulus, stepSeconds: number): StateView | undefined {
  if (!state || state.loops.length === 0) return undefined;
  const ns = (x: number | undefined) => (x === undefined || !Number.isFinite(x) ? "–" : eng(x, "s"));
  const byName = new Map((timing?.elements ?? []).map((t) => [t.name, t]));
  const loops = state.loopTexts.map(({ loop: l, through, stateSignals }) => ({
    signals: through,
    stateSignals: stateSignals.join(", ") || "inside the elements",
    stability: `${stabilityText[l.stability]}${l.intended ? " (declared an oscillator)" : ""}${l.exhaustive ? "" : " (sampled)"}`,
  }));
  const elements = state.elements.map((e) => {
    const t = byName.get(e.name);
    const clockPin = e.kind === "dff" ? "clk" : "en";
    const pin = e.pins[clockPin];
    return {
      name: e.name,
      title: e.kind === "dff" ? "D flip-flop" : "D latch",
      clock: pin ? ("signal" in pin ? pin.signal : `constant ${pin.constant}`) : "",
      tCQ: t ? `${ns(t.clockToOutputSeconds)} / ${ns(t.clockToComplementSeconds)}` : "–",
      tSU: ns(t?.setupSeconds),
      tH: ns(t?.holdSeconds),
      pulse: t ? `${ns(t.minHighSeconds)} / ${ns(t.minLowSeconds)}` : "–",
    };
  });
  const kinds = [...new Set(state.elements.map((e) => e.kind))];
  const clockLines: string[] = [];
  if (timing?.maxClockHz !== undefined && timing.minPeriodSeconds !== undefined) {
    clockLines.push(
      `Estimated clock limit on ${timing.clock}: ${eng(timing.maxClockHz, "Hz")} (shortest period ${eng(timing.minPeriodSeconds, "s")}, set by ${timing.limitedBy === "register path" && timing.criticalPath ? `the path from ${timing.criticalPath.from} to ${timing.criticalPath.to}: clock-to-output, ${eng(timing.criticalPath.logicSeconds, "s")} of logic, and setup` : "the clock's minimum high and low times, for a clock high half of each period"}).`,
    );
    clockLines.push("The estimate adds worst-case gate delays (slowest corner, least gain for turning on, most for storage): a built circuit at typical conditions is faster.");
  }
  if (timing?.inputSetupSeconds !== undefined) clockLines.push(`Data inputs must be steady ${eng(timing.inputSetupSeconds, "s")} before each rising edge of ${timing.clock}.`);
  if (timing?.clockToOutputsSeconds !== undefined) clockLines.push(`After a rising edge the outputs settle within ${eng(timing.clockToOutputsSeconds, "s")}.`);
  if (stimulus.clock) {
    clockLines.push(
      `The testbench clocks ${stimulus.clock.input} at ${eng(1 / (stimulus.clock.stepsPerCycle * stepSeconds), "Hz")} for ${stimulus.clock.cycles} cycles and compares the outputs and the state after every step with the logic's own cycle-by-cycle simulation.`,
    );
  }
  const held = stimulus.held ? Object.entries(stimulus.held) : [];
  const defaults = new Set(stimulus.defaults ?? []);
  const initialText = held.length
    ? `The testbench and the logic's simulation both start from ${held.map(([n, v]) => `${n} = ${v}${defaults.has(n) ? " (default)" : ""}`).join(", ")}, set with ngspice .ic on the state nets.`
    : "";
  const parts: string[] = [];
  for (const kind of ["dff", "dlatch"] as const) {
    const list = state.elements.filter((e) => e.kind === kind);
    if (list.length) parts.push(`${list.length} × ${STATE_ELEMENT_SIGNATURES[kind].title}`);
  }
  if (loops.length) parts.push(`${loops.length} loop${loops.length > 1 ? "s" : ""} written as equations`);
  return {
    summary: `The design stores state in ${parts.join(" and ")}; every loop is kept exactly as written, its state signals named as in the source.`,
    loops,
    elements,
    elementSource: kinds.map((k) => `${k}: ${STATE_ELEMENT_SIGNATURES[k].source}`).join("; "),
    clockLines,
    initialText,
  };
}

/** One line for the report's summary table. */
export function stateSummaryText(state: StateAnalysis): string {
  const parts: string[] = [];
  for (const kind of ["dff", "dlatch"] as const) {
    const list = state.elements.filter((e) => e.kind === kind).map((e) => e.name);
    if (list.length) parts.push(`${list.length} ${kind === "dff" ? "D flip-flop" : "D latch"}${list.length > 1 ? "s" : ""} (${list.join(", ")})`);
  }
  for (const t of state.loopTexts) parts.push(`loop through ${t.through}${t.stateSignals.length ? ` (state signal${t.stateSignals.length > 1 ? "s" : ""} ${t.stateSignals.join(", ")})` : ""}`);
  return `${parts.join("; ")}; feedback kept as written`;
}

/** The same facts for x.json. */
export function stateJson(state: StateAnalysis | undefined, timing: SequentialTiming | undefined): object | null {
  if (!state) return null;
  return {
    loops: state.loops,
    elements: state.elements,
    clock: state.clocking.clock ?? null,
    initialValues: Object.fromEntries(state.initials),
    timing: timing ?? null,
  };
}
