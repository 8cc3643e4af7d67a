// Timing of the state elements and the clock limit, from the electrical engine's gate delays.
//
// Each cell has a falling (t_PHL) and a rising (t_PLH) propagation delay for the load it drives
// (src/electrical/timing.ts, charge control). An arc of a state element (elements.ts) follows a
// transition through the element's gates; its delay is the sum of the delays of the cells
// between the nets it passes, each in the direction the arc gives (through several cells where
// mapping built one gate from several). From the arcs:
//   clock-to-output  t_CQ: the clock's rising edge to q (and to its complement) settling;
//   setup            t_SU: d reaching the nets that must be steady at the capturing edge;
//   hold             t_H:  how long after the edge d must stay (clock arc minus data arc, ≥ 0);
//   pulse widths:    the clock's high and low phases must outlast their arcs.
// The clock limit is the longest register-to-register path (common practice for synchronous
// design): T_min = max over flip-flop pairs of t_CQ(launch) + t_logic + t_SU(capture), and at
// least twice the longer minimum pulse width for a clock of equal high and low phases;
// f_max = 1/T_min. Combinational delays between registers are longest-path sums with
// inverting cells alternating the edge, as the sizing engine's critical path.
import type { SizedDesign } from "../electrical/types.js";
import { ELEMENT_STRUCTURES, type DelayArc } from "./elements.js";
import type { StateElement } from "./expand.js";

type Edge = "rise" | "fall";

export interface ElementTiming {
  name: string;
  kind: StateElement["kind"];
  /** Clock (enable) rising to q settled, and to its complement settled. */
  clockToOutputSeconds: number;
  clockToComplementSeconds: number;
  setupSeconds: number;
  holdSeconds: number;
  minHighSeconds: number;
  minLowSeconds: number;
}

export interface RegisterPath {
  from: string;
  to: string;
  /** t_CQ(from) + logic + t_SU(to). */
  delaySeconds: number;
  logicSeconds: number;
}

export interface SequentialTiming {
  elements: ElementTiming[];
  /** The clock, when one input clocks the flip-flops. */
  clock?: string;
  /** Longest register-to-register path, when there is one. */
  criticalPath?: RegisterPath;
  /** Shortest clock period and why: the longest path, or the pulse widths. */
  minPeriodSeconds?: number;
  maxClockHz?: number;
  limitedBy?: "register path" | "pulse width";
  /** Data inputs must be steady this long before a rising clock edge. */
  inputSetupSeconds?: number;
  /** A rising clock edge to every output settled. */
  clockToOutputsSeconds?: number;
  notes: string[];
}

interface Delays {
  fall: number;
  rise: number;
}

