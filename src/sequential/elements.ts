// The built-in state elements of the equation language and the gate structures they expand
// into. Both are textbook NAND structures (common practice):
//
// dff(d, clk[, set_n, reset_n]) — the positive-edge-triggered D flip-flop of six NAND gates
//   (three cross-coupled SR latches), the structure of the classic 7474 logic diagram:
//     g1 = NAND(set_n, g4, g2)     g2 = NAND(g1, clk, reset_n)
//     g3 = NAND(g2, clk, g4)       g4 = NAND(g3, d, reset_n)
//     q  = NAND(set_n, g2, qn)     qn = NAND(q, g3, reset_n)
//   While clk is low g2 = g3 = 1 and the output latch (q, qn) holds; g4 = !d and g1 = d follow
//   the data. When clk rises, g2 (d = 1) or g3 (d = 0) falls, sets or resets the output latch,
//   and locks the input latches until clk falls again. set_n and reset_n are asynchronous and
//   active low; both low gives q = qn = 1 (as the 7474's function table says).
//
// dlatch(d, en[, set_n, reset_n]) — the gated D latch: an SR latch of two NANDs behind two
//   NAND steering gates and an inverter (Mano, Digital Design, "D latch"; common practice):
//     dn  = NAND(d)                s_n = NAND(d, en, reset_n)   r_n = NAND(dn, en, set_n)
//     q   = NAND(s_n, qn, set_n)   qn  = NAND(r_n, q, reset_n)
//   Transparent while en = 1, holding while en = 0.
//
// Every gate's output is a named signal `<q>.<role>` (q.g1 ... q.g4 and q.n for the flip-flop,
// q.dn, q.s_n, q.r_n and q.n for the latch), kept as a net of the same name through
// optimization and mapping, so the circuit built is exactly this structure.

export type StateElementKind = "dff" | "dlatch";

export interface ElementSignature {
  kind: StateElementKind;
  /** Accepted argument counts. */
  arities: readonly number[];
  /** Argument roles in order. */
  pins: readonly string[];
  /** How the element is written, for messages. */
  usage: string;
  title: string;
  /** Where the structure comes from. */
  source: string;
}

export const STATE_ELEMENT_SIGNATURES: Readonly<Record<StateElementKind, ElementSignature>> = {
  dff: {
    kind: "dff",
    arities: [2, 4],
    pins: ["d", "clk", "set_n", "reset_n"],
    usage: "dff(d, clk) or dff(d, clk, set_n, reset_n)",
    title: "positive-edge-triggered D flip-flop (six NAND gates)",
    source: "the classic six-NAND edge-triggered D flip-flop of the 7474 logic diagram (common practice)",
  },
  dlatch: {
    kind: "dlatch",
    arities: [2, 4],
    pins: ["d", "en", "set_n", "reset_n"],
    usage: "dlatch(d, en) or dlatch(d, en, set_n, reset_n)",
    title: "gated D latch (four NAND gates and an inverter)",
    source: "the gated D latch of Mano, Digital Design (common practice)",
  },
};

export function elementSignature(fn: string): ElementSignature | undefined {
  return Object.prototype.hasOwnProperty.call(STATE_ELEMENT_SIGNATURES, fn)
    ? STATE_ELEMENT_SIGNATURES[fn as StateElementKind]
    : undefined;
}

/** An operand of a gate: another gate of the element (by role), or an argument pin. */
export type GateOperand = { gate: string } | { pin: string };

export interface ElementGate {
  /** Role of the gate; its output net is `<q>.<role>`, except the role "q" which is `<q>` itself. */
  role: string;
  /** NAND of the operands (one operand: an inverter). Pins not given (set_n, reset_n of the
   *  two-argument form) are left out. */
  nand: GateOperand[];
}

/** A delay arc: a transition entering at `from` (a pin) and the chain of gates it ripples
 *  through, each gate's output moving in the direction given (inverting gates alternate). */
export interface DelayArc {
  from: string;
  /** Direction of the transition at `from`. */
  edge: "rise" | "fall";
  through: { gate: string; edge: "rise" | "fall" }[];
}

export interface ElementStructure {
  gates: ElementGate[];
  /** Role of the complement output (the true output's role is "q"). */
  complement: string;
  /** The clock or enable pin. */
  clockPin: string;
  /** Whether the element acts on the clock's rising edge (flip-flop) or its level (latch). */
  trigger: "edge" | "level";
  /** Clock (or enable) to output: the outputs settling after the clock rises. */
  clockToOutput: DelayArc[];
  /** d reaching the nets that must have settled before the capturing clock edge (the rising
   *  edge of a flip-flop, the falling edge of a latch's enable). */
  setup: DelayArc[];
  /** Races after the capturing edge: the clock's arc must win over the data's arc, so d may
   *  change only (clock − data) after the edge. */
  hold: { clock: DelayArc; data: DelayArc }[];
  /** Arcs the clock's high and low phases must outlast. */
  minHigh: DelayArc[];
  minLow: DelayArc[];
}

