// The whole job as one pure function: source text and options in; the files of a run, the
// intermediate results and the diagnostics out. Nothing here touches the file system.
import { appendDiagnostics, capDiagnostics, diag, hasErrors, type Diagnostic } from "../diagnostics/index.js";
import { checkEquivalence, dontCareMask, partialCheckText, type EquivalenceResult, type LogicGraph } from "../logic/index.js";
import { optimizeDesign, type OptimizationReport, type OptLevel } from "../optimize/index.js";
import { cellsToLogic, dtlCostModel, mapToCells, tallyParts, type CellChoice, type CellNetlist, type CostModel } from "../map/index.js";
import { sizeDesign } from "../electrical/size.js";
import type { SizedDesign, SizingOptions } from "../electrical/types.js";
import { emitDesign, type EmitContext, type OutputFile } from "../emit/index.js";
import type { Stimulus } from "../emit/stimulus.js";
import { readDesign } from "./front.js";
import { checkFeedbackHazards, planTestbench } from "../sequential/plan.js";
import type { StateAnalysis } from "../sequential/state.js";
import type { InitialState } from "../sequential/initial.js";
import type { SequentialTiming } from "../sequential/timing.js";
import type { StaticHazard } from "../logic/hazards.js";
import { TOOL } from "./tool.js";

export interface SynthesisOptions {
  top?: string;
  maxFanin: number;
  cells: CellChoice;
  /** True when the user chose the cell families (then no automatic fallback to NAND only). */
  cellsGiven?: boolean;
  /** Optimization level, 0 to 2 (default 2; src/optimize/index.ts). */
  opt?: OptLevel;
  /** Cost model the optimizer and the mapper price with (default DTL parts, src/map/cost.ts). */
  costModel?: CostModel;
  /** Most loads on one net; more are buffered or their driver duplicated (default 8; 0: none). */
  maxFanout?: number;
  /** Tie open-collector outputs (wired-AND) where it saves parts (default off). */
  wiredAnd?: boolean;
  sizing: SizingOptions;
  /** Inputs up to which the testbench walks every combination (default 10). */
  exhaustiveLimit?: number;
  /** Random vectors above that (default 256). */
  randomVectors?: number;
  seed?: number;
  /** The command line to print in the files' headers. */
  commandLine: string;
  /** Testbench step length instead of the one derived from the timing (a clock period is four
   *  steps in a clocked testbench). */
  stepSeconds?: number;
  /** Most and fewest clock cycles of a clocked testbench (default 256 and 8). */
  maxClockCycles?: number;
  minClockCycles?: number;
}

export interface Synthesis {
  graph?: LogicGraph;
  stateNames: string[];
  /** Names kept as nets through optimization and mapping (state signals, state-element nets). */
  keptNames?: string[];
  /** Loops, state elements, initial values, clock (src/sequential/state.ts). */
  state?: StateAnalysis;
  /** The state the testbench and the logic's simulation start from. */
  initial?: InitialState;
  /** Clock-to-output, setup and hold of each state element, and the clock limit. */
  timing?: SequentialTiming;
  /** Static hazards found in the logic feeding loops, as built. */
  hazards?: StaticHazard[];
  netlist?: CellNetlist;
  /** Parts before (the logic as written, mapped directly) and after optimization. */
  optimizationReport?: OptimizationReport;
  equivalence?: EquivalenceResult;
  design?: SizedDesign;
  stimulus?: Stimulus;
  stepSeconds?: number;
  files?: OutputFile[];
  /** What the files were emitted from (to emit them again with more, e.g. a characterization). */
  emitContext?: EmitContext;
  diagnostics: Diagnostic[];
}

/** A 1-2-5 value at or above x. */
function niceCeil(x: number): number {
  const p = 10 ** Math.floor(Math.log10(x));
  for (const m of [1, 2, 5, 10]) if (m * p >= x * (1 - 1e-9)) return m * p;
  return 10 * p;
}

/** Testbench step: long enough for the slowest path to settle several times over. */
export function stepSecondsFor(design: SizedDesign): number {
  const path = design.criticalPath?.delaySeconds;
  const slowestCell = Math.max(0, ...design.cellTypes.map((t) => (t.analysis.timing ? Math.max(t.analysis.timing.tPHLSeconds, t.analysis.timing.tPLHSeconds) : 0)));
  const depth = design.criticalPath?.depth ?? 1;
  const estimate = Math.max(path ?? 0, slowestCell * depth);
  return niceCeil(Math.max(2e-6, 8 * estimate));
}

