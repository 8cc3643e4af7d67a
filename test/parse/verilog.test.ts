// Tests of the structural Verilog front end (src/parse/verilog*.ts).
// External references: the ISCAS-85 c17 benchmark (Brglez and Fujiwara, 1985; netlist and
// equations from memory, as in /work/shared/REFERENCES.md), operator precedence of
// IEEE 1364-2005 §5.1.2 Table 5-4, and binary addition (common practice) for the adders.
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { positionOf, type Diagnostic } from "../../src/diagnostics/index.js";
import { CATALOGUE } from "../../src/diagnostics/catalogue.js";
import type { DesignSource, Expr } from "../../src/syntax/index.js";
import { MAX_NESTING, parseVerilog } from "../../src/parse/verilog.js";
import { Reader, parseItem } from "../../src/parse/verilog-items.js";
import nearley from "nearley";
import compiledGrammar from "../../src/parse/generated/verilog.js";

const fixture = (name: string) =>
  readFileSync(fileURLToPath(new URL(`../fixtures/verilog/${name}`, import.meta.url)), "utf8");

// --- an evaluator written for the tests, independent of src/logic ----------------------------

type Env = Record<string, number>;

function evalExpr(e: Expr, get: (name: string) => number): number {
  switch (e.kind) {
    case "ref":
      return get(e.name);
    case "const":
      return e.value;
    case "not":
      return 1 - evalExpr(e.arg, get);
    case "and":
      return e.args.every((a) => evalExpr(a, get) === 1) ? 1 : 0;
    case "or":
      return e.args.some((a) => evalExpr(a, get) === 1) ? 1 : 0;
    case "xor":
      return e.args.reduce((s, a) => s ^ evalExpr(a, get), 0);
  }
}

/** Values of every signal of a combinational design for one input vector. */
function simulate(src: DesignSource, inputs: Env): Env {
  const byTarget = new Map<string, Expr>();
  for (const a of src.assignments) {
    expect(byTarget.has(a.target), `${a.target} driven twice`).toBe(false);
    byTarget.set(a.target, a.expr);
  }
  const values: Env = { ...inputs };
  const busy = new Set<string>();
  const get = (name: string): number => {
    if (name in values) return values[name]!;
    const e = byTarget.get(name);
    if (!e) throw new Error(`nothing drives ${name}`);
    if (busy.has(name)) throw new Error(`loop through ${name}`);
    busy.add(name);
    const v = evalExpr(e, get);
    busy.delete(name);
    values[name] = v;
    return v;
  };
  for (const t of byTarget.keys()) get(t);
  return values;
}

function vectors(names: readonly string[]): Env[] {
  const out: Env[] = [];
  for (let m = 0; m < 1 << names.length; m++) {
    const env: Env = {};
    names.forEach((n, i) => (env[n] = (m >> (names.length - 1 - i)) & 1));
    out.push(env);
  }
  return out;
}

const names = (ds: { name: string }[]) => ds.map((d) => d.name);
const textOf = (text: string, span: { start: number; length: number }) => text.slice(span.start, span.start + span.length);

function ok(text: string, top?: string): DesignSource {
  const r = parseVerilog(text, "t.v", top !== undefined ? { top } : undefined);
  const errors = r.diagnostics.filter((d) => d.severity === "error");
  expect(errors.map((d) => `${d.code} ${d.message}`)).toEqual([]);
  expect(r.value).toBeDefined();
  return r.value!;
}

/** Parses text that must fail; returns its error diagnostics with their positions. */
function bad(text: string, top?: string): { code: string; at: string; d: Diagnostic }[] {
  const r = parseVerilog(text, "bad.v", top !== undefined ? { top } : undefined);
  expect(r.value).toBeUndefined();
  return r.diagnostics
    .filter((d) => d.severity === "error")
    .map((d) => {
      const p = positionOf(d, text);
      return { code: d.code, at: p ? `${p.line}:${p.column}` : "-", d };
    });
}

// --- c17 --------------------------------------------------------------------------------------

