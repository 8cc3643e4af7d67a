// Output produced in pieces (src/emit/output.ts) and written piece by piece (src/cli/write.ts).
// The references are outside the emitter: the JSON file must be exactly the text ECMAScript's
// JSON.stringify(value, null, 2) gives of the same facts (ECMA-262, JSON.stringify); the bytes
// on disk must be the UTF-8 encoding of the text (RFC 3629), as Node's own encoder gives it; the
// CSV parts list must end every line with CR LF (RFC 4180, section 2.1); and a run whose output
// cannot be made writes nothing (issue 7: a run that fails writes nothing).
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { synthesize, type Synthesis } from "../../src/pipeline/synthesize.js";
import { emitDesign, fileNamesOf } from "../../src/emit/index.js";
import { designJson, writeDesignJson } from "../../src/emit/report.js";
import { producedFile, textOf } from "../../src/emit/output.js";
import { GENERATED_MARKER, NODE_WRITE_FS, writeOutputs, type WriteFs } from "../../src/cli/write.js";
import { filesWithInputHash } from "../support/input-hash.js";
import { randomNetwork } from "../bench/designs.js";

function tmp(): string {
  return mkdtempSync(join(tmpdir(), "gw-streamed-"));
}

// A generated network large enough that every long list of the JSON (cells, nets, parts'
// designators) spans several of the writer's batches; the file name carries characters
// JSON must escape (quote, backslash) and some it must not (Ω, and 𝄞 outside the BMP).
const SOURCE_NAME = 'we"ird\\Ω𝄞.v';
let synthesized: Synthesis | undefined;
function design(): Synthesis {
  synthesized ??= synthesize(randomNetwork(300), SOURCE_NAME, { maxFanin: 8, cells: "mixed", opt: 0, sizing: { supplyVolts: 5 }, commandLine: 'gatewright synth "we\\"ird" Ω', wiredAnd: true });
  expect(synthesized.diagnostics.filter((d) => d.severity === "error").map((d) => `${d.code} ${d.message}`)).toEqual([]);
  return synthesized;
}

describe("the JSON written in pieces", () => {
  it("is JSON.stringify's text of the same facts, byte for byte", () => {
    const s = design();
    const ctx = s.emitContext!;
    expect(ctx.design.netlist.cells.length).toBeGreaterThan(300);
    const files = [{ name: "x.json", what: "facts" }];
    const pieces: string[] = [];
    writeDesignJson((p) => pieces.push(p), ctx, files);
    expect(pieces.length).toBeGreaterThan(10);
    expect(pieces.join("")).toBe(JSON.stringify(designJson(ctx, files), null, 2) + "\n");
  });

  it("reads back as the same value (JSON.parse)", () => {
    const s = design();
    const json = s.files!.find((f) => f.name.endsWith(".json"))!.content;
    const doc = JSON.parse(json) as { source: string; cells: unknown[]; nets: unknown[] };
    expect(doc.source).toBe(SOURCE_NAME);
    expect(doc.cells).toHaveLength(s.design!.netlist.cells.length);
    expect(doc.nets).toHaveLength(s.design!.netlist.nets.length);
  });
});

describe("emitted files", () => {
  it("give the same text streamed as read whole, and the CSV parts list ends every line with CR LF", () => {
    const s = design();
    // Emitted again, so the streamed text is made before `content` was ever read.
    const fresh = emitDesign(s.emitContext!);
    expect(fresh.map((f) => f.name)).toEqual(s.files!.map((f) => f.name));
    fresh.forEach((f, i) => {
      const streamed: string[] = [];
      f.writeTo!((p) => streamed.push(p));
      expect(streamed.length, f.name).toBeGreaterThan(0);
      expect(streamed.join(""), f.name).toBe(s.files![i]!.content);
    });
    const csv = s.files!.find((f) => f.name === fileNamesOf(s.design!.netlist.name).bomCsv)!.content;
    expect(csv.endsWith("\r\n")).toBe(true);
    expect(csv.replace(/\r\n/g, "")).not.toMatch(/[\r\n]/);
  });

  it("a copy made with spread syntax carries its own content only (the input hash reaches the JSON on disk)", () => {
    const s = design();
    const json = fileNamesOf(s.design!.netlist.name).json;
    const hashed = filesWithInputHash(s.files!, json, "sha256:test");
    const dir = tmp();
    const w = writeOutputs(dir, hashed);
    expect(w.error).toBeUndefined();
    expect(JSON.parse(readFileSync(join(dir, json), "utf8")).inputHash).toBe("sha256:test");
    for (const f of s.files!) if (f.name !== json) expect(readFileSync(join(dir, f.name), "utf8"), f.name).toBe(f.content);
  });
});

