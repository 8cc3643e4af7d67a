// Characterizing a sized design's cells in a simulator handed in: the runs of every corner, one
// after the other, then the pure reading (measure.ts). The only impure part of this folder, and
// only through the Simulator it is given (src/simulate starts simulators; this never does).
import { diag, hasErrors, type Diagnostic, type StageResult } from "../diagnostics/index.js";
import type { SizedDesign } from "../electrical/types.js";
import type { SimulationRun, Simulator } from "../simulate/run.js";
import { verifyCorners, type VerifyCorner } from "../verify/corners.js";
import { worstDrives, worstLoads } from "./loads.js";
import { criteria, readCharacterization, type MeasuredRuns } from "./measure.js";
import { dcNetlist, tranNetlist, type RunSetup } from "./netlist.js";
import type { Characterization } from "./types.js";

export interface CharacterizeOptions {
  /** Transient runs for t_PHL and t_PLH (default true); DC levels and thresholds always. */
  transient?: boolean;
  /** Longest one run may take (default the simulator's). */
  timeoutMs?: number;
  onProgress?: (done: number, total: number, label: string) => void;
}

/** The sizing's supply × temperature corners, each with the gain limits the sizing used. */
export function characterizationCorners(design: SizedDesign): { corner: VerifyCorner; betaMin: number; betaMax: number }[] {
  const all = verifyCorners(design, { corners: true });
  const out: { corner: VerifyCorner; betaMin: number; betaMax: number }[] = [];
  for (const c of all) {
    if (c.gain !== "min") continue;
    const fast = all.find((x) => x.gain === "max" && x.supplyVolts === c.supplyVolts && x.tempC === c.tempC);
    out.push({ corner: c, betaMin: c.bf!, betaMax: fast?.bf ?? c.bf! });
  }
  return out;
}

/** Every netlist the characterization runs (pure; for inspection and for the tests). */
export function characterizationPlan(design: SizedDesign, options: { transient?: boolean; separateLoads?: boolean } = {}): RunSetup[] {
  const loads = worstLoads(design);
  const drives = worstDrives(design);
  const plan: RunSetup[] = [];
  for (const { corner, betaMin, betaMax } of characterizationCorners(design)) {
    const o = options.separateLoads ? { separateLoads: true } : {};
    plan.push(dcNetlist(design, corner, loads, drives, betaMin, o));
    if (options.transient !== false) plan.push(tranNetlist(design, corner, loads, drives, betaMin, betaMax, o));
  }
  return plan;
}

/** Reads the runs of a plan (pure). */
export function characterizationFromRuns(design: SizedDesign, plan: RunSetup[], runs: SimulationRun[], simulator: string, elapsedMs: number): StageResult<Characterization> {
  const measured: MeasuredRuns = { dc: [], tran: [] };
  plan.forEach((setup, i) => (setup.kind === "dc" ? measured.dc : measured.tran).push({ setup, run: runs[i]! }));
  const read = readCharacterization(design, worstLoads(design), worstDrives(design), measured);
  // Never a silent failure: a cell that did not pass always comes with an error.
  if (read.cells.some((c) => !c.pass) && !hasErrors(read.diagnostics)) {
    read.diagnostics.push(diag("GW7022", `characterization of ${read.cells.filter((c) => !c.pass).map((c) => c.key).join(", ")} did not pass, for a reason not diagnosed`));
  }
  const value: Characterization = {
    simulator,
    criteria: criteria(design),
    cells: read.cells,
    pass: read.cells.every((c) => c.pass) && runs.every((r) => r.errors.length === 0) && !hasErrors(read.diagnostics),
    runs: runs.length,
    elapsedMs,
    transient: measured.tran.length > 0,
  };
  return { value, diagnostics: read.diagnostics };
}

/** Characterizes every cell type of a sized design in `simulator` at the sizing's corners. */
export async function characterizeDesign(design: SizedDesign, simulator: Simulator, options: CharacterizeOptions = {}): Promise<StageResult<Characterization>> {
  const diagnostics: Diagnostic[] = [];
  let plan: RunSetup[];
  try {
    plan = characterizationPlan(design, options.transient === false ? { transient: false } : {});
  } catch (e) {
    diagnostics.push(diag("GW9001", `internal error while building the characterization netlists: ${(e as Error).message}`));
    return { diagnostics };
  }
  const t0 = performance.now();
  const runs: SimulationRun[] = [];
  for (let i = 0; i < plan.length; i++) {
    const s = plan[i]!;
    const label = `${s.kind === "dc" ? "DC sweep" : "transient"}, ${s.corner.engineCorner ?? s.corner.label}`;
    options.onProgress?.(i, plan.length, label);
    runs.push(await simulator.run(s.text, options.timeoutMs !== undefined ? { timeoutMs: options.timeoutMs } : {}));
  }
  options.onProgress?.(plan.length, plan.length, "done");
  const r = characterizationFromRuns(design, plan, runs, simulator.name, performance.now() - t0);
  return { ...(r.value ? { value: r.value } : {}), diagnostics: [...diagnostics, ...r.diagnostics] };
}
