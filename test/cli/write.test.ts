// Writing outputs (src/cli/write.ts): all files of a run or none. Checked against the rules of
// issue 7 and of the POSIX rename(2) contract (a rename over an existing name replaces it
// atomically; IEEE Std 1003.1, rename()): a run that fails at any step leaves the previous
// files byte for byte as they were, never leaves its temporary files behind, never overwrites a
// file gatewright did not write unless forced, and recognises its own files by their header.
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { main } from "../../src/cli/main.js";
import { CSV_HEADER_PREFIX, GENERATED_MARKER, NODE_WRITE_FS, isGeneratedFile, writeOutputs, type OutputFile, type WriteFs } from "../../src/cli/write.js";
import { synthesize } from "../../src/pipeline/synthesize.js";

function tmp(): string {
  return mkdtempSync(join(tmpdir(), "gw-write-"));
}

/** Every file in a folder (recursively) with its bytes, for before/after comparisons. */
function snapshot(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  if (!existsSync(dir)) return out;
  const walk = (d: string, prefix: string) => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const rel = prefix + e.name;
      if (e.isDirectory()) {
        out[rel + "/"] = "";
        walk(join(d, e.name), rel + "/");
      } else out[rel] = readFileSync(join(d, e.name), "latin1");
    }
  };
  walk(dir, "");
  return out;
}

/** A run's files as the emitters head them (the marker in the first line; the CSV header row). */
function runFiles(tag: string): OutputFile[] {
  return [
    { name: "d.cir", content: `* d: DTL circuit ${GENERATED_MARKER} 0.1.0\n* ${tag}\n.end\n` },
    { name: "d.tb.cir", content: `* d: testbench ${GENERATED_MARKER} 0.1.0\n* ${tag}\n.end\n` },
    { name: "d.bom.csv", content: `${CSV_HEADER_PREFIX},tolerance\n1,R1,${tag},5 %\n` },
    { name: "d.bom.md", content: `<!-- d: parts list ${GENERATED_MARKER} 0.1.0 -->\n${tag}\n` },
    { name: "d.report.md", content: `<!-- d: design report ${GENERATED_MARKER} 0.1.0 -->\n${tag}\n` },
    { name: "d.json", content: `{\n  "generator": { "note": "${GENERATED_MARKER} 0.1.0" },\n  "tag": "${tag}"\n}\n` },
  ];
}

/** node:fs with one call made to fail: the n-th call (1-based) of `which` throws `code`. */
function failingFs(which: keyof WriteFs, n: number, code = "EIO", filter: (args: unknown[]) => boolean = () => true): WriteFs & { calls: number } {
  const fs = { ...NODE_WRITE_FS, calls: 0 } as WriteFs & { calls: number };
  const real = NODE_WRITE_FS[which] as (...a: unknown[]) => unknown;
  (fs as unknown as Record<string, unknown>)[which] = (...args: unknown[]) => {
    if (filter(args) && ++fs.calls === n) {
      const e = new Error(`${code}: injected failure in ${which}`) as NodeJS.ErrnoException;
      e.code = code;
      throw e;
    }
    return real(...args);
  };
  return fs;
}

const isTempToFinal = (args: unknown[]) => typeof args[0] === "string" && (args[0] as string).endsWith(".tmp");

