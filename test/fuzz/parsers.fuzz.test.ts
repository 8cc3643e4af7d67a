// Fuzzing both input languages and the whole pipeline with fast-check (issue 7, "Robustness").
//
// Inputs: the shipped examples and test fixtures, mutated (characters replaced by any
// character including control characters, lone surrogates and non-ASCII letters; tokens
// deleted, duplicated, swapped or replaced; pieces of other files spliced in; truncation),
// token soup of each language, binary junk, huge identifiers, nesting beyond the 2,000-level
// limit and 1 MB lines. Every case runs in-process; a hang shows as the test's timeout.
//
// What every case must satisfy (issue 2, "Errors"; DESIGN.md, "Diagnostics"):
//   - the reader returns (no exception escapes), and no internal error (GW9xxx) is reported;
//   - every diagnostic has a code from the catalogue, the catalogue's severity, a message;
//   - every error has the file and an in-range position (0 <= start, start + length <= text
//     length), and so has each related note that points into the file; the printer can show it;
//   - without errors there is a value; the front end (parse, state elements, logic graph,
//     state analysis) does not throw on what the reader accepted;
//   - synthesize() end to end: no exception and no GW9xxx, and never both error diagnostics
//     and files.
//
// Size: CI-sized by default (about 3,000 cases, well under a minute). The full run is
//   GATEWRIGHT_FUZZ_RUNS=100000 npx vitest run --config test/vitest.config.ts test/fuzz
// (or `npm run fuzz`); GATEWRIGHT_FUZZ_SEED=<n> picks another fixed seed. A failure prints
// fast-check's seed and path, and the shrunk input, to replay it.
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CATALOGUE, formatDiagnostic, hasErrors, type Diagnostic } from "../../src/diagnostics/index.js";
import { MAX_NESTING as EQUATION_NESTING, parseEquations } from "../../src/parse/equations.js";
import { MAX_NESTING as VERILOG_NESTING, parseVerilog } from "../../src/parse/verilog.js";
import { MAX_HIERARCHY_DEPTH } from "../../src/parse/verilog-flatten.js";
import { normalizeLineEnds } from "../../src/cli/options.js";
import { readDesign } from "../../src/pipeline/front.js";
import { synthesize } from "../../src/pipeline/synthesize.js";

// ---------------------------------------------------------------------------------------------
// Size of the run

const TOTAL = Math.max(100, Number(process.env.GATEWRIGHT_FUZZ_RUNS ?? 3000));
const SEED = Number(process.env.GATEWRIGHT_FUZZ_SEED ?? 20_260_107);
/** Cases for one property: its share of the total. */
const runs = (share: number, least = 3) => Math.max(least, Math.round(TOTAL * share));
/** A test's time limit: generous per case, as the machine is shared. */
const timeout = (cases: number, msPerCase: number) => 60_000 + cases * msPerCase;
const assertOpts = (numRuns: number, salt: number) => ({ numRuns, seed: SEED + salt, endOnFailure: true });
/** Lets the event loop run between cases, so the test runner's worker stays responsive during a
 *  long run (every case is still synchronous and in-process). */
const breathe = () => new Promise<void>((resolve) => setImmediate(resolve));
/** A property whose check runs after a turn of the event loop. */
function prop<Ts extends [unknown, ...unknown[]]>(...args: [...{ [K in keyof Ts]: fc.Arbitrary<Ts[K]> }, (...v: Ts) => void]) {
  const check = args.pop() as (...v: Ts) => void;
  const arbs = args as unknown as { [K in keyof Ts]: fc.Arbitrary<Ts[K]> };
  return fc.asyncProperty(...arbs, async (...v: Ts) => {
    await breathe();
    check(...v);
  });
}

// ---------------------------------------------------------------------------------------------
// Seeds: every equation file and every Verilog file shipped with the project

function filesIn(dir: string, ext: string): { name: string; text: string }[] {
  try {
    return readdirSync(dir)
      .filter((f) => f.endsWith(ext))
      .sort()
      .map((f) => ({ name: f, text: readFileSync(join(dir, f), "utf8") }));
  } catch {
    return [];
  }
}

const LOGIC_SEEDS = [...filesIn("examples", ".logic"), ...filesIn("test/fixtures/logic", ".logic"), ...filesIn("test/sequential/fixtures", ".logic")];
const VERILOG_SEEDS = [...filesIn("examples", ".v"), ...filesIn("test/fixtures/verilog", ".v")];
/** Small seeds for the end-to-end runs (each synthesis costs tenths of a second). */
const SMALL_SEEDS = [
  ...LOGIC_SEEDS.filter((s) => s.text.length < 400).map((s) => ({ ...s, file: `${s.name}` })),
  ...VERILOG_SEEDS.filter((s) => ["c17.v", "voter.v", "mux4.v"].includes(s.name)).map((s) => ({ ...s, file: s.name })),
];

// ---------------------------------------------------------------------------------------------
// The checks

type Lang = "equations" | "verilog";

