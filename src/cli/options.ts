// Turning command-line options into the pipeline's options, with clear messages for bad ones.
// `synth` and `verify` both build their synthesis options with prepareSynthesis, so the two
// commands check the same options the same way and cannot disagree. Every check, the sizing
// ranges included, runs here before any work: a bad option is a usage error (exit 2) that
// names the option as the user wrote it.
import { appendDiagnostics, capDiagnostics, diag, hasErrors, type Diagnostic } from "../diagnostics/index.js";
import { parsePartsFile } from "../electrical/devices.js";
import { parseQuantity, type Dimension } from "../electrical/quantity.js";
import { parseSeriesName } from "../electrical/eseries.js";
import { resolveOptions } from "../electrical/options.js";
import type { SizingOptions } from "../electrical/types.js";
import type { CellChoice } from "../map/index.js";
import { languageOf } from "../pipeline/front.js";
import type { SynthesisOptions } from "../pipeline/synthesize.js";
import { optimizeOptionsFrom, type RawOptimizeArgs } from "./optimize-options.js";
import { readText } from "./write.js";
import { shownValue, wholeNumberOption } from "./values.js";

export { shownValue, wholeNumberOption };

export interface RawSizingArgs {
  supply?: string;
  "supply-tolerance"?: string;
  "temp-min"?: string;
  "temp-max"?: string;
  industrial?: boolean;
  "beta-min"?: string;
  series?: string;
  "resistor-tolerance"?: string;
  fanout?: string;
  mode?: string;
  "gate-delay"?: string;
  "path-delay"?: string;
  clock?: string;
  "wiring-cap"?: string;
  "power-max"?: string;
  "noise-margin"?: string;
  "cap-series"?: string;
}

export function sizingOptionsFrom(a: RawSizingArgs, diagnostics: Diagnostic[]): SizingOptions {
  const q = (flag: keyof RawSizingArgs, dim: Dimension): number | undefined => {
    const text = a[flag];
    if (text === undefined || typeof text === "boolean") return undefined;
    const r = parseQuantity(String(text), dim);
    if ("error" in r) {
      diagnostics.push(diag("GW6002", `--${flag} ${shownValue(text)}: ${r.error}`));
      return undefined;
    }
    return r.value;
  };
  const o: SizingOptions = { supplyVolts: q("supply", "voltage") ?? 5 };
  const set = <K extends keyof SizingOptions>(k: K, v: SizingOptions[K] | undefined) => {
    if (v !== undefined) o[k] = v;
  };
  set("supplyTolerance", q("supply-tolerance", "ratio"));
  set("tempMinC", q("temp-min", "temperature"));
  set("tempMaxC", q("temp-max", "temperature"));
  if (a.industrial) o.temperaturePreset = "industrial";
  const beta = q("beta-min", "ratio");
  set("betaMin", beta);
  if (a.series !== undefined) {
    const s = parseSeriesName(a.series);
    if (!s || !["E12", "E24", "E48", "E96"].includes(s)) diagnostics.push(diag("GW6006", `--series ${shownValue(a.series)}: not a resistor series gatewright knows`, undefined, { hint: "use E12, E24, E48 or E96 (IEC 60063)" }));
    else o.series = s as SizingOptions["series"];
  }
  set("resistorTolerance", q("resistor-tolerance", "ratio"));
  const fanout = wholeNumberOption(a.fanout, "fanout", 1, 1000, "give a whole number of loads from 1 to 1000", diagnostics);
  if (fanout !== undefined) o.fanoutOverride = fanout;
  if (a.mode !== undefined) {
    if (a.mode !== "uniform" && a.mode !== "per-gate") diagnostics.push(diag("GW6001", `--mode ${shownValue(a.mode)}: use 'uniform' (one set of values, fewest distinct parts) or 'per-gate' (each gate for its own load, least power)`));
    else o.mode = a.mode;
  }
  set("gateDelayMaxSeconds", q("gate-delay", "time"));
  set("pathDelayMaxSeconds", q("path-delay", "time"));
  set("clockHz", q("clock", "frequency"));
  set("wiringCapacitancePerLoadFarads", q("wiring-cap", "capacitance"));
  set("powerCeilingWatts", q("power-max", "power"));
  set("noiseMarginMinVolts", q("noise-margin", "voltage"));
  if (a["cap-series"] !== undefined) {
    const s = parseSeriesName(a["cap-series"]);
    if (!s || !["E6", "E12", "E24"].includes(s)) diagnostics.push(diag("GW6006", `--cap-series ${shownValue(a["cap-series"])}: not a capacitor series gatewright offers`, undefined, { hint: "use E6, E12 or E24 (ceramic capacitors are usually E6 or E12)" }));
    else o.capacitorSeries = s as SizingOptions["capacitorSeries"];
  }
  return o;
}

