// The system ngspice binary, and its agreement with the embedded engine. Skipped, with a note,
// when `ngspice` is not installed (`apt-get install ngspice`).
import { afterAll, describe, expect, it } from "vitest";
import { embeddedSimulator, systemSimulator, type SimulationRun, type Simulator } from "../../src/simulate/engine.js";
import { sampleAt } from "../../src/simulate/waveform.js";
import { diodeVoltageVolts } from "./physics.js";

const system = await systemSimulator();
const systemAscii = system ? await systemSimulator("ngspice", { rawFormat: "ascii" }) : undefined;
const NOTE = "(skipped: no `ngspice` on the PATH; install it with `apt-get install ngspice`)";
if (!system) console.warn(`system ngspice tests ${NOTE}`);

let embedded: Simulator | undefined;
// The agreement test starts the embedded engine (seconds, more when test files run side by side).
const SLOW_MS = 60_000;
afterAll(async () => {
  await embedded?.close?.();
});

function vector(run: SimulationRun, name: string): Float64Array {
  const v = run.vectors.get(name);
  if (!v) throw new Error(`no vector ${name}; have ${[...run.vectors.keys()].join(", ")}; errors: ${run.errors.join(" | ")}`);
  return v;
}

const DIVIDER = `resistor divider
V1 in 0 DC 10
R1 in out 1k
R2 out 0 3k
.op
.end
`;
const DIODE = `diode at 1 mA
I1 0 a DC 1m
D1 a 0 DDEF
.model DDEF D
.op
.end
`;

describe("system ngspice", { timeout: SLOW_MS }, () => {
  it("reports that a binary that does not exist is not available", async () => {
    expect(await systemSimulator("/nonexistent/ngspice-not-here")).toBeUndefined();
  });

  it.skipIf(!system)(`solves a divider by Ohm's law ${system ? "" : NOTE}`, async () => {
    const run = await system!.run(DIVIDER);
    expect(run.errors).toEqual([]);
    // Ohm's law: 10 V · 3k/4k = 7.5 V, 2.5 mA out of the source (negative in ngspice's sign).
    expect(vector(run, "v(out)")[0]).toBeCloseTo(7.5, 9);
    expect(vector(run, "i(v1)")[0]).toBeCloseTo(-2.5e-3, 12);
  });

  it.skipIf(!system)(`puts a default diode at 1 mA where the Shockley equation says ${system ? "" : NOTE}`, async () => {
    // Default diode IS 1e-14 A, N 1 (REFERENCES.md); V = V_T·ln(I/IS + 1) at 27 °C (CODATA k, q).
    const run = await system!.run(DIODE);
    expect(run.errors).toEqual([]);
    expect(Math.abs(vector(run, "v(a)")[0]! - diodeVoltageVolts(1e-3, 1e-14, 27))).toBeLessThan(10e-6);
  });

  it.skipIf(!system)(`reads .meas results (which plain -b -r would skip) and the RC curve ${system ? "" : NOTE}`, async () => {
    const run = await system!.run(`rc step
V1 in 0 PWL(0 0 1p 1)
R1 in out 1k
C1 out 0 1n
.tran 1n 5u 0 5n
.meas tran v_at_tau FIND v(out) AT=1u
.end
`);
    expect(run.errors).toEqual([]);
    // 1 − e^(−1) after one time constant (common practice).
    expect(Math.abs(run.measures.get("v_at_tau")! - (1 - Math.exp(-1)))).toBeLessThan(1e-5);
    expect(Math.abs(sampleAt(vector(run, "time"), vector(run, "v(out)"), 1e-6) - (1 - Math.exp(-1)))).toBeLessThan(1e-5);
  });

  it.skipIf(!system)(`reads ascii raw files to the same values as binary ones ${system ? "" : NOTE}`, async () => {
    const bench = `rc ramp
V1 in 0 PWL(0 0 2u 1)
R1 in out 1k
C1 out 0 1n
.tran 20n 2u
.end
`;
    const bin = await system!.run(bench);
    const asc = await systemAscii!.run(bench);
    expect(bin.errors).toEqual([]);
    expect(asc.errors).toEqual([]);
    const tb = vector(bin, "time");
    const ta = vector(asc, "time");
    expect(ta.length).toBe(tb.length);
    const vb = vector(bin, "v(out)");
    const va = vector(asc, "v(out)");
    // The ascii file prints 15 significant digits.
    for (let i = 0; i < tb.length; i++) {
      expect(Math.abs(ta[i]! - tb[i]!)).toBeLessThanOrEqual(1e-14 * Math.max(1e-6, Math.abs(tb[i]!)));
      expect(Math.abs(va[i]! - vb[i]!)).toBeLessThan(1e-12);
    }
  });

  it.skipIf(!system)(`writes include files beside the netlist ${system ? "" : NOTE}`, async () => {
    const run = await system!.run(`with include\n.include "lib/half.cir"\nV1 in 0 DC 4\nX1 in out half\n.op\n.end\n`, {
      files: new Map([["lib/half.cir", ".subckt half a y\nR1 a y 1k\nR2 y 0 1k\n.ends\n.end\n"]]),
    });
    expect(run.errors).toEqual([]);
    expect(vector(run, "v(out)")[0]).toBeCloseTo(2, 9);
  });

  it.skipIf(!system)(`reports netlist errors, failed analyses and missing includes ${system ? "" : NOTE}`, async () => {
    const bad = await system!.run(`bad\nV1 in 0 DC 1\nQ1 c b 0 NOSUCHMODEL\n.op\n.end\n`);
    expect(bad.vectors.size).toBe(0);
    expect(bad.errors.join("\n")).toMatch(/nosuchmodel/i);
    const failed = await system!.run(`no op\nV1 in 0 1\nB1 out 0 V=sqrt(-1-v(in)*v(in))\nR1 out 0 1k\n.tran 1n 10n\n.end\n`);
    expect(failed.vectors.size).toBe(0);
    expect(failed.errors.join("\n")).toMatch(/timestep too small/i);
    const missing = await system!.run(`missing\n.include "nothere.cir"\nV1 a 0 1\nR1 a 0 1\n.op\n.end\n`);
    expect(missing.vectors.size).toBe(0);
    expect(missing.errors.join("\n")).toMatch(/nothere\.cir/);
  });

  it.skipIf(!system)(`stops a run past its time limit ${system ? "" : NOTE}`, async () => {
    const run = await system!.run(
      `long\nV1 in 0 PULSE(0 1 0 1n 1n 50n 100n)\nR1 in out 1k\nC1 out 0 10p\n.tran 0.1n 20m\n.end\n`,
      { timeoutMs: 300 },
    );
    expect(run.vectors.size).toBe(0);
    expect(run.errors.join("\n")).toMatch(/did not finish within 0\.3 s/);
  });
});

describe("embedded and system ngspice agree", { timeout: SLOW_MS }, () => {
  it.skipIf(!system)(`within 1 mV on the divider and the diode ${system ? "" : NOTE}`, async () => {
    embedded = await embeddedSimulator();
    for (const [bench, node] of [
      [DIVIDER, "v(out)"],
      [DIODE, "v(a)"],
    ] as const) {
      const a = await embedded.run(bench);
      const b = await system!.run(bench);
      expect(a.errors).toEqual([]);
      expect(b.errors).toEqual([]);
      expect(Math.abs(vector(a, node)[0]! - vector(b, node)[0]!)).toBeLessThan(1e-3);
    }
  });
});
