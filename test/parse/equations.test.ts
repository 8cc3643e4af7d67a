// Tests of the equation-file front end (src/parse/equations.ts, grammars/equations.ne).
//
// Sources: the operator set, spellings and precedence (NOT > AND > XOR > OR, all
// left-associative) are the project's language definition (the equation-language issue; also
// the header of grammars/equations.ne). Boolean identities used to check meaning (De Morgan,
// double negation, the XOR truth table) are common practice.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parseEquations, MAX_ERRORS, MAX_NESTING, designNameOf } from "../../src/parse/equations.js";
import { positionOf, type Diagnostic } from "../../src/diagnostics/index.js";
import type { DesignSource, Expr } from "../../src/syntax/index.js";
import { CATALOGUE } from "../../src/diagnostics/catalogue.js";

// ---- helpers ------------------------------------------------------------------------------------

/** S-expression of a tree without spans: or(a,xor(and(b,c),d)), !(a), 0, 1. */
function show(e: Expr): string {
  switch (e.kind) {
    case "ref":
      return e.name;
    case "const":
      return String(e.value);
    case "not":
      return `!(${show(e.arg)})`;
    default:
      return `${e.kind}(${e.args.map(show).join(",")})`;
  }
}

/** A tree with every span removed, for structural comparison. */
function strip(e: Expr): unknown {
  switch (e.kind) {
    case "ref":
      return { kind: "ref", name: e.name };
    case "const":
      return { kind: "const", value: e.value };
    case "not":
      return { kind: "not", arg: strip(e.arg) };
    default:
      return { kind: e.kind, args: e.args.map(strip) };
  }
}

function ok(text: string, file = "t.logic"): DesignSource {
  const r = parseEquations(text, file);
  expect(r.diagnostics, JSON.stringify(r.diagnostics)).toEqual([]);
  expect(r.value).toBeDefined();
  return r.value!;
}

/** The expression of the only (or the named) assignment. */
function exprOf(text: string, target?: string): Expr {
  const v = ok(text);
  const a = target === undefined ? v.assignments[0] : v.assignments.find((x) => x.target === target);
  expect(a).toBeDefined();
  return a!.expr;
}

function parsesAs(expression: string): string {
  return show(exprOf(`y = ${expression};`));
}

function slice(text: string, span: { start: number; length: number }): string {
  return text.slice(span.start, span.start + span.length);
}

/** code@line:column of each diagnostic. */
function where(text: string, ds: Diagnostic[]): string[] {
  return ds.map((d) => {
    const p = positionOf(d, text);
    return p ? `${d.code}@${p.line}:${p.column}` : d.code;
  });
}

function errors(text: string): Diagnostic[] {
  return parseEquations(text, "bad.logic").diagnostics;
}

/** Truth value of a tree, evaluated directly (independent of src/logic). */
function evaluate(e: Expr, env: Record<string, boolean>): boolean {
  switch (e.kind) {
    case "ref":
      return env[e.name]!;
    case "const":
      return e.value === 1;
    case "not":
      return !evaluate(e.arg, env);
    case "and":
      return e.args.every((a) => evaluate(a, env));
    case "or":
      return e.args.some((a) => evaluate(a, env));
    case "xor":
      return e.args.reduce((acc, a) => acc !== evaluate(a, env), false);
  }
}

function truthTable(expression: string, names: string[]): string {
  const e = exprOf(`y = ${expression};`);
  let out = "";
  for (let m = 0; m < 1 << names.length; m++) {
    const env: Record<string, boolean> = {};
    names.forEach((n, i) => (env[n] = ((m >> (names.length - 1 - i)) & 1) === 1));
    out += evaluate(e, env) ? "1" : "0";
  }
  return out;
}

// ---- good input ---------------------------------------------------------------------------------

