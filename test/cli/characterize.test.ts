// `gatewright synth --characterize` as a user meets it (in-process, output captured): the cells
// measured in ngspice (the embedded engine) go into the report and the JSON; a simulation that
// contradicts the sizing exits 1 and writes nothing; infeasible requests give the documented
// GW5001 message (src/electrical/STATUS.md: the constraint that fails first, what would relax
// it) and exit status 1 (README, "Exit status").
import { execFile } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { describe, expect, it } from "vitest";
import { main } from "../../src/cli/main.js";

async function run(...args: string[]) {
  let out = "";
  let err = "";
  const code = await main(args, { out: { write: (s: string) => (out += s) }, err: { write: (s: string) => (err += s) }, columns: 100 });
  return { code, out, err };
}

/** The command in a child process (through tsx, from the sources): exit code and both streams. */
async function runChild(...args: string[]) {
  try {
    const { stdout, stderr } = await promisify(execFile)("node_modules/.bin/tsx", ["src/cli/bin.ts", ...args], { maxBuffer: 64 << 20, timeout: 880_000 });
    return { code: 0, out: stdout, err: stderr };
  } catch (e) {
    const x = e as { code?: number; stdout?: string; stderr?: string };
    return { code: typeof x.code === "number" ? x.code : -1, out: x.stdout ?? "", err: x.stderr ?? "" };
  }
}

const tmp = () => mkdtempSync(join(tmpdir(), "gw-char-"));
const XOR = "test/fixtures/logic/xor2.logic";

describe("gatewright synth --characterize", () => {
  it("puts the measured figures beside the analytic ones in the report and the JSON", async () => {
    const dir = tmp();
    const r = await run("synth", XOR, "--out", dir, "--characterize");
    expect(r.err).not.toMatch(/error/);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/characterized \d+ cell types? in ngspice at 4 corners .*: every check passes/);
    const report = readFileSync(join(dir, "xor2.report.md"), "utf8");
    expect(report).toContain("## Cells measured in ngspice");
    expect(report).toMatch(/\| V_OL \(worst-case load\) \| 200 mV \|( [\d.]+ mV \|){4}/);
    expect(report).toContain("| t_PLH |");
    const json = JSON.parse(readFileSync(join(dir, "xor2.json"), "utf8"));
    const ch = json.characterization;
    expect(ch.pass).toBe(true);
    expect(ch.transient).toBe(true);
    for (const cell of ch.cells) {
      expect(json.cellTypes.map((t: { key: string }) => t.key)).toContain(cell.key);
      expect(cell.corners).toHaveLength(4);
      for (const k of cell.corners) {
        // Saturated (V_CE(sat) ≤ 0.2 V, the sizing's assumption) and switching at every corner.
        expect(k.vOLVolts).toBeLessThanOrEqual(0.2);
        expect(k.tPHLSeconds).toBeGreaterThan(0);
        expect(k.tPLHSeconds).toBeGreaterThan(k.tPHLSeconds); // storage time delays the rising edge (Moll 1954)
      }
    }
    // Without the option the files carry no characterization (the default stays fast).
    const plain = tmp();
    expect((await run("synth", XOR, "--out", plain)).code).toBe(0);
    expect(JSON.parse(readFileSync(join(plain, "xor2.json"), "utf8")).characterization).toBeUndefined();
    expect(readFileSync(join(plain, "xor2.report.md"), "utf8")).not.toContain("measured in ngspice");
  });

  it("a transistor model the sizing's assumptions do not describe fails the run: GW7020, exit 1, nothing written", async () => {
    // A 150 Ω collector resistance in the model adds I_C·RC to the saturation voltage (Ohm's
    // law), which the declared V_CE(sat) of 0.2 V leaves out: the sizing passes, ngspice does not.
    const dir = tmp();
    const parts = join(dir, "parts.json");
    writeFileSync(parts, JSON.stringify({ npn: { model: { RC: 150 } } }));
    const out = join(dir, "out");
    const r = await run("synth", XOR, "--out", out, "--characterize", "--parts", parts);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/error GW7020: gw_nand2: saturation \(V_OL at most V_CE\(sat\)\) is [\d.]+ mV in ngspice/);
    expect(r.err).toContain("where the sizing claims saturation margin");
    expect(r.err).toContain("nothing written");
    expect(existsSync(out)).toBe(false);
  });
});

describe("infeasible requests through the command line", () => {
  it("a fan-out nothing can meet: GW5001 names the constraint that fails first and what would relax it, exit 1", async () => {
    const dir = tmp();
    for (const extra of [[], ["--characterize"]]) {
      const r = await run("synth", XOR, "--out", dir, "--fanout", "1000", ...extra);
      expect(r.code).toBe(1);
      expect(r.err).toMatch(/error GW5001: .*no E24 values meet every constraint at every corner; .* fails first/);
      expect(r.err).toContain("hint: what would relax it:");
      expect(r.err).toContain("nothing written: 1 error(s)");
      expect(existsSync(join(dir, "xor2.cir"))).toBe(false);
    }
  });

  it("a gate delay budget too tight for any standard values: GW5001 on the delay, exit 1", async () => {
    // Before saying no, the sizing tries every plan of fast variants (src/electrical/size.ts,
    // attemptFast): minutes on a busy machine, so the command runs in a child process, as a
    // user runs it (a test worker must not block that long).
    const dir = join(tmp(), "out");
    const r = await runChild("synth", XOR, "--out", dir, "--gate-delay", "2ns");
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/error GW5001: .*propagation delay, output (rising|falling) \(t_P(LH|HL)\) fails first/);
    expect(r.err).toMatch(/hint: what would relax it: a slower budget/);
    expect(existsSync(dir)).toBe(false);
  }, 900_000);
});
