// The command-line shell as a user meets it: exit codes (0 ok, 1 design problem, 2 usage),
// diagnostics with file:line:column, nothing written on failure, refusal to overwrite files
// gatewright did not write. The shell runs in-process with its output captured.
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { main } from "../../src/cli/main.js";

async function run(...args: string[]) {
  let out = "";
  let err = "";
  const code = await main(args, { out: { write: (s: string) => (out += s) }, err: { write: (s: string) => (err += s) }, columns: 100 });
  return { code, out, err };
}

function tmp(): string {
  return mkdtempSync(join(tmpdir(), "gw-cli-"));
}

describe("gatewright synth", () => {
  it("builds a shipped example and lists what it wrote", async () => {
    const dir = tmp();
    const r = await run("synth", "examples/pump.logic", "--out", dir);
    expect(r.err).not.toMatch(/error/);
    expect(r.code).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(["pump.bom.csv", "pump.bom.md", "pump.cir", "pump.json", "pump.report.md", "pump.tb.cir"]);
    for (const f of readdirSync(dir)) expect(r.out).toContain(join(dir, f));
  });

  it("a design mistake exits 1 with file:line:column, the line, a caret and a hint, and writes nothing", async () => {
    const dir = tmp();
    const src = join(dir, "bad.logic");
    writeFileSync(src, "input a, b;\noutput y;\ny = a & bb;\n");
    const out = join(dir, "out");
    const r = await run("synth", src, "--out", out);
    expect(r.code).toBe(1);
    expect(r.err).toContain(`${src}:3:9: error GW2001`);
    expect(r.err).toContain("  3 | y = a & bb;");
    expect(r.err).toContain("    |         ^^");
    expect(r.err).toContain("did you mean 'b'?");
    expect(existsSync(out)).toBe(false);
  });

  it("usage errors exit 2: unknown option, bad quantity, missing file, no command", async () => {
    const unknown = await run("synth", "examples/pump.logic", "--no-such-option");
    expect(unknown.code).toBe(2);
    expect(unknown.err).toMatch(/Unknown argument/i);
    const bad = await run("synth", "examples/pump.logic", "--supply", "5 furlongs", "--out", tmp());
    expect(bad.code).toBe(2);
    expect(bad.err).toContain("GW6002");
    const missing = await run("synth", "examples/missing.logic");
    expect(missing.code).toBe(2);
    expect(missing.err).toContain("no such file");
    expect((await run()).code).toBe(2);
  });

  it("--help describes the command and its options", async () => {
    const r = await run("synth", "--help");
    expect(r.code).toBe(0);
    for (const opt of ["--supply", "--beta-min", "--series", "--max-fanin", "--out"]) expect(r.out).toContain(opt);
  });

  it("refuses to overwrite a file it did not write, unless forced", async () => {
    const dir = tmp();
    writeFileSync(join(dir, "pump.cir"), "my own hand-made netlist\n");
    const r = await run("synth", "examples/pump.logic", "--out", dir);
    expect(r.code).toBe(1);
    expect(r.err).toContain("GW8002");
    expect(readFileSync(join(dir, "pump.cir"), "utf8")).toBe("my own hand-made netlist\n");
    expect(readdirSync(dir)).toEqual(["pump.cir"]);
    expect((await run("synth", "examples/pump.logic", "--out", dir, "--force")).code).toBe(0);
    // Its own files it regenerates without --force.
    expect((await run("synth", "examples/pump.logic", "--out", dir, "--supply", "12V")).code).toBe(0);
  });
});