describe("parseEquations: design source", () => {
  it("reads the example from the language definition", () => {
    const text = [
      "# comments with '#' or '//' to end of line; also /* block */ comments",
      "input a, b, c;",
      "input s_n, r_n;",
      "output y, q, qn;",
      "t = a & !b;            # internal signal",
      "y = t | (b ^ c)';      # ' is postfix NOT",
      "q  = !(s_n & qn);      // feedback is allowed: this pair is a latch",
      "qn = !(r_n & q);",
      "",
    ].join("\n");
    const r = parseEquations(text, "examples/ctl.logic");
    expect(r.diagnostics).toEqual([]);
    const v = r.value!;
    expect(v.name).toBe("ctl");
    expect(v.file).toBe("examples/ctl.logic");
    expect(v.language).toBe("equations");
    expect(v.wires).toEqual([]);
    expect(v.inputs.map((d) => d.name)).toEqual(["a", "b", "c", "s_n", "r_n"]);
    expect(v.outputs.map((d) => d.name)).toEqual(["y", "q", "qn"]);
    expect(v.assignments.map((a) => `${a.target}=${show(a.expr)}`)).toEqual([
      "t=and(a,!(b))",
      "y=or(t,!(xor(b,c)))",
      "q=!(and(s_n,qn))",
      "qn=!(and(r_n,q))",
    ]);
  });

  it("names the design after the file's base name", () => {
    expect(designNameOf("examples/ctl.logic")).toBe("ctl");
    expect(designNameOf("C:\\work\\adder.v2.logic")).toBe("adder.v2");
    expect(designNameOf("plain")).toBe("plain");
  });

  it("accepts declarations and assignments in any order, repeated declarations and empty statements", () => {
    const v = ok("y = a;;\ninput a;\noutput y; ;\ninput b, c;");
    expect(v.inputs.map((d) => d.name)).toEqual(["a", "b", "c"]);
    expect(v.outputs.map((d) => d.name)).toEqual(["y"]);
    expect(v.assignments).toHaveLength(1);
  });

  it("accepts an empty file and a file of comments only", () => {
    expect(ok("").assignments).toEqual([]);
    expect(ok("# nothing\n// at all\n/* really\n nothing */\n").inputs).toEqual([]);
  });

  it("accepts names with digits, '_', '.' and '$', and CRLF line ends and a byte-order mark", () => {
    const v = ok("\uFEFFinput u1.q$2, _x9;\r\ny = u1.q$2 & _x9;\r\n");
    expect(v.inputs.map((d) => d.name)).toEqual(["u1.q$2", "_x9"]);
    expect(show(v.assignments[0]!.expr)).toBe("and(u1.q$2,_x9)");
  });
});

describe("parseEquations: operators and precedence (project language definition)", () => {
  it("binds NOT tighter than AND, AND tighter than XOR, XOR tighter than OR", () => {
    expect(parsesAs("a | b & c ^ d")).toBe("or(a,xor(and(b,c),d))");
    expect(parsesAs("a ^ b | c")).toBe("or(xor(a,b),c)");
    expect(parsesAs("a & b ^ c & d")).toBe("xor(and(a,b),and(c,d))");
    expect(parsesAs("!a & b")).toBe("and(!(a),b)");
    expect(parsesAs("a & b' | c")).toBe("or(and(a,!(b)),c)");
    expect(parsesAs("a | b ^ c & !d'")).toBe("or(a,xor(b,and(c,!(!(d)))))");
  });

  it("accepts every spelling of each operator", () => {
    expect(parsesAs("a * b")).toBe("and(a,b)");
    expect(parsesAs("a + b")).toBe("or(a,b)");
    expect(parsesAs("~a")).toBe("!(a)");
    expect(parsesAs("a'")).toBe("!(a)");
    expect(parsesAs("a * b + c & d")).toBe("or(and(a,b),and(c,d))");
  });

  it("builds one n-ary node for a chain of one operator without parentheses", () => {
    expect(parsesAs("a & b & c")).toBe("and(a,b,c)");
    expect(parsesAs("a & b * c & d")).toBe("and(a,b,c,d)");
    expect(parsesAs("a | b + c")).toBe("or(a,b,c)");
    expect(parsesAs("a ^ b ^ c")).toBe("xor(a,b,c)");
    expect(parsesAs("a | b & c | d")).toBe("or(a,and(b,c),d)");
  });

  it("keeps the grouping written with parentheses (left-associative otherwise)", () => {
    expect(parsesAs("(a & b) & c")).toBe("and(and(a,b),c)");
    expect(parsesAs("a & (b & c)")).toBe("and(a,and(b,c))");
    expect(parsesAs("(a | b) & c")).toBe("and(or(a,b),c)");
    expect(parsesAs("((a))")).toBe("a");
    expect(parsesAs("(a & b)")).toBe("and(a,b)");
  });

  it("reads prefix and postfix NOT, doubled and mixed", () => {
    expect(parsesAs("a''")).toBe("!(!(a))");
    expect(parsesAs("!!a")).toBe("!(!(a))");
    expect(parsesAs("!~a")).toBe("!(!(a))");
    expect(parsesAs("(x)'")).toBe("!(x)");
    expect(parsesAs("(a & b)'")).toBe("!(and(a,b))");
    expect(parsesAs("!(a | b)'")).toBe("!(!(or(a,b)))");
  });

  it("reads the constants 0 and 1", () => {
    expect(parsesAs("a & 1 | 0")).toBe("or(and(a,1),0)");
    expect(parsesAs("1'")).toBe("!(1)");
  });

  it("ignores comments of all three kinds, also inside an expression", () => {
    const text = "y = a & /* block\n spanning lines */ b # hash\n | c // slashes\n ;";
    expect(show(exprOf(text))).toBe("or(and(a,b),c)");
  });

  it("gives the meanings Boolean algebra expects (common practice)", () => {
    // XOR is true when an odd number of inputs is true.
    expect(truthTable("a ^ b", ["a", "b"])).toBe("0110");
    expect(truthTable("a ^ b ^ c", ["a", "b", "c"])).toBe("01101001");
    // De Morgan: !(a & b) = !a | !b and !(a | b) = !a & !b.
    expect(truthTable("!(a & b)", ["a", "b"])).toBe(truthTable("!a | !b", ["a", "b"]));
    expect(truthTable("(a + b)'", ["a", "b"])).toBe(truthTable("a' * b'", ["a", "b"]));
    // Double negation.
    expect(truthTable("a''", ["a"])).toBe(truthTable("a", ["a"]));
    // Precedence changes meaning: a | b & c differs from (a | b) & c.
    expect(truthTable("a | b & c", ["a", "b", "c"])).toBe("00011111");
    expect(truthTable("(a | b) & c", ["a", "b", "c"])).toBe("00010101");
  });
});

