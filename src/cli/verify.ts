// The `gatewright verify` command's shell: options → synthesis (or the files an earlier run
// wrote for the same source and options) → the verify stage in a simulator → files, a summary
// (or JSON) and an exit code: 0 everything passed, 1 a mismatch, a margin violation, a failed
// run or a design problem, 2 a usage problem (bad option, unreadable file, missing simulator).
import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import type { Argv } from "yargs";
import { appendDiagnostics, diag, hasErrors, type Diagnostic } from "../diagnostics/index.js";
import { emitDesign, fileNamesOf } from "../emit/index.js";
import { synthesize } from "../pipeline/synthesize.js";
import { TOOL } from "../pipeline/tool.js";
import { embeddedSimulator, simulatorMissing, systemSimulator, type Simulator } from "../simulate/engine.js";
import { bomCsvWithBypass, bomMarkdownWithBypass } from "../verify/decoupling.js";
import { storedInputHash, synthesisHash } from "../verify/reuse.js";
import { renderSummary, renderVerifyReport, verifyJson } from "../verify/summary.js";
import { verifyDesign, type VerifyProgress } from "../verify/verify.js";
import { prepareSynthesis, wholeNumberOption, type SynthesisArgs } from "./options.js";
import { printDiagnostics } from "./print.js";
import { writeOutputs } from "./write.js";

export interface VerifyArgs extends SynthesisArgs {
  out: string;
  corners?: boolean;
  simulator: "embedded" | "system";
  ngspice?: string;
  json?: boolean;
  decoupling?: boolean;
  "max-steps"?: number | string;
  plots?: boolean;
  force?: boolean;
  quiet?: boolean;
}

export interface VerifyIo {
  out: { write(s: string): unknown };
  err: { write(s: string): unknown; isTTY?: boolean };
  columns?: number;
}

/** The options of `verify` beyond the synthesis's own. */
export function verifyFlags<T>(y: Argv<T>) {
  return y
    .positional("file", { type: "string", describe: "a .logic equation file or a .v structural Verilog file", demandOption: true })
    .option("out", { alias: "o", type: "string", requiresArg: true, describe: "folder for the outputs and plots", default: "out" })
    .option("corners", { type: "boolean", describe: "also run every corner: supply min/max × temperature extremes × slow/fast transistor", group: "Verify:" })
    .option("simulator", { choices: ["embedded", "system"] as const, requiresArg: true, describe: "ngspice compiled to WebAssembly (no install), or the system ngspice in batch mode", default: "embedded" as const, group: "Verify:" })
    .option("ngspice", { type: "string", requiresArg: true, describe: "the system ngspice program", defaultDescription: "ngspice on the PATH", group: "Verify:" })
    .option("max-steps", { type: "string", requiresArg: true, describe: "most test vectors a run applies", defaultDescription: "from the design's size, so a run stays within minutes", group: "Verify:" })
    .option("decoupling", { type: "boolean", describe: "add the recommended bypass capacitors to the parts list", group: "Verify:" })
    .option("plots", { type: "boolean", describe: "write SVG plots (--no-plots to skip them)", default: true, group: "Verify:" })
    .option("json", { type: "boolean", describe: "print the results as JSON instead of the summary", group: "Verify:" })
    .option("force", { type: "boolean", describe: "overwrite files gatewright did not write" })
    .option("quiet", { alias: "q", type: "boolean", describe: "print errors and the verdict only" })
    .example("$0 verify examples/pump.logic --out out/pump", "simulate the pump controller at the nominal point")
    .example("$0 verify examples/pump.logic --out out/pump --corners --simulator system", "every corner, in the installed ngspice");
}

/** A one-line progress bar on a terminal; nothing at all elsewhere. */
export class ProgressBar {
  private shown = false;
  private readonly started = Date.now();
  constructor(
    private readonly stream: { write(s: string): unknown; isTTY?: boolean },
    private readonly columns = 80,
  ) {}

  get active(): boolean {
    return this.stream.isTTY === true;
  }

  update(p: VerifyProgress): void {
    if (!this.active) return;
    const width = 24;
    const filled = p.total > 0 ? Math.round((width * p.done) / p.total) : 0;
    const secs = Math.round((Date.now() - this.started) / 1000);
    const text = `[${"#".repeat(filled)}${"-".repeat(width - filled)}] ${p.done}/${p.total} ${secs}s ${p.label}`;
    const max = Math.max(20, this.columns - 1);
    this.stream.write(`\r\x1b[K${[...text].slice(0, max).join("")}`);
    this.shown = true;
  }

  finish(): void {
    if (this.shown) this.stream.write("\r\x1b[K");
    this.shown = false;
  }
}

const EXIT = { ok: 0, design: 1, usage: 2 } as const;

async function openSimulator(args: VerifyArgs): Promise<{ simulator?: Simulator; diagnostic?: Diagnostic }> {
  if (args.simulator === "system") {
    const binary = args.ngspice ?? "ngspice";
    const s = await systemSimulator(binary);
    if (!s)
      return {
        diagnostic: simulatorMissing(`the system ngspice ('${binary}')`, "install ngspice (for example 'apt-get install ngspice'), give its path with --ngspice, or use --simulator embedded, which needs no install"),
      };
    return { simulator: s };
  }
  try {
    return { simulator: await embeddedSimulator() };
  } catch (e) {
    return { diagnostic: simulatorMissing("the embedded ngspice (eecircuit-engine)", `${(e as Error).message}; reinstall gatewright's dependencies, or use --simulator system`) };
  }
}