describe("writeOutputs: all or nothing", () => {
  it("writes every file, lists them in order and leaves no temporary file", () => {
    const dir = join(tmp(), "new", "folder");
    const files = runFiles("v1");
    const r = writeOutputs(dir, files);
    expect(r.error).toBeUndefined();
    expect(r.written).toEqual(files.map((f) => join(dir, f.name)));
    expect(snapshot(dir)).toEqual(Object.fromEntries(files.map((f) => [f.name, f.content])));
  });

  it("a run interrupted after its first file (or any later one) leaves the previous files intact", () => {
    const v1 = runFiles("v1");
    const v2 = runFiles("v2 with other values");
    // Interrupt the commit at each of its renames in turn: the k-th temporary file cannot be
    // renamed into place after k-1 files of the new run are already there.
    for (let k = 1; k <= v2.length; k++) {
      const dir = tmp();
      expect(writeOutputs(dir, v1).error).toBeUndefined();
      const before = snapshot(dir);
      const fs = failingFs("renameSync", k, "EIO", isTempToFinal);
      const r = writeOutputs(dir, v2, { fs });
      expect(fs.calls, `rename ${k} was reached`).toBeGreaterThanOrEqual(k);
      expect(r.error?.code).toBe("GW8001");
      expect(r.error?.message).toContain("nothing was changed");
      expect(r.written).toEqual([]);
      expect(snapshot(dir), `interrupted at rename ${k}`).toEqual(before);
    }
  });

  it("an interruption while the new files are only partly there removes them again", () => {
    // Some outputs are new (none before), some replace earlier ones.
    const dir = tmp();
    const v1 = runFiles("v1").slice(0, 2);
    expect(writeOutputs(dir, v1).error).toBeUndefined();
    const before = snapshot(dir);
    const r = writeOutputs(dir, runFiles("v2"), { fs: failingFs("renameSync", 5, "EXDEV", isTempToFinal) });
    expect(r.error?.code).toBe("GW8001");
    expect(snapshot(dir)).toEqual(before);
  });

  it("a failure while writing the temporary files changes nothing and leaves no temporary file", () => {
    const dir = tmp();
    expect(writeOutputs(dir, runFiles("v1")).error).toBeUndefined();
    const before = snapshot(dir);
    // (The first six closes are of the existing files, read for their header.)
    const cases = [["writeSync", 3, "ENOSPC"], ["fsyncSync", 1, "EIO"], ["openSync", 4, "EMFILE"], ["closeSync", 8, "EIO"]] as const;
    for (const [which, n, code] of cases) {
      const onlyTemps = which === "openSync" ? (a: unknown[]) => a[1] === "wx" : undefined;
      const r = writeOutputs(dir, runFiles("v2"), { fs: failingFs(which, n, code, onlyTemps) });
      expect(r.error?.code, which).toBe("GW8001");
      expect(r.error?.message).toContain(code);
      expect(snapshot(dir), `${which} failing`).toEqual(before);
    }
  });

  it("a failed run into a folder that did not exist leaves no folder behind", () => {
    const base = tmp();
    const dir = join(base, "a", "b");
    const r = writeOutputs(dir, runFiles("v1"), { fs: failingFs("renameSync", 2, "EIO", isTempToFinal) });
    expect(r.error?.code).toBe("GW8001");
    expect(readdirSync(base)).toEqual([]);
  });

  it("a failure to save the previous version (backup) undoes the run too", () => {
    const dir = tmp();
    expect(writeOutputs(dir, runFiles("v1")).error).toBeUndefined();
    const before = snapshot(dir);
    // Hard link and the copy fallback both fail for the third file.
    const fs = failingFs("linkSync", 3, "EPERM");
    const copy = failingFs("copyFileSync", 1, "ENOSPC");
    const r = writeOutputs(dir, runFiles("v2"), { fs: { ...fs, copyFileSync: copy.copyFileSync } });
    expect(r.error?.code).toBe("GW8001");
    expect(snapshot(dir)).toEqual(before);
  });

  it("a folder in the way of one output is found before anything is written, forced or not", () => {
    const dir = tmp();
    const v1 = runFiles("v1");
    expect(writeOutputs(dir, v1).error).toBeUndefined();
    // The second output's name is now taken by a folder.
    const blocked = v1[1]!.name;
    NODE_WRITE_FS.rmSync(join(dir, blocked), { force: true });
    mkdirSync(join(dir, blocked));
    const before = snapshot(dir);
    for (const force of [false, true]) {
      const r = writeOutputs(dir, runFiles("v2"), { force });
      expect(r.error?.code).toBe("GW8001");
      expect(r.error?.message).toContain("folder");
      expect(r.error?.path).toBe(join(dir, blocked));
      expect(snapshot(dir)).toEqual(before);
    }
  });

  it("refuses names that would leave the output folder", () => {
    const base = tmp();
    const dir = join(base, "out");
    for (const name of ["../escape.cir", "/etc/escape.cir", "a/../../escape.cir"]) {
      const r = writeOutputs(dir, [{ name, content: `* ${GENERATED_MARKER}\n` }]);
      expect(r.error?.code, name).toBe("GW8001");
    }
    expect(readdirSync(base)).toEqual([]);
  });
});