describe("parseEquations: spans", () => {
  it("puts exact UTF-16 offsets on declarations, assignments and nodes", () => {
    //            0         1         2         3
    //            0123456789012345678901234567890123456
    const text = "input a, b;\ny = !(a & b)' | c;\n";
    const v = ok(text);
    expect(v.inputs[1]).toEqual({ name: "b", span: { start: 9, length: 1 } });
    const asg = v.assignments[0]!;
    expect(asg.targetSpan).toEqual({ start: 12, length: 1 });
    expect(asg.span).toEqual({ start: 12, length: 18 }); // "y = ... c;" including the ';'
    expect(slice(text, asg.span)).toBe("y = !(a & b)' | c;");
    const or = asg.expr;
    expect(or.kind).toBe("or");
    expect(or.span).toEqual({ start: 16, length: 13 });
    if (or.kind !== "or") throw new Error("unreachable");
    const outerNot = or.args[0]!;
    expect(slice(text, outerNot.span)).toBe("!(a & b)'");
    if (outerNot.kind !== "not") throw new Error("unreachable");
    expect(slice(text, outerNot.arg.span)).toBe("(a & b)'"); // postfix NOT covers its parentheses
    if (outerNot.arg.kind !== "not") throw new Error("unreachable");
    expect(outerNot.arg.arg.span).toEqual({ start: 18, length: 5 }); // "a & b" without its parentheses
    expect(or.args[1]!.span).toEqual({ start: 28, length: 1 });
  });

  it("counts offsets in UTF-16 code units after non-ASCII text", () => {
    const text = "# größer 😀\ny = a;";
    const asg = ok(text).assignments[0]!;
    expect(asg.targetSpan.start).toBe(text.indexOf("y"));
    expect(asg.targetSpan.start).toBe(12); // "# größer " is 9 units, the emoji 2, the line feed 1
  });
});

// ---- bad input ----------------------------------------------------------------------------------

