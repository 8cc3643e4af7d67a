// End to end through a real simulator: each design is synthesized, its generated testbench is
// run unmodified (the design inlined in place of the .include, since the embedded engine reads
// no files) in ngspice (eecircuit-engine, ngspice compiled to WebAssembly), and every sampled
// output is compared with the logic graph's own step-by-step simulation.
import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { synthesize, type Synthesis } from "../../src/pipeline/synthesize.js";
import { embeddedSimulator, type Simulator } from "../../src/simulate/engine.js";
import { runTestbench } from "../../src/verify/run.js";
import { hasErrors } from "../../src/diagnostics/index.js";

let sim: Simulator;
beforeAll(async () => {
  sim = await embeddedSimulator();
});
afterAll(async () => {
  await sim?.close?.();
});

function build(file: string, supplyVolts = 5, cells: "mixed" | "nand" | "nor" = "mixed"): Synthesis {
  const text = readFileSync(file, "utf8");
  const s = synthesize(text, file, { maxFanin: 8, cells, sizing: { supplyVolts }, commandLine: "test" });
  const errors = s.diagnostics.filter((d) => d.severity === "error");
  expect(errors.map((d) => `${d.code} ${d.message}`)).toEqual([]);
  expect(hasErrors(s.diagnostics)).toBe(false);
  expect(s.files).toBeDefined();
  return s;
}

async function expectPasses(s: Synthesis) {
  const v = await runTestbench(s, sim);
  expect(v.run.errors).toEqual([]);
  expect(v.comparison.failures).toEqual([]);
  expect(v.comparison.compared).toBeGreaterThan(0);
  expect(v.comparison.pass).toBe(true);
  return v;
}

describe("generated testbenches pass in ngspice", () => {
  it("cross-coupled NAND SR latch: set, hold, reset, hold (common practice)", async () => {
    const s = build("test/fixtures/logic/sr_latch.logic", 5, "nand");
    expect(s.stateNames).toEqual(["q"]);
    // The stimulus visits set then hold, and reset then hold (active-low inputs s_n, r_n).
    const seq = s.stimulus!.vectors.map((v) => v.join(""));
    const v = await expectPasses(s);
    // Hold after set keeps q = 1 and hold after reset keeps q = 0 in the simulated circuit.
    const exp = s.stimulus!.expected;
    const holdAfterSet = seq.findIndex((x, i) => x === "11" && seq[i - 1] === "01");
    const holdAfterReset = seq.findIndex((x, i) => x === "11" && seq[i - 1] === "10");
    expect(exp[holdAfterSet]).toEqual([1, 0]);
    expect(exp[holdAfterReset]).toEqual([0, 1]);
  });

  it("two-input XOR (common practice)", async () => {
    const s = build("test/fixtures/logic/xor2.logic");
    await expectPasses(s);
  });

  it("three-input majority (common practice)", async () => {
    const s = build("test/fixtures/logic/majority3.logic");
    await expectPasses(s);
  });

  it("ISCAS-85 c17 in structural Verilog (Brglez and Fujiwara, 1985; netlist from memory)", async () => {
    const s = build("test/fixtures/verilog/c17.v");
    // c17 is six two-input NANDs; the mapping keeps it at six cells.
    expect(s.netlist!.cells.length).toBe(6);
    await expectPasses(s);
  });
});

describe("regeneration at another supply", () => {
  it("5 V and 12 V: same designators and topology, different values, both pass in ngspice", async () => {
    const a = build("examples/pump.logic", 5);
    const b = build("examples/pump.logic", 12);
    const des = (s: Synthesis) => s.design!.components.map((c) => `${c.designator}:${c.instance}:${c.role}`);
    expect(des(b)).toEqual(des(a));
    const vals = (s: Synthesis) => s.design!.components.filter((c) => c.kind === "R").map((c) => c.value);
    expect(vals(b)).not.toEqual(vals(a));
    expect(b.netlist!.cells.map((c) => `${c.fn}${c.inputs.join(",")}>${c.output}`)).toEqual(a.netlist!.cells.map((c) => `${c.fn}${c.inputs.join(",")}>${c.output}`));
    await expectPasses(a);
    await expectPasses(b);
  });
});

describe("the check can fail", () => {
  it("a cell whose base resistor shunts all base current leaves its output stuck high, and the run says so", async () => {
    const s = build("test/fixtures/logic/xor2.logic", 5, "nand");
    const cir = s.files!.find((f) => f.name.endsWith(".cir") && !f.name.endsWith(".tb.cir"))!;
    // R_B of 10 Ω keeps every transistor off (V_BE < 10 Ω × I_1 ≈ 5 mV).
    cir.content = cir.content.replace(/^RB b 0 \S+$/gm, "RB b 0 10");
    const v = await runTestbench(s, sim);
    expect(v.comparison.pass).toBe(false);
    expect(v.comparison.failures.length).toBeGreaterThan(0);
    expect(v.comparison.failures.every((f) => f.expected === 0)).toBe(true);
  });
});
