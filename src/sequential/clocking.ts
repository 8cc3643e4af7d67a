// Clocking analysis: which primary input clocks the design's flip-flops, if one does.
//
// A design is driven by a clocked testbench when every flip-flop (dff) takes its clock pin from
// one and the same primary input. Latches whose enable is that input are clocked with them
// (transparent while the clock is high). Otherwise — flip-flops clocked from logic (a ripple
// counter), or from several inputs — the design is walked step by step like any other design
// with state, and a note says why.
import { diag, type Diagnostic } from "../diagnostics/index.js";
import type { DesignSource } from "../syntax/index.js";
import { ELEMENT_STRUCTURES } from "./elements.js";
import type { StateElement } from "./expand.js";

export interface Clocking {
  /** The clock input, when the design has one. */
  clock?: string;
  /** Elements clocked (or enabled) by it. */
  clocked: string[];
  /** Elements clocked from something else. */
  other: string[];
  diagnostics: Diagnostic[];
}

export function analyzeClocking(src: DesignSource, elements: readonly StateElement[]): Clocking {
  const diagnostics: Diagnostic[] = [];
  const inputs = new Set(src.inputs.map((d) => d.name));
  const clockOf = (e: StateElement): string | undefined => {
    const pin = e.pins[ELEMENT_STRUCTURES[e.kind].clockPin];
    return pin && "signal" in pin ? pin.signal : undefined;
  };
  const flipFlops = elements.filter((e) => e.kind === "dff");
  const candidates = new Set(flipFlops.map(clockOf));
  const where = (e: StateElement) => ({ file: src.file, span: e.span });
  if (flipFlops.length === 0) return { clocked: [], other: elements.map((e) => e.name), diagnostics };
  const [only] = candidates;
  if (candidates.size === 1 && only !== undefined && inputs.has(only)) {
    const clocked = elements.filter((e) => clockOf(e) === only).map((e) => e.name);
    const other = elements.filter((e) => clockOf(e) !== only).map((e) => e.name);
    diagnostics.push(
      diag("GW3012", `input '${only}' clocks ${clocked.length} state element${clocked.length > 1 ? "s" : ""} (${clocked.join(", ")}): the testbench drives it as a clock and checks the state after every rising edge`, where(flipFlops[0]!)),
    );
    return { clock: only, clocked, other, diagnostics };
  }
  const derived = flipFlops.filter((e) => {
    const c = clockOf(e);
    return c === undefined || !inputs.has(c);
  });
  const why = derived.length
    ? `the flip-flop${derived.length > 1 ? "s" : ""} ${derived.map((e) => `'${e.name}'`).join(", ")} ${derived.length > 1 ? "are" : "is"} clocked from logic, not from an input`
    : `the flip-flops are clocked from ${candidates.size} different inputs (${[...candidates].join(", ")})`;
  diagnostics.push(
    diag("GW3012", `no single clock input: ${why}; the testbench walks the inputs step by step instead of driving a clock`, where(derived[0] ?? flipFlops[0]!), {
      hint: "a clock from logic can glitch and has its own delay (skew): check such a design's timing by hand",
    }),
  );
  return { clocked: [], other: elements.map((e) => e.name), diagnostics };
}
