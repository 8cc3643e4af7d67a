// Minimal two-input-NAND networks (common practice; the gate counts are from memory, see
// /work/shared/REFERENCES.md "Benchmarks"): XOR 4 gates, half adder 5, full adder 9, 2:1
// multiplexer 4 including its select inverter. The optimizer reaches them in two-input-NAND
// mode (NAND cells of at most two inputs, priced as a two-input-NAND count) from the textbook
// descriptions: truth tables and minterm lists, and the usual equations.
import { describe, expect, it } from "vitest";
import { NAND2, synth } from "./support.js";

function expectNand2(b: ReturnType<typeof synth>, gates: number) {
  expect(b.eq.equivalent).toBe(true);
  expect(b.eq.complete).toBe(true);
  for (const c of b.netlist.cells) {
    expect(c.fn).toBe("nand");
    expect(c.inputs.length).toBeLessThanOrEqual(2);
  }
  expect(b.netlist.cells.length).toBe(gates);
}

describe("minimal two-input-NAND networks (common practice, from memory)", () => {
  it("XOR: 4 gates, from its minterms and from a ^ b", () => {
    expectNand2(synth("input a, b; output y; y(a, b) = Σm(1, 2);", NAND2), 4);
    expectNand2(synth("input a, b; output y; y = a & !b | !a & b;", NAND2), 4);
    expectNand2(synth("input a, b; output y; y = a ^ b;", NAND2), 4);
  });

  it("half adder: 5 gates, from its truth table", () => {
    const table = "input a, b; output s, c;\ntable a, b : s, c {\n 00 : 0 0;\n 01 : 1 0;\n 10 : 1 0;\n 11 : 0 1;\n}";
    expectNand2(synth(table, NAND2), 5);
    expectNand2(synth("input a, b; output s, c; s = a ^ b; c = a & b;", NAND2), 5);
  });

  it("full adder: 9 gates, from its truth table", () => {
    const table = [
      "input a, b, cin; output s, cout;",
      "table a, b, cin : s, cout {",
      "  000 : 0 0;  001 : 1 0;  010 : 1 0;  011 : 0 1;",
      "  100 : 1 0;  101 : 0 1;  110 : 0 1;  111 : 1 1;",
      "}",
    ].join("\n");
    expectNand2(synth(table, NAND2), 9);
    // The usual equations: sum as parity, carry as majority.
    expectNand2(synth("input a, b, cin; output s, cout; s = a ^ b ^ cin; cout = a & b | a & cin | b & cin;", NAND2), 9);
  });

  it("2:1 multiplexer: 4 gates including the select inverter, from its minterms and its equation", () => {
    // y = s ? b : a with variables (s, a, b): on at s=0,a=1 (2, 3) and s=1,b=1 (5, 7).
    expectNand2(synth("input s, a, b; output y; y(s, a, b) = m(2, 3, 5, 7);", NAND2), 4);
    expectNand2(synth("input s, a, b; output y; y = s & b | !s & a;", NAND2), 4);
  });

  it("starts from more gates when the optimizer is off (--opt 0), so the counts above are its work", () => {
    const b = synth("input a, b, cin; output s, cout; s = a ^ b ^ cin; cout = a & b | a & cin | b & cin;", NAND2, 0);
    expect(b.eq.equivalent).toBe(true);
    expect(b.netlist.cells.length).toBeGreaterThan(9);
  });
});