describe("parseEquations: mistakes", () => {
  it("an operator without its right operand (GW1002)", () => {
    const text = "input a, b;\ny = a &;";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1002@2:8"]);
    expect(ds[0]!.message).toBe("expected an expression after '&', found ';'");
  });

  it("an assignment without '=' (GW1002)", () => {
    const text = "y a;";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1002@1:3"]);
    expect(ds[0]!.message).toBe("expected '=' after 'y', found 'a'");
  });

  it("a forgotten ';' at the end of a line (GW1002 at the next statement)", () => {
    const text = "input a;\ny = a\nz = a;\n";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1002@3:1"]);
    expect(ds[0]!.message).toBe("expected ';' after the assignment, found 'z'");
    expect(ds[0]!.hint).toContain("line 2");
  });

  it("two operands without an operator on one line (GW1002)", () => {
    const text = "y = a b;";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1002@1:7"]);
    expect(ds[0]!.message).toBe("expected an operator or ';' after 'a', found 'b'");
  });

  it("a declaration with a missing comma, and one with no names (GW1002)", () => {
    const text = "input a b;\noutput ;";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1002@1:9", "GW1002@2:8"]);
    expect(ds[0]!.message).toBe("expected ',' or ';' after 'a', found 'b'");
    expect(ds[1]!.message).toBe("expected a name after 'output', found ';'");
  });

  it("a statement that starts with something else (GW1002)", () => {
    const text = "= a;";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1002@1:1"]);
    expect(ds[0]!.message).toContain("expected a statement ('input', 'output' or an assignment), found '='");
  });

  it("an unclosed '(' names where it opened; a stray ')' says so (GW1002)", () => {
    const text = "y = (a & b;\nz = a);";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1002@1:11", "GW1002@2:6"]);
    expect(ds[0]!.message).toBe("expected an operator or ')' after 'b', found ';'");
    expect(ds[0]!.related?.[0]?.start).toBe(4);
    expect(ds[1]!.hint).toBe("this ')' has no matching '('");
    const empty = errors("y = ();");
    expect(empty[0]!.message).toBe("expected an expression after '(', found ')'");
    expect(empty[0]!.hint).toBeUndefined();
  });

  it("a keyword used as a signal name (GW1002 with a hint)", () => {
    const text = "input a;\ninput = a;";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1002@2:7"]);
    expect(ds[0]!.message).toBe("expected a name after 'input', found '='");
    expect(ds[0]!.hint).toBe("'input' is a keyword and cannot name a signal");
  });

  it("the file ends inside a statement (GW1003 at the end of the file)", () => {
    const text = "input a;\ny = a";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1003@2:6"]);
    expect(ds[0]!.message).toBe("unexpected end of file: expected ';' after the assignment");
    expect(ds[0]!.start).toBe(text.length);
    const text2 = "y = a |";
    const ds2 = errors(text2);
    expect(where(text2, ds2)).toEqual(["GW1003@1:8"]);
    expect(ds2[0]!.message).toBe("unexpected end of file: expected an expression after '|'");
  });

  it("a character no token matches (GW1001), shown in the message", () => {
    // ('-' is a token since truth tables and minterm ranges; '%' still matches none.)
    const text = "input a;\ny = a @ b;\nz = a % b;";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1001@2:7", "GW1001@3:7"]);
    expect(ds[0]!.message).toBe("unexpected character '@' (U+0040)");
    const emoji = errors("y = 😀;");
    expect(emoji[0]!.message).toBe("unexpected character '😀' (U+1F600)");
    expect(emoji[0]!.length).toBe(2);
  });

  it("an unterminated block comment (GW1004 at its start)", () => {
    const text = "input a;\ny = a; /* never\nclosed";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1004@2:8"]);
  });

  it("a number other than 0 or 1 (GW1007)", () => {
    const text = "y = a & 2;\nz = 12ab | 01;";
    const ds = errors(text);
    expect(where(text, ds)).toEqual(["GW1007@1:9", "GW1007@2:5", "GW1007@2:12"]);
    expect(ds[1]!.message).toBe("'12ab' is not a constant: only 0 and 1 are allowed");
  });

  it("binary data: one GW1008 and no design", () => {
    const text = "input a;\ny = a;\u0000\u0001\u0002garbage\u0000";
    const r = parseEquations(text, "bad.logic");
    expect(where(text, r.diagnostics)).toEqual(["GW1008@2:7"]);
    expect(r.value).toBeUndefined();
    const bytes = String.fromCharCode(...Array.from({ length: 256 }, (_, i) => 255 - i));
    expect(parseEquations(bytes, "bin.logic").diagnostics.map((d) => d.code)).toEqual(["GW1008"]);
  });

  it("a name declared twice (GW2005, with the first declaration as related)", () => {
    const text = "input a, b;\ninput a;\noutput y, b;";
    const r = parseEquations(text, "dup.logic");
    expect(where(text, r.diagnostics)).toEqual(["GW2005@2:7", "GW2005@3:11"]);
    expect(r.diagnostics[0]!.message).toBe("'a' is already declared as an input");
    expect(r.diagnostics[0]!.related?.[0]).toMatchObject({ file: "dup.logic", start: 6, length: 1 });
    expect(r.diagnostics[1]!.related?.[0]?.start).toBe(9);
    // The first declaration stands.
    expect(r.value!.inputs.map((d) => d.name)).toEqual(["a", "b"]);
    expect(r.value!.outputs.map((d) => d.name)).toEqual(["y"]);
  });

  it("nesting deeper than the limit (GW1006); the limit itself is accepted", () => {
    const deep = (n: number) => `y = ${"(".repeat(n)}a${")".repeat(n)};`;
    expect(show(exprOf(deep(MAX_NESTING)))).toBe("a");
    const text = deep(MAX_NESTING + 1);
    expect(where(text, errors(text))).toEqual([`GW1006@1:${5 + MAX_NESTING}`]);
    const nots = `y = ${"!".repeat(100_000)}a;\nz = a;`;
    const r = parseEquations(nots, "deep.logic");
    expect(r.diagnostics.map((d) => d.code)).toEqual(["GW1006"]);
    expect(r.value!.assignments.map((a) => a.target)).toEqual(["z"]);
    const parens = `y = ${"(".repeat(100_000)}a${")".repeat(100_000)};`;
    expect(errors(parens).map((d) => d.code)).toEqual(["GW1006"]);
  });

  it("reports every bad statement and keeps the good ones", () => {
    const text = "input a, b;\nx = a &;\ny = a | b;\nz = (a;\nw = a ^ b;\nv = = a;";
    const r = parseEquations(text, "many.logic");
    expect(where(text, r.diagnostics)).toEqual(["GW1002@2:8", "GW1002@4:7", "GW1002@6:5"]);
    expect(r.value!.assignments.map((a) => a.target)).toEqual(["y", "w"]);
  });

  it(`stops after ${MAX_ERRORS} errors with a note`, () => {
    const text = "y = ;\n".repeat(MAX_ERRORS + 20);
    const ds = errors(text);
    expect(ds).toHaveLength(MAX_ERRORS + 1);
    expect(ds.filter((d) => d.severity === "error")).toHaveLength(MAX_ERRORS);
    expect(ds[MAX_ERRORS]!.code).toBe("GW1009");
    expect(CATALOGUE.GW1009.severity).toBe("note");
  });

  it("copes with a 100 kB name and a 1 MB line", () => {
    const name = "n".repeat(100_000);
    const v = ok(`input ${name};\ny = ${name} & ${name}';`);
    expect(v.inputs[0]!.name).toHaveLength(100_000);
    const bad = errors(`y = ${name} ${name};`);
    expect(bad.map((d) => d.code)).toEqual(["GW1002"]);
    expect(bad[0]!.message.length).toBeLessThan(200); // long names are cut short in messages
    const line = `y = ${Array.from({ length: 100_000 }, (_, i) => `a${i % 10}`).join(" & ")};`;
    expect(line.length).toBeGreaterThan(500_000);
    const e = exprOf(line);
    expect(e.kind === "and" && e.args.length).toBe(100_000);
    const junk = "@".repeat(1_000_000);
    expect(errors(junk).map((d) => d.code)).toEqual(["GW1001"]);
  });
});

