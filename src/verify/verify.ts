// The verify stage: a synthesized design's testbench run at the nominal point and at the corners
// the electrical engine sized it for, every sample compared with the logic, and the waveforms
// measured (levels, noise margins, delays, supply current); transfer curves of each cell type;
// bypass capacitors from the measured spikes; SVG plots. Pure except for the Simulator handed
// in (only src/simulate starts one); files come back as data for the CLI to write.
import { diag, type Diagnostic } from "../diagnostics/index.js";
import { emitDesign, fileNamesOf, sampleTime, spiceNamesOf } from "../emit/index.js";
import type { Stimulus } from "../emit/stimulus.js";
import type { Tri } from "../logic/evaluate.js";
import type { Synthesis } from "../pipeline/synthesize.js";
import { TOOL } from "../pipeline/tool.js";
import type { SimulationRun, Simulator } from "../simulate/run.js";
import { compareRun, type RunComparison } from "./compare.js";
import { verifyCorners, type VerifyCorner } from "./corners.js";
import { recommendDecoupling, switchedCells, type DecouplingAdvice } from "./decoupling.js";
import { netThresholdsAt, type MeasuredThresholds } from "./levels.js";
import { measureDelays, measureLevels, measureSupply, summarizeDelays, type DelaySummary, type EdgeDelay, type SignalLevels, type StepSpike, type SupplyMeasures } from "./measure.js";
import { cornerTexts, DUT_SUPPLY_VECTOR, includedFiles } from "./netlist-text.js";
import { decimate, supplyPlot, transferPlot, waveformPlot, type Series, type WaveSignal } from "./plots.js";
import { transferCurves, transferNetlist, type TransferCurve } from "./transfer.js";
import { chooseVectors, defaultMaxSteps, type Coverage } from "./vectors.js";
import { sampledStateNets } from "../emit/spice.js";

export interface VerifyProgress {
  done: number;
  total: number;
  /** What is running now (or finished last). */
  label: string;
}

export interface VerifyOptions {
  /** Run the corners as well as the nominal point. */
  corners: boolean;
  /** Steps a run may take (default: from the design's size, the runs and the simulator). */
  maxSteps?: number;
  /** Which simulator the default budget is for (default embedded, the slower). */
  simulatorKind?: "embedded" | "system";
  /** DC sweeps of each cell type (default true). */
  transfer?: boolean;
  /** SVG plots (default true). */
  plots?: boolean;
  /** The netlist and testbench to simulate instead of the synthesis's own (files reused from
   *  an earlier run, as they are on disk). */
  netlistText?: string;
  testbenchText?: string;
  /** Longest a run may take (default from the run's size, at least 120 s). */
  timeoutMs?: number;
  /** Runs at a time (default 1; the embedded engine runs one at a time anyway). */
  concurrency?: number;
  /** The command line for the headers of files this writes (a testbench of its own vectors). */
  commandLine?: string;
  onProgress?: (p: VerifyProgress) => void;
}

export interface MarginViolation {
  signal: string;
  state: "low" | "high";
  marginVolts: number;
  requiredVolts: number;
}

export interface SignalResult {
  name: string;
  kind: "output" | "state";
  node: string;
  vilVolts: number;
  vihVolts: number;
  /** High level set by the diode-OR inputs it drives (see NetThresholds). */
  highClamped: boolean;
  /** The thresholds came from this condition's transfer curves (see netThresholdsAt). */
  thresholdsFromCurves: boolean;
  levels: SignalLevels;
  delays: DelaySummary;
  /** The electrical engine's figures for the cell driving this net. */
  analytic?: { cell: string; cellType: string; vOLWorstVolts: number; vOHWorstVolts: number; vOLNominalVolts: number; vOHNominalVolts: number };
}

export interface CornerResult {
  corner: VerifyCorner;
  pass: boolean;
  simulator: string;
  errors: string[];
  warnings: string[];
  comparison: RunComparison;
  signals: SignalResult[];
  violations: MarginViolation[];
  delays: EdgeDelay[];
  slowest?: EdgeDelay;
  supply: SupplyMeasures;
  elapsedMs: number;
}