function read(lang: Lang, text: string, file: string) {
  return lang === "equations" ? parseEquations(text, file) : parseVerilog(text, file);
}

/** Errors about the file as a whole ("the file defines no module", "no inputs and no
 *  outputs"): they name the file and may have no position. */
const WHOLE_FILE_CODES = new Set(["GW2008", "GW2013"]);

/** Checks one diagnostic list against the rules above; returns the problems found. */
function diagnosticProblems(ds: readonly Diagnostic[], text: string, file: string): string[] {
  const problems: string[] = [];
  const inRange = (start: unknown, length: unknown) =>
    Number.isInteger(start) && Number.isInteger(length) && (start as number) >= 0 && (length as number) >= 0 && (start as number) + (length as number) <= text.length;
  for (const d of ds) {
    const entry = (CATALOGUE as Record<string, { severity: string }>)[d.code];
    const show = `${d.code} "${String(d.message).slice(0, 120)}"`;
    if (!entry) problems.push(`unknown code ${show}`);
    else if (d.severity !== entry.severity && d.severity !== "warning" && d.severity !== "note") problems.push(`severity ${d.severity} of ${show}`);
    if (d.code.startsWith("GW9")) problems.push(`internal error ${show}`);
    if (typeof d.message !== "string" || d.message.length === 0) problems.push(`empty message ${d.code}`);
    if (d.severity === "error") {
      if (d.file !== file) problems.push(`error without the file: ${show}`);
      const wholeFile = WHOLE_FILE_CODES.has(d.code) && d.start === undefined && d.length === undefined;
      if (!wholeFile && !inRange(d.start, d.length)) problems.push(`error position ${d.start}+${d.length} outside 0..${text.length}: ${show}`);
    }
    for (const r of d.related ?? []) {
      if (r.file === file && r.start !== undefined && !inRange(r.start, r.length ?? 0)) problems.push(`related position ${r.start} outside the text: ${show}`);
    }
  }
  return problems;
}

/** Parses and checks; returns problems (empty when the case passes). */
function checkReader(lang: Lang, text: string, file: string): string[] {
  let res;
  try {
    res = read(lang, text, file);
  } catch (e) {
    return [`the ${lang} reader threw: ${(e as Error).stack?.split("\n").slice(0, 4).join(" | ")}`];
  }
  if (!res || !Array.isArray(res.diagnostics)) return ["no diagnostics array"];
  const problems = diagnosticProblems(res.diagnostics, text, file);
  if (!hasErrors(res.diagnostics) && !res.value) problems.push("no errors and no value");
  try {
    const sources = (f: string) => (f === file ? text : undefined);
    for (const d of res.diagnostics.slice(0, 60)) formatDiagnostic(d, sources);
  } catch (e) {
    problems.push(`printing a diagnostic threw: ${(e as Error).message}`);
  }
  if (problems.length === 0 && res.value && !hasErrors(res.diagnostics)) {
    // The rest of the front end on what the reader accepted.
    try {
      const front = readDesign(text, file);
      problems.push(...diagnosticProblems(front.diagnostics, text, file));
    } catch (e) {
      problems.push(`the front end threw: ${(e as Error).stack?.split("\n").slice(0, 4).join(" | ")}`);
    }
  }
  return problems;
}

function expectClean(lang: Lang, text: string, file: string): void {
  const problems = checkReader(lang, text, file);
  if (problems.length) throw new Error(`${problems.join("\n")}\ninput (${text.length} chars): ${JSON.stringify(text.slice(0, 400))}`);
}

// ---------------------------------------------------------------------------------------------
// Generators

/** Characters a mutation may put in: printable ASCII, control characters, non-ASCII letters,
 *  the summation and product signs of the equation language, a BOM, lone surrogates. */
const ODD_CHARS = ["\u0000", "\u0001", "\u0007", "\b", "\t", "\n", "\r", "\u000b", "\f", "\u001b", "\u007f", "\u00a0", "é", "ß", "Σ", "∑", "Π", "∏", "€", "\u200b", "\u2028", "\ufeff", "\ud800", "\udfff", "😀", "'", "`", "\\", '"', "$"];
const anyChar = fc.oneof(
  { weight: 4, arbitrary: fc.integer({ min: 0x20, max: 0x7e }).map((c) => String.fromCharCode(c)) },
  { weight: 2, arbitrary: fc.constantFrom(...ODD_CHARS) },
  { weight: 1, arbitrary: fc.integer({ min: 0, max: 0xffff }).map((c) => String.fromCharCode(c)) },
);

const EQ_VOCAB = ["input", "output", "init", "oscillator", "table", "dff", "dlatch", "sum", "prod", "m", "M", "d", "dc", "Σ", "Π",
  "a", "b", "q", "qn", "y", "t", "0", "1", "2", "0-3", "=", ";", ",", ":", "(", ")", "{", "}", "!", "~", "'", "&", "*", "^", "|", "+", "-",
  "#", "//", "/*", "*/", "\n", " "];