// ---- properties ---------------------------------------------------------------------------------

const NAMES = ["a", "b", "c", "s_n", "x1", "u.q$"];

type Tree = Expr;
const noSpan = { start: 0, length: 0 };

/** Random trees in the form the parser produces (n-ary nodes have at least two operands). */
const treeArb: fc.Arbitrary<Tree> = fc.letrec<{ tree: Tree }>((tie) => ({
  tree: fc.oneof(
    { depthSize: "small", withCrossShrink: true },
    fc.constantFrom(...NAMES).map((name): Tree => ({ kind: "ref", name, span: noSpan })),
    fc.constantFrom<0 | 1>(0, 1).map((value): Tree => ({ kind: "const", value, span: noSpan })),
    tie("tree").map((arg): Tree => ({ kind: "not", arg, span: noSpan })),
    fc
      .tuple(fc.constantFrom<"and" | "or" | "xor">("and", "or", "xor"), fc.array(tie("tree"), { minLength: 2, maxLength: 4 }))
      .map(([kind, args]): Tree => ({ kind, args, span: noSpan })),
  ),
})).tree;

const PRECEDENCE = { or: 1, xor: 2, and: 3 } as const;
const SPELLINGS = { and: ["&", "*"], or: ["|", "+"], xor: ["^"] } as const;
const GAPS = ["", " ", "  ", "\t", "\n", " /* note */ ", " # note\n", " // note\n"];

/** Prints a tree with random spellings, gaps and extra parentheses; `pick` supplies choices. */
function print(e: Tree, pick: (n: number) => number): string {
  const gap = () => GAPS[pick(GAPS.length)]!;
  const paren = (s: string) => `(${gap()}${s}${gap()})`;
  const maybeParen = (s: string) => (pick(4) === 0 ? paren(s) : s);
  // An operand of a postfix NOT must not be a bare chain of a binary operator.
  const atom = (x: Tree): string => {
    const s = print(x, pick);
    return x.kind === "and" || x.kind === "or" || x.kind === "xor" ? paren(s) : s;
  };
  switch (e.kind) {
    case "ref":
      return maybeParen(e.name);
    case "const":
      return maybeParen(String(e.value));
    case "not": {
      const form = pick(3);
      if (form === 2) return maybeParen(`${atom(e.arg)}${gap()}'`);
      const op = form === 0 ? "!" : "~";
      const arg = e.arg.kind === "ref" || e.arg.kind === "const" || e.arg.kind === "not" ? print(e.arg, pick) : paren(print(e.arg, pick));
      return maybeParen(`${op}${gap()}${arg}`);
    }
    default: {
      const kind = e.kind;
      const parts = e.args.map((arg) => {
        const s = print(arg, pick);
        // Same operator (would merge into this chain) or looser binding: parentheses needed.
        const needs = arg.kind === kind || ((arg.kind === "and" || arg.kind === "or" || arg.kind === "xor") && PRECEDENCE[arg.kind] < PRECEDENCE[kind]);
        return needs ? paren(s) : s;
      });
      const ops = SPELLINGS[kind];
      let out = parts[0]!;
      for (let i = 1; i < parts.length; i++) out += `${gap()}${ops[pick(ops.length)]}${gap()}${parts[i]}`;
      return maybeParen(out);
    }
  }
}