export function estimateSequentialTiming(design: SizedDesign, elements: readonly StateElement[], opts: { clock?: string; clocked?: readonly string[] } = {}): SequentialTiming | undefined {
  if (elements.length === 0) return undefined;
  const nl = design.netlist;
  const notes: string[] = [];
  const delays: Delays[] = nl.cells.map((c) => {
    const inst = design.instances[c.index];
    const t = inst?.analysis.timing ?? (inst ? design.cellTypes[inst.cellType]?.analysis.timing : undefined);
    return { fall: t?.tPHLSeconds ?? NaN, rise: t?.tPLHSeconds ?? NaN };
  });
  if (delays.some((d) => !Number.isFinite(d.fall) || !Number.isFinite(d.rise))) {
    return { elements: [], notes: ["The sizing gave no switching times for some cells, so the state elements' timing and the clock limit are not estimated."] };
  }
  const netByName = new Map(nl.nets.map((n) => [n.name, n.index]));
  // Boundaries for combinational paths: state nets (loop cuts and the elements' kept nets).
  const boundary = new Set(nl.stateNets);
  const elementNets = new Set<number>();
  for (const e of elements) for (const name of Object.values(e.nets)) {
    const net = netByName.get(name);
    if (net !== undefined) elementNets.add(net);
  }

  /** Longest arrival of each edge at every net reached from `sources`, through cells whose
   *  output is not a stop net (a stop net is reached but not passed). */
  const propagate = (sources: Map<number, { rise: number; fall: number }>, stops: ReadonlySet<number>): Map<number, { rise: number; fall: number }> => {
    const arrival = new Map<number, { rise: number; fall: number }>();
    for (const [n, a] of sources) arrival.set(n, { ...a });
    // Cells in an order where every cell comes after the cells driving its inputs, ignoring
    // inputs from stop nets (which are sources or ends only).
    const driver = (net: number): number | undefined => {
      const d = nl.nets[net]!.driver;
      return d.kind === "cell" ? d.cell : undefined;
    };
    const indeg = new Array<number>(nl.cells.length).fill(0);
    const users: number[][] = nl.cells.map(() => []);
    for (const c of nl.cells) {
      for (const x of c.inputs) {
        if (stops.has(x) || sources.has(x)) continue;
        const d = driver(x);
        if (d !== undefined) {
          indeg[c.index]!++;
          users[d]!.push(c.index);
        }
      }
    }
    const queue: number[] = [];
    indeg.forEach((k, i) => k === 0 && queue.push(i));
    for (let h = 0; h < queue.length; h++) {
      const c = nl.cells[queue[h]!]!;
      let inRise = -Infinity;
      let inFall = -Infinity;
      for (const x of c.inputs) {
        if (stops.has(x) && !sources.has(x)) continue; // an end, not passed
        const a = arrival.get(x);
        if (!a) continue;
        inRise = Math.max(inRise, a.rise);
        inFall = Math.max(inFall, a.fall);
      }
      if (inRise > -Infinity || inFall > -Infinity) {
        // Inverting cells: the output falls after an input rises, rises after one falls.
        const out = { fall: inRise + delays[c.index]!.fall, rise: inFall + delays[c.index]!.rise };
        if (!sources.has(c.output)) {
          const prev = arrival.get(c.output);
          arrival.set(c.output, prev ? { fall: Math.max(prev.fall, out.fall), rise: Math.max(prev.rise, out.rise) } : out);
        }
      }
      if (stops.has(c.output)) continue;
      for (const u of users[c.index]!) if (--indeg[u]! === 0) queue.push(u);
    }
    return arrival;
  };

  /** Delay of one segment: a transition at net `from` to the given edge at net `to` (or the
   *  later edge, when mapping made the path non-inverting). */
  const segmentEdge = (from: number, edge: Edge, to: number, toEdge: Edge): number => {
    const src = new Map([[from, edge === "rise" ? { rise: 0, fall: -Infinity } : { rise: -Infinity, fall: 0 }]]);
    const stops = new Set([...boundary].filter((n) => n !== from));
    const a = propagate(src, stops).get(to);
    if (!a) return NaN;
    const v = a[toEdge];
    return Number.isFinite(v) ? v : Math.max(a.rise, a.fall);
  };

  const pinNet = (e: StateElement, pin: string): number | undefined => {
    const p = e.pins[pin];
    if (!p || !("signal" in p)) return undefined;
    return netByName.get(p.signal);
  };
  const arcDelay = (e: StateElement, a: DelayArc): number => {
    let at = pinNet(e, a.from);
    if (at === undefined) return NaN;
    let edge: Edge = a.edge;
    let total = 0;
    for (const step of a.through) {
      const to = netByName.get(e.nets[step.gate]!);
      if (to === undefined) return NaN;
      const d = segmentEdge(at, edge, to, step.edge);
      if (!Number.isFinite(d)) return NaN;
      total += d;
      at = to;
      edge = step.edge;
    }
    return total;
  };
  const maxArc = (e: StateElement, arcs: readonly DelayArc[]) => Math.max(...arcs.map((a) => arcDelay(e, a)).filter(Number.isFinite), 0);
  const endingAt = (e: StateElement, arcs: readonly DelayArc[], gate: string): number => {
    // Longest arrival at `gate` along the arcs (an arc that passes the gate counts up to it).
    let best = 0;
    for (const a of arcs) {
      const k = a.through.findIndex((s) => s.gate === gate);
      if (k < 0) continue;
      const d = arcDelay(e, { ...a, through: a.through.slice(0, k + 1) });
      if (Number.isFinite(d)) best = Math.max(best, d);
    }
    return best;
  };

  const timings: ElementTiming[] = [];
  for (const e of elements) {
    const s = ELEMENT_STRUCTURES[e.kind];
    const hold = Math.max(0, ...s.hold.map((h) => arcDelay(e, h.clock) - arcDelay(e, h.data)).filter(Number.isFinite));
    timings.push({
      name: e.name,
      kind: e.kind,
      clockToOutputSeconds: endingAt(e, s.clockToOutput, "q"),
      clockToComplementSeconds: endingAt(e, s.clockToOutput, s.complement),
      setupSeconds: maxArc(e, s.setup),
      holdSeconds: hold,
      minHighSeconds: maxArc(e, s.minHigh),
      minLowSeconds: maxArc(e, s.minLow),
    });
  }
  const out: SequentialTiming = { elements: timings, notes };
  if (opts.clock === undefined) {
    notes.push(
      elements.some((e) => e.kind === "dff")
        ? "No single input clocks the flip-flops, so no clock limit is given; the figures of each element hold for its own clock or enable."
        : "The design has latches but no flip-flops, so no clock limit is given; each latch's figures hold for its enable.",
    );
    return out;
  }
  out.clock = opts.clock;
  const clocked = new Set(opts.clocked ?? elements.map((e) => e.name));
  const byName = new Map(timings.map((t) => [t.name, t]));
  const launchers = elements.filter((e) => clocked.has(e.name));

  // Register to register: from every clocked element's outputs at their clock-to-output times.
  const stops = new Set([...boundary].filter((n) => elementNets.has(n)));
  let worst: RegisterPath | undefined;
  for (const from of launchers) {
    const t = byName.get(from.name)!;
    const sources = new Map<number, { rise: number; fall: number }>();
    const qNet = netByName.get(from.name);
    const nNet = netByName.get(from.complement);
    if (qNet !== undefined) sources.set(qNet, { rise: t.clockToOutputSeconds, fall: t.clockToOutputSeconds });
    if (nNet !== undefined) sources.set(nNet, { rise: t.clockToComplementSeconds, fall: t.clockToComplementSeconds });
    const arrival = propagate(sources, new Set([...stops].filter((n) => !sources.has(n))));
    for (const to of launchers) {
      const d = pinNet(to, "d");
      if (d === undefined) continue;
      const a = arrival.get(d);
      if (!a) continue;
      const at = Math.max(a.rise, a.fall);
      const tt = byName.get(to.name)!;
      const launch = at;
      const path: RegisterPath = {
        from: from.name,
        to: to.name,
        delaySeconds: launch + tt.setupSeconds,
        logicSeconds: Math.max(0, launch - Math.min(t.clockToOutputSeconds, t.clockToComplementSeconds)),
      };
      if (!worst || path.delaySeconds > worst.delaySeconds) worst = path;
    }
  }
  const pulse = 2 * Math.max(0, ...launchers.map((e) => Math.max(byName.get(e.name)!.minHighSeconds, byName.get(e.name)!.minLowSeconds)));
  if (worst) out.criticalPath = worst;
  const pathPeriod = worst?.delaySeconds ?? 0;
  const period = Math.max(pathPeriod, pulse);
  if (period > 0) {
    out.minPeriodSeconds = period;
    out.maxClockHz = 1 / period;
    out.limitedBy = pathPeriod >= pulse ? "register path" : "pulse width";
  }
  if (!worst) notes.push("No flip-flop feeds another through logic, so the clock limit comes from the clock's minimum high and low times.");

  // Inputs (changing at t = 0) to the flip-flops' d, and clock edge to the outputs.
  const inputSources = new Map<number, { rise: number; fall: number }>();
  nl.inputs.forEach((net) => {
    if (nl.nets[net]!.name !== opts.clock) inputSources.set(net, { rise: 0, fall: 0 });
  });
  const fromInputs = propagate(inputSources, stops);
  let inputSetup = -Infinity;
  for (const e of launchers) {
    const d = pinNet(e, "d");
    if (d === undefined) continue;
    const a = fromInputs.get(d);
    if (!a) continue;
    inputSetup = Math.max(inputSetup, Math.max(a.rise, a.fall) + byName.get(e.name)!.setupSeconds);
  }
  if (Number.isFinite(inputSetup)) out.inputSetupSeconds = inputSetup;
  const allSources = new Map<number, { rise: number; fall: number }>();
  for (const e of launchers) {
    const t = byName.get(e.name)!;
    const q = netByName.get(e.name);
    const n = netByName.get(e.complement);
    if (q !== undefined) allSources.set(q, { rise: t.clockToOutputSeconds, fall: t.clockToOutputSeconds });
    if (n !== undefined) allSources.set(n, { rise: t.clockToComplementSeconds, fall: t.clockToComplementSeconds });
  }
  const toOutputs = propagate(allSources, new Set([...stops].filter((n) => !allSources.has(n))));
  let co = -Infinity;
  for (const o of nl.outputs) {
    const a = toOutputs.get(o.net);
    if (a) co = Math.max(co, a.rise, a.fall);
  }
  if (Number.isFinite(co)) out.clockToOutputsSeconds = co;
  return out;
}

/** The testbench step for a clocked design: a clock period (four steps) of at least eight times
 *  the shortest period the estimate allows, so the functional check is not a speed test. */
export function clockedStepSeconds(baseStepSeconds: number, timing: SequentialTiming | undefined): number {
  const min = timing?.minPeriodSeconds;
  if (min === undefined) return baseStepSeconds;
  return Math.max(baseStepSeconds, niceCeil((8 * min) / 4));
}

function niceCeil(x: number): number {
  const p = 10 ** Math.floor(Math.log10(x));
  for (const m of [1, 2, 5, 10]) if (m * p >= x * (1 - 1e-9)) return m * p;
  return 10 * p;
}