export function synthesize(text: string, file: string, opts: SynthesisOptions): Synthesis {
  const diagnostics: Diagnostic[] = [];
  const out: Synthesis = { diagnostics, stateNames: [] };
  try {
    const front = readDesign(text, file, opts.top !== undefined ? { top: opts.top } : {});
    appendDiagnostics(diagnostics, front.diagnostics);
    if (!front.graph || hasErrors(diagnostics)) return out;
    const g = front.graph;
    out.graph = g;
    out.stateNames = front.stateNames;
    const stateNames = front.stateNames;
    // State signals and the nets of built-in state elements stay nets of their own.
    const keptNames = front.keptNames;
    out.keptNames = keptNames;
    if (front.state) out.state = front.state;

    const costModel = opts.costModel ?? dtlCostModel();
    const mapExtras = { costModel, ...(opts.maxFanout !== undefined ? { maxFanout: opts.maxFanout } : {}), wiredAnd: !!opts.wiredAnd };
    const opt = optimizeDesign(g, { stateNames: keptNames, maxFanin: opts.maxFanin, level: opts.opt ?? 2, cells: opts.cells, ...mapExtras });
    appendDiagnostics(diagnostics, capDiagnostics(opt.diagnostics, file));
    out.optimizationReport = opt.report;
    const optimized = opt.graph;
    const constantOutputs: Diagnostic[] = [];
    const sourcePorts = new Map(g.outputs.map((p) => [p.name, p] as const));
    for (const o of optimized.outputs) {
      const op = optimized.nodes[o.node]!.op;
      if (op === "const0" || op === "const1") {
        const port = sourcePorts.get(o.name);
        constantOutputs.push(
          diag("GW3003", `output '${o.name}' is always ${op === "const1" ? 1 : 0}`, port?.span ? { file, span: port.span } : { file }, {
            hint: "it is tied to the supply or to ground through a resistor, with no cell",
          }),
        );
      }
    }
    appendDiagnostics(diagnostics, capDiagnostics(constantOutputs, file));
    // Map and size. When the mixed mapping's NOR cells cannot be sized (diode-OR inputs share
    // their driver's current, so heavy fan-out defeats them), map again with NAND cells only,
    // unless the user chose the cell families.
    // The mixed attempt that has a fallback reports its failure without the search for what
    // blocks it (a dozen more sizings, minutes on a large design); that search runs only when
    // the NAND-only mapping fails as well.
    const fallback = opts.cells === "mixed" && !opts.cellsGiven;
    const reoptimize = (cells: CellChoice) => opt.forCells?.(cells) ?? optimizeDesign(g, { stateNames: keptNames, maxFanin: opts.maxFanin, level: opts.opt ?? 2, cells, ...mapExtras });
    const attempt = (cells: CellChoice, quickFailure = false) => {
      // Other families than the optimizer priced for: optimize again for them (only priced
      // again when the passes did not depend on the families).
      const again = cells === opts.cells ? undefined : reoptimize(cells);
      const m = mapToCells(again?.graph ?? optimized, { stateNames: keptNames, maxFanin: opts.maxFanin, cells, ...mapExtras });
      return { mapped: m, sized: m.value ? sizeDesign(m.value, quickFailure ? { ...opts.sizing, quickFailure } : opts.sizing) : undefined, report: again?.report ?? opt.report };
    };
    let { mapped, sized, report } = attempt(opts.cells, fallback);
    const fallbackNotes: string[] = [];
    if (fallback && sized && !sized.value && sized.diagnostics.some((d) => d.code === "GW5001")) {
      const retry = attempt("nand");
      if (retry.sized?.value) {
        const why = sized.diagnostics.find((d) => d.code === "GW5001")!.message;
        fallbackNotes.push(`The mixed NAND/NOR mapping could not be sized (${why}); the design was mapped with NAND cells only.`);
        ({ mapped, sized, report } = retry);
      } else if (mapped.value) {
        // Neither fits: explain the mixed mapping's failure in full.
        sized = sizeDesign(mapped.value, opts.sizing);
      }
    }
    appendDiagnostics(diagnostics, capDiagnostics(mapped.diagnostics, file));
    if (!mapped.value) return out;
    const netlist = mapped.value;
    out.netlist = netlist;
    // Wired-AND nets (tied open-collector outputs) are sized with their one shared collector
    // resistor by src/electrical (GW4005, which refused them, is retired). The report shows the
    // parts the same logic takes without them, so the saving is plain.
    out.optimizationReport = { ...report, after: tallyParts(netlist, costModel) };
    if (netlist.cells.some((c) => c.tiedOutput)) {
      const cellsUsed = report.mapping.cells;
      const graphUsed = report === opt.report ? optimized : reoptimize(cellsUsed).graph;
      const plain = mapToCells(graphUsed, { stateNames: keptNames, maxFanin: opts.maxFanin, cells: cellsUsed, ...mapExtras, wiredAnd: false });
      if (plain.value) out.optimizationReport.afterWithoutWiredAnd = tallyParts(plain.value, costModel);
    }

    // Nothing is written unless the cells compute the source's logic.
    const builtLogic = cellsToLogic(netlist);
    // Loop state signals are the free variables of the check; the other kept nets (inside state
    // elements) are logic like any other, which mapping may share.
    const eq = checkEquivalence(g, builtLogic, { stateNames });
    out.equivalence = eq;
    if (!eq.equivalent) {
      const why = eq.problem ?? (eq.counterexample ? `${eq.counterexample.kind} '${eq.counterexample.name}' is ${eq.counterexample.actual} where the source gives ${eq.counterexample.expected} for ${Object.entries(eq.counterexample.assignment).map(([k, v]) => `${k}=${v}`).join(" ")}` : "unknown");
      diagnostics.push(diag("GW9002", `the mapped cells do not compute the source's logic: ${why}`, { file }, { hint: "this is a bug in gatewright; please report it with the input file" }));
      return out;
    }
    const partialText = partialCheckText(eq);
    if (partialText) diagnostics.push(diag("GW3002", partialText, { file }));

    const hazards = checkFeedbackHazards(g, builtLogic, front.state, keptNames);
    out.hazards = hazards.hazards;
    appendDiagnostics(diagnostics, capDiagnostics(hazards.diagnostics, file));

    appendDiagnostics(diagnostics, capDiagnostics(sized?.diagnostics ?? [], file));
    if (!sized?.value || hasErrors(diagnostics)) return out;
    const design = sized.value;
    out.design = design;

    // Initial state, clocked or stepped walk, step length and the state elements' timing.
    const planOpts: Parameters<typeof planTestbench>[4] = { baseStepSeconds: stepSecondsFor(design) };
    if (opts.exhaustiveLimit !== undefined) planOpts.exhaustiveLimit = opts.exhaustiveLimit;
    if (opts.randomVectors !== undefined) planOpts.randomVectors = opts.randomVectors;
    if (opts.seed !== undefined) planOpts.seed = opts.seed;
    if (opts.stepSeconds !== undefined) planOpts.stepSeconds = opts.stepSeconds;
    if (opts.maxClockCycles !== undefined) planOpts.maxCycles = opts.maxClockCycles;
    if (opts.minClockCycles !== undefined) planOpts.minCycles = opts.minClockCycles;
    const plan = planTestbench(g, design, front.state, stateNames, planOpts);
    appendDiagnostics(diagnostics, capDiagnostics(plan.diagnostics, file));
    if (plan.initial) out.initial = plan.initial;
    if (plan.timing) out.timing = plan.timing;
    const stimulus = plan.stimulus;
    // Outputs at their don't-care points may take either value: not checked there.
    const free = dontCareMask(g, keptNames, stimulus.vectors);
    if (free) stimulus.expected = stimulus.expected.map((row, i) => row.map((x, k) => (free[i]![k] ? "X" : x)));
    out.stimulus = stimulus;
    const stepSeconds = plan.stepSeconds;
    out.stepSeconds = stepSeconds;
    const notes: string[] = [...fallbackNotes, ...plan.notes];
    if (!stimulus.exhaustive && !stimulus.clock) notes.push(`The testbench uses ${stimulus.vectors.length} seeded random vectors (seed ${stimulus.seed}), not every combination of the ${g.inputs.length} inputs.`);
    const emitContext: EmitContext = {
      tool: TOOL,
      commandLine: opts.commandLine,
      sourceFile: file,
      graph: g,
      stateNames,
      design,
      equivalence: eq,
      stimulus,
      stepSeconds,
      notes,
      ...(front.state ? { state: front.state } : {}),
      ...(plan.timing ? { timing: plan.timing } : {}),
      ...(out.optimizationReport ? { optimization: out.optimizationReport } : {}),
    };
    out.emitContext = emitContext;
    out.files = emitDesign(emitContext);
    return out;
  } catch (e) {
    diagnostics.push(
      diag("GW9001", `internal error: ${(e as Error).message}`, { file }, {
        hint: "this is a bug in gatewright; please report it with the input file and the command line",
      }),
    );
    delete out.files;
    return out;
  }
}
