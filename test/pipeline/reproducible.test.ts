// Reproducible outputs (issue 7): the same inputs and options give byte-identical files, run
// after run, from any working directory into any output folder, whatever the clock, time zone
// or locale says; no timestamps in the files. Designs cover both input languages, stored state
// (a cross-coupled NAND latch) and a testbench of seeded random vectors (more than 10 inputs).
// Common practice for reproducible builds (reproducible-builds.org, "Timestamps" and "Stable
// outputs"): no build dates, no dependence on the build path, stable ordering.
import { execFileSync } from "node:child_process";
import { copyFileSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { afterEach, describe, expect, it, vi } from "vitest";
import { main } from "../../src/cli/main.js";
import { rippleCarryAdder } from "../bench/designs.js";

const REPO = resolve(".");

async function run(cwd: string, ...args: string[]) {
  let out = "";
  let err = "";
  const before = process.cwd();
  process.chdir(cwd);
  try {
    const code = await main(args, { out: { write: (s: string) => (out += s) }, err: { write: (s: string) => (err += s) }, columns: 100 });
    return { code, out, err };
  } finally {
    process.chdir(before);
  }
}

function tmp(tag: string): string {
  return mkdtempSync(join(tmpdir(), `gw-repro-${tag}-`));
}

/** The files of an output folder, name → bytes. */
function filesOf(dir: string): Map<string, Buffer> {
  return new Map(readdirSync(dir).sort().map((f) => [f, readFileSync(join(dir, f))]));
}

/** A working folder with the design at `in/<name>` (the same relative path in every folder). */
function workspace(tag: string, name: string, text: string): string {
  const w = tmp(tag);
  mkdirSync(join(w, "in"));
  writeFileSync(join(w, "in", name), text);
  return w;
}

const DESIGNS: { name: string; text: () => string; extra: string[] }[] = [
  { name: "xor2.logic", text: () => readFileSync(join(REPO, "test/fixtures/logic/xor2.logic"), "utf8"), extra: [] },
  { name: "sr_latch.logic", text: () => readFileSync(join(REPO, "test/fixtures/logic/sr_latch.logic"), "utf8"), extra: [] },
  { name: "c17.v", text: () => readFileSync(join(REPO, "test/fixtures/verilog/c17.v"), "utf8"), extra: ["--supply", "12V"] },
  // 13 inputs: the testbench walks a seeded random set of vectors.
  { name: "rca6.v", text: () => rippleCarryAdder(6), extra: ["--opt", "1"] },
];

afterEach(() => {
  vi.useRealTimers();
});

describe("byte-identical regeneration", () => {
  for (const d of DESIGNS) {
    it(`${d.name}: two runs, in two working folders into two output folders, are byte-identical`, async () => {
      const a = workspace("a", d.name, d.text());
      const b = workspace("b", d.name, d.text());
      const args = ["synth", join("in", d.name), "--out", "out", "--quiet", ...d.extra];
      const ra = await run(a, ...args);
      expect(ra.code, ra.err).toBe(0);
      const rb = await run(b, ...args);
      expect(rb.code, rb.err).toBe(0);
      const fa = filesOf(join(a, "out"));
      const fb = filesOf(join(b, "out"));
      expect(fa.size).toBe(6);
      expect([...fb.keys()]).toEqual([...fa.keys()]);
      for (const [name, bytes] of fa) expect(fb.get(name)!.equals(bytes), name).toBe(true);
      // A third run over the second's files (regeneration in place) changes nothing.
      expect((await run(b, ...args)).code).toBe(0);
      for (const [name, bytes] of filesOf(join(b, "out"))) expect(bytes.equals(fa.get(name)!), `${name} regenerated`).toBe(true);
      // The outputs do depend on the design (the comparison above is not vacuous).
      if (d.name === "xor2.logic") {
        const c = workspace("c", d.name, d.text().replace(/\^/g, "&"));
        expect((await run(c, ...args)).code).toBe(0);
        expect(filesOf(join(c, "out")).get("xor2.cir")!.equals(fa.get("xor2.cir")!)).toBe(false);
      }
    });
  }

  it("the clock has no say: runs with the system time years apart are byte-identical", async () => {
    const w = workspace("clock", "sr_latch.logic", DESIGNS[1]!.text());
    vi.useFakeTimers({ toFake: ["Date"] });
    vi.setSystemTime(new Date("2001-02-03T04:05:06Z"));
    expect((await run(w, "synth", "in/sr_latch.logic", "--out", "early", "--quiet")).code).toBe(0);
    vi.setSystemTime(new Date("2037-11-12T23:59:58Z"));
    expect((await run(w, "synth", "in/sr_latch.logic", "--out", "late", "--quiet")).code).toBe(0);
    vi.useRealTimers();
    const early = filesOf(join(w, "early"));
    const late = filesOf(join(w, "late"));
    // Only the output folder named in the recorded command line differs.
    for (const [name, bytes] of early) {
      expect(late.get(name)!.toString("utf8").replaceAll("--out late", "--out early"), name).toBe(bytes.toString("utf8"));
    }
  });

  it("no timestamps: no date or time of day appears in any output", async () => {
    const w = workspace("stamp", "c17.v", DESIGNS[2]!.text());
    expect((await run(w, "synth", "in/c17.v", "--out", "out", "--quiet")).code).toBe(0);
    const now = new Date();
    const year = String(now.getUTCFullYear());
    const months = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];
    for (const [name, bytes] of filesOf(join(w, "out"))) {
      const text = bytes.toString("utf8");
      // ISO 8601 dates and times of day, RFC 2822 dates, Unix times in seconds or ms of this era.
      expect(text, name).not.toMatch(/\b(19|20)\d\d-[01]\d-[0-3]\d\b/);
      expect(text, name).not.toMatch(/\b[0-2]\d:[0-5]\d(:[0-5]\d)?\b/);
      expect(text, name).not.toMatch(new RegExp(`\\b(${months.join("|")})\\w* +\\d{1,2},? +(19|20)\\d\\d\\b`));
      expect(text, name).not.toMatch(/\b1[6-9]\d{8}(\d{3})?\b/);
      expect(text.includes(year) && /\b(date|generated on|created|timestamp)\b/i.test(text), name).toBe(false);
    }
  });

  it("different --out spellings change only the recorded command line", async () => {
    // The files' headers quote the command line (to say how to regenerate them), which holds
    // the output folder; everything else is the same, and so is the input hash in the JSON.
    const w = workspace("outs", "xor2.logic", DESIGNS[0]!.text());
    expect((await run(w, "synth", "in/xor2.logic", "--out", "first", "--quiet")).code).toBe(0);
    expect((await run(w, "synth", "in/xor2.logic", "--out", "./second/../second", "--quiet")).code).toBe(0);
    const first = filesOf(join(w, "first"));
    const second = filesOf(join(w, "second"));
    for (const [name, bytes] of first) {
      const a = bytes.toString("utf8").split("\n");
      const b = second.get(name)!.toString("utf8").split("\n");
      expect(b.length, name).toBe(a.length);
      for (let i = 0; i < a.length; i++) {
        if (a[i] !== b[i]) expect(a[i], `${name} line ${i + 1}`).toContain("gatewright synth in/xor2.logic --out first");
      }
    }
    const hash = (m: Map<string, Buffer>) => /"inputHash": "([^"]+)"/.exec(m.get("xor2.json")!.toString("utf8"))?.[1];
    expect(hash(first)).toBeDefined();
    expect(hash(second)).toBe(hash(first));
  });

  it("another process, another time zone and locale, the command run as a user would: the same bytes", async () => {
    const name = "c17.v";
    const a = workspace("proc-a", name, DESIGNS[2]!.text());
    const b = workspace("proc-b", name, DESIGNS[2]!.text());
    const args = ["synth", join("in", name), "--out", "out", "--quiet", ...DESIGNS[2]!.extra];
    expect((await run(a, ...args)).code).toBe(0);
    copyFileSync(join(a, "in", name), join(b, "in", name));
    const loader = pathToFileURL(join(REPO, "node_modules/tsx/dist/loader.mjs")).href;
    execFileSync(process.execPath, ["--import", loader, join(REPO, "src/cli/bin.ts"), ...args], {
      cwd: b,
      env: { ...process.env, TZ: "Pacific/Kiritimati", LANG: "de_DE.UTF-8", LC_ALL: "de_DE.UTF-8" },
      stdio: ["ignore", "pipe", "pipe"],
      timeout: 120_000,
    });
    const fa = filesOf(join(a, "out"));
    const fb = filesOf(join(b, "out"));
    expect([...fb.keys()]).toEqual([...fa.keys()]);
    for (const [f, bytes] of fa) expect(fb.get(f)!.equals(bytes), f).toBe(true);
  });
});
