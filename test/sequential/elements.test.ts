// Built-in state elements: the language (dff, dlatch, init, oscillator) with its errors, the
// expansion into the textbook NAND structures, and their behaviour against the published
// function tables, simulated gate by gate with the logic's unit-delay simulator.
//
// References:
// - D flip-flop with asynchronous preset and clear, positive-edge-triggered: the function
//   table of the 7474 (Texas Instruments SN7474 data sheet; from memory): PRE̅ = L, CLR̅ = H →
//   Q = H; PRE̅ = H, CLR̅ = L → Q = L; both L → Q = Q̅ = H; both H and CLK ↑ → Q = D; CLK not
//   rising → Q holds. Its logic diagram is the six-NAND structure (common practice).
// - Gated D latch: Q follows D while the enable is 1 and holds while it is 0 (Mano, Digital
//   Design; common practice).
import { describe, expect, it } from "vitest";
import { positionOf, type Diagnostic } from "../../src/diagnostics/index.js";
import { StepSimulator, seededRandom, type Tri } from "../../src/logic/index.js";
import { parseEquations } from "../../src/parse/equations.js";
import { readDesign } from "../../src/pipeline/front.js";
import { synthesize } from "../../src/pipeline/synthesize.js";

function where(text: string, ds: Diagnostic[]): string[] {
  return ds.map((d) => {
    const p = positionOf(d, text);
    return p ? `${d.code}@${p.line}:${p.column}` : d.code;
  });
}

function front(text: string, file = "t.logic") {
  const f = readDesign(text, file);
  expect(f.diagnostics.filter((d) => d.severity === "error").map((d) => `${d.code} ${d.message}`)).toEqual([]);
  return f;
}

describe("the language", () => {
  it("reads dff and dlatch with two or four arguments, init lists and oscillator declarations", () => {
    const r = parseEquations("input d, c, s;\noutput q;\ninit q = 1, p = 0;\noscillator o;\nq = dff(d & s, c);\np = dlatch(d, c, 1, s);\n", "t.logic");
    expect(r.diagnostics).toEqual([]);
    expect(r.value!.stateElements!.map((e) => [e.target, e.fn, e.args.length])).toEqual([["q", "dff", 2], ["p", "dlatch", 4]]);
    expect(r.value!.initials!.map((i) => [i.name, i.value])).toEqual([["q", 1], ["p", 0]]);
    expect(r.value!.oscillators!.map((o) => o.name)).toEqual(["o"]);
  });

  it("an unknown function (GW1020, with the nearest name), a wrong argument count (GW1021), a bad initial value (GW1007)", () => {
    const text = "input d, c;\nq = dfff(d, c);\nr = dff(d);\ns = dlatch(d, c, 1);\ninit q = 2;\n";
    const ds = parseEquations(text, "bad.logic").diagnostics;
    expect(where(text, ds)).toEqual(["GW1020@2:5", "GW1021@3:5", "GW1021@4:5", "GW1007@5:10"]);
    expect(ds[0]!.message).toBe("'dfff' is not a function gatewright knows");
    expect(ds[0]!.hint).toContain("did you mean 'dff'?");
    expect(ds[1]!.message).toBe("dff takes 2 or 4 arguments, not 1");
    expect(ds[2]!.message).toBe("dlatch takes 2 or 4 arguments, not 3");
    expect(ds[3]!.message).toContain("use 0 or 1");
  });

  it("a state element is a whole right-hand side, and 'init' is a keyword (GW1002)", () => {
    const text = "input d, c;\nq = dff(d, c) & d;\ninit = d;\n";
    const ds = parseEquations(text, "bad.logic").diagnostics;
    expect(where(text, ds)).toEqual(["GW1002@2:15", "GW1002@3:6"]);
    expect(ds[1]!.hint).toBe("'init' is a keyword and cannot name a signal");
  });

  it("names taken by an element's internal signals (GW2032); init on an input, twice, on no state, or unknown", () => {
    const clash = "input d, c;\noutput q;\nq = dff(d, c);\nq.g1 = d;\n";
    const f = readDesign(clash, "bad.logic");
    expect(where(clash, f.diagnostics.filter((d) => d.severity === "error"))).toEqual(["GW2032@4:1"]);
    const text = "input d, c;\noutput q, y;\nq = dff(d, c);\ny = d & c;\ninit d = 0;\ninit q = 0, q = 1;\ninit y = 1;\ninit qq = 0;\n";
    const g = readDesign(text, "bad.logic");
    const ds = g.diagnostics.filter((d) => d.code.startsWith("GW20"));
    expect(where(text, ds)).toEqual(["GW2030@5:6", "GW2031@6:13", "GW2033@7:6", "GW2001@8:6"]);
    expect(ds[3]!.hint).toBe("did you mean 'q'?");
  });
});

