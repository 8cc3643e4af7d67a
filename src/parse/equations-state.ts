// The state statements of equation files, turned into the design source: `init q = 0;`,
// `oscillator ring;` and built-in state elements `q = dff(d, clk);` (grammar: "State" in
// grammars/equations.ne). Called by EquationReader.accept in equations.ts.
//
// What is reported here:
//   GW1007 an initial value other than 0 or 1
//   GW1020 a function that is not a state element (with the nearest name suggested)
//   GW1021 a state element with the wrong number of arguments
import type { Token } from "moo";
import { diag, type Diagnostic, type Span } from "../diagnostics/index.js";
import { nearestName } from "../logic/names.js";
import { elementSignature, STATE_ELEMENT_SIGNATURES } from "../sequential/elements.js";
import type { Declaration, Expr, InitialValue, StateElementCall } from "../syntax/index.js";
import type { RawExpr, RawList, RawNameList, RawStatement, StatementToken } from "./equations-syntax.js";

export interface StateParts {
  initials: InitialValue[];
  oscillators: Declaration[];
  stateElements: StateElementCall[];
}

export interface StateContext {
  file: string;
  report(d: Diagnostic): void;
  toExpr(e: RawExpr, tokens: StatementToken[]): Expr | undefined;
}

function spanOfTokens(tokens: Token[], first: number, last: number): Span {
  const start = tokens[first]!.offset;
  const end = tokens[last]!.offset + tokens[last]!.text.length;
  return { start, length: end - start };
}

function listOf<T>(l: RawList<T> | null): T[] {
  const out: T[] = [];
  for (let n = l; n; n = n.prev) out.push(n.item);
  return out.reverse();
}

function namesOf(l: RawNameList): number[] {
  const out: number[] = [];
  for (let n: RawNameList | null = l; n; n = n.prev) out.push(n.at);
  return out.reverse();
}

const tokSpan = (t: Token): Span => ({ start: t.offset, length: t.text.length });

/** Converts one state statement; returns false for statements of other kinds. */
export function acceptStateStatement(st: RawStatement, tokens: StatementToken[], parts: StateParts, ctx: StateContext): boolean {
  switch (st.t) {
    case "init": {
      for (const item of listOf(st.items)) {
        const name = tokens[item.name]!;
        const value = tokens[item.value]!;
        if (value.text !== "0" && value.text !== "1") {
          ctx.report(
            diag("GW1007", `'${value.text.length > 24 ? value.text.slice(0, 24) + "..." : value.text}' is not an initial value: use 0 or 1`, { file: ctx.file, span: tokSpan(value) }),
          );
          continue;
        }
        parts.initials.push({ name: name.text, value: value.text === "1" ? 1 : 0, span: spanOfTokens(tokens, item.name, item.value) });
      }
      return true;
    }
    case "oscillator": {
      for (const at of namesOf(st.names)) {
        const t = tokens[at]!;
        parts.oscillators.push({ name: t.text, span: tokSpan(t) });
      }
      return true;
    }
    case "call": {
      const fn = tokens[st.fn]!;
      const sig = elementSignature(fn.text);
      const span = spanOfTokens(tokens, st.first, st.last);
      if (!sig) {
        const near = nearestName(fn.text, Object.keys(STATE_ELEMENT_SIGNATURES));
        ctx.report(
          diag("GW1020", `'${fn.text.length > 24 ? fn.text.slice(0, 24) + "..." : fn.text}' is not a function gatewright knows`, { file: ctx.file, span: tokSpan(fn) }, {
            hint: near
              ? `did you mean '${near}'? (${STATE_ELEMENT_SIGNATURES[near as keyof typeof STATE_ELEMENT_SIGNATURES].usage})`
              : `the state elements are ${Object.values(STATE_ELEMENT_SIGNATURES).map((s) => s.usage).join("; ")}`,
          }),
        );
        return true;
      }
      const rawArgs = listOf(st.args);
      if (!sig.arities.includes(rawArgs.length)) {
        ctx.report(
          diag(
            "GW1021",
            `${sig.kind} takes ${sig.arities.join(" or ")} arguments, not ${rawArgs.length}`,
            { file: ctx.file, span: spanOfTokens(tokens, st.fn, st.last - 1) },
            { hint: `write ${sig.usage}` },
          ),
        );
        return true;
      }
      const args: Expr[] = [];
      for (const a of rawArgs) {
        const e = ctx.toExpr(a, tokens);
        if (e === undefined) return true; // reported (a bad constant)
        args.push(e);
      }
      const target = tokens[st.target]!;
      parts.stateElements.push({ target: target.text, targetSpan: tokSpan(target), fn: sig.kind, fnSpan: tokSpan(fn), args, span });
      return true;
    }
    default:
      return false;
  }
}
