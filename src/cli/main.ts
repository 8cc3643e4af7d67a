// The command-line shell: arguments → a call → printed results and an exit code.
// Exit status: 0 success, 1 a problem with the design (bad input, infeasible sizing),
// 2 a usage error (unknown option, bad option value, unreadable file).
import yargs, { type Argv } from "yargs";
import { appendDiagnostics, diag, hasErrors } from "../diagnostics/index.js";
import { synthesize } from "../pipeline/synthesize.js";
import { TOOL } from "../pipeline/tool.js";
import { printDiagnostics } from "./print.js";
import { writeOutputs } from "./write.js";
import { joinNegativeValues, prepareSynthesis, repeatedOptions, type SynthesisArgs } from "./options.js";
import { optimizeFlags } from "./optimize-options.js";
import { eng } from "../emit/format.js";
import { emitDesign, type EmitContext } from "../emit/index.js";
import { synthesisHash } from "../verify/reuse.js";
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
    .option("supply", { type: "string", requiresArg: true, describe: "supply voltage, nominal", defaultDescription: "5 V", group: "Electrical:" })
    .option("supply-tolerance", { type: "string", requiresArg: true, describe: "supply tolerance", defaultDescription: "5 %", group: "Electrical:" })
    .option("temp-min", { type: "string", requiresArg: true, describe: "lowest ambient temperature", defaultDescription: "0 degC", group: "Electrical:" })
    .option("temp-max", { type: "string", requiresArg: true, describe: "highest ambient temperature", defaultDescription: "70 degC", group: "Electrical:" })
    .option("industrial", { type: "boolean", describe: "industrial temperature range, -40 to 85 degC", group: "Electrical:" })
    .option("beta-min", { type: "string", requiresArg: true, describe: "minimum transistor current gain at 25 degC", defaultDescription: "30", group: "Electrical:" })
    .option("series", { type: "string", requiresArg: true, describe: "resistor series (IEC 60063): E12, E24, E48, E96", defaultDescription: "E24", group: "Electrical:" })
    .option("resistor-tolerance", { type: "string", requiresArg: true, describe: "resistor tolerance", defaultDescription: "the series' usual one", group: "Electrical:" })
    .option("fanout", { type: "string", requiresArg: true, describe: "size every output for this many loads", defaultDescription: "the largest in the design", group: "Electrical:" })
    .option("mode", { type: "string", requiresArg: true, describe: "uniform: one set of values (fewest distinct parts); per-gate: each gate for its load (least power)", defaultDescription: "uniform", group: "Electrical:" })
    .option("gate-delay", { type: "string", requiresArg: true, describe: "largest propagation delay of one gate, e.g. 200ns", group: "Speed:" })
    .option("path-delay", { type: "string", requiresArg: true, describe: "largest delay through the longest path, e.g. 1us", group: "Speed:" })
    .option("clock", { type: "string", requiresArg: true, describe: "clock frequency the design must meet, e.g. 100kHz", group: "Speed:" })
    .option("wiring-cap", { type: "string", requiresArg: true, describe: "wiring capacitance per load", defaultDescription: "3 pF", group: "Speed:" })
    .option("power-max", { type: "string", requiresArg: true, describe: "ceiling on each gate's worst-case static power", group: "Electrical:" })
    .option("noise-margin", { type: "string", requiresArg: true, describe: "noise margin every input must keep, low and high, at the worst corner", defaultDescription: "0.4 V", group: "Electrical:" })
    .option("cap-series", { type: "string", requiresArg: true, describe: "series of the fast cells' speed-up capacitors: E6, E12, E24", defaultDescription: "E6", group: "Speed:" })
    .option("parts", { type: "string", requiresArg: true, describe: "parts file (JSON): your diode and transistor models and part numbers", group: "Electrical:" });
}

function logicFlags<T>(y: Argv<T>) {
  return optimizeFlags(y)
    .option("top", { type: "string", requiresArg: true, describe: "top module of a Verilog file", defaultDescription: "the one no other module instantiates", group: "Logic:" })
    .option("max-fanin", { type: "string", requiresArg: true, describe: "most inputs on one cell", default: 8, group: "Logic:" })
    .option("cells", { choices: ["mixed", "nand", "nor"] as const, requiresArg: true, describe: "cell families to map onto", default: "mixed" as const, group: "Logic:" });
}

interface SynthArgs extends SynthesisArgs {
  out: string;
  force?: boolean;
  quiet?: boolean;
  characterize?: boolean;
}

