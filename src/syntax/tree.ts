// The design source: what both front ends (equations and structural Verilog) produce.
// Plain data with source spans; names are not yet resolved (see logic/build.ts).
import type { Span } from "../diagnostics/index.js";

export type Expr =
  | { kind: "ref"; name: string; span: Span }
  | { kind: "const"; value: 0 | 1; span: Span }
  | { kind: "not"; arg: Expr; span: Span }
  | { kind: "and" | "or" | "xor"; args: Expr[]; span: Span };

export interface Declaration {
  name: string;
  span: Span;
}

export interface Assignment {
  target: string;
  targetSpan: Span;
  expr: Expr;
  /** Span of the whole statement. */
  span: Span;
}

/**
 * Points where a signal's value is free (don't-cares), written as cubes over input variables.
 * Made by minterm functions (`d(...)`) and truth tables (`-` outputs); the assignment of the
 * same target gives the value as written, which an optimizer may change at these points.
 */
export interface DontCareSource {
  /** The assigned signal whose value is free at these points. */
  target: string;
  targetSpan: Span;
  /** Input variables the cubes are written over, in order (first = leftmost character). */
  variables: Declaration[];
  /** One character per variable: '0', '1' or '-' (either). Disjoint from the points the
   *  source specifies. */
  cubes: string[];
  /** Span of the statement that gave them. */
  span: Span;
}

export interface DesignSource {
  /** Path of the file as the user gave it (used in diagnostics). */
  file: string;
  /** Design name: the file's base name for equations, the top module's name for Verilog. */
  name: string;
  inputs: Declaration[];
  outputs: Declaration[];
  /** Declared internal signals (Verilog `wire`). Equation files declare internals by assigning. */
  wires: Declaration[];
  assignments: Assignment[];
  /** Language the design came from. */
  language: "equations" | "verilog";
  /** Don't-cares of assigned signals (equation files: minterm functions and truth tables).
   *  Absent when there are none. */
  dontCares?: DontCareSource[];
  /** Built-in state elements (`q = dff(d, clk);`), expanded into assignments by src/sequential. */
  stateElements?: StateElementCall[];
  /** `init` declarations: starting values of state signals. */
  initials?: InitialValue[];
  /** Signals named in `oscillator` declarations: a loop through one of them is meant to oscillate. */
  oscillators?: Declaration[];
}

/** A built-in state element, written `q = dff(d, clk);` in equation files. The function name
 *  and the number of arguments are checked when reading; src/sequential expands it. */
export interface StateElementCall {
  target: string;
  targetSpan: Span;
  /** Function name as written (`dff`, `dlatch`). */
  fn: string;
  fnSpan: Span;
  args: Expr[];
  /** Span of the whole statement. */
  span: Span;
}

/** `init q = 0;`: the value a state signal starts with. */
export interface InitialValue {
  name: string;
  value: 0 | 1;
  span: Span;
}

// Builders used by grammar postprocessors, so that the grammars build plain typed objects.
export const build = {
  ref(name: string, span: Span): Expr {
    return { kind: "ref", name, span };
  },
  constant(value: 0 | 1, span: Span): Expr {
    return { kind: "const", value, span };
  },
  not(arg: Expr, span: Span): Expr {
    return { kind: "not", arg, span };
  },
  /** n-ary operator; nested operators of the same kind are kept as written (no flattening here). */
  nary(kind: "and" | "or" | "xor", args: Expr[], span: Span): Expr {
    return { kind, args, span };
  },
};

/** Visits an expression without recursion (deeply nested input must not overflow the stack). */
export function forEachRef(e: Expr, visit: (name: string, span: Span) => void): void {
  const stack: Expr[] = [e];
  while (stack.length) {
    const x = stack.pop()!;
    switch (x.kind) {
      case "ref":
        visit(x.name, x.span);
        break;
      case "const":
        break;
      case "not":
        stack.push(x.arg);
        break;
      default:
        for (let i = x.args.length - 1; i >= 0; i--) stack.push(x.args[i]!);
    }
  }
}