describe("expansion", () => {
  it("dff: six NAND gates of the 7474 structure, each a net named q or q.<gate>, kept through mapping", () => {
    const s = synthesize("input d, clk;\noutput q;\nq = dff(d, clk);\n", "ff.logic", { maxFanin: 8, cells: "nand", sizing: { supplyVolts: 5 }, commandLine: "test" });
    expect(s.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    const nl = s.netlist!;
    const gate = (name: string) => {
      const net = nl.nets.find((n) => n.name === name)!;
      expect(net.driver.kind).toBe("cell");
      const c = nl.cells[(net.driver as { cell: number }).cell]!;
      return `${c.fn}(${c.inputs.map((i) => nl.nets[i]!.name).sort().join(",")})`;
    };
    // The classic six-NAND edge-triggered D flip-flop (common practice).
    expect(gate("q.g1")).toBe("nand(q.g2,q.g4)");
    expect(gate("q.g2")).toBe("nand(clk,q.g1)");
    expect(gate("q.g3")).toBe("nand(clk,q.g2,q.g4)");
    expect(gate("q.g4")).toBe("nand(d,q.g3)");
    expect(gate("q")).toBe("nand(q.g2,q.n)");
    expect(gate("q.n")).toBe("nand(q,q.g3)");
    expect(nl.cells).toHaveLength(6);
  });

  it("dlatch: four NANDs and an inverter (Mano's gated D latch)", () => {
    const s = synthesize("input d, en;\noutput q;\nq = dlatch(d, en);\n", "l.logic", { maxFanin: 8, cells: "nand", sizing: { supplyVolts: 5 }, commandLine: "test" });
    const nl = s.netlist!;
    const fn = (name: string) => {
      const net = nl.nets.find((n) => n.name === name)!;
      const c = nl.cells[(net.driver as { cell: number }).cell]!;
      return `${c.fn}(${c.inputs.map((i) => nl.nets[i]!.name).sort().join(",")})`;
    };
    expect([fn("q.dn"), fn("q.s_n"), fn("q.r_n"), fn("q"), fn("q.n")]).toEqual(["nand(d)", "nand(d,en)", "nand(en,q.dn)", "nand(q.n,q.s_n)", "nand(q,q.r_n)"]);
  });

  it("an argument written as an expression becomes a net of its own, q.d; a constant set_n drops out", () => {
    const f = front("input a, b, clk, r_n;\noutput q;\nq = dff(a ^ b, clk, 1, r_n);\n");
    expect(f.keptNames).toContain("q.d");
    expect(f.state!.elements[0]!.pins).toEqual({ d: { signal: "q.d" }, clk: { signal: "clk" }, set_n: { constant: 1 }, reset_n: { signal: "r_n" } });
  });
});

// ---- behaviour against the function tables ---------------------------------------------------

type Vec = Record<string, 0 | 1>;

/** Random walk changing one input a step (so no two inputs race), from a start vector. */
function walk(names: string[], start: Vec, steps: number, seed: number): Vec[] {
  const rand = seededRandom(seed);
  const out: Vec[] = [{ ...start }];
  for (let i = 0; i < steps; i++) {
    const next = { ...out[out.length - 1]! };
    const k = names[rand() % names.length]!;
    next[k] = next[k] ? 0 : 1;
    out.push(next);
  }
  return out;
}

function simulate(text: string, vectors: Vec[]): { q: Tri; qn: Tri }[] {
  const f = front(text);
  const g = f.graph!;
  const sim = new StepSimulator(g);
  return vectors.map((v) => {
    sim.step(g.inputs.map((p) => v[p.name]!));
    return { q: sim.valueOf("q")!, qn: sim.valueOf("q.n")! };
  });
}

describe("behaviour (gate-level unit-delay simulation against the function tables)", () => {
  it("dff with preset and clear follows the 7474 function table over 3,000 single-input changes", () => {
    const names = ["d", "clk", "s_n", "r_n"];
    // Start cleared: CLR̅ low.
    const vectors = walk(names, { d: 0, clk: 0, s_n: 1, r_n: 0 }, 3000, 7);
    const got = simulate("input d, clk, s_n, r_n;\noutput y;\nq = dff(d, clk, s_n, r_n);\ny = q;\n", vectors);
    let q: 0 | 1 = 0;
    let checkedEdges = 0;
    vectors.forEach((v, i) => {
      const prev = vectors[i - 1];
      let qn: 0 | 1;
      if (!v.s_n && !v.r_n) {
        q = 1;
        qn = 1;
      } else {
        if (!v.s_n) q = 1;
        else if (!v.r_n) q = 0;
        else if (prev && !prev.clk && v.clk) {
          q = v.d;
          checkedEdges++;
        }
        qn = q ? 0 : 1;
      }
      expect([i, got[i]!.q, got[i]!.qn]).toEqual([i, q, qn]);
    });
    expect(checkedEdges).toBeGreaterThan(50);
  });

  it("dff(d, clk): takes d at each rising edge only", () => {
    const vectors = walk(["d", "clk"], { d: 0, clk: 0 }, 1000, 11);
    const got = simulate("input d, clk;\noutput y;\nq = dff(d, clk);\ny = q;\n", vectors);
    let q: Tri = "X";
    vectors.forEach((v, i) => {
      const prev = vectors[i - 1];
      if (prev && !prev.clk && v.clk) q = v.d;
      if (q !== "X") expect([i, got[i]!.q]).toEqual([i, q]);
    });
  });

  it("dlatch with set and clear: transparent while en = 1, holding while en = 0, over 3,000 single-input changes", () => {
    const names = ["d", "en", "s_n", "r_n"];
    const vectors = walk(names, { d: 0, en: 0, s_n: 1, r_n: 0 }, 3000, 5);
    const got = simulate("input d, en, s_n, r_n;\noutput y;\nq = dlatch(d, en, s_n, r_n);\ny = q;\n", vectors);
    let q: 0 | 1 = 0;
    vectors.forEach((v, i) => {
      let qn: 0 | 1;
      if (!v.s_n && !v.r_n) {
        q = 1;
        qn = 1;
      } else {
        if (!v.s_n) q = 1;
        else if (!v.r_n) q = 0;
        else if (v.en) q = v.d;
        qn = q ? 0 : 1;
      }
      expect([i, got[i]!.q, got[i]!.qn]).toEqual([i, q, qn]);
    });
  });
});
