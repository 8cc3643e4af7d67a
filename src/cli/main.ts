// The command-line shell: arguments → a call → printed results and an exit code.
// Exit status: 0 success, 1 a problem with the design (bad input, infeasible sizing),
// 2 a usage error (unknown option, bad option value, unreadable file).
import yargs, { type Argv } from "yargs";
import { diag, hasErrors, type Diagnostic } from "../diagnostics/index.js";
import { parsePartsFile } from "../electrical/devices.js";
import { synthesize } from "../pipeline/synthesize.js";
import { TOOL } from "../pipeline/tool.js";
import { printDiagnostics } from "./print.js";
import { readText, writeOutputs } from "./write.js";
import { sizingOptionsFrom, type RawSizingArgs } from "./options.js";
import { optimizeFlags, optimizeOptionsFrom, type RawOptimizeArgs } from "./optimize-options.js";
import { eng } from "../emit/format.js";
import { fileNamesOf } from "../emit/index.js";
import { filesWithInputHash, synthesisHash } from "../verify/reuse.js";
import { runVerify, verifyFlags, type VerifyArgs } from "./verify.js";
import { characterizeSynthesis } from "./characterize.js";

export const EXIT = { ok: 0, design: 1, usage: 2 } as const;

/** Where the shell prints: the process's streams, or a test's. */
export interface Io {
  out: { write(s: string): unknown };
  err: { write(s: string): unknown };
  columns?: number;
}

const processIo: Io = { out: process.stdout, err: process.stderr, ...(process.stdout.columns ? { columns: process.stdout.columns } : {}) };

function sizingFlags<T>(y: Argv<T>) {
  return y
    .option("supply", { type: "string", describe: "supply voltage, nominal", default: undefined, defaultDescription: "5 V", group: "Electrical:" })
    .option("supply-tolerance", { type: "string", describe: "supply tolerance", defaultDescription: "5 %", group: "Electrical:" })
    .option("temp-min", { type: "string", describe: "lowest ambient temperature", defaultDescription: "0 degC", group: "Electrical:" })
    .option("temp-max", { type: "string", describe: "highest ambient temperature", defaultDescription: "70 degC", group: "Electrical:" })
    .option("industrial", { type: "boolean", describe: "industrial temperature range, -40 to 85 degC", group: "Electrical:" })
    .option("beta-min", { type: "string", describe: "minimum transistor current gain at 25 degC", defaultDescription: "30", group: "Electrical:" })
    .option("series", { type: "string", describe: "resistor series (IEC 60063): E12, E24, E48, E96", defaultDescription: "E24", group: "Electrical:" })
    .option("resistor-tolerance", { type: "string", describe: "resistor tolerance", defaultDescription: "the series' usual one", group: "Electrical:" })
    .option("fanout", { type: "string", describe: "size every output for this many loads", defaultDescription: "the largest in the design", group: "Electrical:" })
    .option("mode", { type: "string", describe: "uniform: one set of values (fewest distinct parts); per-gate: each gate for its load (least power)", defaultDescription: "uniform", group: "Electrical:" })
    .option("gate-delay", { type: "string", describe: "largest propagation delay of one gate, e.g. 200ns", group: "Speed:" })
    .option("path-delay", { type: "string", describe: "largest delay through the longest path, e.g. 1us", group: "Speed:" })
    .option("clock", { type: "string", describe: "clock frequency the design must meet, e.g. 100kHz", group: "Speed:" })
    .option("wiring-cap", { type: "string", describe: "wiring capacitance per load", defaultDescription: "3 pF", group: "Speed:" })
    .option("power-max", { type: "string", describe: "ceiling on each gate's worst-case static power", group: "Electrical:" })
    .option("parts", { type: "string", describe: "parts file (JSON): your diode and transistor models and part numbers", group: "Electrical:" });
}