export interface TransferResult {
  cellType: string;
  loadText: string;
  curves: TransferCurve[];
  engine: { vILVolts: number; vIHVolts: number; vOLVolts: number; vOHVolts: number; nominal: { vILVolts: number; vIHVolts: number; vOLVolts: number; vOHVolts: number } };
  errors: string[];
}

export interface VerifyFile {
  name: string;
  content: string;
  what: string;
}

export interface VerifyResult {
  design: string;
  simulator: string;
  pass: boolean;
  coverage?: Coverage;
  stepSeconds?: number;
  corners: CornerResult[];
  transfer: TransferResult[];
  /** The slowest edge over every corner. */
  slowest?: EdgeDelay & { corner: string };
  /** The engine's estimate of the longest path. */
  pathEstimateSeconds?: number;
  decoupling?: DecouplingAdvice;
  requiredMarginVolts: number;
  /** Whether state signals were compared, and why not when they were not. */
  statesCompared: string[];
  notes: string[];
  files: VerifyFile[];
  diagnostics: Diagnostic[];
  elapsedMs: number;
}

/** A small pool: runs `tasks` with at most `limit` at a time, in order of start. */
async function pool<T>(tasks: (() => Promise<T>)[], limit: number): Promise<T[]> {
  const results: T[] = new Array(tasks.length);
  let next = 0;
  const worker = async () => {
    while (next < tasks.length) {
      const i = next++;
      results[i] = await tasks[i]!();
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(limit, tasks.length)) }, worker));
  return results;
}

function emptyComparison(): RunComparison {
  return { pass: false, compared: 0, skipped: 0, failures: [], worstLowVolts: Number.NaN, worstHighVolts: Number.NaN };
}

function emptySupply(): SupplyMeasures {
  return { averageWatts: Number.NaN, averageAmps: Number.NaN, peakAmps: Number.NaN, staticMinAmps: Number.NaN, staticMaxAmps: Number.NaN, spikes: [] };
}

interface SignalSpec {
  name: string;
  kind: "output" | "state";
  node: string;
  vector: string;
  net: number;
  column: number;
}