describe("ISCAS-85 c17 (Brglez and Fujiwara, 1985; from memory)", () => {
  const text = fixture("c17.v");
  const src = ok(text);

  it("has the benchmark's ports, nets and six gates", () => {
    expect(src.name).toBe("c17");
    expect(src.language).toBe("verilog");
    expect(src.file).toBe("t.v");
    expect(names(src.inputs)).toEqual(["N1", "N2", "N3", "N6", "N7"]);
    expect(names(src.outputs)).toEqual(["N22", "N23"]);
    expect(names(src.wires)).toEqual(["N10", "N11", "N16", "N19"]);
    expect(src.assignments.map((a) => a.target)).toEqual(["N10", "N11", "N16", "N19", "N22", "N23"]);
  });

  it("computes the published NAND equations on all 32 input vectors", () => {
    // Brglez and Fujiwara 1985 (from memory): N10 = NAND(N1,N3), N11 = NAND(N3,N6),
    // N16 = NAND(N2,N11), N19 = NAND(N11,N7), N22 = NAND(N10,N16), N23 = NAND(N16,N19).
    const nand = (a: number, b: number) => 1 - (a & b);
    const all = vectors(["N1", "N2", "N3", "N6", "N7"]);
    expect(all).toHaveLength(32);
    for (const v of all) {
      const got = simulate(src, v);
      const n10 = nand(v.N1!, v.N3!);
      const n11 = nand(v.N3!, v.N6!);
      const n16 = nand(v.N2!, n11);
      const n19 = nand(n11, v.N7!);
      expect([got.N10, got.N11, got.N16, got.N19]).toEqual([n10, n11, n16, n19]);
      expect([got.N22, got.N23]).toEqual([nand(n10, n16), nand(n16, n19)]);
    }
  });

  it("builds each gate as not(and(inputs)) with spans on the output terminal and the statement", () => {
    const a = src.assignments[0]!;
    expect(a.expr.kind).toBe("not");
    if (a.expr.kind !== "not") return;
    expect(a.expr.arg.kind).toBe("and");
    expect(textOf(text, a.targetSpan)).toBe("N10");
    expect(positionOf({ code: "GW2001", severity: "error", message: "", start: a.targetSpan.start }, text)).toEqual({ line: 11, column: 17 });
    expect(textOf(text, a.span)).toBe("nand NAND2_1 (N10, N1, N3);");
    const refs = a.expr.arg.kind === "and" ? a.expr.arg.args.map((x) => (x.kind === "ref" ? textOf(text, x.span) : "?")) : [];
    expect(refs).toEqual(["N1", "N3"]);
  });
});

// --- vectors ----------------------------------------------------------------------------------

describe("vectors", () => {
  it("expands ports MSB first in the declared order, in port order", () => {
    const src = ok(`
      module v(a, b, y);
        input [3:0] a;
        input [0:2] b;
        output [1:0] y;
        assign y[1] = a[3] & b[0];
        assign y[0] = a[0] | b[2];
      endmodule`);
    expect(names(src.inputs)).toEqual(["a[3]", "a[2]", "a[1]", "a[0]", "b[0]", "b[1]", "b[2]"]);
    expect(names(src.outputs)).toEqual(["y[1]", "y[0]"]);
  });

  it("expands ANSI headers, wires and whole-vector assignments bit by bit", () => {
    const src = ok(`
      module v(input [3:0] a, b, input c, output [0:3] y, output r);
        wire [1:0] w;
        assign y = a & ~b;
        assign w[1] = c, w[0] = ^a;
        assign r = w[1] ^ w[0];
      endmodule`);
    expect(names(src.inputs)).toEqual(["a[3]", "a[2]", "a[1]", "a[0]", "b[3]", "b[2]", "b[1]", "b[0]", "c"]);
    expect(names(src.outputs)).toEqual(["y[0]", "y[1]", "y[2]", "y[3]", "r"]);
    expect(names(src.wires)).toEqual(["w[1]", "w[0]"]);
    // y[0] is the MSB of y and pairs with the MSBs a[3], b[3].
    expect(src.assignments.slice(0, 4).map((a) => a.target)).toEqual(["y[0]", "y[1]", "y[2]", "y[3]"]);
    for (const v of vectors(["a[3]", "a[2]", "a[1]", "a[0]", "b[3]", "b[2]", "b[1]", "b[0]", "c"])) {
      const got = simulate(src, v);
      for (let p = 0; p < 4; p++) expect(got[`y[${p}]`]).toBe(v[`a[${3 - p}]`]! & (1 - v[`b[${3 - p}]`]!));
      const parity = v["a[3]"]! ^ v["a[2]"]! ^ v["a[1]"]! ^ v["a[0]"]!;
      expect(got.r).toBe(v.c! ^ parity);
    }
  });

  it("reads the multiplexer fixture: bit-selects, reductions, a two-output buf and implicit nets", () => {
    const text = fixture("mux4.v");
    const src = ok(text);
    expect(names(src.inputs)).toEqual(["d[3]", "d[2]", "d[1]", "d[0]", "s[0]", "s[1]"]);
    expect(names(src.outputs)).toEqual(["y", "y_copy", "y_bar"]);
    expect(names(src.wires)).toEqual(["pick[3]", "pick[2]", "pick[1]", "pick[0]", "s_n0", "s_n1", "y_spare"]);
    const spare = src.assignments.find((a) => a.target === "y_spare")!;
    expect(textOf(text, spare.span)).toBe("buf (y_copy, y_spare, y);");
    for (const v of vectors(["d[3]", "d[2]", "d[1]", "d[0]", "s[0]", "s[1]"])) {
      const got = simulate(src, v);
      const sel = v["s[0]"]! * 2 + v["s[1]"]!;
      expect(got.y).toBe(v[`d[${sel}]`]);
      expect(got.y_copy).toBe(got.y);
      expect(got.y_spare).toBe(got.y);
      expect(got.y_bar).toBe(1 - got.y!);
    }
  });
});

