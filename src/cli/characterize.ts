// `gatewright synth --characterize`: after synthesis and before anything is written, every sized
// cell type is measured in the embedded ngspice at the sizing's corners with its worst-case load
// (src/characterize), and the files are emitted again with the measured figures in the report
// and the JSON. A cell that misses what the sizing claims gives an error, so nothing is written.
import { diag, hasErrors, type Diagnostic } from "../diagnostics/index.js";
import { characterizeDesign } from "../characterize/run.js";
import type { Characterization } from "../characterize/types.js";
import { emitDesign, type EmitContext, type OutputFile } from "../emit/index.js";
import { eng } from "../emit/format.js";
import type { Synthesis } from "../pipeline/synthesize.js";
import { embeddedSimulator, simulatorMissing } from "../simulate/engine.js";
import { ProgressBar } from "./verify.js";

export interface CharacterizeOutcome {
  diagnostics: Diagnostic[];
  characterization?: Characterization;
  /** The synthesis's files emitted again with the characterization, and what they came from. */
  files?: OutputFile[];
  emitContext?: EmitContext;
  /** One line for the terminal. */
  summary?: string;
}

export async function characterizeSynthesis(result: Synthesis, io: { err: { write(s: string): unknown; isTTY?: boolean }; columns?: number }): Promise<CharacterizeOutcome> {
  if (!result.design || !result.emitContext) {
    return { diagnostics: [diag("GW9001", "internal error: nothing to characterize (the synthesis kept no emit context)")] };
  }
  let simulator;
  try {
    simulator = await embeddedSimulator();
  } catch (e) {
    return { diagnostics: [simulatorMissing("the embedded ngspice (eecircuit-engine)", `${(e as Error).message}; reinstall gatewright's dependencies, or leave out --characterize`)] };
  }
  const bar = new ProgressBar(io.err, io.columns ?? 80);
  let r;
  try {
    r = await characterizeDesign(result.design, simulator, { onProgress: (done, total, label) => bar.update({ done, total, label: `characterizing: ${label}` }) });
  } finally {
    bar.finish();
    await simulator.close?.();
  }
  const out: CharacterizeOutcome = { diagnostics: r.diagnostics };
  if (!r.value) return out;
  out.characterization = r.value;
  const ch = r.value;
  const corners = ch.cells[0]?.corners.length ?? 0;
  out.summary = `characterized ${ch.cells.length} cell type${ch.cells.length === 1 ? "" : "s"} in ngspice at ${corners} corner${corners === 1 ? "" : "s"} (${ch.runs} runs, ${eng(ch.elapsedMs / 1000, "s")}): ${ch.pass && !hasErrors(r.diagnostics) ? "every check passes" : "FAILS"}`;
  out.emitContext = { ...result.emitContext, characterization: ch };
  out.files = emitDesign(out.emitContext);
  return out;
}