const V_VOCAB = ["module", "endmodule", "input", "output", "inout", "wire", "reg", "assign", "and", "nand", "or", "nor", "xor", "xnor", "not", "buf",
  "always", "begin", "end", "parameter", "supply0", "a", "b", "y", "u1", "m", "[3:0]", "[", "]", ":", "0", "1", "1'b0", "1'b1", "4'hz", "'bx",
  "(", ")", ".", ",", ";", "=", "~", "!", "&", "|", "^", "~^", "?", "{", "}", "#", "`define", "$display", "\\esc ", "\"str\"", "//", "/*", "*/", "\n", " "];

/** Cuts text into tokens of a rough kind (names, numbers, spaces, single characters). */
function tokens(text: string): string[] {
  return text.match(/\s+|[A-Za-z_][\w.$]*|\d+|[^\sA-Za-z_\d]/g) ?? [];
}

type Mutation =
  | { op: "char"; at: number; ch: string }
  | { op: "insert"; at: number; ch: string }
  | { op: "delete-char"; at: number }
  | { op: "delete-token"; at: number }
  | { op: "duplicate-token"; at: number; times: number }
  | { op: "swap-tokens"; at: number; with: number }
  | { op: "replace-token"; at: number; word: string }
  | { op: "splice"; at: number; from: number; start: number; len: number }
  | { op: "truncate"; at: number };

function mutation(vocab: string[]): fc.Arbitrary<Mutation> {
  const at = fc.nat();
  return fc.oneof(
    fc.record({ op: fc.constant("char" as const), at, ch: anyChar }),
    fc.record({ op: fc.constant("insert" as const), at, ch: anyChar }),
    fc.record({ op: fc.constant("delete-char" as const), at }),
    fc.record({ op: fc.constant("delete-token" as const), at }),
    fc.record({ op: fc.constant("duplicate-token" as const), at, times: fc.integer({ min: 1, max: 4 }) }),
    fc.record({ op: fc.constant("swap-tokens" as const), at, with: fc.nat() }),
    fc.record({ op: fc.constant("replace-token" as const), at, word: fc.constantFrom(...vocab) }),
    fc.record({ op: fc.constant("splice" as const), at, from: fc.nat(), start: fc.nat(), len: fc.integer({ min: 1, max: 200 }) }),
    fc.record({ op: fc.constant("truncate" as const), at }),
  );
}

function applyMutation(text: string, m: Mutation, donors: readonly string[]): string {
  const pos = (n: number, len: number) => (len === 0 ? 0 : n % (len + 1));
  switch (m.op) {
    case "char": {
      if (text.length === 0) return m.ch;
      const i = m.at % text.length;
      return text.slice(0, i) + m.ch + text.slice(i + 1);
    }
    case "insert": {
      const i = pos(m.at, text.length);
      return text.slice(0, i) + m.ch + text.slice(i);
    }
    case "delete-char": {
      if (text.length === 0) return text;
      const i = m.at % text.length;
      return text.slice(0, i) + text.slice(i + 1);
    }
    case "truncate":
      return text.slice(0, pos(m.at, text.length));
    case "splice": {
      const donor = donors[m.from % donors.length] ?? "";
      const s = pos(m.start, donor.length);
      const i = pos(m.at, text.length);
      return text.slice(0, i) + donor.slice(s, s + m.len) + text.slice(i);
    }
    default: {
      const t = tokens(text);
      if (t.length === 0) return text;
      const i = m.at % t.length;
      if (m.op === "delete-token") t.splice(i, 1);
      else if (m.op === "duplicate-token") t.splice(i, 0, ...Array<string>(m.times).fill(t[i]!));
      else if (m.op === "swap-tokens") {
        const j = m.with % t.length;
        [t[i], t[j]] = [t[j]!, t[i]!];
      } else if (m.op === "replace-token") t[i] = m.word;
      return t.join("");
    }
  }
}

/** A seed file with one to eight mutations applied. */
function mutated(seeds: readonly { name: string; text: string }[], vocab: string[], donors: readonly string[], most = 8) {
  return fc
    .record({ seed: fc.constantFrom(...seeds), mutations: fc.array(mutation(vocab), { minLength: 1, maxLength: most }) })
    .map(({ seed, mutations }) => ({ name: seed.name, text: mutations.reduce((t, m) => applyMutation(t, m, donors), seed.text), mutations }));
}

/** Token soup: words of a language joined with spaces or nothing. */
function soup(vocab: string[]) {
  return fc.array(fc.oneof({ weight: 6, arbitrary: fc.constantFrom(...vocab) }, { weight: 1, arbitrary: anyChar }), { maxLength: 80 }).chain((words) =>
    fc.constantFrom(" ", "", "\n").map((sep) => words.join(sep)),
  );
}

/** Bytes as a text editor would hand them over: UTF-8 decoded (with U+FFFD for bad sequences)
 *  or Latin-1. */
const junk = fc.tuple(fc.uint8Array({ maxLength: 600 }), fc.boolean()).map(([bytes, utf8]) => Buffer.from(bytes).toString(utf8 ? "utf8" : "latin1"));

