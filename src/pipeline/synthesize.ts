// The whole job as one pure function: source text and options in; the files of a run, the
// intermediate results and the diagnostics out. Nothing here touches the file system.
import { diag, hasErrors, type Diagnostic } from "../diagnostics/index.js";
import { checkEquivalence, type EquivalenceResult, type LogicGraph } from "../logic/index.js";
import { optimizeLogic } from "../optimize/index.js";
import { cellsToLogic, mapToCells, type CellChoice, type CellNetlist } from "../map/index.js";
import { sizeDesign } from "../electrical/size.js";
import type { SizedDesign, SizingOptions } from "../electrical/types.js";
import { emitDesign, makeStimulus, type OutputFile } from "../emit/index.js";
import type { Stimulus } from "../emit/stimulus.js";
import { readDesign } from "./front.js";
import { TOOL } from "./tool.js";

export interface SynthesisOptions {
  top?: string;
  maxFanin: number;
  cells: CellChoice;
  sizing: SizingOptions;
  /** Inputs up to which the testbench walks every combination (default 10). */
  exhaustiveLimit?: number;
  /** Random vectors above that (default 256). */
  randomVectors?: number;
  seed?: number;
  /** The command line to print in the files' headers. */
  commandLine: string;
}

export interface Synthesis {
  graph?: LogicGraph;
  stateNames: string[];
  netlist?: CellNetlist;
  equivalence?: EquivalenceResult;
  design?: SizedDesign;
  stimulus?: Stimulus;
  stepSeconds?: number;
  files?: OutputFile[];
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
    diagnostics.push(...front.diagnostics);
    if (!front.graph || hasErrors(diagnostics)) return out;
    const g = front.graph;
    out.graph = g;
    out.stateNames = front.stateNames;
    const stateNames = front.stateNames;

    const optimized = optimizeLogic(g, { stateNames, maxFanin: opts.maxFanin });
    for (const o of optimized.outputs) {
      const op = optimized.nodes[o.node]!.op;
      if (op === "const0" || op === "const1") {
        const port = g.outputs.find((p) => p.name === o.name);
        diagnostics.push(
          diag("GW3003", `output '${o.name}' is always ${op === "const1" ? 1 : 0}`, port?.span ? { file, span: port.span } : { file }, {
            hint: "it is tied to the supply or to ground through a resistor, with no cell",
          }),
        );
      }
    }
    const mapped = mapToCells(optimized, { stateNames, maxFanin: opts.maxFanin, cells: opts.cells });
    diagnostics.push(...mapped.diagnostics);
    if (!mapped.value) return out;
    const netlist = mapped.value;
    out.netlist = netlist;

    // Nothing is written unless the cells compute the source's logic.
    const eq = checkEquivalence(g, cellsToLogic(netlist), { stateNames });
    out.equivalence = eq;
    if (!eq.equivalent) {
      const why = eq.problem ?? (eq.counterexample ? `${eq.counterexample.kind} '${eq.counterexample.name}' is ${eq.counterexample.actual} where the source gives ${eq.counterexample.expected} for ${Object.entries(eq.counterexample.assignment).map(([k, v]) => `${k}=${v}`).join(" ")}` : "unknown");
      diagnostics.push(diag("GW9002", `the mapped cells do not compute the source's logic: ${why}`, { file }, { hint: "this is a bug in gatewright; please report it with the input file" }));
      return out;
    }
    const partialCones = eq.cones.filter((c) => !c.exhaustive);
    if (partialCones.length) {
      diagnostics.push(
        diag("GW3002", `the logic check was partial: ${partialCones.length} output or state cone${partialCones.length > 1 ? "s have" : " has"} more than 20 free variables and ${partialCones.length > 1 ? "were" : "was"} checked with ${partialCones[0]!.vectors} random vectors each`, { file }),
      );
    }

    const sized = sizeDesign(netlist, opts.sizing);
    diagnostics.push(...sized.diagnostics);
    if (!sized.value || hasErrors(sized.diagnostics)) return out;
    const design = sized.value;
    out.design = design;

    const stimOpts: Parameters<typeof makeStimulus>[1] = { sequential: stateNames.length > 0 };
    if (opts.exhaustiveLimit !== undefined) stimOpts.exhaustiveLimit = opts.exhaustiveLimit;
    if (opts.randomVectors !== undefined) stimOpts.randomCount = opts.randomVectors;
    if (opts.seed !== undefined) stimOpts.seed = opts.seed;
    const stimulus = makeStimulus(g, stimOpts);
    out.stimulus = stimulus;
    const stepSeconds = stepSecondsFor(design);
    out.stepSeconds = stepSeconds;
    const notes: string[] = [];
    if (!stimulus.exhaustive) notes.push(`The testbench uses ${stimulus.vectors.length} seeded random vectors (seed ${stimulus.seed}), not every combination of the ${g.inputs.length} inputs.`);
    out.files = emitDesign({
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
    });
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