function logicFlags<T>(y: Argv<T>) {
  return optimizeFlags(y)
    .option("top", { type: "string", describe: "top module of a Verilog file", defaultDescription: "the one no other module instantiates", group: "Logic:" })
    .option("max-fanin", { type: "number", describe: "most inputs on one cell", default: 8, group: "Logic:" })
    .option("cells", { choices: ["mixed", "nand", "nor"] as const, describe: "cell families to map onto", default: "mixed" as const, group: "Logic:" });
}

interface SynthArgs extends RawSizingArgs, RawOptimizeArgs {
  file: string;
  out: string;
  top?: string;
  "max-fanin": number;
  cells: "mixed" | "nand" | "nor";
  parts?: string;
  force?: boolean;
  quiet?: boolean;
  characterize?: boolean;
}

export async function runSynth(args: SynthArgs, argv: string[], io: Io): Promise<number> {
  const diagnostics: Diagnostic[] = [];
  const sources = new Map<string, string>();
  const read = readText(args.file);
  if (read.error !== undefined) {
    printDiagnostics([diag("GW6004", read.error)], sources, io.err);
    return EXIT.usage;
  }
  const text = read.text!;
  sources.set(args.file, text);
  const sizing = sizingOptionsFrom(args, diagnostics);
  const optimize = optimizeOptionsFrom(args, diagnostics);
  if (args.parts !== undefined) {
    const p = readText(args.parts);
    if (p.error !== undefined) diagnostics.push(diag("GW6004", p.error));
    else {
      sources.set(args.parts, p.text!);
      const parsed = parsePartsFile(p.text!, args.parts);
      diagnostics.push(...parsed.diagnostics);
      if (parsed.value) sizing.parts = parsed.value;
    }
  }
  if (!Number.isInteger(args["max-fanin"]) || args["max-fanin"] < 2 || args["max-fanin"] > 64) {
    diagnostics.push(diag("GW6003", `--max-fanin ${args["max-fanin"]}: give a whole number from 2 to 64`));
  }
  if (hasErrors(diagnostics)) {
    printDiagnostics(diagnostics, sources, io.err);
    return EXIT.usage;
  }
  const opts: Parameters<typeof synthesize>[2] = {
    maxFanin: args["max-fanin"],
    cells: args.cells,
    cellsGiven: argv.some((a) => a === "--cells" || a.startsWith("--cells=")),
    sizing,
    opt: optimize.opt,
    costModel: optimize.costModel,
    maxFanout: optimize.maxFanout,
    wiredAnd: optimize.wiredAnd,
    commandLine: ["gatewright", ...argv].join(" "),
  };
  if (args.top !== undefined) opts.top = args.top;
  const result = synthesize(text, args.file, opts);
  diagnostics.push(...result.diagnostics);
  const shown = args.quiet ? diagnostics.filter((d) => d.severity === "error") : diagnostics;
  printDiagnostics(shown, sources, io.err);
  if (!result.files || hasErrors(diagnostics)) {
    const internal = diagnostics.some((d) => d.code.startsWith("GW9"));
    if (!args.quiet) io.err.write(`${internal ? "internal error" : "nothing written"}: ${diagnostics.filter((d) => d.severity === "error").length} error(s)\n`);
    return EXIT.design;
  }
  // --characterize: the sized cells measured in ngspice; the files emitted again with the figures.
  let characterizedText: string | undefined;
  if (args.characterize) {
    const c = await characterizeSynthesis(result, io);
    printDiagnostics(args.quiet ? c.diagnostics.filter((d) => d.severity === "error") : c.diagnostics, sources, io.err);
    if (!c.files || hasErrors(c.diagnostics)) {
      if (!args.quiet) io.err.write(`nothing written: ${c.diagnostics.filter((d) => d.severity === "error").length} error(s) in the characterization${c.summary ? ` (${c.summary})` : ""}\n`);
      return EXIT.design;
    }
    result.files = c.files;
    characterizedText = c.summary;
  }
  // The hash of source and options lets `verify` reuse these files as they are.
  const hashed = filesWithInputHash(result.files, fileNamesOf(result.design!.netlist.name).json, synthesisHash(TOOL.version, text, opts as unknown as Record<string, unknown>));
  const w = writeOutputs(args.out, hashed, { force: !!args.force });
  if (w.error) {
    printDiagnostics([diag(w.error.code, w.error.message)], sources, io.err);
    return EXIT.design;
  }
  if (!args.quiet) {
    const d = result.design!;
    const nl = result.netlist!;
    io.out.write(
      `${nl.name}: ${nl.cells.length} cells, ${d.totals.transistors} transistors, ${d.totals.diodes} diodes, ${d.totals.resistors} resistors; ` +
        `worst-case ${eng(d.totals.staticPowerWatts, "W")} at ${eng(sizing.supplyVolts, "V")}\n`,
    );
    if (characterizedText) io.out.write(`  ${characterizedText}\n`);
    for (const f of w.written) io.out.write(`  wrote ${f}\n`);
  }
  return EXIT.ok;
}

