// Fuzzing the parts file reader (--parts FILE, JSON: RFC 8259) with fast-check (issue 7,
// "Robustness": options and data files are validated with clear messages, never a crash or a
// hang).
//
// Inputs: a parts file in the documented shape, mutated as text (characters replaced,
// inserted or deleted, truncation, pieces duplicated) and as data (any JSON value put at any
// key path, known or not); binary junk; nesting of arrays and objects far beyond any parts file;
// huge strings and keys.
//
// What every case must satisfy (DESIGN.md, "Diagnostics"):
//   - parsePartsFile returns (no exception escapes); no internal error (GW9xxx);
//   - every diagnostic has a catalogued code, a message, the file, and a position inside the
//     text when it has one; the printer can show it;
//   - without errors there is a value, and the sizing's option check accepts it without throwing;
//   - through the command line: exit 2 and nothing written for a bad file, the messages bounded.
//
// Size: a share of GATEWRIGHT_FUZZ_RUNS (default 3,000), as in parsers.fuzz.test.ts.
import { existsSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { main } from "../../src/cli/main.js";
import { CATALOGUE, formatDiagnostic, hasErrors, type Diagnostic } from "../../src/diagnostics/index.js";
import { parsePartsFile } from "../../src/electrical/devices.js";
import { resolveOptions } from "../../src/electrical/options.js";

const TOTAL = Math.max(100, Number(process.env.GATEWRIGHT_FUZZ_RUNS ?? 3000));
const SEED = Number(process.env.GATEWRIGHT_FUZZ_SEED ?? 20_260_107);
const runs = (share: number, least = 3) => Math.max(least, Math.round(TOTAL * share));
const opts = (numRuns: number, salt: number) => ({ numRuns, seed: SEED + salt, endOnFailure: true });

// A parts file in the documented shape (README, "Parts files"). The model parameters are the
// usual published SPICE models of a 1N4148 switching diode and a 2N2222A transistor, from
// memory; they serve only as a realistic seed to mutate, nothing is checked against them.
const SEED_PARTS = {
  diode: { partNumber: "1N4148", vForwardVolts: "0.7 V", model: { IS: 2.52e-9, N: 1.752, RS: 0.568, BV: 100, CJO: 4e-12, TT: 20e-9 } },
  npn: { partNumber: "2N2222A", betaMin: 75, betaMax: 300, vceSatVolts: "0.3 V", model: { IS: 14.34e-15, BF: 255.9, RB: "10 ohm", RC: 1, XTB: 1.5, CJE: 22e-12, TF: 411e-12 } },
};
const SEED_TEXT = JSON.stringify(SEED_PARTS, null, 2);
const FILE = "parts.json";

function problems(text: string): string[] {
  let res;
  try {
    res = parsePartsFile(text, FILE);
  } catch (e) {
    return [`parsePartsFile threw: ${(e as Error).stack?.split("\n").slice(0, 4).join(" | ")}`];
  }
  const out: string[] = [];
  const inRange = (d: Diagnostic) => d.start === undefined || (Number.isInteger(d.start) && d.start >= 0 && d.start + (d.length ?? 0) <= text.length);
  for (const d of res.diagnostics) {
    const show = `${d.code} "${String(d.message).slice(0, 100)}"`;
    if (!(d.code in CATALOGUE)) out.push(`unknown code ${show}`);
    if (d.code.startsWith("GW9")) out.push(`internal error ${show}`);
    if (!d.message) out.push(`empty message ${d.code}`);
    if (d.severity === "error" && d.file !== FILE) out.push(`error without the file: ${show}`);
    if (!inRange(d)) out.push(`position ${d.start}+${d.length} outside 0..${text.length}: ${show}`);
  }
  try {
    for (const d of res.diagnostics.slice(0, 20)) formatDiagnostic(d, (f) => (f === FILE ? text : undefined));
  } catch (e) {
    out.push(`printing threw: ${(e as Error).message}`);
  }
  if (!hasErrors(res.diagnostics)) {
    if (!res.value) out.push("no errors and no value");
    else {
      try {
        resolveOptions({ supplyVolts: 5, parts: res.value });
      } catch (e) {
        out.push(`the sizing's option check threw on an accepted parts file: ${(e as Error).message}`);
      }
    }
  }
  return out;
}

function expectClean(text: string): void {
  const p = problems(text);
  if (p.length) throw new Error(`${p.join("\n")}\ninput (${text.length} chars): ${JSON.stringify(text.slice(0, 300))}`);
}

const anyChar = fc.oneof(
  { weight: 4, arbitrary: fc.integer({ min: 0x20, max: 0x7e }).map((c) => String.fromCharCode(c)) },
  { weight: 2, arbitrary: fc.constantFrom("\u0000", "\t", "\n", "\r", "\ufeff", "\ud800", "é", "{", "}", "[", "]", '"', "\\", ":", ",", "-", "e", "1") },
  { weight: 1, arbitrary: fc.integer({ min: 0, max: 0xffff }).map((c) => String.fromCharCode(c)) },
);

type TextEdit = { op: "set" | "insert" | "delete" | "truncate" | "repeat"; at: number; ch: string; len: number; times: number };
const textEdit: fc.Arbitrary<TextEdit> = fc.record({
  op: fc.constantFrom("set", "insert", "delete", "truncate", "repeat"),
  at: fc.nat(),
  ch: anyChar,
  len: fc.integer({ min: 1, max: 40 }),
  times: fc.integer({ min: 2, max: 50 }),
});

function applyEdit(t: string, e: TextEdit): string {
  const i = t.length === 0 ? 0 : e.at % (t.length + 1);
  switch (e.op) {
    case "set":
      return t.slice(0, i) + e.ch + t.slice(i + 1);
    case "insert":
      return t.slice(0, i) + e.ch + t.slice(i);
    case "delete":
      return t.slice(0, i) + t.slice(i + e.len);
    case "truncate":
      return t.slice(0, i);
    case "repeat":
      return t.slice(0, i) + t.slice(i, i + e.len).repeat(e.times) + t.slice(i + e.len);
  }
}

/** Key paths of the seed (and a few it does not have), for data mutations. */
const PATHS = [[], ["diode"], ["npn"], ["schottky"], ["resistor"], ["diode", "model"], ["npn", "model"], ["npn", "betaMin"], ["npn", "betaMax"], ["npn", "vceSatVolts"], ["diode", "vForwardVolts"], ["npn", "model", "BF"], ["npn", "model", "RB"], ["diode", "model", "RS"], ["npn", "partNumber"], ["npn", "model", "__proto__"], ["constructor"]];

/** The seed with one JSON value put at one key path. */
function withValue(path: readonly string[], value: unknown): unknown {
  const root = JSON.parse(SEED_TEXT) as Record<string, unknown>;
  if (path.length === 0) return value;
  let node: Record<string, unknown> = root;
  for (const k of path.slice(0, -1)) {
    const next = node[k];
    if (next === null || typeof next !== "object" || Array.isArray(next)) node[k] = {};
    node = node[k] as Record<string, unknown>;
  }
  Object.defineProperty(node, path[path.length - 1]!, { value, enumerable: true, writable: true, configurable: true });
  return root;
}

const quantityText = fc.oneof(
  fc.constantFrom("5 V", "-5 V", "0.2 A", "1e999", "NaN", "Infinity", "10 kohm", "4k7", "2k2", "5 %", "", " ", "1 MHz", "-0", "0x10", "1e-400", "(((1)))", "5 V V"),
  fc.string({ maxLength: 30 }),
);
const hostileValue = fc.oneof(
  fc.json({ maxDepth: 4 }).map((s) => JSON.parse(s) as unknown),
  quantityText,
  fc.double(),
  fc.constantFrom(null, true, false, 0, -1, 1e308, -1e308, Number.MIN_VALUE, [], {}),
);

describe("fuzzing the parts file reader", () => {
  it("reads the seed without errors", () => {
    const r = parsePartsFile(SEED_TEXT, FILE);
    expect(r.diagnostics).toEqual([]);
    expect(r.value?.npn?.betaMin).toBe(75);
    expectClean(SEED_TEXT);
  });

  const nText = runs(0.03);
  it(`text mutations of a parts file (${nText} cases)`, async () => {
    await fc.assert(
      fc.property(fc.array(textEdit, { minLength: 1, maxLength: 6 }), (edits) => expectClean(edits.reduce(applyEdit, SEED_TEXT))),
      opts(nText, 101),
    );
  }, 120_000);

  const nData = runs(0.03);
  it(`any JSON value at any key path (${nData} cases)`, async () => {
    await fc.assert(
      fc.property(fc.constantFrom(...PATHS), hostileValue, (path, value) => expectClean(JSON.stringify(withValue(path, value)) ?? "null")),
      opts(nData, 102),
    );
  }, 120_000);

  const nJunk = runs(0.01);
  it(`binary junk (${nJunk} cases)`, async () => {
    await fc.assert(
      fc.property(fc.uint8Array({ maxLength: 400 }), fc.boolean(), (bytes, utf8) => expectClean(Buffer.from(bytes).toString(utf8 ? "utf8" : "latin1"))),
      opts(nJunk, 103),
    );
  }, 120_000);

  it("deep nesting, huge strings, huge keys and many keys: diagnostics, never a crash or a hang", () => {
    const deep = 100_000;
    const cases = [
      "[".repeat(deep),
      "{\"npn\":".repeat(deep),
      `{"npn":${"[".repeat(deep)}${"]".repeat(deep)}}`,
      `{"npn":{"model":{"BF":${'{"a":'.repeat(deep)}1${"}".repeat(deep)}}}}`,
      // A 1 MB quantity: the number pattern used to backtrack over it for minutes.
      JSON.stringify({ npn: { betaMin: "5".repeat(1 << 20) } }),
      JSON.stringify({ npn: { vceSatVolts: `${"(".repeat(50_000)}0.2 V${")".repeat(50_000)}` } }),
      JSON.stringify({ ["k".repeat(1 << 20)]: 1 }),
      JSON.stringify({ npn: { model: Object.fromEntries(Array.from({ length: 50_000 }, (_, i) => [`K${i}`, 1])) } }),
      `${SEED_TEXT.slice(0, -1)}${",\"npn\":{}".repeat(50_000)}}`,
    ];
    for (const text of cases) expectClean(text);
    // The long quantity is refused by its length, not read.
    const long = parsePartsFile(cases[4]!, FILE);
    expect(long.diagnostics.map((d) => d.message)).toEqual([expect.stringContaining("npn.betaMin: too long for a quantity (at most 100 characters)")]);
  }, 120_000);
});

describe("hostile parts files through the command line", () => {
  const base = mkdtempSync(join(tmpdir(), "gw-parts-fuzz-"));
  let serial = 0;
  async function synthWithParts(text: string) {
    const parts = join(base, `parts${++serial}.json`);
    writeFileSync(parts, text);
    const out = join(base, `out${serial}`);
    let err = "";
    const code = await main(["synth", "test/fixtures/logic/xor2.logic", "--out", out, "--parts", parts, "--quiet"], { out: { write: () => true }, err: { write: (s: string) => (err += s) } });
    return { code, err, wrote: existsSync(out), parts };
  }

  it("a byte-order mark before the JSON is accepted (some editors save UTF-8 with one)", async () => {
    const r = await synthWithParts(`\ufeff${SEED_TEXT}`);
    expect(r.err).toBe("");
    expect(r.code).toBe(0);
    expect(r.wrote).toBe(true);
  });

  it("50,000 unknown entries: exit 2, the first 50 errors and a count", async () => {
    const r = await synthWithParts(JSON.stringify(Object.fromEntries(Array.from({ length: 50_000 }, (_, i) => [`k${i}`, 1]))));
    expect(r.code).toBe(2);
    expect(r.wrote).toBe(false);
    expect(r.err.match(/error GW6005: parts file: k\d+: unknown entry/g)).toHaveLength(50);
    expect(r.err).toContain(`${r.parts}: note GW2034: 49,950 more errors not shown; the first 50 are`);
  });

  it("a NUL byte: the JSON error at its line and column", async () => {
    const r = await synthWithParts('{\n  "npn":\u0000{}\n}\n');
    expect(r.code).toBe(2);
    // Offset 10 (after `{`, the newline and `  "npn":`): line 2, column 9.
    expect(r.err).toContain(`${r.parts}:2:9: error GW6005: parts file is not valid JSON`);
  });
});