const ALL_TEXTS = [...LOGIC_SEEDS, ...VERILOG_SEEDS].map((s) => s.text);

// ---------------------------------------------------------------------------------------------
// The properties

describe("fuzzing the equation reader (*.logic)", () => {
  it("has seeds to mutate", () => {
    expect(LOGIC_SEEDS.length).toBeGreaterThanOrEqual(5);
    for (const s of LOGIC_SEEDS) expectClean("equations", s.text, s.name);
  });

  const nMut = runs(0.30);
  it(`mutated examples and fixtures (${nMut} cases)`, async () => {
    await fc.assert(prop(mutated(LOGIC_SEEDS, EQ_VOCAB, ALL_TEXTS), (c) => expectClean("equations", c.text, c.name)), assertOpts(nMut, 1));
  }, timeout(nMut, 100));

  const nSoup = runs(0.10);
  it(`token soup (${nSoup} cases)`, async () => {
    await fc.assert(prop(soup(EQ_VOCAB), (t) => expectClean("equations", t, "soup.logic")), assertOpts(nSoup, 2));
  }, timeout(nSoup, 50));

  const nJunk = runs(0.05);
  it(`binary junk (${nJunk} cases)`, async () => {
    await fc.assert(prop(junk, (t) => expectClean("equations", t, "junk.logic")), assertOpts(nJunk, 3));
  }, timeout(nJunk, 50));
});

describe("fuzzing the structural Verilog reader (*.v)", () => {
  it("has seeds to mutate", () => {
    expect(VERILOG_SEEDS.length).toBeGreaterThanOrEqual(3);
    for (const s of VERILOG_SEEDS) expectClean("verilog", s.text, s.name);
  });

  const nMut = runs(0.30);
  it(`mutated examples and fixtures (${nMut} cases)`, async () => {
    await fc.assert(prop(mutated(VERILOG_SEEDS, V_VOCAB, ALL_TEXTS), (c) => expectClean("verilog", c.text, c.name)), assertOpts(nMut, 11));
  }, timeout(nMut, 100));

  const nSoup = runs(0.10);
  it(`token soup (${nSoup} cases)`, async () => {
    await fc.assert(prop(soup(V_VOCAB), (t) => expectClean("verilog", t, "soup.v")), assertOpts(nSoup, 12));
  }, timeout(nSoup, 50));

  const nJunk = runs(0.05);
  it(`binary junk (${nJunk} cases)`, async () => {
    await fc.assert(prop(junk, (t) => expectClean("verilog", t, "junk.v")), assertOpts(nJunk, 13));
  }, timeout(nJunk, 50));

  const nCross = runs(0.05);
  it(`each language's files read as the other (${nCross} cases)`, async () => {
    const both = [...LOGIC_SEEDS.map((s) => ({ ...s, lang: "verilog" as const })), ...VERILOG_SEEDS.map((s) => ({ ...s, lang: "equations" as const }))];
    await fc.assert(
      prop(fc.constantFrom(...both), fc.array(mutation([...EQ_VOCAB, ...V_VOCAB]), { maxLength: 3 }), (s, ms) => {
        const text = ms.reduce((t, m) => applyMutation(t, m, ALL_TEXTS), s.text);
        expectClean(s.lang, text, s.lang === "verilog" ? "cross.v" : "cross.logic");
      }),
      assertOpts(nCross, 14),
    );
  }, timeout(nCross, 100));
});

// ---------------------------------------------------------------------------------------------
// Hostile inputs: huge identifiers, deep nesting, 1 MB lines

/** Builds an equation file or a Verilog module around one expression. */
const skeleton = {
  equations: (expr: string, decl = "a, b") => `input ${decl};\noutput y;\ny = ${expr};\n`,
  verilog: (expr: string, decl = "a, b") => `module hostile(${decl}, y);\n  input ${decl};\n  output y;\n  assign y = ${expr};\nendmodule\n`,
};

const nestingKinds = {
  equations: [
    (n: number) => `${"(".repeat(n)}a${")".repeat(n)}`,
    (n: number) => `${"!".repeat(n)}a`,
    (n: number) => `${"~".repeat(n)}a`,
    (n: number) => `a${"'".repeat(n)}`,
    (n: number) => `${"(a & ".repeat(n)}b${")".repeat(n)}`,
    (n: number) => `${"!(".repeat(n)}a${")".repeat(n)}`,
    (n: number) => `${"(".repeat(n)}a${")'".repeat(n)}`,
    // Unbalanced: opened and never closed, or closed too often.
    (n: number) => `${"(".repeat(n)}a`,
    (n: number) => `a${")".repeat(n)}`,
  ],
  verilog: [
    (n: number) => `${"(".repeat(n)}a${")".repeat(n)}`,
    (n: number) => `${"~".repeat(n)}a`,
    (n: number) => `${"!".repeat(n)}a`,
    (n: number) => `${"(a & ".repeat(n)}b${")".repeat(n)}`,
    (n: number) => `${"~(".repeat(n)}a${")".repeat(n)}`,
    (n: number) => `${"{".repeat(n)}a${"}".repeat(n)}`,
    (n: number) => `${"(".repeat(n)}a`,
    (n: number) => `a${")".repeat(n)}`,
  ],
};