export async function runSynth(args: SynthArgs, argv: string[], io: Io): Promise<number> {
  const sources = new Map<string, string>();
  const { prepared, diagnostics } = prepareSynthesis(args, argv, sources);
  if (!prepared) {
    printDiagnostics(diagnostics, sources, io.err);
    return EXIT.usage;
  }
  const { text, options: opts } = prepared;
  const result = synthesize(text, args.file, opts);
  appendDiagnostics(diagnostics, result.diagnostics);
  const shown = args.quiet ? diagnostics.filter((d) => d.severity === "error") : diagnostics;
  printDiagnostics(shown, sources, io.err);
  if (!result.files || hasErrors(diagnostics)) {
    const internal = diagnostics.some((d) => d.code.startsWith("GW9"));
    if (!args.quiet) io.err.write(`${internal ? "internal error" : "nothing written"}: ${diagnostics.filter((d) => d.severity === "error").length} error(s)\n`);
    return EXIT.design;
  }
  // --characterize: the sized cells measured in ngspice; the files emitted again with the figures.
  let characterizedText: string | undefined;
  let characterizedContext: EmitContext | undefined;
  if (args.characterize) {
    const c = await characterizeSynthesis(result, io);
    printDiagnostics(args.quiet ? c.diagnostics.filter((d) => d.severity === "error") : c.diagnostics, sources, io.err);
    if (!c.files || hasErrors(c.diagnostics)) {
      if (!args.quiet) io.err.write(`nothing written: ${c.diagnostics.filter((d) => d.severity === "error").length} error(s) in the characterization${c.summary ? ` (${c.summary})` : ""}\n`);
      return EXIT.design;
    }
    result.files = c.files;
    characterizedContext = c.emitContext;
    characterizedText = c.summary;
  }
  // The hash of source and options lets `verify` reuse these files as they are.
  // The files are emitted again with it (nothing was made yet: each file's text is made as it is
  // written), so the JSON is written once, hash included.
  const hashed = emitDesign({ ...(characterizedContext ?? result.emitContext!), inputHash: synthesisHash(TOOL.version, text, opts as unknown as Record<string, unknown>) });
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
        `worst-case ${eng(d.totals.staticPowerWatts, "W")} at ${eng(opts.sizing.supplyVolts, "V")}\n`,
    );
    if (characterizedText) io.out.write(`  ${characterizedText}\n`);
    for (const f of w.written) io.out.write(`  wrote ${f}\n`);
  }
  return EXIT.ok;
}

/** Every option that takes a value, in both commands (a test checks this list against the help). */
export const VALUE_FLAGS: ReadonlySet<string> = new Set([
  // sizingFlags
  "supply", "supply-tolerance", "temp-min", "temp-max", "beta-min", "series", "resistor-tolerance", "fanout", "mode",
  "gate-delay", "path-delay", "clock", "wiring-cap", "power-max", "noise-margin", "cap-series", "parts",
  // logicFlags and optimizeFlags
  "top", "max-fanin", "cells", "opt", "cost", "cost-weights", "max-fanout",
  // synth and verify
  "out", "simulator", "ngspice", "max-steps",
]);

/** A command's options, checked once the parser has read them: repeated options are refused. */
function usageProblems(a: Record<string, unknown>, sources: Map<string, string>, io: Io): boolean {
  const repeated = repeatedOptions(a, VALUE_FLAGS);
  if (repeated.length === 0) return false;
  printDiagnostics(repeated, sources, io.err);
  return true;
}

export async function main(rawArgv: string[], io: Io = processIo): Promise<number> {
  let pending: (() => number | Promise<number>) | undefined;
  let usageError: string | undefined;
  // `--wiring-cap -3pF` would be read as the short flags -3, -p, -F: joined to one word first.
  const argv = joinNegativeValues(rawArgv, VALUE_FLAGS);
  const parser = yargs(argv)
    .scriptName("gatewright")
    .usage("$0 <command> [options]\n\nTurns logic equations (.logic) or structural Verilog (.v) into sized diode-transistor logic: an ngspice netlist with testbench, a parts list and a report.")
    .command(
      "synth <file>",
      "map, size and emit a design",
      (y) =>
        sizingFlags(logicFlags(y))
          .positional("file", { type: "string", describe: "a .logic equation file or a .v structural Verilog file", demandOption: true })
          .option("out", { alias: "o", type: "string", requiresArg: true, describe: "folder for the outputs", default: "out" })
          .option("force", { type: "boolean", describe: "overwrite files gatewright did not write" })
          .option("quiet", { alias: "q", type: "boolean", describe: "print errors only" })
          .option("characterize", { type: "boolean", describe: "measure every sized cell in ngspice (embedded) at the sizing's corners with its worst-case load, put the figures beside the analytic ones in the report and JSON, and fail if they contradict the sizing (about 10-20 s)" })
          .example("$0 synth examples/pump.logic --out out/pump", "build the pump controller at 5 V")
          .example("$0 synth examples/pump.logic --out out/pump12 --supply 12V", "the same design for a 12 V plant supply")
          .example("$0 synth examples/pump.logic --out out/pump --characterize", "also measure each sized cell in ngspice at the corners"),
      (a) => {
        // Run only after parsing has finished without a usage error.
        pending = () => (usageProblems(a, new Map(), io) ? EXIT.usage : runSynth(a as unknown as SynthArgs, rawArgv, io));
      },
    )
    .command(
      "verify <file>",
      "synthesize (or reuse the outputs), simulate in ngspice at the nominal point and the corners, compare with the logic, measure and plot",
      (y) => verifyFlags(sizingFlags(logicFlags(y))),
      (a) => {
        pending = () => (usageProblems(a, new Map(), io) ? EXIT.usage : runVerify(a as unknown as VerifyArgs, rawArgv, io));
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
      // The parser's own validation errors (YError: a missing value, a bad choice) are usage
      // errors; anything else is a bug.
      if (err && err.name !== "YError") throw err;
      usageError = msg ?? err?.message;
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

