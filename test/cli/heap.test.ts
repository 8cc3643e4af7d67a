// The command starts itself again with a larger young generation for large input files
// (src/cli/heap.ts, src/cli/bin.ts): when it does, and that the restarted command keeps the
// shell's contract (diagnostic with file:line:column, exit code, nothing written).
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { LARGE_INPUT_BYTES, RESTARTED_ENV, wantsLargerYoungGeneration } from "../../src/cli/heap.js";

const sizes: Record<string, number> = { "big.v": LARGE_INPUT_BYTES, "small.v": 2000, "dir": Number.NaN };
const sizeOf = (p: string): number | undefined => (p in sizes && !Number.isNaN(sizes[p]) ? sizes[p] : undefined);

describe("when the command starts itself again", () => {
  it("a large file on the command line, and nothing else, asks for it", () => {
    expect(wantsLargerYoungGeneration(["synth", "big.v", "--out", "o"], [], {}, sizeOf)).toBe(true);
    expect(wantsLargerYoungGeneration(["synth", "small.v", "--out", "o"], [], {}, sizeOf)).toBe(false);
    expect(wantsLargerYoungGeneration(["synth", "dir"], [], {}, sizeOf)).toBe(false);
    expect(wantsLargerYoungGeneration(["--help"], [], {}, sizeOf)).toBe(false);
  });

  it("never twice, and never over the user's own choice", () => {
    expect(wantsLargerYoungGeneration(["synth", "big.v"], [], { [RESTARTED_ENV]: "1" }, sizeOf)).toBe(false);
    expect(wantsLargerYoungGeneration(["synth", "big.v"], ["--max-semi-space-size=16"], {}, sizeOf)).toBe(false);
    expect(wantsLargerYoungGeneration(["synth", "big.v"], [], { NODE_OPTIONS: "--max-semi-space-size=32" }, sizeOf)).toBe(false);
  });

  it("the restarted command reports a bad large file as the shell does and writes nothing", () => {
    const dir = mkdtempSync(join(tmpdir(), "gw-heap-"));
    const file = join(dir, "large.v");
    // A large structural netlist of our own with a syntax error on its last line.
    const lines = ["module large(a, b, y);", "  input a, b;", "  output y;"];
    let length = 0;
    for (let k = 0; length < LARGE_INPUT_BYTES; k++) {
      const line = `  wire w${k}; nand g${k} (w${k}, a, b);`;
      lines.push(line);
      length += line.length + 1;
    }
    lines.push("  nand gz (y, a ;; b);", "endmodule", "");
    writeFileSync(file, lines.join("\n"));
    const out = join(dir, "out");
    const env = { ...process.env };
    delete env[RESTARTED_ENV];
    const r = spawnSync(process.execPath, ["--import", "tsx", "src/cli/bin.ts", "synth", file, "--out", out], { encoding: "utf8", env });
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(new RegExp(`large\\.v:${lines.length - 2}:\\d+: error GW1\\d{3}`));
    expect(r.stderr).not.toMatch(/at .*\.ts:\d+/);
    expect(existsSync(out)).toBe(false);
    expect(readFileSync(file, "utf8")).toContain("endmodule");
  }, 60_000);
});