describe("writeOutputs: files gatewright did not write", () => {
  it("refuses to overwrite a file without our header, touching nothing, unless forced", () => {
    const dir = tmp();
    writeFileSync(join(dir, "d.report.md"), "# my own notes on this design\n");
    const before = snapshot(dir);
    const r = writeOutputs(dir, runFiles("v1"));
    expect(r.error?.code).toBe("GW8002");
    expect(r.error?.path).toBe(join(dir, "d.report.md"));
    expect(r.error?.message).toContain("--force");
    // Not even the files that do not clash were written.
    expect(snapshot(dir)).toEqual(before);
    const forced = writeOutputs(dir, runFiles("v1"), { force: true });
    expect(forced.error).toBeUndefined();
    expect(readFileSync(join(dir, "d.report.md"), "utf8")).toBe(runFiles("v1")[4]!.content);
  });

  it("recognises its own files only by the marker at their head", () => {
    const dir = tmp();
    const cases: [string, string, boolean][] = [
      ["spice.cir", `* x: DTL circuit ${GENERATED_MARKER} 0.1.0\n`, true],
      ["parts.csv", `${CSV_HEADER_PREFIX},tolerance,rating\n`, true],
      ["empty.cir", "", false],
      ["hand.cir", "* my netlist\nR1 1 0 1k\n", false],
      // The marker far down a file the user wrote (a quoted line, say) does not count.
      ["quoted.md", `${"x".repeat(600)}\n${GENERATED_MARKER}\n`, false],
      // A CSV of the user's own with other columns.
      ["mine.csv", "qty,ref,value\n1,R1,1k\n", false],
    ];
    for (const [name, content, ours] of cases) {
      writeFileSync(join(dir, name), content);
      expect(isGeneratedFile(join(dir, name)), name).toBe(ours);
      const r = writeOutputs(dir, [{ name, content: "new\n" }]);
      expect(r.error?.code, name).toBe(ours ? undefined : "GW8002");
    }
    mkdirSync(join(dir, "folder.cir"));
    expect(isGeneratedFile(join(dir, "folder.cir"))).toBe(false);
  });

  it("recognises every kind of file the pipeline emits by its header", () => {
    const src = readFileSync("test/fixtures/logic/xor2.logic", "utf8");
    const r = synthesize(src, "xor2.logic", { maxFanin: 8, cells: "mixed", sizing: { supplyVolts: 5 }, commandLine: "gatewright synth xor2.logic" });
    expect(r.files?.map((f) => f.name).sort()).toEqual(["xor2.bom.csv", "xor2.bom.md", "xor2.cir", "xor2.json", "xor2.report.md", "xor2.tb.cir"]);
    const dir = tmp();
    expect(writeOutputs(dir, r.files!).error).toBeUndefined();
    for (const f of r.files!) expect(isGeneratedFile(join(dir, f.name)), f.name).toBe(true);
    // So a second run over them needs no --force.
    expect(writeOutputs(dir, r.files!).error).toBeUndefined();
  });
});

describe("gatewright synth: the command's writing", () => {
  async function run(...args: string[]) {
    let out = "";
    let err = "";
    const code = await main(args, { out: { write: (s: string) => (out += s) }, err: { write: (s: string) => (err += s) }, columns: 100 });
    return { code, out, err };
  }

  it("a run interrupted after its first output file leaves the previous run's files intact", async () => {
    const dir = tmp();
    expect((await run("synth", "test/fixtures/logic/xor2.logic", "--out", dir, "--quiet")).code).toBe(0);
    const before = snapshot(dir);
    expect(Object.keys(before)).toHaveLength(6);
    // The second rename into place fails (the CLI writes through NODE_WRITE_FS).
    const realRename = NODE_WRITE_FS.renameSync;
    let renames = 0;
    NODE_WRITE_FS.renameSync = (from, to) => {
      if (from.endsWith(".tmp") && ++renames === 2) throw Object.assign(new Error("EIO: injected"), { code: "EIO" });
      realRename(from, to);
    };
    let r;
    try {
      r = await run("synth", "test/fixtures/logic/xor2.logic", "--out", dir, "--supply", "12V");
    } finally {
      NODE_WRITE_FS.renameSync = realRename;
    }
    expect(renames).toBe(2);
    expect(r.code).toBe(1);
    expect(r.err).toContain("GW8001");
    expect(r.out).not.toContain("wrote");
    expect(snapshot(dir)).toEqual(before);
    // The same run without the fault does change the files (the check above could fail).
    expect((await run("synth", "test/fixtures/logic/xor2.logic", "--out", dir, "--supply", "12V", "--quiet")).code).toBe(0);
    expect(snapshot(dir)).not.toEqual(before);
  });

  it("a run that fails on its input writes nothing and leaves earlier outputs as they were", async () => {
    const dir = tmp();
    expect((await run("synth", "test/fixtures/logic/xor2.logic", "--out", dir, "--quiet")).code).toBe(0);
    const before = snapshot(dir);
    const bad = join(tmp(), "xor2.logic");
    writeFileSync(bad, "input a, b;\noutput y;\ny = a ^ c;\n");
    const r = await run("synth", bad, "--out", dir);
    expect(r.code).toBe(1);
    expect(r.err).toContain("GW2001");
    expect(snapshot(dir)).toEqual(before);
    // A usage error likewise.
    expect((await run("synth", "test/fixtures/logic/xor2.logic", "--out", dir, "--series", "E7")).code).toBe(2);
    expect(snapshot(dir)).toEqual(before);
  });

  it("a folder in the way of one output: exit 1, GW8001, the other earlier outputs intact", async () => {
    const dir = tmp();
    expect((await run("synth", "test/fixtures/logic/xor2.logic", "--out", dir, "--quiet")).code).toBe(0);
    NODE_WRITE_FS.rmSync(join(dir, "xor2.tb.cir"), { force: true });
    mkdirSync(join(dir, "xor2.tb.cir"));
    const before = snapshot(dir);
    const r = await run("synth", "test/fixtures/logic/xor2.logic", "--out", dir, "--supply", "12V", "--force");
    expect(r.code).toBe(1);
    expect(r.err).toContain("GW8001");
    expect(r.err).toContain("xor2.tb.cir");
    expect(snapshot(dir)).toEqual(before);
  });
});