/** The command-line flag of each sizing option (the `about` of resolveOptions' diagnostics). */
const FLAG_OF: Partial<Record<keyof SizingOptions, keyof RawSizingArgs>> = {
  supplyVolts: "supply",
  supplyTolerance: "supply-tolerance",
  tempMinC: "temp-min",
  tempMaxC: "temp-max",
  temperaturePreset: "industrial",
  betaMin: "beta-min",
  series: "series",
  resistorTolerance: "resistor-tolerance",
  fanoutOverride: "fanout",
  mode: "mode",
  gateDelayMaxSeconds: "gate-delay",
  pathDelayMaxSeconds: "path-delay",
  clockHz: "clock",
  wiringCapacitancePerLoadFarads: "wiring-cap",
  powerCeilingWatts: "power-max",
  noiseMarginMinVolts: "noise-margin",
  capacitorSeries: "cap-series",
};

/**
 * The sizing options' range checks (src/electrical/options.ts resolveOptions, the same ones the
 * sizing applies), run before any work, each problem naming the options it is about as the
 * user wrote them: "--beta-min -3: minimum gain must be greater than zero, not -3".
 */
export function sizingRangeProblems(a: RawSizingArgs, sizing: SizingOptions): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const d of resolveOptions(sizing).diagnostics) {
    if (d.severity !== "error") continue;
    const flags = (d.about ?? []).map((f) => FLAG_OF[f as keyof SizingOptions]).filter((f): f is keyof RawSizingArgs => f !== undefined && a[f] !== undefined && a[f] !== false);
    const named = [...new Set(flags)].map((f) => (typeof a[f] === "boolean" ? `--${f}` : `--${f} ${shownValue(a[f])}`));
    const { about: _about, ...rest } = d;
    out.push(named.length ? { ...rest, message: `${named.join(", ")}: ${d.message}` } : rest);
  }
  return out;
}

/**
 * A design file's text with each lone CR (the line end of classic Mac OS) turned into LF, so
 * that comments end and lines are counted where the user sees them. CRLF stays as it is (the
 * readers take CR as white space); the length does not change, so no position moves.
 */
export function normalizeLineEnds(text: string): string {
  return text.includes("\r") ? text.replace(/\r(?!\n)/g, "\n") : text;
}

/** The options `synth` and `verify` share: the design, the logic and the sizing. */
export interface SynthesisArgs extends RawSizingArgs, RawOptimizeArgs {
  file: string;
  out?: string;
  top?: string;
  "max-fanin"?: number | string;
  cells: CellChoice;
  parts?: string;
}

export interface PreparedSynthesis {
  /** The design file's text. */
  text: string;
  options: SynthesisOptions;
}

/**
 * Reads the design file and the parts file and turns the command line into the synthesis's
 * options, every option checked before any work. Returns the diagnostics (a usage error when
 * any is an error; the design file's text is then in `sources` if it could be read) and,
 * without errors, what to synthesize.
 */
