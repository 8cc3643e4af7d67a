// State-element expansion: the built-in state elements of a design source (`q = dff(d, clk);`)
// become plain assignments of NAND gates (the structures of elements.ts), before names are
// resolved. Pure: a design source in, a design source with the elements expanded, the
// elements' descriptions and diagnostics out.
import { diag, type Diagnostic, type Span } from "../diagnostics/index.js";
import type { Assignment, DesignSource, Expr } from "../syntax/index.js";
import {
  ELEMENT_STRUCTURES,
  STATE_ELEMENT_SIGNATURES,
  elementNetName,
  elementPinNetName,
  type GateOperand,
  type StateElementKind,
} from "./elements.js";

/** What drives a pin of a state element. */
export type PinSource = { signal: string } | { constant: 0 | 1 };

export interface StateElement {
  kind: StateElementKind;
  /** The element's output (the assigned signal). */
  name: string;
  /** Net name of each gate of the structure, by role ("q" is the output itself). */
  nets: Record<string, string>;
  /** Net name of the complement output. */
  complement: string;
  /** What drives each pin that was given (pins of the short form are absent). */
  pins: Record<string, PinSource>;
  span: Span;
}

export interface Expansion {
  source: DesignSource;
  elements: StateElement[];
  /** Names that must stay nets of their own through optimization and mapping: every gate of
   *  every element, and every signal that drives one of their pins (except inputs). */
  keptNames: string[];
  diagnostics: Diagnostic[];
}

export function expandStateElements(src: DesignSource): Expansion {
  const calls = src.stateElements ?? [];
  const diagnostics: Diagnostic[] = [];
  if (calls.length === 0) return { source: src, elements: [], keptNames: [], diagnostics };
  const file = src.file;

  // Names the user wrote, with where, so that a generated name never takes one.
  const userNames = new Map<string, Span>();
  for (const d of [...src.inputs, ...src.outputs, ...src.wires]) if (!userNames.has(d.name)) userNames.set(d.name, d.span);
  for (const a of src.assignments) if (!userNames.has(a.target)) userNames.set(a.target, a.targetSpan);
  for (const c of calls) if (!userNames.has(c.target)) userNames.set(c.target, c.targetSpan);
  const inputs = new Set(src.inputs.map((d) => d.name));

  const assignments: Assignment[] = [...src.assignments];
  const elements: StateElement[] = [];
  const kept = new Set<string>();
  const targets = new Set<string>();
  const generated = new Set<string>();

  for (const call of calls) {
    const kind = call.fn as StateElementKind;
    const structure = ELEMENT_STRUCTURES[kind];
    const signature = STATE_ELEMENT_SIGNATURES[kind];
    const q = call.target;
    if (targets.has(q)) {
      // Driven twice: let name resolution report it once, against the first.
      assignments.push({ target: q, targetSpan: call.targetSpan, expr: { kind: "const", value: 0, span: call.span }, span: call.span });
      continue;
    }
    targets.add(q);
    const nets: Record<string, string> = {};
    for (const gate of structure.gates) nets[gate.role] = elementNetName(q, gate.role);
    // Generated names must be new.
    let clash = false;
    const ownNames = [
      ...structure.gates.filter((x) => x.role !== "q").map((x) => nets[x.role]!),
      ...signature.pins.map((pin) => elementPinNetName(q, pin)),
    ];
    for (const name of ownNames) {
      const taken = userNames.get(name);
      if (taken !== undefined || generated.has(name)) {
        clash = true;
        diagnostics.push(
          diag("GW2032", `'${name}' is the name of an internal signal of the ${kind} '${q}'`, { file, span: taken ?? call.targetSpan }, {
            hint: `rename the signal, or the ${kind} '${q}'`,
            related: [{ message: `the ${kind} '${q}' is here`, file, start: call.span.start, length: call.span.length }],
          }),
        );
      }
    }
    if (clash) continue;

    // Pins: a constant stays a constant, an input or a named signal is read directly (and the
    // signal is kept as a net), an expression becomes a net of its own, `<q>.<pin>`.
    const pins: Record<string, PinSource> = {};
    const pinExpr: Record<string, Expr> = {};
    call.args.forEach((arg, i) => {
      const pin = signature.pins[i]!;
      if (arg.kind === "const") {
        pins[pin] = { constant: arg.value };
        pinExpr[pin] = arg;
      } else if (arg.kind === "ref") {
        pins[pin] = { signal: arg.name };
        pinExpr[pin] = arg;
        if (!inputs.has(arg.name)) kept.add(arg.name);
      } else {
        const net = elementPinNetName(q, pin);
        generated.add(net);
        assignments.push({ target: net, targetSpan: call.fnSpan, expr: arg, span: call.span });
        pins[pin] = { signal: net };
        pinExpr[pin] = { kind: "ref", name: net, span: arg.span };
        kept.add(net);
      }
    });

    const span = call.span;
    const operandExpr = (o: GateOperand): Expr | undefined =>
      "gate" in o ? { kind: "ref", name: nets[o.gate]!, span } : pinExpr[o.pin];
    for (const gate of structure.gates) {
      const operands = gate.nand.map(operandExpr).filter((e): e is Expr => e !== undefined);
      const body: Expr = operands.length === 1 ? operands[0]! : { kind: "and", args: operands, span };
      const expr: Expr = { kind: "not", arg: body, span };
      const target = nets[gate.role]!;
      if (gate.role !== "q") generated.add(target);
      assignments.push({ target, targetSpan: gate.role === "q" ? call.targetSpan : call.fnSpan, expr, span });
      kept.add(target);
    }
    elements.push({ kind, name: q, nets, complement: nets[structure.complement]!, pins, span });
  }

  const source: DesignSource = { ...src, assignments };
  delete source.stateElements;
  return { source, elements, keptNames: [...kept], diagnostics };
}