// --- hierarchy --------------------------------------------------------------------------------

describe("module instances", () => {
  const text = fixture("adders.v");

  it("chooses the module nobody instantiates and flattens two levels with hierarchical names", () => {
    const src = ok(text);
    expect(src.name).toBe("adder2");
    expect(names(src.inputs)).toEqual(["p[1]", "p[0]", "q[1]", "q[0]"]);
    expect(names(src.outputs)).toEqual(["r[1]", "r[0]", "co"]);
    const wires = names(src.wires);
    for (const w of ["k", "fa0.x", "fa0.s1", "fa0.ha1.a", "fa0.ha2.c", "fa1.ha2.s", "fa1.cout"]) expect(wires).toContain(w);
    const targets = src.assignments.map((a) => a.target);
    // Named connection .a(s1) inside fa0: the child port is driven from the parent's net.
    const ha2a = src.assignments.find((a) => a.target === "fa0.ha2.a")!;
    expect(ha2a.expr).toMatchObject({ kind: "ref", name: "fa0.s1" });
    expect(textOf(text, ha2a.targetSpan)).toBe(".a");
    // The constant connection .cin(1'b0).
    expect(src.assignments.find((a) => a.target === "fa0.cin")!.expr).toMatchObject({ kind: "const", value: 0 });
    // Output port: the parent net is driven from the child's port net.
    expect(src.assignments.find((a) => a.target === "r[1]")!.expr).toMatchObject({ kind: "ref", name: "fa1.sum" });
    expect(targets).toContain("fa1.ha1.s");
    // Binary addition (common practice): r + 4·co = p + q.
    for (const v of vectors(["p[1]", "p[0]", "q[1]", "q[0]"])) {
      const got = simulate(src, v);
      const sum = v["p[1]"]! * 2 + v["p[0]"]! + v["q[1]"]! * 2 + v["q[0]"]!;
      expect(got.co! * 4 + got["r[1]"]! * 2 + got["r[0]"]!).toBe(sum);
    }
  });

  it("connects ordered ports in port-list order and lists the design's ports in declaration order", () => {
    const text =
      "module sub(y, b, a);\n  input a;\n  input b;\n  output y;\n  assign y = a & ~b;\nendmodule\n" +
      "module t(p, q, r);\n  input p, q;\n  output r;\n  sub u (r, p, q);\nendmodule\n";
    const src = ok(text);
    expect(src.assignments.find((a) => a.target === "u.b")!.expr).toMatchObject({ kind: "ref", name: "p" });
    expect(src.assignments.find((a) => a.target === "u.a")!.expr).toMatchObject({ kind: "ref", name: "q" });
    for (const v of vectors(["p", "q"])) expect(simulate(src, v).r).toBe(v.q! & (1 - v.p!));
    const sub = ok(text, "sub");
    expect(names(sub.inputs)).toEqual(["a", "b"]);
    expect(names(sub.outputs)).toEqual(["y"]);
  });

  it("takes another top module when asked", () => {
    const src = ok(text, "full_adder");
    expect(src.name).toBe("full_adder");
    expect(names(src.inputs)).toEqual(["x", "y", "cin"]);
    expect(names(src.wires)).toEqual(expect.arrayContaining(["s1", "ha1.a", "ha2.s"]));
    for (const v of vectors(["x", "y", "cin"])) {
      const got = simulate(src, v);
      expect(got.cout! * 2 + got.sum!).toBe(v.x! + v.y! + v.cin!);
    }
  });

  it("reports several possible tops, and an unknown top with the nearest name", () => {
    const two = "module a1(x, y); input x; output y; buf (y, x); endmodule\nmodule b1(x, y); input x; output y; not (y, x); endmodule\n";
    const e = bad(two);
    expect(e.map((x) => x.code)).toEqual(["GW2008"]);
    expect(e[0]!.d.message).toContain("'a1'");
    expect(e[0]!.d.message).toContain("'b1'");
    expect(e[0]!.d.hint).toContain("top");
    expect(ok(two, "b1").name).toBe("b1");
    const u = bad(text, "ful_adder");
    expect(u.map((x) => x.code)).toEqual(["GW2009"]);
    expect(u[0]!.d.hint).toContain("'full_adder'");
  });

  it("refuses, before doing the work, a small file that flattens to millions of gates", () => {
    const levels = 24; // 2^24 leaf gates
    const parts: string[] = [];
    for (let i = 0; i < levels; i++) parts.push(`module m${i}(a, y, z); input a; output y, z; m${i + 1} l (a, y, ); m${i + 1} r (a, z, ); endmodule`);
    parts.push(`module m${levels}(a, y, z); input a; output y, z; not (y, a); buf (z, a); endmodule`);
    const e = bad(parts.join("\n"));
    expect(e.map((x) => x.code)).toEqual(["GW2022"]);
  });

  it("flattens a hierarchy 1,500 modules deep without recursion", () => {
    const depth = 1500;
    const parts: string[] = [];
    for (let i = 0; i < depth; i++) parts.push(`module m${i}(a, y); input a; output y; m${i + 1} u (a, y); endmodule`);
    parts.push(`module m${depth}(a, y); input a; output y; not (y, a); endmodule`);
    const src = ok(parts.join("\n"));
    expect(src.name).toBe("m0");
    const deepest = src.assignments.find((a) => a.expr.kind === "not")!;
    expect(deepest.target).toBe(`${"u.".repeat(depth)}y`);
    expect(simulate(src, { a: 0 }).y).toBe(1);
    expect(simulate(src, { a: 1 }).y).toBe(0);
  });
});

