// Sequential designs end to end through a real simulator: each design is synthesized, its
// generated testbench run unmodified in ngspice (eecircuit-engine, ngspice in WebAssembly; the
// design inlined in place of the .include), and every sampled output and state net compared
// with the logic graph's own step-by-step (for clocked designs, cycle-by-cycle) simulation,
// started from the same initial state the testbench sets with .ic.
//
// Designs (common practice unless noted): the SR latch of cross-coupled NAND gates and of
// cross-coupled NOR gates; the gated D latch (Mano, Digital Design); a latch written as a
// multiplexer with its consensus term (Unger, Asynchronous Switching Circuits); the six-NAND
// positive-edge-triggered D flip-flop (the 7474 logic diagram); a 3-bit synchronous binary
// counter; a 4-bit shift register.
import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { synthesize, type Synthesis, type SynthesisOptions } from "../../src/pipeline/synthesize.js";
import { embeddedSimulator, type Simulator } from "../../src/simulate/engine.js";
import { runTestbench, type VerifyOptions } from "../../src/verify/run.js";

let sim: Simulator;
beforeAll(async () => {
  sim = await embeddedSimulator();
});
afterAll(async () => {
  await sim?.close?.();
});

const F = "test/sequential/fixtures";

function build(name: string, cells: "mixed" | "nand" | "nor" = "mixed", extra: Partial<SynthesisOptions> = {}): Synthesis {
  const file = `${F}/${name}.logic`;
  const s = synthesize(readFileSync(file, "utf8"), file, { maxFanin: 8, cells, sizing: { supplyVolts: 5 }, commandLine: "test", ...extra });
  expect(s.diagnostics.filter((d) => d.severity === "error").map((d) => `${d.code} ${d.message}`)).toEqual([]);
  expect(s.files).toBeDefined();
  return s;
}

async function expectPasses(s: Synthesis, opts: VerifyOptions = {}) {
  const v = await runTestbench(s, sim, opts);
  expect(v.run.errors).toEqual([]);
  expect(v.comparison.failures).toEqual([]);
  expect(v.comparison.compared).toBeGreaterThan(0);
  expect(v.comparison.pass).toBe(true);
  return v;
}

const bits = (row: (0 | 1 | "X")[]) => row.map(String).join("");

describe("latches in ngspice against the logic's step-by-step simulation", () => {
  it("SR latch of cross-coupled NAND gates: set, hold, reset, hold from q = 0", async () => {
    const s = build("sr_nand", "nand");
    expect(s.netlist!.cells.map((c) => `${c.fn}${c.inputs.length}`)).toEqual(["nand2", "nand2"]);
    const seq = s.stimulus!.vectors.map((v) => v.join(""));
    const exp = s.stimulus!.expected.map(bits);
    expect(seq[0]).toBe("11"); // both inputs idle: q = 0 from the init holds
    expect(exp[0]).toBe("01");
    // set (s_n low), then hold, then reset (r_n low), then hold (inputs s_n, r_n).
    const at = (v: string, after: string) => seq.findIndex((x, i) => x === v && seq[i - 1] === after);
    expect(exp[seq.indexOf("01")]).toBe("10");
    expect(exp[at("11", "01")]).toBe("10");
    expect(exp[seq.indexOf("10")]).toBe("01");
    expect(exp[at("11", "10")]).toBe("01");
    await expectPasses(s);
  });

  it("SR latch of cross-coupled NOR gates (cells nor)", async () => {
    const s = build("sr_nor", "nor");
    expect(s.netlist!.cells.filter((c) => c.inputs.length === 2).map((c) => c.fn)).toEqual(["nor", "nor"]);
    expect(s.stimulus!.expected[0]).toEqual([0, 1]);
    await expectPasses(s);
  });

  it("gated D latch (four NANDs and an inverter): follows d while en = 1, holds while en = 0", async () => {
    const s = build("dlatch");
    const v = await expectPasses(s);
    // q.n, the complement inside the design, is sampled too.
    expect(s.stimulus!.stateSignals).toEqual(["q", "q.n"]);
    // Outputs q and qn, and the state net q.n, at every step.
    expect(v.comparison.compared).toBe(s.stimulus!.vectors.length * 3);
  });

  it("latch written as a multiplexer with its consensus term holds when en falls (cells nand and mixed)", async () => {
    for (const cells of ["nand", "mixed"] as const) {
      const s = build("mux_latch", cells);
      expect(s.diagnostics.filter((d) => d.code === "GW3011")).toEqual([]);
      const seq = s.stimulus!.vectors.map((v) => v.join(""));
      // en falls with d = 1 and q = 1 (inputs d, en): 11 → 10, and q stays 1.
      const fall = seq.findIndex((x, i) => x === "10" && seq[i - 1] === "11");
      expect(fall).toBeGreaterThan(0);
      expect(s.stimulus!.expected[fall]).toEqual([1]);
      await expectPasses(s);
    }
  });
});

