// Front of the pipeline: source text → logic graph with its stored state named.
import { appendDiagnostics, capDiagnostics, diag, hasErrors, type Diagnostic } from "../diagnostics/index.js";
import { buildLogicGraph, type LogicGraph } from "../logic/index.js";
import { expandStateElements } from "../sequential/expand.js";
import { analyzeState, type StateAnalysis } from "../sequential/state.js";
import { parseEquations } from "../parse/equations.js";
import { parseVerilog } from "../parse/verilog.js";
import type { DesignSource } from "../syntax/index.js";

export type InputLanguage = "equations" | "verilog";

export function languageOf(file: string): InputLanguage | undefined {
  if (/\.logic$/i.test(file)) return "equations";
  if (/\.v$/i.test(file)) return "verilog";
  return undefined;
}

export interface FrontResult {
  source?: DesignSource;
  graph?: LogicGraph;
  stateNames: string[];
  /** Names kept as nets of their own through optimization and mapping (state signals and the
   *  nets of built-in state elements); a superset of stateNames. */
  keptNames: string[];
  /** Loops, state elements, initial values and clock (src/sequential/state.ts). */
  state?: StateAnalysis;
  diagnostics: Diagnostic[];
}

export function readDesign(text: string, file: string, opts: { top?: string } = {}): FrontResult {
  const diagnostics: Diagnostic[] = [];
  const lang = languageOf(file);
  if (!lang) {
    diagnostics.push(
      diag("GW6007", `cannot tell the language of '${file}'`, { file }, {
        hint: "equation files end in .logic, structural Verilog files in .v",
      }),
    );
    return { diagnostics, stateNames: [], keptNames: [] };
  }
  const parsed = lang === "equations" ? parseEquations(text, file) : parseVerilog(text, file, opts.top !== undefined ? { top: opts.top } : {});
  appendDiagnostics(diagnostics, capDiagnostics(parsed.diagnostics, file));
  if (!parsed.value || hasErrors(parsed.diagnostics)) return { diagnostics, stateNames: [], keptNames: [] };
  // Built-in state elements (q = dff(d, clk)) become NAND gates before names are resolved.
  const expanded = expandStateElements(parsed.value);
  appendDiagnostics(diagnostics, capDiagnostics(expanded.diagnostics, file));
  if (hasErrors(expanded.diagnostics)) return { source: parsed.value, diagnostics, stateNames: [], keptNames: [] };
  const built = buildLogicGraph(expanded.source);
  appendDiagnostics(diagnostics, capDiagnostics(built.diagnostics, file));
  if (!built.value) return { source: parsed.value, diagnostics, stateNames: [], keptNames: [] };
  const g = built.value;
  const state = analyzeState(parsed.value, g, expanded.elements, expanded.keptNames);
  appendDiagnostics(diagnostics, capDiagnostics(state.diagnostics, file));
  return { source: parsed.value, graph: g, stateNames: state.stateNames, keptNames: state.keptNames, state, diagnostics };
}