describe("writing a text produced in pieces", () => {
  it("writes its UTF-8 bytes, through pieces longer than the write buffer and pairs of surrogates at every offset", () => {
    const clef = "𝄞"; // two UTF-16 code units, four bytes of UTF-8
    const pieces = [`* ${GENERATED_MARKER} 0.1.0\n`, "Ω µ ±5 %\n", "a".repeat(1 << 20) + "\n"];
    // Long pieces of pairs shifted by one unit, so some slice edge of the writer falls inside a pair.
    for (let shift = 0; shift < 4; shift++) pieces.push("b".repeat(shift) + clef.repeat(100_003) + "\n");
    for (let i = 0; i < 5000; i++) pieces.push(`line ${i} ${clef}\n`);
    const text = pieces.join("");
    const dir = tmp();
    const file = producedFile("big.cir", "test", (out) => pieces.forEach((p) => out(p)));
    const w = writeOutputs(dir, [file]);
    expect(w.error).toBeUndefined();
    expect(readFileSync(join(dir, "big.cir")).equals(Buffer.from(text, "utf8"))).toBe(true);
    expect(textOf((out) => file.writeTo!(out))).toBe(text);
  });

  it("writes a pair of surrogates split between two pieces as its one UTF-8 character (RFC 3629), however the pieces fall in batches", () => {
    const clef = "𝄞"; // U+1D11E: the pair D834 DD1E, F0 9D 84 9E in UTF-8
    const pieces = [`* ${GENERATED_MARKER} 0.1.0\n`];
    // Short pieces, each ending with the first half of a pair that the next piece completes,
    // and long pieces (longer than a batch) split the same way.
    for (let i = 0; i < 3000; i++) pieces.push(`line ${i} ${clef[0]}`, `${clef[1]} end\n`);
    pieces.push("c".repeat(40_000) + clef[0], clef[1] + "d".repeat(40_000) + "\n");
    const text = pieces.join("");
    const dir = tmp();
    const w = writeOutputs(dir, [producedFile("split.cir", "test", (out) => pieces.forEach((p) => out(p)))]);
    expect(w.error).toBeUndefined();
    expect(readFileSync(join(dir, "split.cir")).equals(Buffer.from(text, "utf8"))).toBe(true);
  });

  it("a producer that fails is an internal error: nothing is written, earlier files stay, no temporary file is left", () => {
    const dir = tmp();
    const good = `* ${GENERATED_MARKER} 0.1.0\nold\n`;
    writeFileSync(join(dir, "a.cir"), good);
    const failing = producedFile("b.cir", "test", (out) => {
      out(`* ${GENERATED_MARKER} 0.1.0\n`);
      out("x".repeat(1 << 20));
      throw new Error("no view for this cell");
    });
    const w = writeOutputs(dir, [producedFile("a.cir", "test", (out) => out(`* ${GENERATED_MARKER} 0.1.0\nnew\n`)), failing]);
    expect(w.error?.code).toBe("GW9001");
    expect(w.error?.message).toContain("b.cir");
    expect(w.error?.message).toContain("no view for this cell");
    expect(w.written).toEqual([]);
    expect(readdirSync(dir)).toEqual(["a.cir"]);
    expect(readFileSync(join(dir, "a.cir"), "utf8")).toBe(good);
  });

  it("a file system that fails during a produced file is a writing error (GW8001), and changes nothing", () => {
    const dir = join(tmp(), "out");
    let calls = 0;
    const fs: WriteFs = {
      ...NODE_WRITE_FS,
      writeSync: (fd, d, o, l) => {
        if (++calls === 3) {
          const e = new Error("ENOSPC: no space left on device") as NodeJS.ErrnoException;
          e.code = "ENOSPC";
          throw e;
        }
        return NODE_WRITE_FS.writeSync(fd, d, o, l);
      },
    };
    const file = producedFile("big.cir", "test", (out) => {
      for (let i = 0; i < 40_000; i++) out(`* ${GENERATED_MARKER} line ${i} of a long file\n`);
    });
    const w = writeOutputs(dir, [file], { fs });
    expect(w.error?.code).toBe("GW8001");
    expect(w.error?.message).toContain("ENOSPC");
    expect(existsSync(dir)).toBe(false);
  });
});
