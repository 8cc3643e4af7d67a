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
