// Options and data files are checked before any work, with messages that name the option or the
// key and say what would be right, and exit status 2 (a usage error; issue 2: "0 success,
// 1 design problem, 2 usage error"). Nothing is written on a usage error.
// Sources: IEC 60063:2015 defines the series E3, E6, E12, E24, E48, E96 and E192 (gatewright
// sizes with E12 to E96); units and prefixes as in the SI Brochure (BIPM, 9th edition);
// RFC 8259 for JSON.
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { main, VALUE_FLAGS } from "../../src/cli/main.js";

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
  it("--noise-margin and --cap-series reach the sizing and the report says they were given", async () => {
    const r = await synthWith("--noise-margin", "0.3V", "--cap-series", "E12");
    expect(r.code).toBe(0);
    const report = readFileSync(join(base, `out${serial}`, "xor2.report.md"), "utf8");
    expect(report).toMatch(/\| Required noise margin, low and high \| 300 mV \| given \|/);
    expect(report).toMatch(/low-state noise margin \| [\d.]+ mV \| ≥ 300 mV/);
  });

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

  // Regression: the sizing options' range checks (src/electrical/options.ts resolveOptions)
  // used to run inside synthesize(), after the CLI had accepted the options: exit 1, "nothing
  // written: 1 error(s)", and a message that did not name the option. Now the CLI runs them
  // before any work (src/cli/options.ts prepareSynthesis), naming the option as it was typed.
  it("a value out of range (--beta-min -3 and the sizing ranges): exit 2 naming the option", async () => {
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
      expect(r.err, "checked before synthesis").not.toContain("nothing written");
    }
  });

  it("range messages quote the option as typed, then the range that was broken", async () => {
    const cases: [string[], string][] = [
      [["--beta-min", "-3"], "error GW6003: --beta-min -3: minimum gain must be greater than zero, not -3"],
      // 0..70 °C is the default (commercial) range, so a lowest temperature of 90 °C is no range.
      [["--temp-min", "90 degC"], "error GW6003: --temp-min 90 degC: temperature range 90..70 °C is not a range"],
      [["--industrial", "--temp-max=-50degC"], "error GW6003: --temp-max -50degC, --industrial: temperature range -40..-50 °C is not a range"],
      [["--supply-tolerance", "-5 %"], "error GW6003: --supply-tolerance -5 %: supply tolerance must be between 0 and 50 %, not -0.05"],
      [["--supply", "100 V"], "error GW6003: --supply 100 V: supply 100 V is above what gatewright sizes (60 V)"],
      [["--wiring-cap", "-3pF"], "error GW6003: --wiring-cap -3pF: wiring capacitance must not be negative"],
      [["--noise-margin", "-0.3V"], "error GW6003: --noise-margin -0.3V: noise margin must not be negative"],
      [["--cap-series", "E96"], "error GW6006: --cap-series E96: not a capacitor series gatewright offers"],
    ];
    for (const [args, message] of cases) {
      const r = await synthWith(...args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.err).toContain(message);
    }
  });

  // Regression (message): a non-number for --max-fanin was reported as "--max-fanin NaN" (yargs
  // turned the text into NaN). Whole-number options now arrive as text and are read strictly.
  it("--max-fanin with text quotes the text", async () => {
    const r = await synthWith("--max-fanin", "x");
    expect(r.code).toBe(2);
    expect(r.err).toContain("--max-fanin x");
  });

  it("whole-number options take decimal digits only and quote what was typed", async () => {
    const cases: [string[], string][] = [
      [["--max-fanin", "8 cells"], "GW6003: --max-fanin 8 cells: give a whole number from 2 to 64"],
      [["--max-fanin="], "GW6003: --max-fanin : give a whole number from 2 to 64"],
      [["--opt", "x"], "GW6003: --opt x: give 0, 1 or 2"],
      [["--max-fanout", "two"], "GW6003: --max-fanout two: give a whole number from 2 to 1000, or 0 for no limit"],
      [["--fanout", "0x10"], "GW6003: --fanout 0x10: give a whole number of loads from 1 to 1000"],
      [["--fanout", "1e3"], "GW6003: --fanout 1e3: give a whole number of loads from 1 to 1000"],
    ];
    for (const [args, message] of cases) {
      const r = await synthWith(...args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.err).toContain(message);
      expect(r.wrote).toBe(false);
    }
  });

  // Regression (message): a negative quantity with its unit glued on, given as a separate word
  // (`--wiring-cap -3pF`, `--supply -5V`), was split by yargs into short flags: "Unknown
  // arguments: 3, p, F". The shell now joins such a word to its option first.
  it("a negative quantity with a unit after a space is named as the option's value", async () => {
    const r = await synthWith("--wiring-cap", "-3pF");
    expect(r.code).toBe(2);
    expect(r.err).toContain("--wiring-cap");
  });

  it("a negative temperature as a separate word is read: -40degC is the usual industrial low (common practice)", async () => {
    const r = await synthWith("--temp-min", "-40degC", "--quiet");
    expect(r.err).toBe("");
    expect(r.code).toBe(0);
    const spaced = await synthWith("--temp-min", "-40 degC", "--quiet");
    expect(spaced.code).toBe(0);
  });

  it("an option without its value is a usage error, not the default", async () => {
    for (const args of [["--supply"], ["--supply", "--quiet"], ["--max-fanin"], ["--cells"]]) {
      const r = await synthWith(...args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.err).toMatch(/not enough arguments following: (supply|max-fanin|cells)/i);
      expect(r.wrote).toBe(false);
    }
    // `--out` as the last word: nothing may go to the default folder instead.
    const r = await run("synth", DESIGN, "--out");
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/not enough arguments following: out/i);
    const empty = await run("synth", DESIGN, "--out=");
    expect(empty.code).toBe(2);
    expect(empty.err).toContain("GW6001: --out: give the folder for the outputs");
  });

  it("an option given twice is refused, naming both values", async () => {
    const r = await synthWith("--supply", "5V", "--supply", "12V");
    expect(r.code).toBe(2);
    expect(r.err).toContain("error GW6001: --supply is given 2 times (5V, 12V); give it once");
    expect(r.wrote).toBe(false);
  });

  it("a huge or control-character value is refused with a short message", async () => {
    const r = await synthWith("--supply", `5${"0".repeat(100_000)} V`);
    expect(r.code).toBe(2);
    expect(r.err).toContain("GW6002: --supply 5000");
    expect(r.err).toContain("(100,003 characters): too long for a quantity (at most 100 characters)");
    expect(r.err.length).toBeLessThan(400);
    const ctl = await synthWith("--mode", "fast\u0000\u001b[2J");
    expect(ctl.code).toBe(2);
    // NUL and ESC (the start of a terminal control sequence) are shown as "?".
    expect(ctl.err).toContain("--mode fast??[2J:");
  });

  it("every option that takes a value is in the shell's list of them (so a negative value is joined to it)", async () => {
    // The list is kept by hand in src/cli/main.ts; the help shows each option with its type.
    for (const cmd of ["synth", "verify"]) {
      const help = (await run(cmd, "--help")).out;
      const options = [...help.matchAll(/^\s+(?:-\w, )?--([\w-]+)\s[\s\S]*?\[(string|number|boolean|choices:)/gm)];
      expect(options.length, cmd).toBeGreaterThan(20);
      for (const [, name, type] of options) {
        if (type === "boolean") expect(VALUE_FLAGS.has(name!), `${cmd} --${name}`).toBe(false);
        else expect(VALUE_FLAGS.has(name!), `${cmd} --${name}`).toBe(true);
      }
    }
  });
});

