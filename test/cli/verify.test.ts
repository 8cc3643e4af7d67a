// `gatewright verify` as a user meets it, in-process: exit codes (0 all pass, 1 a mismatch or
// margin violation, 2 usage), the files it writes, reuse of earlier outputs (the hash of source
// and options in the generated JSON), --json, --decoupling, the GW7003 message for a missing
// system ngspice, and a progress bar only on a terminal. Simulation runs on a small design (a
// two-input XOR of four NAND cells: 4 vectors): the first test in the embedded ngspice (the
// default), the others in the system ngspice when it is installed (it starts faster).
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { main } from "../../src/cli/main.js";
import { systemSimulator } from "../../src/simulate/engine.js";

const FAST = (await systemSimulator()) ? ["--simulator", "system"] : [];

async function run(args: string[], opts: { tty?: boolean } = {}) {
  let out = "";
  let err = "";
  const code = await main(args, {
    out: { write: (s: string) => (out += s) },
    err: Object.assign({ write: (s: string) => (err += s) }, opts.tty ? { isTTY: true } : {}),
    columns: 100,
  });
  return { code, out, err };
}

const XOR = "test/fixtures/logic/xor2.logic";
const tmp = () => mkdtempSync(join(tmpdir(), "gw-verify-cli-"));

describe("gatewright verify", { timeout: 300_000 }, () => {
  it("passes a design, writes the outputs, plots, report and JSON, and says what it covered", async () => {
    const dir = tmp();
    const r = await run(["verify", XOR, "--cells", "nand", "--out", dir, "--decoupling"]);
    expect(r.err).not.toMatch(/error/);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^xor2: PASS/m);
    expect(r.out).toMatch(/every combination of the 2 inputs/);
    expect(r.out).toMatch(/slowest path: [ab] → y/);
    const files = readdirSync(dir).sort();
    for (const f of ["xor2.cir", "xor2.tb.cir", "xor2.json", "xor2.bom.csv", "xor2.bom.md", "xor2.wave.svg", "xor2.supply.svg", "xor2.transfer.gw_nand2.svg", "xor2.verify.md", "xor2.verify.json"]) expect(files).toContain(f);
    for (const f of files) expect(r.out).toContain(join(dir, f));
    expect(JSON.parse(readFileSync(join(dir, "xor2.json"), "utf8")).inputHash).toMatch(/^sha256:/);
    // --decoupling put the bypass capacitors on the parts list.
    expect(readFileSync(join(dir, "xor2.bom.csv"), "utf8")).toMatch(/^1,C1,100nF,/m);
    expect(readFileSync(join(dir, "xor2.bom.md"), "utf8")).toMatch(/\| C1 \| 100nF \|/);
    // Quiet on a pipe: no progress bar.
    expect(r.err).not.toContain("\r");
  });

  it("reuses the outputs it made for the same source and options, and simulates them as they are: a weakened cell on disk fails (exit 1, --json)", async () => {
    const dir = tmp();
    const first = await run(["verify", XOR, "--cells", "nand", "--out", dir, "--no-plots", ...FAST]);
    expect(first.code).toBe(0);
    const again = await run(["verify", XOR, "--cells", "nand", "--out", dir, "--no-plots", ...FAST]);
    expect(again.code).toBe(0);
    expect(again.out).toMatch(/^reusing /m);
    expect(again.out).not.toMatch(/wrote .*xor2\.cir/);
    // Raise R_P of the cell driving y so it cannot saturate even with the typical model (see
    // test/verify/verify.test.ts for the numbers): 220 kΩ leaves R_B more current than R_P gives.
    const cirPath = join(dir, "xor2.cir");
    const cir = readFileSync(cirPath, "utf8");
    const sub = /\.subckt gw_nand2[\s\S]*?\.ends gw_nand2\n/.exec(cir)![0];
    const weak = sub.replace(/gw_nand2/g, "gw_nand2_weak").replace(/^RP vcc p \S+$/m, "RP vcc p 220k");
    writeFileSync(cirPath, cir.replace(sub, `${sub}\n${weak}`).replace(/^(XU\d+ .* y vcc) gw_nand2$/m, "$1 gw_nand2_weak"));
    const bad = await run(["verify", XOR, "--cells", "nand", "--out", dir, "--no-plots", "--json", ...FAST]);
    expect(bad.code).toBe(1);
    const j = JSON.parse(bad.out);
    expect(j.pass).toBe(false);
    expect(j.reusedOutputs).toBe(true);
    expect(j.corners[0].failures.map((f: { signal: string }) => f.signal)).toContain("y");
    expect(new Set(j.corners[0].failures.map((f: { signal: string }) => f.signal))).toEqual(new Set(["y"]));
    expect(bad.err).toContain("GW7002");
    // Another supply is another design: synthesized afresh, the edited netlist replaced.
    const other = await run(["verify", XOR, "--cells", "nand", "--out", dir, "--no-plots", "--supply", "12V", ...FAST]);
    expect(other.code).toBe(0);
    expect(other.out).toContain(`wrote ${cirPath}`);
  });

  it("reuses what synth wrote", async () => {
    const dir = tmp();
    expect((await run(["synth", XOR, "--cells", "nand", "--out", dir])).code).toBe(0);
    const v = await run(["verify", XOR, "--cells", "nand", "--out", dir, "--no-plots", ...FAST]);
    expect(v.code).toBe(0);
    expect(v.out).toMatch(/^reusing /m);
  });

  it("draws a progress bar on a terminal and clears it", async () => {
    const r = await run(["verify", XOR, "--cells", "nand", "--out", tmp(), "--no-plots", ...FAST], { tty: true });
    expect(r.code).toBe(0);
    expect(r.err).toMatch(/\r\x1b\[K\[#*-*\] \d+\/\d+ /);
    // The last bar drawn is followed by a line clear.
    const last = r.err.lastIndexOf("\r\x1b[K[");
    expect(r.err.indexOf("\r\x1b[K", last + 1)).toBeGreaterThan(last);
  });

  it("usage errors exit 2: bad simulator, bad --max-steps, missing file", async () => {
    expect((await run(["verify", XOR, "--simulator", "spice3"])).code).toBe(2);
    const steps = await run(["verify", XOR, "--max-steps", "0", "--out", tmp()]);
    expect(steps.code).toBe(2);
    expect(steps.err).toContain("GW6003");
    const missing = await run(["verify", "examples/missing.logic"]);
    expect(missing.code).toBe(2);
    expect(missing.err).toContain("no such file");
  });

  it("a missing system ngspice is GW7003 with what to do, exit 2", async () => {
    const r = await run(["verify", XOR, "--simulator", "system", "--ngspice", "/nonexistent/ngspice", "--out", tmp()]);
    expect(r.code).toBe(2);
    expect(r.err).toContain("GW7003");
    expect(r.err).toMatch(/apt-get install ngspice/);
    expect(r.err).toMatch(/--simulator embedded/);
  });

  it("--help lists the verify options", async () => {
    const r = await run(["verify", "--help"]);
    expect(r.code).toBe(0);
    for (const o of ["--corners", "--simulator", "--json", "--decoupling", "--max-steps", "--supply", "--out"]) expect(r.out).toContain(o);
  });
});