export function prepareSynthesis(args: SynthesisArgs, argv: readonly string[], sources: Map<string, string>): { prepared?: PreparedSynthesis; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  if (!languageOf(args.file)) {
    // A usage problem (the command names a file gatewright cannot read), told before reading it.
    return { diagnostics: [diag("GW6007", `cannot tell the language of '${args.file}'`, { file: args.file }, { hint: "equation files end in .logic, structural Verilog files in .v" })] };
  }
  const read = readText(args.file);
  if (read.error !== undefined) return { diagnostics: [diag("GW6004", read.error)] };
  const text = normalizeLineEnds(read.text!);
  sources.set(args.file, text);
  if (args.out !== undefined && String(args.out).trim() === "") diagnostics.push(diag("GW6001", "--out: give the folder for the outputs", undefined, { hint: "for example --out out/design" }));
  if (args.top !== undefined && String(args.top).trim() === "") diagnostics.push(diag("GW6001", "--top: give the name of the top module"));
  const sizing = sizingOptionsFrom(args, diagnostics);
  const optimize = optimizeOptionsFrom(args, diagnostics);
  if (args.parts !== undefined) {
    const p = readText(args.parts);
    if (p.error !== undefined) diagnostics.push(diag("GW6004", p.error));
    else {
      // A byte-order mark (as some editors save UTF-8) is no JSON (RFC 8259 §8.1): dropped, and
      // the positions of the messages count from after it.
      const partsText = p.text!.startsWith("\ufeff") ? p.text!.slice(1) : p.text!;
      sources.set(args.parts, partsText);
      const parsed = parsePartsFile(partsText, args.parts);
      appendDiagnostics(diagnostics, capDiagnostics(parsed.diagnostics, args.parts));
      if (parsed.value) sizing.parts = parsed.value;
    }
  }
  const maxFanin = wholeNumberOption(args["max-fanin"] ?? 8, "max-fanin", 2, 64, "give a whole number from 2 to 64", diagnostics);
  // The ranges, once every option could be read on its own.
  if (!hasErrors(diagnostics)) appendDiagnostics(diagnostics, sizingRangeProblems(args, sizing));
  if (hasErrors(diagnostics) || maxFanin === undefined) return { diagnostics };
  const options: SynthesisOptions = {
    maxFanin,
    cells: args.cells,
    cellsGiven: argv.some((a) => a === "--cells" || a.startsWith("--cells=")),
    sizing,
    opt: optimize.opt,
    costModel: optimize.costModel,
    maxFanout: optimize.maxFanout,
    wiredAnd: optimize.wiredAnd,
    commandLine: ["gatewright", ...argv].join(" "),
  };
  if (args.top !== undefined) options.top = args.top;
  return { prepared: { text, options }, diagnostics };
}

/**
 * Options given more than once (`--supply 5V --supply 12V`): the command line parser collects
 * them into a list, which no option accepts. One GW6001 for each.
 */
export function repeatedOptions(args: Record<string, unknown>, valueFlags: Iterable<string>): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const flag of valueFlags) {
    const v = args[flag];
    if (Array.isArray(v)) out.push(diag("GW6001", `--${flag} is given ${v.length} times (${v.map(shownValue).join(", ")}); give it once`));
  }
  return out;
}

/**
 * Joins an option that takes a value with a following word that is a negative number, with or
 * without a unit (`--wiring-cap -3pF`, `--temp-min -40 degC`), into one word
 * (`--wiring-cap=-3pF`), so that the command-line parser does not read the value as short
 * flags (-3, -p, -F). Words after `--` are left alone.
 */
export function joinNegativeValues(argv: readonly string[], valueFlags: ReadonlySet<string>): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    if (a === "--") {
      for (let j = i; j < argv.length; j++) out.push(argv[j]!);
      break;
    }
    const next = argv[i + 1];
    const name = a.startsWith("--") ? a.slice(2) : undefined;
    if (name !== undefined && !name.includes("=") && valueFlags.has(name) && next !== undefined && /^-(\d|\.\d)/.test(next)) {
      out.push(`${a}=${next}`);
      i++;
      continue;
    }
    out.push(a);
  }
  return out;
}