describe("hostile inputs", () => {
  for (const lang of ["equations", "verilog"] as const) {
    const limit = lang === "equations" ? EQUATION_NESTING : VERILOG_NESTING;
    const file = lang === "equations" ? "deep.logic" : "deep.v";

    it(`${lang}: nesting at and beyond the ${limit}-level limit is GW1006 at a position, never a stack overflow`, () => {
      expect(limit).toBe(2000);
      for (const [k, make] of nestingKinds[lang].entries()) {
        for (const n of [limit - 1, limit + 1, 3 * limit, 50_000]) {
          const text = skeleton[lang](make(n));
          expectClean(lang, text, file);
          const res = read(lang, text, file);
          // Balanced parentheses or NOT runs just under the limit are read (kinds 0-3); far
          // beyond it every kind is rejected with GW1006 (or, unbalanced, a syntax error).
          if (n >= 3 * limit && k < 4) expect(res.diagnostics.some((d) => d.code === "GW1006"), `kind ${k}, ${n} levels`).toBe(true);
          if (n === limit - 1 && k < 2) expect(hasErrors(res.diagnostics), `kind ${k}, ${n} levels`).toBe(false);
        }
      }
    }, 120_000);

    const nNest = runs(0.004, 6);
    it(`${lang}: random deep nesting, ${nNest} cases`, async () => {
      const arb = fc.record({ k: fc.nat({ max: nestingKinds[lang].length - 1 }), n: fc.integer({ min: 1500, max: 30_000 }), seed: fc.constantFrom(...(lang === "equations" ? LOGIC_SEEDS : VERILOG_SEEDS)), at: fc.nat() });
      await fc.assert(
        prop(arb, ({ k, n, seed, at }) => {
          // The deep expression alone, and spliced into a real file.
          const deep = nestingKinds[lang][k]!(n);
          expectClean(lang, skeleton[lang](deep), file);
          const i = at % (seed.text.length + 1);
          expectClean(lang, seed.text.slice(0, i) + deep + seed.text.slice(i), file);
        }),
        assertOpts(nNest, 21 + (lang === "verilog" ? 1 : 0)),
      );
    }, timeout(nNest, 2000));

    const nHuge = runs(0.004, 6);
    it(`${lang}: huge identifiers, ${nHuge} cases`, async () => {
      const seeds = lang === "equations" ? LOGIC_SEEDS : VERILOG_SEEDS;
      const arb = fc.record({ seed: fc.constantFrom(...seeds), pick: fc.nat(), len: fc.integer({ min: 1000, max: 1_000_000 }), ch: fc.constantFrom("a", "Z", "_", "x9") });
      await fc.assert(
        prop(arb, ({ seed, pick, len, ch }) => {
          // Rename one of the seed's names everywhere to a name of `len` characters.
          const names = [...new Set(seed.text.match(/\b[A-Za-z_]\w*\b/g) ?? [])];
          const old = names[pick % names.length]!;
          const huge = ("q" + ch.repeat(Math.ceil(len / ch.length))).slice(0, len);
          const text = seed.text.replace(new RegExp(`\\b${old}\\b`, "g"), huge);
          expectClean(lang, text, seed.name);
        }),
        assertOpts(nHuge, 31 + (lang === "verilog" ? 1 : 0)),
      );
    }, timeout(nHuge, 3000));

    const nLine = runs(0.002, 4);
    it(`${lang}: 1 MB lines, ${nLine} cases`, async () => {
      const MB = 1 << 20;
      const lines = lang === "equations"
        ? [
            () => `input a, b;\noutput y;\n# ${"x".repeat(MB)}\ny = a & b;\n`,
            () => skeleton.equations(`a${" & b".repeat(MB / 4)}`),
            () => skeleton.equations(`a${" | b ^ a & b'".repeat(MB / 14)}`),
            // Every input used (a flood of unused-input warnings is a bug of its own, below).
            () => {
              const names = Array.from({ length: MB / 8 }, (_, i) => `i${i}`);
              return `input ${names.join(", ")};\noutput y;\ny = ${names.join(" ^ ")};\n`;
            },
            // Statements on one line, each used (a flood of diagnostics is the bug below).
            () => {
              const n = Math.floor(MB / 12);
              return `input a;\noutput y;\nt0 = a; ${Array.from({ length: n - 1 }, (_, i) => `t${i + 1} = t${i};`).join(" ")} y = t${n - 1};\n`;
            },
            () => `input a;\noutput y;\ny = a;\n/* ${"*".repeat(MB)}`,
            () => `${"§".repeat(MB)}\n`,
            () => `input a;\noutput y;\n${"t = !a ".repeat(MB / 8)}`,
          ]
        : [
            () => `module m(a, y); input a; output y; // ${"x".repeat(MB)}\n not (y, a);\nendmodule\n`,
            () => skeleton.verilog(`a${" & b".repeat(MB / 4)}`),
            () => `module m(a, b, y); input a, b; output y; and (y${", a, b".repeat(MB / 6)}); endmodule\n`,
            () => `module m(a, y); input a; output y; ${"not (y, a); ".repeat(MB / 12)}endmodule\n`,
            () => `module m(${Array.from({ length: MB / 8 }, (_, i) => `p${i}`).join(", ")}); endmodule\n`,
            () => `module m(a, y); input a; output y; /* ${"*".repeat(MB)}`,
            () => `${"§".repeat(MB)}\n`,
            () => `module m(a, y); input a; output y; ${"wire ".repeat(MB / 5)}`,
          ];
      const arb = fc.record({ k: fc.nat({ max: lines.length - 1 }), cut: fc.option(fc.nat(), { nil: undefined }) });
      await fc.assert(
        prop(arb, ({ k, cut }) => {
          const text = lines[k]!();
          expectClean(lang, cut === undefined ? text : text.slice(0, cut % text.length), lang === "equations" ? "long.logic" : "long.v");
        }),
        assertOpts(nLine, 41 + (lang === "verilog" ? 1 : 0)),
      );
    }, timeout(nLine, 6000));
  }

  it("equations: a chain of 20,000 named signals (a deep graph without any nesting) reads", async () => {
    await breathe();
    const n = 20_000;
    const body = Array.from({ length: n }, (_, i) => `t${i} = !${i ? `t${i - 1}` : "a"};`).join("\n");
    expectClean("equations", `input a;\noutput y;\n${body}\ny = t${n - 1};\n`, "chain.logic");
  }, 120_000);

  it("verilog: a chain of 20,000 gates and a gate of 20,000 inputs read", async () => {
    await breathe();
    const n = 20_000;
    const wires = Array.from({ length: n }, (_, i) => `w${i}`);
    const chain = `module chain(a, y);\n  input a;\n  output y;\n  wire ${wires.join(", ")};\n  buf (w0, a);\n${wires.slice(1).map((w, i) => `  not (${w}, w${i});`).join("\n")}\n  buf (y, w${n - 1});\nendmodule\n`;
    expectClean("verilog", chain, "chain.v");
    expectClean("verilog", `module wide(a, b, y); input a, b; output y; nand (y${", a, b".repeat(n / 2)}); endmodule\n`, "wide.v");
  }, 120_000);

  // Regression (was a stack overflow): `diagnostics.push(...list)` in src/pipeline spread one
  // argument per diagnostic and threw "RangeError: Maximum call stack size exceeded" above
  // about 125,000 of them: one GW2006 warning per unused input of
  // `input i0, i1, ..., i131071; output y; y = i0;` (1 MB, .logic or .v), or one GW2002 error
  // per extra driver of `y = a; ` written 150,000 times, as buildLogicGraph capped no errors.
  // Now stages' diagnostics are appended without spreading and cut to the first 50 errors and
  // the first 50 warnings of each code, with one GW2034 note counting the rest
  // (src/diagnostics/limit.ts).
  // The long cases below are async and let the event loop turn between their parts, so the
  // test runner's worker answers its runner while they work.
  it("both languages: 131,072 unused inputs give warnings, not a stack overflow", async () => {
    const names = Array.from({ length: 131_072 }, (_, i) => `i${i}`).join(", ");
    const cases = [
      { text: `input ${names};\noutput y;\ny = i0;\n`, file: "unused.logic", lang: "equations" as const },
      { text: `module unused(${names}, y);\n  input ${names};\n  output y;\n  buf (y, i0);\nendmodule\n`, file: "unused.v", lang: "verilog" as const },
    ];
    for (const c of cases) {
      await breathe();
      expectClean(c.lang, c.text, c.file);
      await breathe();
      const front = readDesign(c.text, c.file);
      expect(hasErrors(front.diagnostics), c.file).toBe(false);
      expect(front.diagnostics.filter((d) => d.code === "GW2006")).toHaveLength(50);
      const rest = front.diagnostics.filter((d) => d.code === "GW2034");
      expect(rest).toHaveLength(1);
      // 131,072 inputs, i0 used: 131,071 warnings, 50 shown.
      expect(rest[0]!.message).toContain("131,021 more GW2006 warnings");
    }
  }, 120_000);

  it("equations: 150,000 drivers of one signal on a 1 MB line give capped errors, not a stack overflow", async () => {
    await breathe();
    const text = `input a;\noutput y;\n${"y = a; ".repeat(150_000)}\n`;
    expectClean("equations", text, "drivers.logic");
    await breathe();
    const front = readDesign(text, "drivers.logic");
    // The first assignment drives y; each of the other 149,999 is a second driver.
    expect(front.diagnostics.filter((d) => d.code === "GW2002")).toHaveLength(50);
    expect(front.diagnostics.find((d) => d.code === "GW2034")?.message).toContain("149,949 more errors not shown");
    expect(front.graph).toBeUndefined();
  }, 120_000);

  // Regression (was "JavaScript heap out of memory"): each level's names are prefixed with the
  // instance path when the top module is flattened, so the total length of the names grows
  // with the square of the depth: 8,000 levels (a 574 KB file) made about 387 million
  // characters of names and 0.9 GB; 100,000 levels (7 MB) ended the process. Now the depth is
  // limited to MAX_HIERARCHY_DEPTH levels (GW2035 at the instance that passes it) and the
  // names' total length to MAX_FLAT_NAME_CHARS (GW2022), both computed before flattening
  // (src/parse/verilog-flatten.ts).
  const chainOfModules = (n: number, instanceName = "u") =>
    Array.from({ length: n }, (_, i) =>
      i < n - 1 ? `module m${i}(a, y); input a; output y; m${i + 1} ${instanceName}(.a(a), .y(y)); endmodule` : `module m${i}(a, y); input a; output y; not (y, a); endmodule`,
    ).join("\n");

  it("verilog: a module hierarchy 20,000 levels deep is rejected or read in bounded memory", async () => {
    expect(MAX_HIERARCHY_DEPTH).toBe(2000);
    await breathe();
    const text = chainOfModules(20_000);
    expectClean("verilog", text, "hier.v");
    await breathe();
    const res = parseVerilog(text, "hier.v");
    const deep = res.diagnostics.filter((d) => d.code === "GW2035");
    expect(deep).toHaveLength(1);
    // Module m0 is the top; the instance 'u' inside m2000 (of m2001) is level 2,001.
    const inM2000 = text.indexOf("m2001 u(") + "m2001 ".length;
    expect(deep[0]!.start).toBe(inM2000);
    expect(deep[0]!.message).toContain("instance 'u' of module 'm2001' in module 'm2000' is level 2,001");
    expect(deep[0]!.message).toContain("19,999 levels deep");
  }, 120_000);

  it("verilog: a hierarchy at the depth limit reads; one level more is GW2035", async () => {
    await breathe();
    // m0 .. m2000: 2,000 levels of instances below m0.
    const at = parseVerilog(chainOfModules(MAX_HIERARCHY_DEPTH + 1), "limit.v");
    expect(hasErrors(at.diagnostics)).toBe(false);
    expect(at.value?.wires.some((w) => w.name === `${"u.".repeat(MAX_HIERARCHY_DEPTH)}y`)).toBe(true);
    const beyond = parseVerilog(chainOfModules(MAX_HIERARCHY_DEPTH + 2), "limit.v");
    expect(beyond.diagnostics.map((d) => d.code)).toEqual(["GW2035"]);
  }, 120_000);

  it("verilog: long instance names down a deep hierarchy hit the name-length limit (GW2022), not the memory", () => {
    // 200 levels with 5,000-character instance names: a 1 MB file whose flattened names would
    // come to about 600 million characters.
    const text = chainOfModules(200, "u".repeat(5000));
    expectClean("verilog", text, "names.v");
    const res = parseVerilog(text, "names.v");
    expect(res.diagnostics.map((d) => d.code)).toEqual(["GW2022"]);
    expect(res.diagnostics[0]!.message).toMatch(/characters of hierarchical names.*more than the limit of 100,000,000/);
  }, 120_000);
});