const g = (gate: string): GateOperand => ({ gate });
const p = (pin: string): GateOperand => ({ pin });
type Edge = "rise" | "fall";
const arc = (from: string, edge: Edge, ...through: [string, Edge][]): DelayArc => ({
  from,
  edge,
  through: through.map(([gate, e]) => ({ gate, edge: e })),
});

export const ELEMENT_STRUCTURES: Readonly<Record<StateElementKind, ElementStructure>> = {
  dff: {
    gates: [
      { role: "g1", nand: [p("set_n"), g("g4"), g("g2")] },
      { role: "g2", nand: [g("g1"), p("clk"), p("reset_n")] },
      { role: "g3", nand: [g("g2"), p("clk"), g("g4")] },
      { role: "g4", nand: [g("g3"), p("d"), p("reset_n")] },
      { role: "q", nand: [p("set_n"), g("g2"), g("n")] },
      { role: "n", nand: [g("q"), g("g3"), p("reset_n")] },
    ],
    complement: "n",
    clockPin: "clk",
    trigger: "edge",
    clockToOutput: [
      // d = 1: g2 falls and sets q; q.n follows.
      arc("clk", "rise", ["g2", "fall"], ["q", "rise"], ["n", "fall"]),
      // d = 0: g3 falls and resets q through q.n.
      arc("clk", "rise", ["g3", "fall"], ["n", "rise"], ["q", "fall"]),
    ],
    // While clk is low, g4 = !d and g1 = d must have settled before clk rises.
    setup: [arc("d", "rise", ["g4", "fall"], ["g1", "rise"]), arc("d", "fall", ["g4", "rise"], ["g1", "fall"])],
    // d = 1 captured: g2 must fall before a falling d raises g4 (which would pull g3 low);
    // d = 0 captured: g3 must fall before a rising d lowers g4 (which would raise g1).
    hold: [
      { clock: arc("clk", "rise", ["g2", "fall"]), data: arc("d", "fall", ["g4", "rise"]) },
      { clock: arc("clk", "rise", ["g3", "fall"]), data: arc("d", "rise", ["g4", "fall"]) },
    ],
    // High phase: the falling g2 or g3 must lock the input latch (g1 or g4 rises).
    minHigh: [arc("clk", "rise", ["g2", "fall"], ["g1", "rise"]), arc("clk", "rise", ["g3", "fall"], ["g4", "rise"])],
    // Low phase: g2 and g3 return high and the input latches follow d again.
    minLow: [arc("clk", "fall", ["g3", "rise"], ["g4", "fall"], ["g1", "rise"]), arc("clk", "fall", ["g2", "rise"], ["g1", "fall"])],
  },
  dlatch: {
    gates: [
      { role: "dn", nand: [p("d")] },
      { role: "s_n", nand: [p("d"), p("en"), p("reset_n")] },
      { role: "r_n", nand: [g("dn"), p("en"), p("set_n")] },
      { role: "q", nand: [g("s_n"), g("n"), p("set_n")] },
      { role: "n", nand: [g("r_n"), g("q"), p("reset_n")] },
    ],
    complement: "n",
    clockPin: "en",
    trigger: "level",
    clockToOutput: [
      arc("en", "rise", ["s_n", "fall"], ["q", "rise"], ["n", "fall"]),
      arc("en", "rise", ["r_n", "fall"], ["n", "rise"], ["q", "fall"]),
    ],
    // Before en falls, d must have gone through to both sides of the SR latch.
    setup: [
      arc("d", "rise", ["s_n", "fall"], ["q", "rise"], ["n", "fall"]),
      arc("d", "fall", ["dn", "rise"], ["r_n", "fall"], ["n", "rise"], ["q", "fall"]),
    ],
    // d and en enter the same steering gates (d through the inverter too), so once en is low
    // at them a change of d cannot pass: no hold time beyond the enable's own edge.
    hold: [],
    minHigh: [
      arc("en", "rise", ["s_n", "fall"], ["q", "rise"], ["n", "fall"]),
      arc("en", "rise", ["r_n", "fall"], ["n", "rise"], ["q", "fall"]),
    ],
    minLow: [arc("en", "fall", ["s_n", "rise"]), arc("en", "fall", ["r_n", "rise"])],
  },
};

/** Net name of a gate of the element whose output is `q`. */
export function elementNetName(q: string, role: string): string {
  return role === "q" ? q : `${q}.${role}`;
}

/** Net name of an argument that is an expression rather than a plain signal. */
export function elementPinNetName(q: string, pin: string): string {
  return `${q}.${pin}`;
}