// --- operator precedence ----------------------------------------------------------------------

describe("operator precedence (IEEE 1364-2005 §5.1.2, Table 5-4)", () => {
  // Table 5-4, highest first: unary ~ !, then binary &, then ^ ~^, then |, then &&, then ||.
  // Each case gives the grouping the table implies and a wrong grouping that differs on at
  // least one input vector, so the check can fail.
  const cases: [string, (a: number, b: number, c: number) => number, (a: number, b: number, c: number) => number][] = [
    ["a | b & c", (a, b, c) => a | (b & c), (a, b, c) => (a | b) & c],
    ["a ^ b & c", (a, b, c) => a ^ (b & c), (a, b, c) => (a ^ b) & c],
    ["a | b ^ c", (a, b, c) => a | (b ^ c), (a, b, c) => (a | b) ^ c],
    ["a ~^ b & c", (a, b, c) => 1 - (a ^ (b & c)), (a, b, c) => (1 - (a ^ b)) & c],
    ["a ^~ b | c", (a, b, c) => (1 - (a ^ b)) | c, (a, b, c) => 1 - (a ^ (b | c))],
    ["a || b && c", (a, b, c) => a | (b & c), (a, b, c) => (a | b) & c],
    ["a && b | c", (a, b, c) => a & (b | c), (a, b, c) => (a & b) | c],
    ["a || b | c & a", (a, b, c) => a | b | (c & a), (a, b, c) => (a | b | c) & a],
    ["~a & b", (a, b) => (1 - a) & b, (a, b) => 1 - (a & b)],
    ["!a | b ^ c", (a, b, c) => (1 - a) | (b ^ c), (a, b, c) => 1 - (a | (b ^ c))],
    ["a | ~b & c", (a, b, c) => a | ((1 - b) & c), (a, b, c) => (a | (1 - b)) & c],
    ["(a | b) & c", (a, b, c) => (a | b) & c, (a, b, c) => a | (b & c)],
    ["a & b ^ c | a & c", (a, b, c) => ((a & b) ^ c) | (a & c), (a, b, c) => (a & (b ^ c)) | (a & c)],
    // Left to right, two xnors cancel: (a ~^ b) ~^ c = a ^ b ^ c, not ~(a ^ b ^ c).
    ["a ~^ b ~^ c", (a, b, c) => 1 - ((1 - (a ^ b)) ^ c), (a, b, c) => 1 - (a ^ b ^ c)],
  ];
  for (const [expr, right, wrong] of cases) {
    it(`reads ${expr}`, () => {
      const src = ok(`module p(a, b, c, y); input a, b, c; output y; assign y = ${expr}; endmodule`);
      let differs = false;
      for (const v of vectors(["a", "b", "c"])) {
        const got = simulate(src, v).y;
        expect(got, JSON.stringify(v)).toBe(right(v.a!, v.b!, v.c!));
        if (right(v.a!, v.b!, v.c!) !== wrong(v.a!, v.b!, v.c!)) differs = true;
      }
      expect(differs).toBe(true);
    });
  }

  it("keeps an unparenthesised chain as one n-ary node and a parenthesised group apart", () => {
    const src = ok("module p(a, b, c, d, y, z); input a, b, c, d; output y, z; assign y = a & b & c & d; assign z = (a & b) & c; endmodule");
    const [y, z] = src.assignments;
    expect(y!.expr.kind === "and" && y!.expr.args.length).toBe(4);
    expect(z!.expr.kind === "and" && z!.expr.args.length).toBe(2);
  });

  it("reads a 20,000-operand chain and a 1,999-deep nesting without overflowing the stack", () => {
    const chain = Array.from({ length: 20000 }, (_, i) => (i % 2 ? "a" : "b")).join(" ^ ");
    const src = ok(`module p(a, b, y); input a, b; output y; assign y = ${chain}; endmodule`);
    expect(simulate(src, { a: 1, b: 0 }).y).toBe(0); // 10,000 ones: even parity
    const deep = "(".repeat(MAX_NESTING - 1) + "a" + ")".repeat(MAX_NESTING - 1);
    const src2 = ok(`module p(a, y); input a; output y; assign y = ~${deep}; endmodule`);
    expect(simulate(src2, { a: 1 }).y).toBe(0);
  });
});