// ---------------------------------------------------------------------------------------------
// Encodings and line ends: a byte-order mark, CRLF (DOS) and CR-only line ends, UTF-16 text

describe("encodings and line ends", () => {
  const samples = [
    { lang: "equations" as const, file: "enc.logic", text: LOGIC_SEEDS.find((s) => s.name === "pump.logic")?.text ?? LOGIC_SEEDS[0]!.text },
    { lang: "verilog" as const, file: "enc.v", text: VERILOG_SEEDS.find((s) => s.name === "c17.v")?.text ?? VERILOG_SEEDS[0]!.text },
  ];
  /** What a reader made of a file, without positions (which move with the line ends). */
  const shape = (lang: Lang, text: string, file: string) => {
    const r = read(lang, text, file);
    const v = r.value;
    return { errors: r.diagnostics.filter((d) => d.severity === "error").map((d) => d.code), inputs: v?.inputs.map((d) => d.name), outputs: v?.outputs.map((d) => d.name), assignments: v?.assignments.map((a) => a.target) };
  };

  for (const s of samples) {
    it(`${s.lang}: a byte-order mark and CRLF line ends read as the plain file does`, () => {
      const plain = shape(s.lang, s.text, s.file);
      expect(plain.errors).toEqual([]);
      for (const variant of ["\ufeff" + s.text, s.text.replace(/\n/g, "\r\n"), "\ufeff" + s.text.replace(/\n/g, "\r\n")]) {
        expectClean(s.lang, variant, s.file);
        expect(shape(s.lang, variant, s.file)).toEqual(plain);
      }
      // CR-only line ends (as classic Mac OS wrote them): the readers end comments at LF only,
      // so the shell turns each lone CR into LF when it reads a file (src/cli/options.ts);
      // here the reader must at least not fail.
      expectClean(s.lang, s.text.replace(/\n/g, "\r"), s.file);
      expect(shape(s.lang, normalizeLineEnds(s.text.replace(/\n/g, "\r")), s.file)).toEqual(plain);
    });

    it(`${s.lang}: UTF-16 text (NUL bytes when read as UTF-8) is GW1008 at the first NUL`, () => {
      const bytes = Buffer.from("\ufeff" + s.text, "utf16le");
      const text = bytes.toString("utf8");
      expectClean(s.lang, text, s.file);
      const r = read(s.lang, text, s.file);
      expect(r.diagnostics.map((d) => d.code)).toEqual(["GW1008"]);
      expect(r.diagnostics[0]!.start).toBe(text.indexOf("\u0000"));
    });
  }

  it("an error in a CRLF file is printed at its line and column", () => {
    const text = "input a, b;\r\noutput y;\r\ny = a & bb;\r\n";
    const r = parseEquations(text, "crlf.logic");
    const d = r.diagnostics.find((x) => x.severity === "error") ?? readDesign(text, "crlf.logic").diagnostics.find((x) => x.severity === "error")!;
    // 'bb' is the ninth character of the third line.
    expect(formatDiagnostic(d, () => text).split("\n")[0]).toMatch(/^crlf\.logic:3:9: error GW2001/);
  });
});

