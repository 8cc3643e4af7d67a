// Feedback analysis: every loop found, its state signals named, and a loop that cannot hold a
// value (an oscillator) told apart from one that can (a latch).
//
// Facts used (common practice): a ring of an odd number of inverters has no stable state and
// oscillates (the ring oscillator); a ring of an even number holds either value (two inverters
// back to back are the simplest static memory cell); cross-coupled NAND or NOR gates are the SR
// latch; a NAND with an enable in a ring of three oscillates only while the enable is 1.
import { describe, expect, it } from "vitest";
import { analyzeFeedback, buildLogicGraph, type LogicGraph } from "../../src/logic/index.js";
import { parseEquations } from "../../src/parse/equations.js";
import { readDesign } from "../../src/pipeline/front.js";

function graphOf(text: string, file = "t.logic"): LogicGraph {
  const p = parseEquations(text, file);
  expect(p.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  const b = buildLogicGraph(p.value!);
  expect(b.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  return b.value!;
}

/** Independent reference: does s = F(x, s) have a solution, by direct evaluation of the loop's
 *  gates written out in the test. */
function ringHasFixedPoint(inverters: number): boolean {
  // r_k = !r_{k-1}, r_0 = !r_{n-1}: a fixed point needs r_0 = !^n r_0.
  for (const r0 of [0, 1]) {
    let v = r0;
    for (let k = 0; k < inverters; k++) v = 1 - v;
    if (v === r0) return true;
  }
  return false;
}

describe("analyzeFeedback", () => {
  it("finds the SR latch's loop, names its signals and state signal, and finds it stable for every input (common practice)", () => {
    for (const text of [
      "input s_n, r_n; output q, qn; q = !(s_n & qn); qn = !(r_n & q);",
      "input s, r; output q, qn; q = !(r | qn); qn = !(s | q);",
    ]) {
      const fb = analyzeFeedback(graphOf(text));
      expect(fb.loops).toHaveLength(1);
      expect(fb.loops[0]!.signals).toEqual(["q", "qn"]);
      expect(fb.loops[0]!.stateSignals).toEqual(["q"]);
      expect(fb.loops[0]!.stability).toBe("always");
      expect(fb.loops[0]!.exhaustive).toBe(true);
      expect(fb.diagnostics).toEqual([]);
    }
  });

  it("rings of 1 to 6 inverters: odd ones have no stable state, even ones do (ring oscillator; common practice)", () => {
    for (let n = 1; n <= 6; n++) {
      const names = Array.from({ length: n }, (_, k) => `r${k}`);
      const body = names.map((r, k) => `${r} = !${names[(k + n - 1) % n]};`).join(" ");
      const fb = analyzeFeedback(graphOf(`input a; output y; ${body} y = a & r0;`));
      expect(fb.loops).toHaveLength(1);
      const reference = ringHasFixedPoint(n);
      expect(fb.loops[0]!.stability).toBe(reference ? "always" : "never");
      expect(fb.diagnostics.map((d) => d.code)).toEqual(reference ? [] : ["GW3004"]);
    }
  });

  it("a ring of three with a NAND enable oscillates only while the enable is 1: a warning naming that input (common practice)", () => {
    const fb = analyzeFeedback(graphOf("input en; output y; a = !(en & c); b = !a; c = !b; y = c;"));
    expect(fb.loops[0]!.stability).toBe("sometimes");
    expect(fb.loops[0]!.unstableWhen).toEqual({ en: 1 });
    expect(fb.diagnostics.map((d) => d.code)).toEqual(["GW3010"]);
    expect(fb.diagnostics[0]!.message).toContain("when en = 1");
  });

  it("an oscillator declaration marks the loop as intended; one on a signal off every loop is a warning", () => {
    const fb = analyzeFeedback(graphOf("input a; output y; r1 = !r3; r2 = !r1; r3 = !r2; y = a & r3;"), { oscillators: [{ name: "r2" }, { name: "y" }] });
    expect(fb.loops[0]!.intended).toBe(true);
    expect(fb.diagnostics.map((d) => [d.code, d.severity])).toEqual([["GW3010", "warning"]]);
    expect(fb.diagnostics[0]!.message).toContain("'y' is declared an oscillator but lies on no loop");
  });

  it("two loops of a design are analysed apart; another loop's state is a free input of each", () => {
    const fb = analyzeFeedback(
      graphOf("input s_n, r_n, en; output q, y; q = !(s_n & qn); qn = !(r_n & q); a = !(en & q & c); b = !a; c = !b; y = c;"),
    );
    expect(fb.loops.map((l) => l.signals.join(",")).sort()).toEqual(["a,b,c", "q,qn"]);
    const ring = fb.loops.find((l) => l.signals.includes("a"))!;
    expect(ring.stability).toBe("sometimes");
    expect(ring.support).toContain("q");
    expect(fb.loops.find((l) => l.signals.includes("q"))!.stability).toBe("always");
  });
});

describe("large loops (sampled search)", () => {
  it("an 8-bit Johnson counter, one loop through all eight flip-flops (25 variables), is found stable (common practice)", () => {
    const n = 8;
    let text = `input clk;\noutput ${Array.from({ length: n }, (_, i) => `q${i}`).join(", ")};\n`;
    for (let i = 0; i < n; i++) text += `q${i} = dff(${i === 0 ? `q${n - 1}.n` : `q${i - 1}`}, clk);\n`;
    const f = readDesign(text, "johnson.logic");
    expect(f.diagnostics.filter((d) => d.severity !== "note")).toEqual([]);
    const loop = f.state!.loops[0]!;
    expect(f.state!.loops).toHaveLength(1);
    expect(loop.exhaustive).toBe(false);
    expect(loop.stability).toBe("always");
    expect(f.diagnostics.find((d) => d.code === "GW3001")!.message).toContain("the loop through the flip-flops q0, q1, q2, q3, q4, q5, q6, q7");
  });
});

describe("through the front of the pipeline", () => {
  it("an oscillator loop without the mark is rejected with its signals named (GW3004 at the first one's line)", () => {
    const text = "input a;\noutput y;\nr1 = !r3;\nr2 = !r1;\nr3 = !r2;\ny = r3 & a;\n";
    const f = readDesign(text, "ring.logic");
    const e = f.diagnostics.filter((d) => d.severity === "error");
    expect(e.map((d) => d.code)).toEqual(["GW3004"]);
    expect(e[0]!.message).toContain("r1, r2, r3");
    expect(e[0]!.start).toBe(text.indexOf("r1 ="));
    expect(e[0]!.related?.map((r) => r.message)).toEqual(["'r2' is on the loop", "'r3' is on the loop"]);
    expect(e[0]!.hint).toContain("oscillator r1;");
  });

  it("with `oscillator r1;` the same design is accepted and the loop reported as intended", () => {
    const f = readDesign("input a; output y; oscillator r1; r1 = !r3; r2 = !r1; r3 = !r2; y = r3 & a;", "ring.logic");
    expect(f.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    expect(f.state!.loops[0]!.intended).toBe(true);
    expect(f.diagnostics.find((d) => d.code === "GW3001")!.message).toContain("the loop through r1, r2, r3");
  });
});