// --- bad inputs -------------------------------------------------------------------------------

describe("diagnostics for bad input", () => {
  const head = "module m(a, b, y);\n  input a, b;\n  output y;\n";
  const cases: { name: string; text: string; code: string; at: string; says?: string }[] = [
    { name: "behavioural always block", text: head + "  always @(a) y = a;\nendmodule\n", code: "GW1005", at: "4:3", says: "always" },
    { name: "gate delay", text: head + "  nand #2 g1 (y, a, b);\nendmodule\n", code: "GW1005", at: "4:8", says: "delay" },
    { name: "concatenation", text: head + "  assign y = {a, b};\nendmodule\n", code: "GW1005", at: "4:14", says: "concatenation" },
    { name: "reg variable", text: head + "  reg q;\n  buf (y, a);\nendmodule\n", code: "GW1005", at: "4:3", says: "reg" },
    { name: "inout port", text: "module m(a, y);\n  inout a;\n  output y;\nendmodule\n", code: "GW1005", at: "2:3", says: "inout" },
    { name: "missing operand", text: head + "  assign y = a & ;\nendmodule\n", code: "GW1002", at: "4:18", says: "expected an expression" },
    { name: "missing ';' before endmodule", text: head + "  assign y = a & b\nendmodule\n", code: "GW1002", at: "5:1", says: "';'" },
    { name: "end of file inside a module", text: head + "  assign y = a & b;\n", code: "GW1003", at: "5:1", says: "endmodule" },
    { name: "character no token matches", text: head + "  assign y = a £ b;\nendmodule\n", code: "GW1001", at: "4:16" },
    { name: "NUL byte", text: head + "  assign y = a\u0000;\nendmodule\n", code: "GW1008", at: "4:15" },
    { name: "unterminated comment", text: head + "  /* assign y = a;\nendmodule\n", code: "GW1004", at: "4:3" },
    { name: "2-bit constant", text: head + "  assign y = 2'b10;\nendmodule\n", code: "GW1007", at: "4:14", says: "2 bits" },
    { name: "x value", text: head + "  assign y = 1'bx;\nendmodule\n", code: "GW1005", at: "4:14" },
    { name: "gate with one terminal", text: head + "  nand g (y);\nendmodule\n", code: "GW2012", at: "4:8" },
    { name: "gate output a constant", text: head + "  and (1'b1, a, b);\nendmodule\n", code: "GW2012", at: "4:8" },
    { name: "bit outside the range", text: "module m(a, y);\n  input [3:0] a;\n  output y;\n  assign y = a[4];\nendmodule\n", code: "GW2015", at: "4:14" },
    { name: "widths differ", text: "module m(a, y);\n  input [3:0] a;\n  output y;\n  assign y = a;\nendmodule\n", code: "GW2021", at: "4:10" },
    { name: "port never declared", text: "module m(a, y);\n  input a;\n  buf (y, a);\nendmodule\n", code: "GW2020", at: "1:13" },
    { name: "module never closed before the next", text: head + "  buf (y, a);\nmodule n(q); output q; endmodule\n", code: "GW1002", at: "5:1", says: "endmodule" },
    { name: "parameter", text: head + "  parameter W = 2;\nendmodule\n", code: "GW1005", at: "4:3", says: "parameter" },
    { name: "attribute", text: head + "  (* keep *) buf (y, a);\nendmodule\n", code: "GW1005", at: "4:3", says: "attributes" },
    { name: "arithmetic", text: head + "  assign y = a + b;\nendmodule\n", code: "GW1005", at: "4:16", says: "'+'" },
    { name: "part-select", text: "module m(a, y);\n  input [3:0] a;\n  output y;\n  assign y = ^a[2:1];\nendmodule\n", code: "GW1005", at: "4:16", says: "part-select" },
  ];
  for (const c of cases) {
    it(`${c.name}: ${c.code} at ${c.at}`, () => {
      const e = bad(c.text);
      expect(e[0]).toBeDefined();
      expect({ code: e[0]!.code, at: e[0]!.at }).toEqual({ code: c.code, at: c.at });
      if (c.says) expect(e[0]!.d.message).toContain(c.says);
      expect(e[0]!.d.file).toBe("bad.v");
    });
  }

  it("reports a delay with a hint that timing comes from the sized circuit", () => {
    const e = bad(head + "  nand #2 g1 (y, a, b);\nendmodule\n");
    expect(e[0]!.d.hint).toMatch(/timing comes from the sized circuit/);
  });

  it("reports a NUL byte once and stops", () => {
    const r = parseVerilog("module m\u0000(a);\u0001\u0002 endmodule", "bin.v");
    expect(r.diagnostics.map((d) => d.code)).toEqual(["GW1008"]);
  });

  it("checks instances: unknown module, port count, unknown named port, unconnected input", () => {
    const sub = "module ha(a, b, s);\n  input a, b;\n  output s;\n  xor (s, a, b);\nendmodule\n";
    const top = (body: string) => `${sub}module t(x, y, z);\n  input x, y;\n  output z;\n${body}\nendmodule\n`;
    let e = bad(top("  hb u1 (x, y, z);"));
    expect(e.map((x) => [x.code, x.at])).toEqual([["GW2009", "9:3"]]);
    expect(e[0]!.d.hint).toContain("'ha'");
    e = bad(top("  ha u1 (x, y);"));
    expect(e.map((x) => [x.code, x.at])).toEqual([["GW2011", "9:3"]]);
    e = bad(top("  ha u1 (.a(x), .bb(y), .s(z));"));
    expect(e.map((x) => [x.code, x.at])).toEqual([["GW2011", "9:18"]]);
    expect(e[0]!.d.hint).toContain("'b'");
    e = bad(top("  ha u1 (.a(x), .s(z));"));
    expect(e.map((x) => x.code)).toEqual(["GW2011"]);
    expect(e[0]!.d.message).toContain("'b'");
  });

  it("reports a module that instantiates itself, directly or through another", () => {
    let e = bad("module r(a, y);\n  input a; output y;\n  r inner (a, y);\nendmodule\n");
    expect(e.map((x) => [x.code, x.at])).toEqual([["GW2010", "3:3"]]);
    e = bad("module p(a, y); input a; output y; q u (a, y); endmodule\nmodule q(a, y); input a; output y; p v (a, y); endmodule\n");
    expect(e.map((x) => x.code)).toEqual(["GW2010"]);
    expect(e[0]!.d.message).toMatch(/through 'q'/);
  });

  it("resynchronises at the next ';' and reports each bad statement once", () => {
    const text = head + "  assign y = a & ;\n  nand (y, a b);\n  wire ok1;\n  assign = b;\nendmodule\n";
    const e = bad(text);
    expect(e.map((x) => [x.code, x.at])).toEqual([
      ["GW1002", "4:18"],
      ["GW1002", "5:14"],
      ["GW1002", "7:10"],
    ]);
    expect(e[1]!.d.message).toBe("expected an operator, ',', ')' or '[' but found 'b'");
  });

  it("stops after 50 errors with a note", () => {
    const text = head + "  assign y = ;\n".repeat(80) + "endmodule\n";
    const r = parseVerilog(text, "many.v");
    expect(r.diagnostics.filter((d) => d.severity === "error")).toHaveLength(50);
    expect(r.diagnostics[r.diagnostics.length - 1]!.code).toBe("GW1009");
  });

  it("rejects nesting deeper than the limit before parsing", () => {
    const deep = "(".repeat(MAX_NESTING + 1) + "a" + ")".repeat(MAX_NESTING + 1);
    const e = bad(`${head}  assign y = ${deep};\nendmodule\n`);
    expect(e.map((x) => [x.code, x.at])).toEqual([["GW1006", `4:${14 + MAX_NESTING}`]]);
    const unary = "~".repeat(MAX_NESTING + 5) + "a";
    expect(bad(`${head}  assign y = ${unary};\nendmodule\n`).map((x) => x.code)).toEqual(["GW1006"]);
    // At the limit itself: accepted (an even number of inversions gives back a).
    const src = ok(`${head}  assign y = ${"~".repeat(MAX_NESTING)}a;\nendmodule\n`);
    expect(simulate(src, { a: 1, b: 0 }).y).toBe(1);
  });

  it("uses only catalogued codes", () => {
    const texts = cases.map((c) => c.text);
    for (const t of texts) for (const d of parseVerilog(t, "x.v").diagnostics) expect(CATALOGUE[d.code]).toBeDefined();
  });
});

