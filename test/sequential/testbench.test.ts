// The clocked testbench plan: initial state, the walk, and where the inputs change; and the
// timing estimate's arithmetic from the cells' delays.
//
// References (common practice): a 3-bit binary counter counts 0, 1, ..., 7, 0 on successive
// clock edges; an n-bit shift register has 2^n states, each reachable, and with one data input
// two transitions from each; an SR latch of NAND gates holds with both inputs high; in a
// synchronous design the data must not change at the clock edge (setup and hold) and the
// shortest clock period is the longest register-to-register path, clock-to-output plus logic
// plus setup.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { synthesize, type Synthesis } from "../../src/pipeline/synthesize.js";
import { ELEMENT_STRUCTURES } from "../../src/sequential/elements.js";

function build(file: string, extra: Partial<Parameters<typeof synthesize>[2]> = {}): Synthesis {
  const s = synthesize(readFileSync(file, "utf8"), file, { maxFanin: 8, cells: "nand", sizing: { supplyVolts: 5 }, commandLine: "test", ...extra });
  expect(s.diagnostics.filter((d) => d.severity === "error").map((d) => d.message)).toEqual([]);
  expect(s.files).toBeDefined();
  return s;
}

const F = "test/sequential/fixtures";

describe("initial state", () => {
  it("an SR latch with `init q = 0` starts with both inputs idle (high) so the value holds, and the testbench sets it with .ic", () => {
    const s = build(`${F}/sr_nand.logic`);
    expect(s.diagnostics.filter((d) => d.code === "GW3013")).toEqual([]);
    expect(s.stimulus!.vectors[0]).toEqual([1, 1]);
    expect(s.stimulus!.expected[0]).toEqual([0, 1]);
    expect(s.initial!.held).toEqual(new Map([["q", 0]]));
    const tb = s.files!.find((f) => f.name.endsWith(".tb.cir"))!.content;
    expect(tb).toMatch(/^\.ic v\(q\)=\S+$/m);
  });

  it("contradictory initial values are reported (GW3013)", () => {
    const text = "input s_n, r_n;\noutput q, qn;\nq = !(s_n & qn);\nqn = !(r_n & q);\ninit q = 1, qn = 1;\n";
    const s = synthesize(text, "sr.logic", { maxFanin: 8, cells: "nand", sizing: { supplyVolts: 5 }, commandLine: "test" });
    expect(s.diagnostics.filter((d) => d.code === "GW3013").map((d) => d.severity)).toEqual(["warning"]);
  });

  it("a loop without init starts with its state signal at 0, and the report says it was a default", () => {
    const s = build(`${F}/mux_latch.logic`.replace("mux_latch", "mux_latch"), {});
    void s;
    const text = "input d, en;\noutput q;\nq = d & en | q & !en | d & q;\n";
    const t = synthesize(text, "m.logic", { maxFanin: 8, cells: "nand", sizing: { supplyVolts: 5 }, commandLine: "test" });
    expect(t.initial!.defaults).toEqual(["q"]);
    expect(t.stimulus!.expected[0]).toEqual([0]);
    const report = t.files!.find((f) => f.name.endsWith(".report.md"))!.content;
    expect(report).toContain("q = 0 (default)");
  });
});