export async function main(argv: string[], io: Io = processIo): Promise<number> {
  let pending: (() => number | Promise<number>) | undefined;
  let usageError: string | undefined;
  const parser = yargs(argv)
    .scriptName("gatewright")
    .usage("$0 <command> [options]\n\nTurns logic equations (.logic) or structural Verilog (.v) into sized diode-transistor logic: an ngspice netlist with testbench, a parts list and a report.")
    .command(
      "synth <file>",
      "map, size and emit a design",
      (y) =>
        sizingFlags(logicFlags(y))
          .positional("file", { type: "string", describe: "a .logic equation file or a .v structural Verilog file", demandOption: true })
          .option("out", { alias: "o", type: "string", describe: "folder for the outputs", default: "out" })
          .option("force", { type: "boolean", describe: "overwrite files gatewright did not write" })
          .option("quiet", { alias: "q", type: "boolean", describe: "print errors only" })
          .option("characterize", { type: "boolean", describe: "measure every sized cell in ngspice (embedded) at the sizing's corners with its worst-case load, put the figures beside the analytic ones in the report and JSON, and fail if they contradict the sizing (about 10-20 s)" })
          .example("$0 synth examples/pump.logic --out out/pump", "build the pump controller at 5 V")
          .example("$0 synth examples/pump.logic --out out/pump12 --supply 12V", "the same design for a 12 V plant supply")
          .example("$0 synth examples/pump.logic --out out/pump --characterize", "also measure each sized cell in ngspice at the corners"),
      (a) => {
        // Run only after parsing has finished without a usage error.
        pending = () => runSynth(a as unknown as SynthArgs, argv, io);
      },
    )
    .command(
      "verify <file>",
      "synthesize (or reuse the outputs), simulate in ngspice at the nominal point and the corners, compare with the logic, measure and plot",
      (y) => verifyFlags(sizingFlags(logicFlags(y))),
      (a) => {
        pending = () => runVerify(a as unknown as VerifyArgs, argv, io);
      },
    )
    .demandCommand(1, "say what to do: gatewright synth FILE or gatewright verify FILE (see --help)")
    .strict()
    .recommendCommands()
    .version(TOOL.version)
    .help()
    .alias("h", "help")
    .wrap(Math.min(100, io.columns ?? 100))
    .fail((msg, err) => {
      if (err) throw err;
      usageError = msg;
    })
    .exitProcess(false);
  let output = "";
  try {
    // With a callback, yargs hands back its help and version text instead of printing it.
    await new Promise<void>((resolve, reject) => {
      try {
        parser.parse(argv, {}, (err, _parsed, text) => {
          output = text ?? "";
          if (err && usageError === undefined) usageError = err.message;
          resolve();
        });
      } catch (e) {
        reject(e);
      }
    });
  } catch (e) {
    io.err.write(`gatewright: internal error: ${(e as Error).stack ?? e}\n`);
    return EXIT.design;
  }
  if (usageError !== undefined) {
    io.err.write(`gatewright: ${usageError}\nRun 'gatewright --help' for the commands and options.\n`);
    return EXIT.usage;
  }
  if (output) io.out.write(output.endsWith("\n") ? output : output + "\n");
  return pending ? await pending() : EXIT.ok;
}