export async function verifyDesign(s: Synthesis, simulator: Simulator, o: VerifyOptions): Promise<VerifyResult> {
  const started = Date.now();
  const diagnostics: Diagnostic[] = [];
  const design = s.design;
  const result: VerifyResult = {
    design: design?.netlist.name ?? "",
    simulator: simulator.version && !simulator.name.includes(simulator.version) ? `${simulator.name} ${simulator.version}` : simulator.name,
    pass: false,
    corners: [],
    transfer: [],
    requiredMarginVolts: design?.parameters.find((p) => p.name === "noiseMarginMinVolts")?.value ?? 0.4,
    statesCompared: [],
    notes: [],
    files: [],
    diagnostics,
    elapsedMs: 0,
  };
  if (!design || !s.graph || !s.stimulus || s.stepSeconds === undefined || !s.files || !s.equivalence) {
    diagnostics.push(diag("GW9001", "internal error: verify needs a complete synthesis", undefined, { hint: "this is a bug in gatewright; please report it with the input file" }));
    return result;
  }
  const graph = s.graph;
  const step = s.stepSeconds;
  result.stepSeconds = step;
  const names = fileNamesOf(design.netlist.name);
  const byName = new Map(s.files.map((f) => [f.name, f.content]));
  const netlistText = o.netlistText ?? byName.get(names.netlist)!;
  const corners = verifyCorners(design, { corners: o.corners });
  // The transient runs dominate (a DC sweep takes a fraction of a second).
  const maxSteps = o.maxSteps ?? defaultMaxSteps(design.netlist.cells.length, corners.length, o.simulatorKind ?? "embedded");
  const chosen = chooseVectors(
    { graph, stateNames: s.stateNames, synthesized: s.stimulus, ...(s.keptNames ? { keptNames: s.keptNames } : {}) },
    { maxSteps, ...(s.stimulus.seed !== undefined ? { seed: s.stimulus.seed } : {}) },
  );
  result.coverage = chosen.coverage;
  const stimulus: Stimulus = chosen.stimulus;
  let testbench: string;
  if (chosen.fromSynthesis) testbench = o.testbenchText ?? byName.get(names.testbench)!;
  else {
    // A testbench of its own vectors, from the same emitter; written beside the others.
    const files = emitDesign({
      tool: TOOL,
      commandLine: o.commandLine ?? `gatewright verify`,
      sourceFile: graph.file ?? design.netlist.name,
      graph,
      stateNames: s.stateNames,
      design,
      equivalence: s.equivalence,
      stimulus,
      stepSeconds: step,
      notes: [],
      ...(s.state ? { state: s.state } : {}),
      ...(s.timing ? { timing: s.timing } : {}),
    });
    testbench = files.find((f) => f.name === names.testbench)!.content;
    result.files.push({ name: `${design.netlist.name}.verify.tb.cir`, content: testbench, what: `testbench of the ${stimulus.vectors.length} vectors verify chose (${chosen.coverage.text})` });
    const why = chosen.coverage.prefixOf !== undefined
      ? `the testbench's ${chosen.coverage.prefixOf} steps do not fit the time budget of ${maxSteps} steps a run`
      : chosen.coverage.kind === "exhaustive"
        ? "every combination fits the time budget, though the synthesized testbench samples at random"
        : s.stimulus.vectors.length > maxSteps
          ? `the testbench's ${s.stimulus.vectors.length} steps do not fit the time budget of ${maxSteps} steps a run`
          : "the testbench's random vectors leave some output value untried";
    result.notes.push(`Verify chose its own vectors (${why}): ${chosen.coverage.text}. The testbench it ran is ${design.netlist.name}.verify.tb.cir.`);
  }
  const include = includedFiles(testbench)[0] ?? names.netlist;

  // What is compared and saved.
  const spice = spiceNamesOf(design);
  const nl = design.netlist;
  const signals: SignalSpec[] = nl.outputs.map((p, k) => ({ name: p.name, kind: "output", node: spice.outputs[k]!, vector: `v(${spice.outputs[k]!})`, net: p.net, column: k }));
  // State signals: those the testbench samples (with the values the logic's simulation expects).
  const stateRows: Tri[][] = stimulus.stateExpected ?? [];
  for (const sn of sampledStateNets(design, spice, stimulus)) {
    signals.push({ name: sn.name, kind: "state", node: sn.node, vector: `v(${sn.node})`, net: sn.net, column: sn.index });
    result.statesCompared.push(sn.name);
  }
  const outputNames = new Set(nl.outputs.map((p) => p.name));
  const unsampled = s.stateNames.filter((n) => !outputNames.has(n) && !result.statesCompared.includes(n));
  if (unsampled.length) result.notes.push(`State signal${unsampled.length === 1 ? "" : "s"} ${unsampled.join(", ")} ${unsampled.length === 1 ? "is" : "are"} not sampled on ${unsampled.length === 1 ? "its" : "their"} own (not a net of the mapped design); the outputs were compared.`);
  const save = [...spice.inputs.map((x) => `v(${x})`), ...signals.map((x) => x.vector), "i(vcc)", DUT_SUPPLY_VECTOR];
  const sampleTimes = stimulus.vectors.map((_, i) => sampleTime(i, step));
  const switched = switchedCells(nl, stimulus.vectors);

  const cells = nl.cells.length;
  const timeoutMs = o.timeoutMs ?? Math.max(120_000, cells * stimulus.vectors.length * 50);
  const transfer = o.transfer !== false;
  const total = corners.length * (transfer ? 2 : 1);
  let done = 0;
  const progress = (label: string) => o.onProgress?.({ done, total, label });
  const plotsWanted = o.plots !== false;
  const waveKeep = new Map<string, { inputs: WaveSignal[]; outputs: WaveSignal[]; supply: Series; averageAmps: number }>();

  const runTransient = async (corner: VerifyCorner): Promise<CornerResult> => {
    progress(`transient, ${corner.label}`);
    const texts = cornerTexts(netlistText, testbench, corner, design.models.npn.name, save);
    let run: SimulationRun;
    if (texts.problems.length) {
      run = { simulator: simulator.name, vectors: new Map(), measures: new Map(), log: "", errors: texts.problems.map((p) => `the testbench could not be prepared: ${p}`), warnings: [], elapsedMs: 0 };
    } else run = await simulator.run(texts.testbench, { files: new Map([[include, texts.netlist]]), timeoutMs });
    done++;
    progress(`transient, ${corner.label}`);
    return analyzeRun(corner, run);
  };

  const analyzeRun = (corner: VerifyCorner, run: SimulationRun): CornerResult => {
    const time = run.vectors.get("time") ?? new Float64Array();
    const vec = (name: string) => run.vectors.get(name) ?? new Float64Array();
    const measuredTh = curveThresholds.get(corner.id);
    const specs = signals.map((x) => ({ ...x, th: netThresholdsAt(design, x.net, measuredTh), values: vec(x.vector) }));
    const outs = specs.filter((x) => x.kind === "output");
    const sts = specs.filter((x) => x.kind === "state");
    const comparison = run.errors.length || time.length === 0
      ? emptyComparison()
      : compareRun({
          time,
          outputs: outs.map((x) => ({ name: x.name, node: x.node, values: x.values, levels: x.th })),
          expected: stimulus.expected,
          sampleTimes,
          states: sts.map((x) => ({ name: x.name, node: x.node, values: x.values, levels: x.th })),
          expectedStates: stateRows.map((row) => sts.map((x) => row[x.column] ?? "X")),
        });
    const column = (x: SignalSpec): Tri[] => (x.kind === "output" ? stimulus.expected.map((r) => r[x.column]!) : stateRows.map((r) => r[x.column] ?? "X"));
    const measured = specs.map((x) => ({ x, levels: measureLevels(time, x.values, column(x), sampleTimes, x.th) }));
    // Inputs: their own levels, for the 50 % points.
    const inputs = spice.inputs.map((node, k) => {
      const values = vec(`v(${node})`);
      const lv = measureLevels(time, values, stimulus.vectors.map((v) => v[k]!), sampleTimes, { vilVolts: 0, vihVolts: 0 });
      return { name: nl.nets[nl.inputs[k]!]!.name, node, values, level50Volts: (lv.lowTypVolts + lv.highTypVolts) / 2 };
    });
    const delays = time.length
      ? measureDelays({
          time,
          vectors: stimulus.vectors,
          stepSeconds: step,
          sampleTimes,
          inputs: inputs.filter((i) => Number.isFinite(i.level50Volts)),
          outputs: measured
            .filter((m) => m.x.kind === "output" && Number.isFinite(m.levels.lowTypVolts) && Number.isFinite(m.levels.highTypVolts))
            .map((m) => ({ name: m.x.name, values: m.x.values, level50Volts: (m.levels.lowTypVolts + m.levels.highTypVolts) / 2, expected: column(m.x) })),
        })
      : [];
    const required = result.requiredMarginVolts;
    const violations: MarginViolation[] = [];
    const sigResults: SignalResult[] = measured.map(({ x, levels }) => {
      const driver = nl.nets[x.net]!.driver;
      const r: SignalResult = {
        name: x.name,
        kind: x.kind,
        node: x.node,
        vilVolts: x.th.vilVolts,
        vihVolts: x.th.vihVolts,
        highClamped: x.th.highClamped,
        thresholdsFromCurves: x.th.fromCurves,
        levels,
        delays: summarizeDelays(delays, x.name),
      };
      if (driver.kind === "cell") {
        const inst = design.instances[driver.cell]!;
        r.analytic = {
          cell: `U${driver.cell + 1}`,
          cellType: design.cellTypes[inst.cellType]!.key,
          vOLWorstVolts: inst.analysis.vOLVolts,
          vOHWorstVolts: inst.analysis.vOHVolts,
          vOLNominalVolts: inst.analysis.nominal.vOLVolts,
          vOHNominalVolts: inst.analysis.nominal.vOHVolts,
        };
      }
      if (time.length && !run.errors.length) {
        if (levels.lowSamples > 0 && !(levels.noiseMarginLowVolts >= required)) violations.push({ signal: x.name, state: "low", marginVolts: levels.noiseMarginLowVolts, requiredVolts: required });
        if (levels.highSamples > 0 && !x.th.highClamped && !(levels.noiseMarginHighVolts >= required)) violations.push({ signal: x.name, state: "high", marginVolts: levels.noiseMarginHighVolts, requiredVolts: required });
      }
      return r;
    });
    const iDut = vec(DUT_SUPPLY_VECTOR);
    const supply = time.length && iDut.length ? measureSupply(time, iDut, corner.supplyVolts, step, sampleTimes) : emptySupply();
    const slowest = delays.reduce<EdgeDelay | undefined>((a, d) => (!a || d.delaySeconds > a.delaySeconds ? d : a), undefined);
    const c: CornerResult = {
      corner,
      pass: comparison.pass && run.errors.length === 0 && violations.length === 0,
      simulator: run.simulator,
      errors: [...run.errors],
      warnings: [...run.warnings],
      comparison,
      signals: sigResults,
      violations,
      delays,
      supply,
      elapsedMs: run.elapsedMs,
    };
    if (slowest) c.slowest = slowest;
    if (plotsWanted && time.length) {
      const delivered = Float64Array.from(iDut, (v) => -v);
      waveKeep.set(corner.id, {
        inputs: inputs.map((i) => ({ name: i.name, series: decimate(time, i.values) })),
        outputs: measured.map(({ x }) => ({ name: x.kind === "state" ? `${x.name} (state)` : x.name, series: decimate(time, x.values), vilVolts: x.th.vilVolts, vihVolts: x.th.vihVolts })),
        supply: decimate(time, delivered),
        averageAmps: supply.averageAmps,
      });
    }
    return c;
  };

  const runSweep = async (corner: VerifyCorner): Promise<{ corner: VerifyCorner; curves: TransferCurve[]; errors: string[] }> => {
    progress(`transfer curves, ${corner.label}`);
    const texts = cornerTexts(netlistText, testbench, corner, design.models.npn.name, save);
    const dc = transferNetlist(design, corner, include);
    const run = await simulator.run(dc.text, { files: new Map([[include, texts.netlist]]), timeoutMs: 120_000 });
    done++;
    progress(`transfer curves, ${corner.label}`);
    return { corner, curves: transferCurves(run, dc.setups, corner), errors: run.errors };
  };

  // Transfer curves first: their unity-gain points are the reading thresholds of each run.
  progress("starting");
  const sweeps = transfer ? await pool(corners.map((c) => () => runSweep(c)), o.concurrency ?? 1) : [];
  const curveThresholds = new Map<string, Map<string, MeasuredThresholds>>();
  for (const w of sweeps) {
    const m = new Map<string, MeasuredThresholds>();
    for (const c of w.curves) if (c.points) m.set(c.cellType, { vIlVolts: c.points.vIlVolts, vIhVolts: c.points.vIhVolts });
    curveThresholds.set(w.corner.id, m);
  }
  result.corners = await pool(corners.map((c) => () => runTransient(c)), o.concurrency ?? 1);

  // Transfer curves by cell type, across corners.
  design.cellTypes.forEach((t) => {
    const curves = sweeps.flatMap((w) => w.curves.filter((c) => c.cellType === t.key));
    if (!curves.length) return;
    const a = t.analysis;
    result.transfer.push({
      cellType: t.key,
      loadText: curves[0]!.loadText,
      curves,
      engine: { vILVolts: a.vILVolts, vIHVolts: a.vIHVolts, vOLVolts: a.vOLVolts, vOHVolts: a.vOHVolts, nominal: { vILVolts: a.nominal.vILVolts, vIHVolts: a.nominal.vIHVolts, vOLVolts: a.nominal.vOLVolts, vOHVolts: a.nominal.vOHVolts } },
      errors: [...new Set(sweeps.flatMap((w) => w.errors))],
    });
  });

  // Verdicts and diagnostics.
  for (const c of result.corners) {
    for (const e of c.errors) diagnostics.push(diag("GW7001", `${c.corner.label}: ${e}`));
    const byOutput = new Map<string, number>();
    for (const f of c.comparison.failures) byOutput.set(f.output, (byOutput.get(f.output) ?? 0) + 1);
    for (const [name, count] of byOutput) {
      const f = c.comparison.failures.find((x) => x.output === name)!;
      diagnostics.push(
        diag("GW7002", `${c.corner.label}: ${f.kind === "state" ? "state signal" : "output"} '${name}' disagrees with the logic at ${count} sample${count === 1 ? "" : "s"}; first at step ${f.step}: ${f.volts.toFixed(3)} V reads ${f.read === "?" ? "neither 0 nor 1" : f.read}, the logic says ${f.expected}`, undefined, {
          hint: "look at the waveform plot of this corner; a level between the thresholds usually means a transistor that does not saturate or does not turn off",
        }),
      );
    }
    for (const v of c.violations)
      diagnostics.push(
        diag("GW7004", `${c.corner.label}: '${v.signal}' leaves a ${v.state}-state noise margin of ${v.marginVolts.toFixed(3)} V, less than the ${v.requiredVolts} V the design was sized for`, undefined, {
          hint: "the sizing's worst case did not hold in simulation; check the parts' models or size with more margin",
        }),
      );
  }
  for (const t of result.transfer) for (const e of t.errors) diagnostics.push(diag("GW7001", `transfer curve of ${t.cellType}: ${e}`));
  if (chosen.coverage.kind === "sampled") diagnostics.push(diag("GW7005", `the check was partial: ${chosen.coverage.text}`));

  let slowest: (EdgeDelay & { corner: string }) | undefined;
  for (const c of result.corners) if (c.slowest && (!slowest || c.slowest.delaySeconds > slowest.delaySeconds)) slowest = { ...c.slowest, corner: c.corner.label };
  if (slowest) result.slowest = slowest;
  if (design.criticalPath) result.pathEstimateSeconds = design.criticalPath.delaySeconds;
  const spikeSources: { corner: string; spikes: StepSpike[] }[] = result.corners.map((c) => ({ corner: c.corner.label, spikes: c.supply.spikes }));
  result.decoupling = recommendDecoupling(design, spikeSources, switched);
  result.pass = result.corners.length > 0 && result.corners.every((c) => c.pass) && result.transfer.every((t) => t.errors.length === 0);

  // Plots.
  if (plotsWanted) {
    const id = design.netlist.name;
    const nominal = waveKeep.get("nominal");
    if (nominal) result.files.push({ name: `${id}.wave.svg`, content: waveformPlot(id, corners[0]!.label, nominal.inputs, nominal.outputs, `${id}-wave`), what: "waveforms of the inputs and outputs at the nominal point, with reading thresholds" });
    for (const c of result.corners.filter((x) => !x.pass && x.corner.id !== "nominal").slice(0, 3)) {
      const w = waveKeep.get(c.corner.id);
      if (w) result.files.push({ name: `${id}.wave.${c.corner.id}.svg`, content: waveformPlot(id, c.corner.label, w.inputs, w.outputs, `${id}-wave-${c.corner.id}`), what: `waveforms at ${c.corner.label}, where the check failed` });
    }
    const supplyRuns = result.corners.filter((c) => waveKeep.has(c.corner.id)).map((c) => ({ corner: c.corner.shortLabel, series: waveKeep.get(c.corner.id)!.supply, averageAmps: waveKeep.get(c.corner.id)!.averageAmps }));
    if (supplyRuns.length) result.files.push({ name: `${id}.supply.svg`, content: supplyPlot(id, supplyRuns, `${id}-supply`), what: "supply current of the circuit at each corner" });
    for (const t of result.transfer) {
      const label = (cid: string) => corners.find((c) => c.id === cid)?.shortLabel ?? cid;
      const curves = t.curves.filter((c) => c.vinVolts.length).map((c) => ({ corner: label(c.corner), vin: c.vinVolts, vout: c.voutVolts }));
      if (curves.length)
        result.files.push({ name: `${id}.transfer.${t.cellType}.svg`, content: transferPlot(t.cellType, t.loadText, curves, t.engine, `${id}-tr-${t.cellType}`), what: `transfer curve of ${t.cellType} at each corner, with its worst-case load` });
    }
  }
  // Every file says who wrote it (so a later run may replace it).
  for (const f of result.files)
    if (f.name.endsWith(".svg")) f.content = f.content.replace(/^(<\?xml[^>]*\?>\n?)?/, (decl) => `${decl}<!-- ${f.name}: generated by ${TOOL.name} ${TOOL.version} -->\n`);
  result.elapsedMs = Date.now() - started;
  return result;
}