describe("flip-flops in ngspice against the logic's cycle-by-cycle simulation", () => {
  it("the six-NAND positive-edge-triggered D flip-flop", async () => {
    const s = build("dff");
    expect(s.stimulus!.clock!.input).toBe("clk");
    expect(s.stimulus!.clock!.complete).toBe(true);
    await expectPasses(s);
  });

  it("3-bit synchronous counter: counts 0 to 7 and wraps, in ngspice", async () => {
    const s = build("counter3", "mixed", { minClockCycles: 10 });
    const st = s.stimulus!;
    const counts = st.edgeSteps!.map((i) => st.expected[i]!.reduce<number>((acc, b, bit) => acc + (b === 1 ? 1 << bit : 0), 0));
    expect(counts.slice(0, 11)).toEqual([0, 0, 1, 2, 3, 4, 5, 6, 7, 0, 1]);
    await expectPasses(s);
  });

  it("4-bit shift register: every state with both data values", async () => {
    const s = build("shift4");
    expect(s.stimulus!.clock!.pairsCovered).toBe(32);
    await expectPasses(s);
  });
});

describe("the clock limit", () => {
  // The estimate adds worst-case gate delays; the simulated circuit runs at typical conditions.
  // Measured with the embedded ngspice (gatewright 0.1.0, 5 V): the divide-by-two flip-flop
  // (cells nand or mixed, estimate 434 kHz) works up to 2.0 times the estimated limit and fails
  // from 2.2 times; the flip-flop with its data from the testbench (changing a quarter period
  // before each edge) works at the limit and fails at twice it; the 3-bit counter (mixed,
  // estimate 349 kHz) works at 1.5 times, is marginal at 2 and fails from 2.5 times. The test
  // asks for "works at the limit, fails at four times it".
  const FACTOR = 4;

  async function atClock(name: string, multiple: number, cells: "nand" | "mixed") {
    const base = build(name, cells);
    const fmax = base.timing!.maxClockHz!;
    expect(fmax).toBeGreaterThan(0);
    const period = 1 / (multiple * fmax);
    const s = build(name, cells, { stepSeconds: period / 4, minClockCycles: 12 });
    return runTestbench(s, sim, { samples: "edges" });
  }

  const what = { toggle: "the D flip-flop dividing its clock by two (d = q.n)", dff: "the D flip-flop with its data from the inputs", counter3: "the 3-bit counter" };
  for (const [name, cells] of [["toggle", "nand"], ["toggle", "mixed"], ["dff", "nand"], ["counter3", "mixed"]] as const) {
    it(`${what[name]}, cells ${cells}: works at the estimated maximum clock frequency, fails at ${FACTOR} times it`, async () => {
      const ok = await atClock(name, 1, cells);
      expect(ok.run.errors).toEqual([]);
      expect(ok.comparison.failures).toEqual([]);
      expect(ok.comparison.compared).toBeGreaterThan(20);
      const fast = await atClock(name, FACTOR, cells);
      expect(fast.run.errors).toEqual([]);
      expect(fast.comparison.failures.length).toBeGreaterThan(0);
    });
  }
});

describe("loops that cannot hold state", () => {
  it("a ring of three inverters is rejected (GW3004) with its signals named, and nothing is built", () => {
    const file = `${F}/ring3.logic`;
    const s = synthesize(readFileSync(file, "utf8"), file, { maxFanin: 8, cells: "mixed", sizing: { supplyVolts: 5 }, commandLine: "test" });
    const e = s.diagnostics.filter((d) => d.severity === "error");
    expect(e.map((d) => d.code)).toEqual(["GW3004"]);
    expect(e[0]!.message).toContain("r1, r2, r3");
    expect(s.files).toBeUndefined();
  });
});