function* nodes(e: Expr): Generator<Expr> {
  yield e;
  if (e.kind === "not") yield* nodes(e.arg);
  else if (e.kind !== "ref" && e.kind !== "const") for (const a of e.args) yield* nodes(a);
}

describe("parseEquations: properties", () => {
  it("random trees printed in any spelling parse back to the same tree", () => {
    fc.assert(
      fc.property(treeArb, fc.infiniteStream(fc.nat()), (tree, choices) => {
        const it = choices[Symbol.iterator]();
        const pick = (n: number) => it.next().value % n;
        const text = `y =${GAPS[pick(GAPS.length)]}${print(tree, pick)}\n;`;
        const r = parseEquations(text, "p.logic");
        expect(r.diagnostics, text).toEqual([]);
        const got = r.value!.assignments[0]!.expr;
        expect(strip(got), text).toEqual(strip(tree));
        // Every node's span holds text that parses back to that node.
        for (const node of nodes(got)) {
          const again = parseEquations(`z = ${slice(text, node.span)};`, "s.logic");
          expect(again.diagnostics).toEqual([]);
          expect(strip(again.value!.assignments[0]!.expr)).toEqual(strip(node));
        }
      }),
      { numRuns: 200 },
    );
  });

  it("each statement of a file parses as if it stood alone", () => {
    // Statements with the same token kinds as an earlier one reuse its parse; names, constants
    // and offsets must still come from their own text, and near-identical shapes must not mix.
    // Small trees make repeated and near-identical shapes common.
    const smallTree = treeArb.filter((t) => [...nodes(t)].length <= 6);
    fc.assert(
      fc.property(fc.array(fc.tuple(smallTree, fc.infiniteStream(fc.nat())), { minLength: 1, maxLength: 12 }), (items) => {
        const statements: string[] = [];
        items.forEach(([tree, choices], i) => {
          const it = choices[Symbol.iterator]();
          const pick = (n: number) => it.next().value % n;
          const text = `t${i} = ${print(tree, pick)};`;
          statements.push(text);
          // The same shape again: every name renamed, constants changed (7 is a bad constant).
          const digit = ["0", "1", "7"][pick(3)]!;
          statements.push(text.replace(/[A-Za-z_][A-Za-z0-9_.$]*/g, (n) => (n === "note" ? n : `r_${n}`)).replace(/\b[01]\b/g, digit));
        });
        const together = parseEquations(statements.join("\n"), "p.logic");
        let shift = 0;
        let k = 0;
        for (const text of statements) {
          const alone = parseEquations(text, "p.logic");
          const mine = together.diagnostics.filter((d) => d.start! >= shift && d.start! < shift + text.length);
          expect(mine.map((d) => `${d.code}:${d.start! - shift}`)).toEqual(alone.diagnostics.map((d) => `${d.code}:${d.start}`));
          const b = alone.value!.assignments[0];
          if (b) {
            const a = together.value!.assignments[k++]!;
            expect(a.target).toBe(b.target);
            expect(strip(a.expr)).toEqual(strip(b.expr));
            const spans = (e: Expr) => [...nodes(e)].map((n) => [n.span.start, n.span.length]);
            expect(spans(a.expr)).toEqual(spans(b.expr).map(([st, len]) => [st! + shift, len]));
            expect(a.span.start).toBe(b.span.start + shift);
          }
          shift += text.length + 1;
        }
        expect(together.value!.assignments).toHaveLength(k);
      }),
      { numRuns: 150 },
    );
  });

  it("never throws or fails internally, whatever the text, and keeps spans inside it", () => {
    const alphabet = fc.constantFrom(..."ab01_ =;,()!~'&*^|+#/\n\t@$.9".split(""), "input ", "output ", "/*", "*/", "\u0000", "é", "😀");
    fc.assert(
      fc.property(fc.oneof(fc.array(alphabet, { maxLength: 60 }).map((xs) => xs.join("")), fc.string({ unit: "binary", maxLength: 60 })), (text) => {
        const r = parseEquations(text, "fuzz.logic");
        for (const d of r.diagnostics) {
          expect(d.code).not.toBe("GW9001");
          if (d.start !== undefined) {
            expect(d.start).toBeGreaterThanOrEqual(0);
            expect(d.start + (d.length ?? 0)).toBeLessThanOrEqual(text.length);
          }
        }
        if (r.diagnostics.length === 0) expect(r.value).toBeDefined();
      }),
      { numRuns: 500 },
    );
  });
});

// ---- minterm functions and truth tables (issue 4) --------------------------------------------------
// Sources: the minterm notation F(a,b,c) = Σm(1,3,5) + d(7) with a as the most significant
// bit, maxterms ΠM(...), and truth tables with '-' for don't-cares are the textbook conventions
// (e.g. Mano, Digital Design; common practice). The syntax is the project's own (header of
// grammars/equations.ne).