export async function runVerify(args: VerifyArgs, argv: string[], io: VerifyIo): Promise<number> {
  // The synthesis's options exactly as `synth` builds them (src/cli/options.ts).
  const sources = new Map<string, string>();
  const { prepared, diagnostics } = prepareSynthesis(args, argv, sources);
  const maxSteps = wholeNumberOption(args["max-steps"], "max-steps", 2, 1_000_000, "give a whole number of steps from 2 to 1000000", diagnostics);
  if (!prepared || hasErrors(diagnostics)) {
    printDiagnostics(diagnostics, sources, io.err);
    return EXIT.usage;
  }
  const { text, options: opts } = prepared;
  const s = synthesize(text, args.file, opts);
  appendDiagnostics(diagnostics, s.diagnostics);
  if (!s.files || !s.design || hasErrors(diagnostics)) {
    printDiagnostics(args.quiet ? diagnostics.filter((d) => d.severity === "error") : diagnostics, sources, io.err);
    const internal = diagnostics.some((d) => d.code.startsWith("GW9"));
    io.err.write(`${internal ? "internal error" : "nothing verified"}: ${diagnostics.filter((d) => d.severity === "error").length} error(s)\n`);
    return EXIT.design;
  }
  const names = fileNamesOf(s.design.netlist.name);
  const hash = synthesisHash(TOOL.version, text, opts as unknown as Record<string, unknown>);
  const opened = await openSimulator(args);
  if (!opened.simulator) {
    printDiagnostics([opened.diagnostic!], sources, io.err);
    return EXIT.usage;
  }
  const simulator = opened.simulator;

  // The files an earlier run wrote for the same source and options are simulated as they are.
  const inDir = (f: string) => join(args.out, f);
  let reused = false;
  let netlistText: string | undefined;
  let testbenchText: string | undefined;
  const written: string[] = [];
  if (existsSync(inDir(names.json)) && existsSync(inDir(names.netlist)) && existsSync(inDir(names.testbench))) {
    try {
      if (storedInputHash(readFileSync(inDir(names.json), "utf8")) === hash) {
        netlistText = readFileSync(inDir(names.netlist), "utf8");
        testbenchText = readFileSync(inDir(names.testbench), "utf8");
        reused = true;
      }
    } catch {
      reused = false;
    }
  }
  if (!reused) {
    // Emitted again with the hash (each file's text is made as it is written): the JSON once.
    const w = writeOutputs(args.out, emitDesign({ ...s.emitContext!, inputHash: hash }), { force: !!args.force });
    if (w.error) {
      await simulator.close?.();
      printDiagnostics([diag(w.error.code, w.error.message)], sources, io.err);
      return EXIT.design;
    }
    for (const f of w.written) written.push(f);
  }

  const bar = new ProgressBar(io.err, io.columns ?? 80);
  let result;
  try {
    result = await verifyDesign(s, simulator, {
      corners: !!args.corners,
      simulatorKind: args.simulator,
      plots: args.plots !== false,
      concurrency: args.simulator === "system" ? 2 : 1,
      commandLine: opts.commandLine,
      onProgress: (p) => bar.update(p),
      ...(maxSteps !== undefined ? { maxSteps } : {}),
      ...(netlistText !== undefined ? { netlistText } : {}),
      ...(testbenchText !== undefined ? { testbenchText } : {}),
    });
  } finally {
    bar.finish();
    await simulator.close?.();
  }

  // Plots, the report and the JSON; the parts list with the bypass capacitors when asked.
  const files = [
    ...result.files.map((f) => ({ name: f.name, content: f.content })),
    { name: `${result.design}.verify.md`, content: renderVerifyReport(result, TOOL) },
  ];
  if (args.decoupling && result.decoupling) {
    const csvPath = inDir(names.bomCsv);
    const mdPath = inDir(names.bomMd);
    const csv = existsSync(csvPath) ? readFileSync(csvPath, "utf8") : s.files.find((f) => f.name === names.bomCsv)!.content;
    const md = existsSync(mdPath) ? readFileSync(mdPath, "utf8") : s.files.find((f) => f.name === names.bomMd)!.content;
    files.push({ name: names.bomCsv, content: bomCsvWithBypass(csv, result.decoupling) });
    files.push({ name: names.bomMd, content: bomMarkdownWithBypass(md, result.decoupling) });
  }
  const jsonName = `${result.design}.verify.json`;
  const allNames = [...files.map((f) => f.name), jsonName];
  const jsonView = { ...(verifyJson(result, TOOL) as Record<string, unknown>), reusedOutputs: reused, outputFolder: args.out, written: [...new Set([...written, ...allNames.map(inDir)])] };
  files.push({ name: jsonName, content: JSON.stringify(jsonView, null, 2) + "\n" });
  const w = writeOutputs(args.out, files, { force: !!args.force });
  if (w.error) {
    printDiagnostics([diag(w.error.code, w.error.message)], sources, io.err);
    return EXIT.design;
  }
  for (const f of w.written) written.push(f);

  const shown = [...diagnostics, ...result.diagnostics].filter((d) => (args.quiet ? d.severity === "error" : true));
  printDiagnostics(shown, sources, io.err);
  if (args.json) io.out.write(JSON.stringify(jsonView, null, 2) + "\n");
  else if (args.quiet) io.out.write(`${result.design}: ${result.pass ? "PASS" : "FAIL"}\n`);
  else {
    if (reused) io.out.write(`reusing ${inDir(names.netlist)} and ${inDir(names.testbench)}: written by gatewright for this source and these options\n`);
    io.out.write(renderSummary(result, [...new Set(written)], { decouplingAdded: !!args.decoupling }));
  }
  return result.pass && !hasErrors(result.diagnostics) ? EXIT.ok : EXIT.design;
}
