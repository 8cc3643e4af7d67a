// Test support: random expressions as design sources, and an evaluator written independently
// of src/logic (direct recursive evaluation of the syntax tree), to check the pipeline against.
import fc from "fast-check";
import type { DesignSource, Expr } from "../../src/syntax/index.js";

const span = { start: 0, length: 0 };

export function exprArb(names: string[], depth = 4): fc.Arbitrary<Expr> {
  const { expr } = fc.letrec<{ expr: Expr }>((tie) => ({
    expr: fc.oneof(
      { depthSize: "small", withCrossShrink: true },
      fc.constantFrom(...names).map((name): Expr => ({ kind: "ref", name, span })),
      fc.constantFrom<0 | 1>(0, 1).map((value): Expr => ({ kind: "const", value, span })),
      tie("expr").map((arg): Expr => ({ kind: "not", arg, span })),
      fc
        .tuple(fc.constantFrom<"and" | "or" | "xor">("and", "or", "xor"), fc.array(tie("expr"), { minLength: 2, maxLength: 4 }))
        .map(([kind, args]): Expr => ({ kind, args, span })),
    ),
  }));
  return expr.filter((e) => depthOf(e) <= depth + 2);
}

function depthOf(e: Expr): number {
  if (e.kind === "ref" || e.kind === "const") return 0;
  if (e.kind === "not") return 1 + depthOf(e.arg);
  return 1 + Math.max(...e.args.map(depthOf));
}

export function evalExpr(e: Expr, env: Record<string, number>): number {
  switch (e.kind) {
    case "ref":
      return env[e.name]!;
    case "const":
      return e.value;
    case "not":
      return 1 - evalExpr(e.arg, env);
    case "and":
      return e.args.every((a) => evalExpr(a, env) === 1) ? 1 : 0;
    case "or":
      return e.args.some((a) => evalExpr(a, env) === 1) ? 1 : 0;
    case "xor":
      return e.args.reduce((s, a) => s ^ evalExpr(a, env), 0);
  }
}

export function sourceOf(name: string, inputs: string[], outputs: [string, Expr][]): DesignSource {
  return {
    file: `${name}.logic`,
    name,
    language: "equations",
    inputs: inputs.map((n) => ({ name: n, span })),
    outputs: outputs.map(([n]) => ({ name: n, span })),
    wires: [],
    assignments: outputs.map(([target, expr]) => ({ target, targetSpan: span, expr, span })),
  };
}