/** The don't-care cubes of a target, as text. */
function dcOf(v: DesignSource, target: string): string[] | undefined {
  return v.dontCares?.find((d) => d.target === target)?.cubes;
}

/** The value of a target's expression at each point of its variables (first variable = MSB). */
function valuesOf(v: DesignSource, target: string, vars: string[]): string {
  const a = v.assignments.find((x) => x.target === target)!;
  let out = "";
  for (let m = 0; m < 1 << vars.length; m++) {
    const env: Record<string, boolean> = {};
    vars.forEach((n, i) => (env[n] = ((m >> (vars.length - 1 - i)) & 1) === 1));
    out += evaluate(a.expr, env) ? "1" : "0";
  }
  return out;
}

describe("parseEquations: minterm functions", () => {
  it("reads Σm(...) + d(...) in every spelling, as the canonical sum with the don't-cares beside it", () => {
    for (const rhs of ["Σm(1, 3, 5) + d(7)", "∑m(1,3,5)+d(7)", "sum m(1, 3, 5) + d(7)", "m(1, 3, 5) d(7)", "m(1,3) + m(5) | D(7)", "m(1, 3, 5) dc(7)", "SUM m(1-1, 3, 5) d(7-7)"]) {
      const v = ok(`input a, b, c; output F;\nF(a, b, c) = ${rhs};`);
      expect(valuesOf(v, "F", ["a", "b", "c"]), rhs).toBe("01010100");
      expect(dcOf(v, "F"), rhs).toEqual(["111"]);
      expect(v.dontCares![0]!.variables.map((d) => d.name)).toEqual(["a", "b", "c"]);
    }
  });

  it("reads maxterms ΠM(...) as the canonical product, ranges, and empty groups", () => {
    const v = ok("input a, b, c; output G, H, Z;\nG(a, b, c) = ΠM(0, 2, 4) * d(7);\nH(a, b, c) = prod M(0-3);\nZ(a, b) = m();");
    expect(valuesOf(v, "G", ["a", "b", "c"])).toBe("01010111");
    expect(dcOf(v, "G")).toEqual(["111"]);
    expect(valuesOf(v, "H", ["a", "b", "c"])).toBe("00001111");
    expect(valuesOf(v, "Z", ["a", "b"])).toBe("0000");
    expect(v.dontCares!.length).toBe(1);
  });

  it("accepts the variables' declarations after the function, and gives the statement's spans", () => {
    const text = "output F;\nF(x, y) = m(3);\ninput x, y;";
    const v = ok(text);
    const a = v.assignments[0]!;
    expect(slice(text, a.targetSpan)).toBe("F");
    expect(slice(text, a.span)).toBe("F(x, y) = m(3);");
    expect(valuesOf(v, "F", ["x", "y"])).toBe("0001");
  });

  it("reports bad minterm lists with codes and positions", () => {
    const cases: [string, string[], string?][] = [
      ["input a, b, c; output F;\nF(a, b, c) = m(1, 8);", ["GW1010@2:19"], "minterm 8 is out of range: 'F' has 3 variables, so its minterms are 0 to 7"],
      ["input a, b; output F;\nF(a, b) = m(1, 2, 1);", ["GW1011@2:19"], "minterm 1 is listed twice"],
      ["input a, b; output F;\nF(a, b) = m(1, 2) + d(2);", ["GW1012@2:23"], "minterm 2 is both in m(...) and in d(...)"],
      ["input a, b; output F;\nF(a, b) = m(1) + x(2);", ["GW1013@2:18"], "'x' is not a group of a minterm function"],
      ["input a, b; output F;\nF(a, b) = m(1) + M(2);", ["GW1013@2:18"]],
      ["input a, b; output F;\nF(a, b) = Σ M(2);", ["GW1013@2:13"]],
      ["input a, b; output F;\nF(a, b) = total m(2);", ["GW1013@2:11"]],
      ["input a, b; output F;\nF(a, b) = m(3-1);", ["GW1010@2:13"], "the range 3-1 runs backwards"],
      ["input a, b; output F;\nF(a, b) = m(0x2);", ["GW1010@2:13"], "'0x2' is not a minterm number"],
      ["input a; output F;\nF(a, q) = m(1);", ["GW2016@2:6"], "'q' is not a declared input; the variables of a function or table must be inputs"],
      ["input a; output F, q;\nF(a, q) = m(1);", ["GW2016@2:6"]],
      ["input a; output F;\nF(a, a) = m(1);", ["GW2017@2:6"], "'a' is listed twice"],
      ["input a; output F;\nF(a) = m(1)\ny = a;", ["GW1002@3:1"], "expected ';' after the function, found 'y'"],
    ];
    for (const [text, expected, message] of cases) {
      const ds = errors(text);
      expect(where(text, ds), text).toEqual(expected);
      if (message) expect(ds[0]!.message).toBe(message);
    }
  });

  it("limits the number of variables (GW1017)", () => {
    const vars = Array.from({ length: 25 }, (_, i) => `x${i}`);
    const text = `input ${vars.join(", ")}; output F;\nF(${vars.join(", ")}) = m(1);`;
    expect(errors(text).map((d) => d.code)).toEqual(["GW1017"]);
  });
});