// --- item parsing -----------------------------------------------------------------------------

describe("item by item parsing", () => {
  it("gives the same items when a repeated item shape replays nearley's derivation", () => {
    const text = fixture("adders.v") + fixture("mux4.v") + fixture("c17.v");
    const diags: Diagnostic[] = [];
    const reader = new Reader(text, diags, "x.v");
    let count = 0;
    for (let item = reader.next(); item; item = reader.next()) {
      const direct = parseItem(item.tokens, false);
      const first = parseItem(item.tokens, true);
      const again = parseItem(item.tokens, true); // from the shape table
      expect(direct.ok).toBe(true);
      expect(first).toEqual(direct);
      expect(again).toEqual(direct);
      count++;
    }
    expect(diags).toEqual([]);
    expect(count).toBeGreaterThan(30);
  });

  it("has exactly one parse for every item of the fixtures (the grammar is unambiguous there)", () => {
    const text =
      fixture("adders.v") + fixture("mux4.v") +
      "module z(input [1:0] a, b, output y, output wire q); wire w1 = a[0] ^ ~b[1] | !a[1] && (b[0] || a[0]), w2;" +
      " assign y = ~&a, q = a[0] ~^ b[0] ^~ ~^b; nand (y, a[0], b[0]), g2 (q, 1'b1, 0);" +
      " sub u1 (.p(a), .q()), u2 (a, , q); sub u3 (); endmodule";
    const grammar = nearley.Grammar.fromCompiled(compiledGrammar as unknown as nearley.CompiledRules);
    const reader = new Reader(text, [], "x.v");
    let count = 0;
    for (let item = reader.next(); item; item = reader.next()) {
      const tokens = item.tokens;
      let i = 0;
      const lexer = { reset() {}, next: () => tokens[i++], save: () => ({}), formatError: () => "", has: () => true };
      const parser = new nearley.Parser(grammar, { lexer: lexer as unknown as nearley.Lexer });
      parser.feed("");
      expect(parser.results, tokens.map((t) => t.text).join(" ")).toHaveLength(1);
      count++;
    }
    expect(count).toBeGreaterThan(25);
  });

  it("reads a long declaration list in pieces to the same result", () => {
    const n = 1000;
    const list = Array.from({ length: n }, (_, i) => `w${i}`);
    const src = ok(`module L(a, y); input a; output y; wire ${list.join(", ")}; assign y = a; endmodule`);
    expect(names(src.wires)).toEqual(list);
    const gates = Array.from({ length: n }, (_, i) => `g${i} (w${i}, a, a)`).join(", ");
    const src2 = ok(`module L(a, y); input a; output y; wire ${list.join(", ")}; nand ${gates}; assign y = w999; endmodule`);
    expect(src2.assignments.map((a) => a.target)).toEqual([...list, "y"]);
  });
});