// ---------------------------------------------------------------------------------------------
// 1 MB lines through the whole pipeline

describe("synthesize() on expressions of 150,000 operands", () => {
  // Regression (was GW9001 "Maximum call stack size exceeded"): the optimizer and the logic
  // checks pushed a node's fan-ins with `stack.push(...fanins)`, one argument per operand;
  // `y = a & b & b & ...` with 262,144 operands on one 1 MB line failed in liveNodes
  // (src/optimize/builder.ts). Now every such list is appended element by element.
  const n = 150_000;
  const cases = [
    { file: "wide.logic", text: `input a, b;\noutput y;\ny = a${" & b".repeat(n)};\n` },
    { file: "wide.v", text: `module wide(a, b, y); input a, b; output y; and (y${", a, b".repeat(n / 2)}); endmodule\n` },
  ];
  for (const c of cases) {
    it(`${c.file}: files, no internal error`, async () => {
      await breathe();
      const r = synthesize(c.text, c.file, { maxFanin: 8, cells: "mixed", sizing: { supplyVolts: 5 }, commandLine: "gatewright synth wide", opt: 1 });
      expect(r.diagnostics.filter((d) => d.severity === "error").map((d) => `${d.code} ${d.message}`)).toEqual([]);
      expect(r.files?.length).toBeGreaterThan(0);
    }, 180_000);
  }
});

