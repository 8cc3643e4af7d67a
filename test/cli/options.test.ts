// Options and data files are checked before any work, with messages that name the option or the
// key and say what would be right, and exit status 2 (a usage error; issue 2: "0 success,
// 1 design problem, 2 usage error"). Nothing is written on a usage error.
// Sources: IEC 60063:2015 defines the series E3, E6, E12, E24, E48, E96 and E192 (gatewright
// sizes with E12 to E96); units and prefixes as in the SI Brochure (BIPM, 9th edition);
// RFC 8259 for JSON.
import { existsSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { main } from "../../src/cli/main.js";

const DESIGN = "test/fixtures/logic/xor2.logic";

async function run(...args: string[]) {
  let out = "";
  let err = "";
  const code = await main(args, { out: { write: (s: string) => (out += s) }, err: { write: (s: string) => (err += s) }, columns: 100 });
  return { code, out, err };
}

const base = mkdtempSync(join(tmpdir(), "gw-options-"));
let serial = 0;

/** Runs `synth` on a small design with extra options into a fresh folder; checks nothing was written. */
async function synthWith(...extra: string[]) {
  const out = join(base, `out${++serial}`);
  const r = await run("synth", DESIGN, "--out", out, ...extra);
  return { ...r, wrote: existsSync(out) };
}

function partsFile(text: string): string {
  const p = join(base, `parts${++serial}.json`);
  writeFileSync(p, text);
  return p;
}

describe("command-line options", () => {
  it("the unchanged command works, so the failures below are the options' doing", async () => {
    const r = await synthWith("--quiet");
    expect(r.code).toBe(0);
    expect(r.wrote).toBe(true);
  });

  it("an unknown option is named, exit 2, nothing written", async () => {
    for (const [flag, name] of [["--frobnicate", "frobnicate"], ["--supplly", "supplly"]] as const) {
      const r = await synthWith(flag, "5V");
      expect(r.code, flag).toBe(2);
      expect(r.err).toMatch(/unknown argument/i);
      expect(r.err).toContain(name);
      expect(r.err).toContain("--help");
      expect(r.wrote).toBe(false);
    }
  });

  it("a quantity with the wrong unit or no number: GW6002 naming the option and the expected kind", async () => {
    const cases: [string[], RegExp][] = [
      [["--supply", "5 furlongs"], /--supply 5 furlongs: .*expected a voltage in V/],
      [["--supply", "5 A"], /--supply 5 A: "5 A" is a current, but expected a voltage/],
      [["--supply", "twelve"], /--supply twelve: .*expected a voltage/],
      [["--gate-delay", "5 V"], /--gate-delay 5 V: .*expected a time/],
      [["--beta-min", "30 V"], /--beta-min 30 V: .*not a ratio/],
    ];
    for (const [args, message] of cases) {
      const r = await synthWith(...args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.err).toContain("error GW6002");
      expect(r.err).toMatch(message);
      expect(r.wrote).toBe(false);
    }
  });

  it("--max-fanin outside 2..64 or not whole: GW6003 with the range, exit 2", async () => {
    for (const v of ["1", "0", "65", "2.5"]) {
      const r = await synthWith("--max-fanin", v);
      expect(r.code, v).toBe(2);
      expect(r.err).toContain(`error GW6003: --max-fanin ${v}: give a whole number from 2 to 64`);
      expect(r.wrote).toBe(false);
    }
  });

  it("--fanout and --mode out of their sets: exit 2", async () => {
    const fan = await synthWith("--fanout", "0");
    expect(fan.code).toBe(2);
    expect(fan.err).toContain("GW6003: --fanout 0");
    const mode = await synthWith("--mode", "fast");
    expect(mode.code).toBe(2);
    expect(mode.err).toMatch(/GW6001: --mode fast: use 'uniform' .* or 'per-gate'/);
  });

  it("an unknown resistor series: GW6006 with the series that are known, exit 2", async () => {
    // E7 is no IEC 60063 series; E192 is one, but gatewright sizes with E12 to E96 only.
    for (const s of ["E7", "E192", "X24"]) {
      const r = await synthWith("--series", s);
      expect(r.code, s).toBe(2);
      expect(r.err).toContain(`error GW6006: --series ${s}`);
      expect(r.err).toContain("E12, E24, E48 or E96");
      expect(r.wrote).toBe(false);
    }
  });

  // Bug: range checks of the sizing options (src/electrical/options.ts resolveOptions) run
  // inside synthesize(), after the CLI has accepted the options, so their GW6003 comes back as
  // a design problem: exit 1 and "nothing written: 1 error(s)" instead of exit 2, and the
  // message does not name the option ("minimum gain must be greater than zero, not -3").
  // Reproduce: gatewright synth test/fixtures/logic/xor2.logic --beta-min -3 → exit 1.
  // Same for --supply=-5V, --supply 100V, --temp-min 90degC, --resistor-tolerance "80 %",
  // --clock "0 Hz". Flip to `it` once runSynth checks them (resolveOptions) before synthesizing.
  it.fails("a value out of range (--beta-min -3 and the sizing ranges): exit 2 naming the option", async () => {
    const cases: [string[], string][] = [
      [["--beta-min", "-3"], "--beta-min"],
      [["--beta-min=-3"], "--beta-min"],
      [["--supply=-5V"], "--supply"],
      [["--supply", "100 V"], "--supply"],
      [["--temp-min", "90 degC"], "--temp-min"],
      [["--resistor-tolerance", "80 %"], "--resistor-tolerance"],
      [["--clock", "0 Hz"], "--clock"],
    ];
    for (const [args, flag] of cases) {
      const r = await synthWith(...args);
      expect(r.err, args.join(" ")).toContain("GW6003");
      expect(r.wrote).toBe(false);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.err).toContain(flag);
    }
  });

  it("the sizing ranges are enforced today, only with the wrong exit status (see the bug above)", async () => {
    const r = await synthWith("--beta-min", "-3");
    expect(r.err).toContain("error GW6003: minimum gain must be greater than zero, not -3");
    expect(r.wrote).toBe(false);
    expect(r.code).not.toBe(0);
  });

  // Bug (message): a non-number for --max-fanin is reported as "--max-fanin NaN" (yargs turns
  // the text into NaN before runSynth sees it). Reproduce: gatewright synth x.logic --max-fanin x.
  it.fails("--max-fanin with text quotes the text", async () => {
    const r = await synthWith("--max-fanin", "x");
    expect(r.code).toBe(2);
    expect(r.err).toContain("--max-fanin x");
  });

  // Bug (message): a negative quantity with its unit glued on, given as a separate word
  // (`--wiring-cap -3pF`, `--supply -5V`), is split by yargs into short flags: "Unknown
  // arguments: 3, p, F". `--wiring-cap=-3pF` reaches the option check.
  it.fails("a negative quantity with a unit after a space is named as the option's value", async () => {
    const r = await synthWith("--wiring-cap", "-3pF");
    expect(r.code).toBe(2);
    expect(r.err).toContain("--wiring-cap");
  });
});