// --- properties -------------------------------------------------------------------------------

type GateKind = "and" | "nand" | "or" | "nor" | "xor" | "xnor" | "not" | "buf";
interface Gate {
  kind: GateKind;
  outs: string[];
  ins: string[];
  name?: string;
}

/** Random gate-level netlists: each gate reads inputs or outputs of earlier gates. */
const netlistArb = fc
  .record({
    nIn: fc.integer({ min: 1, max: 5 }),
    specs: fc.array(
      fc.record({
        kind: fc.constantFrom<GateKind>("and", "nand", "or", "nor", "xor", "xnor", "not", "buf"),
        picks: fc.array(fc.nat(), { minLength: 1, maxLength: 4 }),
        outs: fc.integer({ min: 1, max: 2 }),
        named: fc.boolean(),
      }),
      { minLength: 1, maxLength: 25 },
    ),
    spacing: fc.constantFrom(" ", "\n", "  ", " /* c */ ", "\t", " // note\n"),
  })
  .map(({ nIn, specs, spacing }) => {
    const inputs = Array.from({ length: nIn }, (_, i) => `in${i}`);
    const avail = [...inputs];
    const gates: Gate[] = [];
    let next = 0;
    specs.forEach((s, gi) => {
      const single = s.kind === "not" || s.kind === "buf";
      const ins = single ? [avail[s.picks[0]! % avail.length]!] : s.picks.slice(0, Math.max(2, s.picks.length)).map((p) => avail[p % avail.length]!);
      while (!single && ins.length < 2) ins.push(avail[0]!);
      const outs = Array.from({ length: single ? s.outs : 1 }, () => `n${next++}`);
      gates.push({ kind: s.kind, ins, outs, ...(s.named ? { name: `g${gi}` } : {}) });
      avail.push(...outs);
    });
    return { inputs, gates, spacing };
  });