describe("parseEquations: truth tables", () => {
  const HALF = "input a, b; output s, c;\ntable a, b : s, c {\n  00 : 0 0;\n  01 : 1 0;\n  10 : 1 0;\n  11 : 0 1;\n}\n";

  it("reads a truth table into one assignment per output", () => {
    const v = ok(HALF);
    expect(v.assignments.map((a) => a.target)).toEqual(["s", "c"]);
    expect(valuesOf(v, "s", ["a", "b"])).toBe("0110");
    expect(valuesOf(v, "c", ["a", "b"])).toBe("0001");
    expect(v.dontCares).toBeUndefined();
    expect(slice(HALF, v.assignments[0]!.targetSpan)).toBe("s");
    expect(slice(HALF, v.assignments[1]!.span).startsWith("table a, b")).toBe(true);
  });

  it("takes '-' outputs as don't-cares, '-' inputs as both values, and unlisted rows as 0", () => {
    const text = "input a, b, c; output y, z;\ntable a, b, c : y, z {\n  0 0 0 : 1 -;\n  1 - - : 0 1;\n  01- : - 0;\n  011 : 1 -;\n};";
    const v = ok(text);
    // y: 000 → 1, 1xx → 0, 010 → free, 011 → 1, 001 → 0 (unlisted).
    expect(valuesOf(v, "y", ["a", "b", "c"])).toBe("10010000");
    expect(dcOf(v, "y")).toEqual(["010"]);
    // z: 000 free, 1xx → 1, 01x → 0; the '-' of row 4 yields to row 3's 0.
    expect(valuesOf(v, "z", ["a", "b", "c"])).toBe("00001111");
    expect(dcOf(v, "z")).toEqual(["000"]);
  });

  it("reads an empty table, a table after its declarations' use, and the statement after it", () => {
    const v = ok("output y;\ntable a : y { }\nx = a;\ninput a;\noutput x;");
    expect(valuesOf(v, "y", ["a"])).toBe("00");
    expect(v.assignments.map((a) => a.target)).toEqual(["y", "x"]);
  });

  it("reports bad tables with codes and positions", () => {
    const cases: [string, string[], string?][] = [
      ["input a, b; output y;\ntable a, b : y {\n  0 : 1;\n}", ["GW1014@3:3"], "this row gives 1 input value; the table has 2 inputs (a, b)"],
      ["input a, b; output y;\ntable a, b : y {\n  00 : 1 1;\n}", ["GW1014@3:8"], "this row gives 2 output values; the table has 1 output (y)"],
      ["input a, b; output y;\ntable a, b : y {\n  02 : 1;\n}", ["GW1015@3:3"], "'02' is not a truth-table value"],
      ["input a, b; output y;\ntable a, b : y {\n  0- : 1;\n  01 : 0;\n}", ["GW1016@4:3"], "rows 1 and 2 of the table disagree on 'y' at a=0 b=1"],
      ["input a, b; output y;\ntable a, b : y {\n  11 : 1;\n  11 : 0;\n}", ["GW1016@4:3"]],
      ["input a; output y;\ntable a, q : y {\n  00 : 1;\n}", ["GW2016@2:10"]],
      ["input a; output y;\ntable a : a {\n  0 : 1;\n}", ["GW2017@2:11"]],
      ["input a, b; output y;\ntable a, b : y {\n  00 : 1;\ninput c;", ["GW1002@4:1"], "expected '}' to close the table before 'input'"],
      ["input a, b; output y;\ntable a, b : y {\n  00 : 1\n}", ["GW1002@4:1"]],
      ["input a, b; output y;\ntable a, b : y {\n  00 : 1;", ["GW1003@3:10"]],
      ["input a, b; output y;\ntable a, b y {\n  00 : 1;\n}", ["GW1002@2:12"]],
    ];
    for (const [text, expected, message] of cases) {
      const ds = errors(text);
      expect(where(text, ds), text).toEqual(expected);
      if (message) expect(ds[0]!.message).toBe(message);
    }
  });

  it("'table' is a keyword; the errors after a table do not hide the next statement's", () => {
    expect(errors("table = a;").map((d) => d.code)).toEqual(["GW1002"]);
    const text = "input a; output y, z;\ntable a : y {\n  2 : 1;\n}\nz = a &;";
    expect(where(text, errors(text))).toEqual(["GW1015@3:3", "GW1002@5:8"]);
  });
});
