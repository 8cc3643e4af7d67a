// Front of the pipeline: source text → logic graph with its stored state named.
import { diag, hasErrors, type Diagnostic } from "../diagnostics/index.js";
import { analyzeLoops, buildLogicGraph, type LogicGraph } from "../logic/index.js";
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
    return { diagnostics, stateNames: [] };
  }
  const parsed = lang === "equations" ? parseEquations(text, file) : parseVerilog(text, file, opts.top !== undefined ? { top: opts.top } : {});
  diagnostics.push(...parsed.diagnostics);
  if (!parsed.value || hasErrors(parsed.diagnostics)) return { diagnostics, stateNames: [] };
  const built = buildLogicGraph(parsed.value);
  diagnostics.push(...built.diagnostics);
  if (!built.value) return { source: parsed.value, diagnostics, stateNames: [] };
  const g = built.value;
  const loops = analyzeLoops(g);
  const stateNames = loops.cuts.map((c) => g.nodes[c]!.name!);
  if (stateNames.length) {
    const first = g.nodes[loops.cuts[0]!]!;
    diagnostics.push(
      diag(
        "GW3001",
        `the design stores state: ${loops.groups.length} feedback loop${loops.groups.length > 1 ? "s" : ""}, kept as written; state signal${stateNames.length > 1 ? "s" : ""}: ${stateNames.join(", ")}`,
        first.span ? { file, span: first.span } : { file },
      ),
    );
  }
  return { source: parsed.value, graph: g, stateNames, diagnostics };
}