describe("clocked walk", () => {
  it("the data inputs change only with the clock low, a quarter period before a rising edge, never with the clock", () => {
    for (const file of ["dff", "shift4", "counter3"]) {
      const s = build(`${F}/${file}.logic`);
      const st = s.stimulus!;
      const k = st.clock!.index;
      expect(st.clock!.stepsPerCycle).toBe(4);
      for (let i = 1; i < st.vectors.length; i++) {
        const prev = st.vectors[i - 1]!;
        const cur = st.vectors[i]!;
        const clockChanged = prev[k] !== cur[k];
        const dataChanged = cur.some((b, j) => j !== k && b !== prev[j]);
        expect(clockChanged && dataChanged).toBe(false);
        if (dataChanged) {
          expect(cur[k]).toBe(0);
          expect(st.vectors[i + 1]?.[k] ?? 1).toBe(1); // the next step is the rising edge
          expect((i - 1) % 4).toBe(0);
        }
      }
    }
  });

  it("3-bit counter: just before each rising edge the outputs count 0, 1, ..., 7, 0 (common practice)", () => {
    const s = build(`${F}/counter3.logic`, { minClockCycles: 9 });
    const st = s.stimulus!;
    const counts = st.edgeSteps!.map((i) => st.expected[i]!.reduce<number>((acc, b, bit) => acc + (b === 1 ? 1 << bit : 0), 0));
    expect(counts.slice(0, 10)).toEqual([0, 0, 1, 2, 3, 4, 5, 6, 7, 0]);
  });

  it("4-bit shift register: the walk reaches all 16 states and tries both data values in each (32 pairs)", () => {
    const s = build(`${F}/shift4.logic`);
    expect(s.stimulus!.clock!.pairsFound).toBe(32);
    expect(s.stimulus!.clock!.pairsCovered).toBe(32);
    expect(s.stimulus!.clock!.complete).toBe(true);
    // Each rising edge shifts: q0 takes din, q(k) takes q(k-1).
    const st = s.stimulus!;
    for (const i of st.edgeSteps!.slice(2)) {
      const before = st.expected[i - 4]!;
      const after = st.expected[i]!;
      const din = st.vectors[i - 4]![0]!;
      expect(after).toEqual([din, before[0], before[1], before[2]]);
    }
  });

  it("with more data inputs than the exhaustive limit, a seeded random data sequence (and a note saying so)", () => {
    const s = build(`${F}/shift4.logic`, { exhaustiveLimit: 0, randomVectors: 40, seed: 3 });
    expect(s.stimulus!.seed).toBe(3);
    expect(s.stimulus!.clock!.cycles).toBe(40);
    expect(s.stimulus!.clock!.complete).toBe(false);
    const report = s.files!.find((f) => f.name.endsWith(".report.md"))!.content;
    expect(report).toContain("seeded random data (seed 3)");
  });

  it("the testbench states the clock, samples the state nets inside the design, and sets .ic on every state net", () => {
    const s = build(`${F}/dff.logic`);
    const tb = s.files!.find((f) => f.name.endsWith(".tb.cir"))!.content;
    expect(tb).toContain("* Clock clk: period");
    expect(tb).toMatch(/^\.meas tran s\d+_st_q_n FIND v\(xdut\.q_n\) AT=/m);
    const ic = tb.split("\n").find((l) => l.startsWith(".ic "))!;
    for (const n of ["xdut.q_g1", "xdut.q_g2", "xdut.q_g3", "xdut.q_g4", "q", "xdut.q_n"]) expect(ic).toContain(`v(${n})=`);
  });

  it("a flip-flop clocked from logic gets a note and a step-by-step walk", () => {
    const text = "input a, b, d;\noutput q;\nq = dff(d, a & b);\n";
    const s = synthesize(text, "g.logic", { maxFanin: 8, cells: "nand", sizing: { supplyVolts: 5 }, commandLine: "test" });
    const note = s.diagnostics.find((d) => d.code === "GW3012")!;
    expect(note.message).toContain("clocked from logic");
    expect(s.stimulus!.clock).toBeUndefined();
  });
});

describe("timing estimate", () => {
  it("clock-to-output, setup and the clock limit add up the cells' t_PHL and t_PLH along the 7474 structure", () => {
    const s = build(`${F}/toggle.logic`);
    const d = s.design!;
    const nl = d.netlist;
    const delay = (net: string, edge: "rise" | "fall") => {
      const n = nl.nets.find((x) => x.name === net)!;
      const cell = (n.driver as { cell: number }).cell;
      const t = d.instances[cell]!.analysis.timing!;
      return edge === "rise" ? t.tPLHSeconds : t.tPHLSeconds;
    };
    // By hand from the structure (inverting NAND gates; each arc alternates the edge).
    const tcq = Math.max(delay("q.g2", "fall") + delay("q", "rise"), delay("q.g3", "fall") + delay("q.n", "rise") + delay("q", "fall"));
    const tcqn = Math.max(delay("q.g2", "fall") + delay("q", "rise") + delay("q.n", "fall"), delay("q.g3", "fall") + delay("q.n", "rise"));
    const tsu = Math.max(delay("q.g4", "fall") + delay("q.g1", "rise"), delay("q.g4", "rise") + delay("q.g1", "fall"));
    const tHigh = Math.max(delay("q.g2", "fall") + delay("q.g1", "rise"), delay("q.g3", "fall") + delay("q.g4", "rise"));
    const tLow = Math.max(delay("q.g3", "rise") + delay("q.g4", "fall") + delay("q.g1", "rise"), delay("q.g2", "rise") + delay("q.g1", "fall"));
    const t = s.timing!.elements[0]!;
    expect(t.clockToOutputSeconds).toBeCloseTo(tcq, 15);
    expect(t.clockToComplementSeconds).toBeCloseTo(tcqn, 15);
    expect(t.setupSeconds).toBeCloseTo(tsu, 15);
    expect(t.minHighSeconds).toBeCloseTo(tHigh, 15);
    expect(t.minLowSeconds).toBeCloseTo(tLow, 15);
    // d is q.n itself: the register path is t_CQ(q.n) + t_SU with no logic between.
    expect(s.timing!.criticalPath!.delaySeconds).toBeCloseTo(tcqn + tsu, 15);
    const period = Math.max(tcqn + tsu, 2 * Math.max(tHigh, tLow));
    expect(s.timing!.minPeriodSeconds).toBeCloseTo(period, 15);
    expect(s.timing!.maxClockHz).toBeCloseTo(1 / period, 3);
    expect(ELEMENT_STRUCTURES.dff.clockToOutput).toHaveLength(2);
  });

  it("the counter's limit is set by its longest register-to-register path, through the carry logic into q2", () => {
    const s = build(`${F}/counter3.logic`);
    const tm = s.timing!;
    expect(tm.limitedBy).toBe("register path");
    expect(tm.criticalPath!.to).toBe("q2");
    expect(tm.criticalPath!.logicSeconds).toBeGreaterThan(0);
    const report = s.files!.find((f) => f.name.endsWith(".report.md"))!.content;
    expect(report).toContain("## Stored state and clocking");
    expect(report).toMatch(/Estimated clock limit on clk: [\d.]+ kHz/);
  });
});