describe("parts files", () => {
  it("a negative resistance in a model card is named by its key path, exit 2", async () => {
    // RS (diode series resistance) and RB (base resistance): SPICE model parameters in ohms.
    for (const [text, path] of [
      [JSON.stringify({ diode: { model: { RS: -5 } } }), "diode.model.RS"],
      [JSON.stringify({ npn: { model: { RB: "-10 ohm" } } }), "npn.model.RB"],
      [JSON.stringify({ npn: { model: { RC: -1, BF: 100 } } }), "npn.model.RC"],
    ] as const) {
      const p = partsFile(text);
      const r = await synthWith("--parts", p);
      expect(r.code, path).toBe(2);
      expect(r.err).toContain(`${p}: error GW6005: parts file: ${path}: must not be negative`);
      expect(r.wrote).toBe(false);
    }
  });

  it("wrong shapes and values are named by their key path", async () => {
    const cases: [unknown, string][] = [
      [[1, 2], "(top level): must be a JSON object"],
      [{ npn: 5 }, "npn: must be an object"],
      [{ npn: { model: [] } }, "npn.model: must be an object of SPICE model parameters"],
      [{ npn: { model: { QQ: 1 } } }, "npn.model.QQ: unknown NPN model parameter"],
      [{ npn: { model: { RB: null } } }, "npn.model.RB: must be a number or a quantity string, not null"],
      [{ diode: { vForwardVolts: -0.7 } }, "diode.vForwardVolts: must be greater than zero"],
      [{ npn: { vceSatVolts: "0.2 A" } }, 'npn.vceSatVolts: "0.2 A" is a current, but expected a voltage'],
      [{ npn: { betaMin: "abc" } }, "npn.betaMin: "],
      [{ npn: { betaMin: 50, betaMax: 20 } }, "npn.betaMax: must not be below npn.betaMin"],
      [{ resistor: {} }, "resistor: unknown entry"],
    ];
    for (const [data, message] of cases) {
      const r = await synthWith("--parts", partsFile(JSON.stringify(data)));
      expect(r.code, message).toBe(2);
      expect(r.err).toContain(`GW6005: parts file: ${message}`);
      expect(r.wrote).toBe(false);
    }
  });

  it("every problem of one file is reported, not only the first", async () => {
    const r = await synthWith("--parts", partsFile(JSON.stringify({ npn: { model: { QQ: 1, RB: -2 } }, resistor: {} })));
    expect(r.code).toBe(2);
    expect(r.err).toContain("resistor: unknown entry");
    expect(r.err).toContain("npn.model.QQ");
    expect(r.err).toContain("npn.model.RB: must not be negative");
  });

  it("malformed JSON: file:line:column of the fault, the line and a caret (RFC 8259 syntax)", async () => {
    const cases: [string, string, string][] = [
      // A missing comma between members, on the second line.
      ['{\n  "npn": {"model": {"BF": 100 "IS": 1e-14}}\n}\n', ":2:31:", '  2 |   "npn": {"model": {"BF": 100 "IS": 1e-14}}'],
      // A trailing comma (allowed in JavaScript, not in JSON).
      ['{ "npn": { "betaMin": 40, }\n}', ":1:27:", '  1 | { "npn": { "betaMin": 40, }'],
      ["", ":1:1:", "  1 | "],
    ];
    for (const [text, at, line] of cases) {
      const p = partsFile(text);
      const r = await synthWith("--parts", p);
      expect(r.code, JSON.stringify(text)).toBe(2);
      expect(r.err).toContain(`${p}${at} error GW6005: parts file is not valid JSON`);
      expect(r.err).toContain(line);
      expect(r.err).toMatch(/\n\s+\|\s*\^/);
      expect(r.wrote).toBe(false);
    }
  });

  it("a parts file that cannot be read: GW6004, exit 2", async () => {
    const r = await synthWith("--parts", join(base, "no-such-parts.json"));
    expect(r.code).toBe(2);
    expect(r.err).toContain("error GW6004");
    expect(r.err).toContain("no such file");
  });
});
