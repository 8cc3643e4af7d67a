// What a simulator run gives back, and how both simulator paths build it from ngspice's output.
import { classifyMessages, parseMeasures } from "./messages.js";
import { parseRawFile, type RawPlot } from "./raw.js";

export interface SimulationRun {
  /** Which simulator produced this run. */
  simulator: string;
  /**
   * Vectors of the last analysis in the netlist, by lower-case name: "time", "v(y)", "i(vcc)",
   * "v(x1.n3)" for nodes inside subcircuits, "v(v-sweep)" for a DC sweep of source V….
   * Branch currents follow ngspice's sign: positive into the source's + terminal, so a supply
   * that delivers current reads negative. Empty when the run failed.
   */
  vectors: Map<string, Float64Array>;
  /** Name of the independent vector ("time" for .tran, "v(v-sweep)" for .dc), when there is one. */
  scale?: string;
  /** ngspice's plot name, e.g. "Transient Analysis", "DC transfer characteristic", "Operating Point". */
  analysis?: string;
  /** `.meas` results by lower-case name. */
  measures: Map<string, number>;
  /** Everything ngspice printed. */
  log: string;
  /** Problems that make the result wrong or missing: netlist errors, failed analyses, failed `.meas`. */
  errors: string[];
  warnings: string[];
  elapsedMs: number;
}

export interface RunOptions {
  /** Longest a run may take before it is stopped and reported as an error. Default 120 s. */
  timeoutMs?: number;
  /**
   * Files the netlist includes, by the name used in its `.include` lines. The embedded engine gets
   * them inlined; the system simulator gets them written beside the netlist.
   */
  files?: ReadonlyMap<string, string>;
}

export interface Simulator {
  readonly name: string;
  /** ngspice version as reported by the simulator, e.g. "45.2". */
  readonly version?: string;
  /** Never rejects for problems in the netlist; they come back in `errors`. */
  run(netlist: string, options?: RunOptions): Promise<SimulationRun>;
  close?(): Promise<void>;
}

export const DEFAULT_TIMEOUT_MS = 120_000;

/** ngspice vector names as this project uses them: lower case, branch currents as `i(x)`. */
export function normalizeVectorName(name: string, type: string): string {
  const lower = name.toLowerCase();
  const branch = /^(.+)#branch$/.exec(lower);
  if (branch) return `i(${branch[1]})`;
  if (!lower.includes("(") && type.toLowerCase() === "voltage" && !lower.endsWith("-sweep")) return `v(${lower})`;
  return lower;
}

const SCALE_TYPES = new Set(["time", "frequency"]);

function vectorsOfPlot(plot: RawPlot): { vectors: Map<string, Float64Array>; scale?: string } {
  const vectors = new Map<string, Float64Array>();
  plot.variables.forEach((variable, i) => {
    const name = normalizeVectorName(variable.name, variable.type);
    const re = plot.real[i]!;
    const im = plot.imag?.[i];
    // Complex (AC) vectors are given as magnitudes; the project only runs real analyses.
    vectors.set(name, im ? re.map((x, k) => Math.hypot(x, im[k]!)) : re);
  });
  const first = plot.variables[0];
  let scale: string | undefined;
  if (first && plot.points > 1) {
    const n = normalizeVectorName(first.name, first.type);
    if (SCALE_TYPES.has(first.type.toLowerCase()) || n.endsWith("-sweep)") || n.endsWith("-sweep")) scale = n;
  }
  return scale === undefined ? { vectors } : { vectors, scale };
}

export interface RawOutcome {
  simulator: string;
  rawBytes?: Uint8Array;
  /** ngspice's standard output (for the embedded engine: everything it printed). */
  log: string;
  /** ngspice's error output, as text or as collected lines. */
  stderr: string | readonly string[];
  /** Problems found by gatewright itself (timeouts, missing files), put first. */
  extraErrors?: readonly string[];
  extraWarnings?: readonly string[];
  elapsedMs: number;
}

/** Builds a run from what a simulator left behind: raw file bytes, stdout, stderr. */
export function buildRun(outcome: RawOutcome): SimulationRun {
  const messages = classifyMessages(outcome.stderr);
  const errors = [...(outcome.extraErrors ?? []), ...messages.errors];
  const warnings = [...(outcome.extraWarnings ?? []), ...messages.warnings];
  let vectors = new Map<string, Float64Array>();
  let scale: string | undefined;
  let analysis: string | undefined;
  if (outcome.rawBytes && outcome.rawBytes.length > 0) {
    const raw = parseRawFile(outcome.rawBytes);
    if (raw.problem) errors.push(`the raw file could not be read completely: ${raw.problem}`);
    // `write` saves the current plot: the last analysis. After a netlist error ngspice's current
    // plot is its table of constants, which is no result at all.
    const plot = raw.plots[raw.plots.length - 1];
    if (plot && plot.plotName.toLowerCase() !== "constants") {
      const v = vectorsOfPlot(plot);
      vectors = v.vectors;
      scale = v.scale;
      analysis = plot.plotName;
    }
  }
  if (vectors.size === 0 && errors.length === 0) {
    const noJob = warnings.find((w) => /no job/i.test(w));
    errors.push(noJob ? "the netlist has no analysis (.op, .dc, .tran …), so ngspice produced no results" : "ngspice produced no results");
  }
  const fullLog = typeof outcome.stderr === "string" && outcome.stderr.trim() !== ""
    ? `${outcome.log}\n${outcome.stderr}`
    : outcome.log;
  const run: SimulationRun = {
    simulator: outcome.simulator,
    vectors,
    measures: parseMeasures(outcome.log),
    log: fullLog,
    errors,
    warnings,
    elapsedMs: outcome.elapsedMs,
  };
  if (scale !== undefined) run.scale = scale;
  if (analysis !== undefined) run.analysis = analysis;
  return run;
}

/** A run that never reached ngspice (or whose output was lost). */
export function failedRun(simulator: string, errors: readonly string[], elapsedMs = 0, log = ""): SimulationRun {
  return { simulator, vectors: new Map(), measures: new Map(), log, errors: [...errors], warnings: [], elapsedMs };
}