describe("design files as editors save them", () => {
  it("a file of no known language is a usage error (GW6007, exit 2), told before it is read", async () => {
    const r = await run("synth", join(base, "no-such-design.txt"), "--out", join(base, `out${++serial}`));
    expect(r.code).toBe(2);
    expect(r.err).toContain("error GW6007: cannot tell the language of");
    expect(r.err).not.toContain("GW6004");
  });

  it("CR-only line ends (classic Mac OS) are read as line ends: the design builds, errors at their line", async () => {
    const lf = "input a, b; # two inputs\noutput y;\ny = a & !b;\n";
    const p = join(base, `cr${++serial}.logic`);
    writeFileSync(p, lf.replace(/\n/g, "\r"));
    const ok = await run("synth", p, "--out", join(base, `out${++serial}`), "--quiet");
    expect(ok.err).toBe("");
    expect(ok.code).toBe(0);
    const bad = join(base, `cr${++serial}.logic`);
    writeFileSync(bad, lf.replace("!b", "!bb").replace(/\n/g, "\r"));
    const r = await run("synth", bad, "--out", join(base, `out${++serial}`));
    expect(r.code).toBe(1);
    // 'bb' starts at the tenth character of the third line ("y = a & !bb;").
    expect(r.err).toContain(`${bad}:3:10: error GW2001`);
  });
});

describe("gatewright verify: the same option checks as synth, before any simulation", () => {
  async function verifyWith(...extra: string[]) {
    const out = join(base, `verify${++serial}`);
    const r = await run("verify", DESIGN, "--out", out, ...extra);
    return { ...r, wrote: existsSync(out) };
  }

  it("range, number, negative-value, repeated and parts-file problems: exit 2, named, nothing written", async () => {
    const cases: [string[], string][] = [
      [["--beta-min", "-3"], "error GW6003: --beta-min -3: minimum gain must be greater than zero, not -3"],
      [["--clock", "0 Hz"], "error GW6003: --clock 0 Hz: clock frequency must be greater than zero, not 0"],
      [["--max-fanin", "x"], "error GW6003: --max-fanin x: give a whole number from 2 to 64"],
      [["--max-steps", "1e3"], "error GW6003: --max-steps 1e3: give a whole number of steps from 2 to 1000000"],
      [["--wiring-cap", "-3pF"], "error GW6003: --wiring-cap -3pF: wiring capacitance must not be negative"],
      [["--supply", "5V", "--supply", "12V"], "error GW6001: --supply is given 2 times (5V, 12V); give it once"],
      [["--parts", partsFile(JSON.stringify({ npn: { model: { RB: -2 } } }))], "GW6005: parts file: npn.model.RB: must not be negative"],
      // Checked before the simulator is looked for: no GW7003 for a missing system ngspice.
      [["--simulator", "system", "--ngspice", join(base, "no-such-ngspice"), "--opt", "3"], "error GW6003: --opt 3: give 0, 1 or 2"],
    ];
    for (const [args, message] of cases) {
      const r = await verifyWith(...args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.err).toContain(message);
      expect(r.err).not.toContain("GW7003");
      expect(r.wrote).toBe(false);
    }
  });

  it("a missing value is a usage error", async () => {
    const r = await verifyWith("--max-steps");
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/not enough arguments following: max-steps/i);
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