function printNetlist(n: { inputs: string[]; gates: Gate[]; spacing: string }): string {
  const sp = n.spacing;
  const outs = n.gates[n.gates.length - 1]!.outs;
  const wires = n.gates.flatMap((g) => g.outs).filter((w) => !outs.includes(w));
  const lines = [
    `module rnd(${[...n.inputs, ...outs].join(`,${sp}`)});`,
    `input ${n.inputs.join(`,${sp}`)};`,
    `output ${outs.join(", ")};`,
    ...(wires.length ? [`wire${sp}${wires.join(",")};`] : []),
    ...n.gates.map((g) => `${g.kind}${sp}${g.name ?? ""}${sp}(${[...g.outs, ...g.ins].join(`,${sp}`)});`),
    "endmodule",
  ];
  return lines.join(sp === " " ? "\n" : sp);
}

function expectedExpr(g: Gate): string {
  const ins = g.ins.length === 1 ? g.ins[0]! : `${{ and: "and", nand: "and", or: "or", nor: "or", xor: "xor", xnor: "xor" }[g.kind as "and"]}(${g.ins.join(",")})`;
  return g.kind === "nand" || g.kind === "nor" || g.kind === "xnor" || g.kind === "not" ? `not(${ins})` : ins;
}

function shape(e: Expr): string {
  switch (e.kind) {
    case "ref":
      return e.name;
    case "const":
      return String(e.value);
    case "not":
      return `not(${shape(e.arg)})`;
    default:
      return `${e.kind}(${e.args.map(shape).join(",")})`;
  }
}

describe("properties", () => {
  it("random gate-level netlists printed as Verilog parse back to the same gates", () => {
    fc.assert(
      fc.property(netlistArb, (n) => {
        const text = printNetlist(n);
        const r = parseVerilog(text, "rnd.v");
        expect(r.diagnostics).toEqual([]);
        const src = r.value!;
        expect(names(src.inputs)).toEqual(n.inputs);
        const expected = n.gates.flatMap((g) => g.outs.map((o) => `${o} = ${expectedExpr(g)}`));
        expect(src.assignments.map((a) => `${a.target} = ${shape(a.expr)}`)).toEqual(expected);
        for (const a of src.assignments) {
          // The target span is the output terminal as written.
          expect(textOf(text, a.targetSpan)).toBe(a.target);
        }
      }),
      { numRuns: 200 },
    );
  });

  it("never throws and never reports an internal error on token soup", () => {
    const vocab = [
      "module", "endmodule", "input", "output", "wire", "assign", "nand", "not", "buf", "reg", "always",
      "(", ")", "[", "]", "{", "}", ";", ",", ".", ":", "=", "#", "~", "&", "|", "^", "~^", "!", "&&", "||",
      "a", "b", "y", "m", "0", "1", "1'b1", "2'b10", "4'hx", "3", "/*", "*/", "//", "\n", "`define", "\\esc", "\"s\"", "£",
    ];
    fc.assert(
      fc.property(fc.array(fc.constantFrom(...vocab), { maxLength: 60 }), fc.option(fc.constantFrom("m", "a", "zz")), (toks, top) => {
        const text = toks.join(" ");
        const r = parseVerilog(text, "soup.v", top === null ? undefined : { top });
        expect(r.diagnostics.map((d) => d.code)).not.toContain("GW9001");
        for (const d of r.diagnostics) {
          expect(CATALOGUE[d.code]).toBeDefined();
          if (d.start !== undefined) expect(d.start).toBeLessThanOrEqual(text.length);
        }
      }),
      { numRuns: 500 },
    );
  });
});