// ---------------------------------------------------------------------------------------------
// The whole pipeline on small mutated designs

describe("fuzzing synthesize() end to end", () => {
  const nSynth = runs(0.03, 10);
  it(`small mutated designs (${nSynth} cases): errors or files, never both, never an exception`, async () => {
    let withFiles = 0;
    await fc.assert(
      prop(fc.constantFrom(...SMALL_SEEDS), fc.array(mutation([...EQ_VOCAB, ...V_VOCAB]), { minLength: 0, maxLength: 3 }), fc.constantFrom(2, 3, 8), fc.constantFrom(0, 1, 1, 2), fc.constantFrom("mixed", "mixed", "nand", "nor"), (seed, ms, maxFanin, opt, cells) => {
        const text = ms.reduce((t, m) => applyMutation(t, m, ALL_TEXTS), seed.text);
        let r;
        try {
          r = synthesize(text, seed.file, { maxFanin, cells, sizing: { supplyVolts: 5 }, commandLine: "gatewright synth fuzz", opt });
        } catch (e) {
          throw new Error(`synthesize threw: ${(e as Error).stack}\ninput: ${JSON.stringify(text)}`);
        }
        const problems = diagnosticProblems(
          r.diagnostics.filter((d) => d.file === seed.file && d.start !== undefined),
          text,
          seed.file,
        );
        const internal = r.diagnostics.filter((d) => d.code.startsWith("GW9"));
        if (internal.length) problems.push(...internal.map((d) => `internal error ${d.code}: ${d.message}`));
        if (hasErrors(r.diagnostics) && r.files) problems.push("error diagnostics and files both");
        if (!hasErrors(r.diagnostics) && !r.files) problems.push("neither errors nor files");
        if (problems.length) throw new Error(`${problems.join("\n")}\ninput (${seed.file}): ${JSON.stringify(text)}`);
        if (r.files) withFiles++;
      }),
      assertOpts(nSynth, 51),
    );
    // The mutations leave some designs intact enough to build (otherwise this tests only errors).
    expect(withFiles).toBeGreaterThan(0);
  }, timeout(nSynth, 3000));
});
