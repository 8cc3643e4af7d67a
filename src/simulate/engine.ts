// One interface for running a netlist in ngspice, embedded (WebAssembly, in-process worker) or
// the system binary. This folder is the only place in gatewright that starts a simulator.
import { diag, type Diagnostic } from "../diagnostics/index.js";
import type { SimulationRun } from "./run.js";

export type { RunOptions, SimulationRun, Simulator } from "./run.js";
export { DEFAULT_TIMEOUT_MS, normalizeVectorName } from "./run.js";
export { embeddedSimulator } from "./embedded.js";
export { systemSimulator, type SystemSimulatorOptions } from "./system.js";
export { inlineIncludes, referencedFiles, stripControlSections, withControlBlock } from "./netlist.js";

/** The errors of a run as GW7001 diagnostics (none when the run succeeded). */
export function runDiagnostics(run: SimulationRun, file?: string): Diagnostic[] {
  return run.errors.map((message) =>
    diag("GW7001", `${run.simulator}: ${message}`, file === undefined ? undefined : { file }),
  );
}

/** GW7003 for a simulator that is not available (e.g. no `ngspice` on the PATH). */
export function simulatorMissing(what: string, hint?: string): Diagnostic {
  return diag("GW7003", `${what} is not available`, undefined, hint ? { hint } : undefined);
}
