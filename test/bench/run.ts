// gatewright's benchmark (`npm run bench`): generated designs through the pipeline, stage by
// stage, with wall time, peak memory and the time ratio for doubling the design. Figures are
// printed beside the targets of issue 7 (100,000 gates in at most 3 s and 1 GB; doubling the
// design at most doubles the time, ±15 %) as met / not met; nothing is asserted.
//
// Usage:  npm run bench                      the whole benchmark (about an hour on 2 busy cores)
//         npm run bench -- --quick           small sizes only, to try it
//         npm run bench -- --only random     one family (random, rca, cla, mul, chain, c17)
//         npm run bench -- --stage-cap 60 --job-cap 600   time caps in seconds
//         npm run bench -- --only random --sizes 50000,100000,200000 --start-modes optimize=reduced,equivalence=skipped,plan=reduced
//                                                    chosen sizes, starting with stages reduced
//         npm run bench -- --profile random:10000         one design under node --cpu-prof:
//                                                         the hottest functions per stage
//                                                         (--start-modes applies here too)
//
// The emit stage emits the six files and writes them (src/cli/write.ts, as `synth` does) into a
// scratch folder that is removed afterwards: its time and memory are those of the whole output
// path. Its CPU time and the peak resident memory sampled while it ran are shown beside it.
//
// Each design runs in a child process of its own (so its peak memory is its own, and a stage
// that runs away can be stopped): the child runs the stages in the order synthesize() runs them
// (src/pipeline/synthesize.ts) and reports each stage's time as it finishes; the parent samples
// the child's resident memory from /proc every 50 ms and stops it at the job cap. The child runs
// with the heap the command would use for the design (src/cli/heap.ts: a larger young
// generation for input files of a megabyte or more).
//
// Time caps. A stage outside the issue's target path (equivalence check, testbench stimulus,
// optimization) that takes longer than the stage cap on one size runs reduced on the larger sizes
// of that family (equivalence: exhaustive only up to 8 inputs a cone and 32 random vectors; the
// stimulus: 8 random vectors; optimization: level 1), and is skipped after a second time
// (equivalence: not checked; optimization: level 0, the logic as written). The tables say so.
// A child stopped at the job cap ends its family.
import { spawn } from "node:child_process";
import { readFileSync, existsSync, mkdtempSync, readdirSync, rmSync, statSync } from "node:fs";
import { cpus, loadavg, tmpdir, totalmem } from "node:os";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { LARGE_INPUT_BYTES, YOUNG_GENERATION_FLAG } from "../../src/cli/heap.js";
import { arrayMultiplier, carryLookaheadAdder, inverterChain, randomNetwork, rippleCarryAdder } from "./designs.js";

const HERE = fileURLToPath(new URL(".", import.meta.url));
const REPO = join(HERE, "..", "..");

// ---------------------------------------------------------------------------------------------
// Jobs

type Family = "random" | "rca" | "cla" | "mul" | "chain" | "c17";
type Mode = "full" | "reduced" | "skipped";
type ReducibleStage = "optimize" | "equivalence" | "plan";

interface Job {
  family: Family;
  size: number;
  reps: number;
  modes: Record<ReducibleStage, Mode>;
  /** Stop repeating once this much time has gone on the runs. */
  repeatBudgetMs: number;
}

/** Stages in the order synthesize() runs them; `target` marks the issue's path. */
const STAGES = [
  { key: "parse", label: "parse", target: true },
  { key: "build", label: "build", target: true },
  { key: "optimize", label: "optimize", target: true },
  { key: "map", label: "map", target: true },
  { key: "size", label: "size", target: true },
  { key: "equivalence", label: "equiv", target: false },
  { key: "hazards", label: "hazards", target: false },
  { key: "plan", label: "stimulus", target: false },
  { key: "emit", label: "emit", target: true },
] as const;
type StageKey = (typeof STAGES)[number]["key"];

function designOf(family: Family, size: number): { file: string; text: string } {
  switch (family) {
    case "random":
      return { file: `rnd${size}.v`, text: randomNetwork(size) };
    case "rca":
      return { file: `rca${size}.v`, text: rippleCarryAdder(size) };
    case "cla":
      return { file: `cla${size}.v`, text: carryLookaheadAdder(size) };
    case "mul":
      return { file: `mul${size}.v`, text: arrayMultiplier(size) };
    case "chain":
      return { file: `chain${size}.v`, text: inverterChain(size) };
    case "c17":
      return { file: "c17.v", text: readFileSync(join(REPO, "test/fixtures/verilog/c17.v"), "utf8") };
  }
}

function gateCount(text: string): number {
  return (text.match(/^\s*(and|nand|or|nor|xor|xnor|not|buf)\b/gm) ?? []).length;
}

// ---------------------------------------------------------------------------------------------
// Child: one design, the stages timed

interface StageLine {
  t: "stage";
  rep: number;
  stage: StageKey;
  ms: number;
  /** CPU time of the process during the stage (user + system, every thread). */
  cpuMs: number;
  rssMB: number;
  note?: string;
}

async function child(job: Job): Promise<void> {
  const { parseVerilog } = await import("../../src/parse/verilog.js");
  const { expandStateElements } = await import("../../src/sequential/expand.js");
  const { analyzeState } = await import("../../src/sequential/state.js");
  const { buildLogicGraph, checkEquivalence } = await import("../../src/logic/index.js");
  const { optimizeDesign } = await import("../../src/optimize/index.js");
  const { cellsToLogic, dtlCostModel, mapToCells } = await import("../../src/map/index.js");
  const { sizeDesign } = await import("../../src/electrical/size.js");
  const { checkFeedbackHazards, planTestbench } = await import("../../src/sequential/plan.js");
  const { stepSecondsFor } = await import("../../src/pipeline/synthesize.js");
  const { emitDesign } = await import("../../src/emit/index.js");
  const { writeOutputs } = await import("../../src/cli/write.js");
  const { TOOL } = await import("../../src/pipeline/tool.js");
  const { hasErrors } = await import("../../src/diagnostics/index.js");

  const send = (x: unknown) => process.stdout.write(JSON.stringify(x) + "\n");
  const { file, text } = designOf(job.family, job.size);
  const started = performance.now();
  const rss = () => Math.round(process.memoryUsage().rss / 1e6);
  let info: Record<string, unknown> = {};
  let current: StageKey | "start" = "start";
  // An exception inside a stage is a bug in gatewright: report where, and end the child.
  process.on("uncaughtException", (e) => {
    send({ t: "crash", stage: current, message: (e.stack ?? String(e)).split("\n").slice(0, 6).join("\n") });
    process.exit(5);
  });
  for (let rep = 0; rep < job.reps; rep++) {
    if (rep > 0 && performance.now() - started > job.repeatBudgetMs) break;
    (globalThis as { gc?: () => void }).gc?.();
    const time = <R>(stage: StageKey, f: () => R, note?: string): R => {
      current = stage;
      const t0 = performance.now();
      const c0 = process.cpuUsage();
      const r = f();
      const c = process.cpuUsage(c0);
      const line: StageLine = { t: "stage", rep, stage, ms: performance.now() - t0, cpuMs: (c.user + c.system) / 1000, rssMB: rss() };
      if (note) line.note = note;
      send(line);
      return r;
    };
    const fail = (stage: string, why: string) => {
      send({ t: "error", rep, stage, message: why.slice(0, 400) });
      process.exit(3);
    };

    // Front: what readDesign (src/pipeline/front.ts) does, in its two halves.
    const parsed = time("parse", () => parseVerilog(text, file));
    if (!parsed.value || hasErrors(parsed.diagnostics)) return fail("parse", parsed.diagnostics.map((d) => `${d.code} ${d.message}`).join("; "));
    const front = time("build", () => {
      const expanded = expandStateElements(parsed.value!);
      const built = buildLogicGraph(expanded.source);
      if (!built.value) return undefined;
      const state = analyzeState(parsed.value!, built.value, expanded.elements, expanded.keptNames);
      return { g: built.value, state, keptNames: state.keptNames, stateNames: state.stateNames };
    });
    if (!front) return fail("build", "no logic graph");
    const g = front.g;
    const costModel = dtlCostModel();
    const mapExtras = { costModel, wiredAnd: false };
    const level = job.modes.optimize === "full" ? 2 : job.modes.optimize === "reduced" ? 1 : 0;
    const opt = time("optimize", () => optimizeDesign(g, { stateNames: front.keptNames, maxFanin: 8, level, cells: "mixed", ...mapExtras }), level === 2 ? undefined : `level ${level}`);
    // Map and size (uniform), with synthesize()'s fallback to NAND cells when the mixed
    // mapping cannot be sized.
    const sizing = { supplyVolts: 5, mode: "uniform" as const };
    let mapped = time("map", () => mapToCells(opt.graph, { stateNames: front.keptNames, maxFanin: 8, cells: "mixed", ...mapExtras }));
    if (!mapped.value) return fail("map", mapped.diagnostics.map((d) => d.message).join("; "));
    // The mixed attempt reports a failure without the search for what blocks it, as
    // synthesize() does when it has the NAND fallback.
    let sized = time("size", () => sizeDesign(mapped.value!, { ...sizing, quickFailure: true }));
    if (!sized.value && sized.diagnostics.some((d) => d.code === "GW5001")) {
      // synthesize() optimizes again for NAND cells: only priced again when the passes did not
      // depend on the families (a large design, or level 0).
      const nandOpt = time("optimize", () => opt.forCells?.("nand") ?? optimizeDesign(g, { stateNames: front.keptNames, maxFanin: 8, level, cells: "nand", ...mapExtras }), "NAND fallback");
      mapped = time("map", () => mapToCells(nandOpt.graph, { stateNames: front.keptNames, maxFanin: 8, cells: "nand", ...mapExtras }), "NAND fallback");
      sized = time("size", () => sizeDesign(mapped.value!, sizing), "NAND fallback");
    }
    if (!sized.value) return fail("size", sized.diagnostics.map((d) => d.message).join("; "));
    const netlist = mapped.value!;
    const design = sized.value;

    // The cells read back as logic (part of the check's time, as in synthesize()).
    type Eq = ReturnType<typeof checkEquivalence>;
    let eq: Eq;
    let builtLogic: ReturnType<typeof cellsToLogic>;
    if (job.modes.equivalence === "skipped") {
      builtLogic = time("equivalence", () => cellsToLogic(netlist), "skipped");
      eq = { equivalent: true, complete: false, cones: [], problem: "not checked (benchmark: skipped after its time cap)" };
    } else {
      const eqOpts = job.modes.equivalence === "reduced" ? { stateNames: front.stateNames, maxExhaustiveSupport: 8, randomWords: 1 } : { stateNames: front.stateNames };
      let built!: ReturnType<typeof cellsToLogic>;
      eq = time("equivalence", () => checkEquivalence(g, (built = cellsToLogic(netlist)), eqOpts), job.modes.equivalence === "reduced" ? "reduced" : undefined);
      builtLogic = built;
      if (!eq.equivalent) return fail("equivalence", `not equivalent: ${eq.problem ?? JSON.stringify(eq.counterexample)}`);
    }
    time("hazards", () => checkFeedbackHazards(g, builtLogic, front.state, front.keptNames));
    const planOpts = { baseStepSeconds: stepSecondsFor(design), ...(job.modes.plan === "full" ? {} : { randomVectors: 8 }) };
    const plan = time("plan", () => planTestbench(g, design, front.state, front.stateNames, planOpts), job.modes.plan === "full" ? undefined : "8 vectors");
    const outDir = mkdtempSync(join(tmpdir(), "gw-bench-out-"));
    const written = time("emit", () => {
      const files = emitDesign({
        tool: TOOL,
        commandLine: `gatewright synth ${file}`,
        sourceFile: file,
        graph: g,
        stateNames: front.stateNames,
        design,
        equivalence: eq,
        stimulus: plan.stimulus,
        stepSeconds: plan.stepSeconds,
        notes: [],
        ...(front.state ? { state: front.state } : {}),
        ...(plan.timing ? { timing: plan.timing } : {}),
      });
      const w = writeOutputs(outDir, files);
      if (w.error) throw new Error(w.error.message);
      return w.written;
    });
    const outputBytes = written.reduce((s, f) => s + statSync(f).size, 0);
    rmSync(outDir, { recursive: true, force: true });
    info = {
      nodes: g.nodes.length,
      inputs: g.inputs.length,
      outputs: g.outputs.length,
      cells: netlist.cells.length,
      outputBytes,
      partialCones: eq.cones.filter((c) => !c.exhaustive).length,
      workLimitedCones: eq.cones.filter((c) => c.limitedBy === "work").length,
      vectors: plan.stimulus.vectors.length,
    };
  }
  send({ t: "end", info, maxRssMB: Math.round(process.resourceUsage().maxRSS / 1024) });
}

// ---------------------------------------------------------------------------------------------
// Parent: run the jobs, stop runaways, print the tables

interface JobResult {
  job: Job;
  gates: number;
  /** Per stage, the times of the runs that reached it. */
  times: Map<StageKey, number[]>;
  /** Per stage, the CPU times of the runs that reached it. */
  cpu: Map<StageKey, number[]>;
  /** Per stage, the highest resident memory sampled while it ran, and the memory when it began. */
  stagePeakMB: Map<StageKey, number>;
  stageStartMB: Map<StageKey, number>;
  notes: Map<StageKey, string>;
  peakRssMB: number;
  runs: number;
  info: Record<string, unknown>;
  /** Set when the child was stopped or failed. */
  stopped?: { stage: StageKey | "start"; why: string; crashed?: boolean };
  wallMs: number;
}

const TSX_LOADER = pathToFileURL(join(REPO, "node_modules/tsx/dist/loader.mjs")).href;

function readRssMB(pid: number): number {
  try {
    const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Math.round(Number(m[1]) / 1024) : 0;
  } catch {
    return 0;
  }
}

function runJob(job: Job, jobCapMs: number, extraNodeArgs: string[] = []): Promise<JobResult> {
  const { text } = designOf(job.family, job.size);
  const result: JobResult = { job, gates: gateCount(text), times: new Map(), cpu: new Map(), stagePeakMB: new Map(), stageStartMB: new Map(), notes: new Map(), peakRssMB: 0, runs: 0, info: {}, wallMs: 0 };
  const t0 = performance.now();
  return new Promise((resolve) => {
    // The heap the command would run this design with (src/cli/bin.ts starts itself again with a
    // larger young generation for large input files).
    const heap = Buffer.byteLength(text, "utf8") >= LARGE_INPUT_BYTES ? [YOUNG_GENERATION_FLAG] : [];
    const proc = spawn(process.execPath, ["--expose-gc", ...heap, ...extraNodeArgs, "--import", TSX_LOADER, fileURLToPath(import.meta.url), "--child", JSON.stringify(job)], {
      cwd: REPO,
      stdio: ["ignore", "pipe", "pipe"],
    });
    let lastStage: StageKey | "start" = "start";
    let buffer = "";
    let stderr = "";
    let killedForCap = false;
    let lastRssMB = 0;
    const sampler = setInterval(() => {
      if (proc.pid === undefined) return;
      const now = readRssMB(proc.pid);
      result.peakRssMB = Math.max(result.peakRssMB, now);
      if (lastStage !== "start") {
        const running = nextStage(lastStage);
        if (running !== lastStage) result.stagePeakMB.set(running, Math.max(result.stagePeakMB.get(running) ?? 0, now));
      }
    }, 50);
    const cap = setTimeout(() => {
      killedForCap = true;
      proc.kill("SIGKILL");
    }, jobCapMs);
    proc.stdout.on("data", (chunk: Buffer) => {
      buffer += chunk.toString("utf8");
      let nl: number;
      while ((nl = buffer.indexOf("\n")) >= 0) {
        const line = buffer.slice(0, nl);
        buffer = buffer.slice(nl + 1);
        let msg: Record<string, unknown>;
        try {
          msg = JSON.parse(line) as Record<string, unknown>;
        } catch {
          continue;
        }
        if (msg.t === "stage") {
          const s = msg as unknown as StageLine;
          // A NAND fallback's second optimize, map and size add to the first.
          const list = result.times.get(s.stage) ?? [];
          const cpuList = result.cpu.get(s.stage) ?? [];
          if (list.length === s.rep + 1) {
            list[s.rep]! += s.ms;
            cpuList[s.rep]! += s.cpuMs;
          } else {
            list.push(s.ms);
            cpuList.push(s.cpuMs);
          }
          result.times.set(s.stage, list);
          result.cpu.set(s.stage, cpuList);
          result.stagePeakMB.set(s.stage, Math.max(result.stagePeakMB.get(s.stage) ?? 0, s.rssMB));
          const following = nextStage(s.stage);
          if (following !== s.stage && !result.stageStartMB.has(following)) result.stageStartMB.set(following, s.rssMB);
          if (s.note) {
            const had = result.notes.get(s.stage);
            result.notes.set(s.stage, !had ? s.note : had.split(", ").includes(s.note) ? had : `${had}, ${s.note}`);
          }
          result.runs = Math.max(result.runs, s.rep + 1);
          result.peakRssMB = Math.max(result.peakRssMB, s.rssMB);
          lastStage = s.stage;
        } else if (msg.t === "end") {
          result.info = msg.info as Record<string, unknown>;
          result.peakRssMB = Math.max(result.peakRssMB, msg.maxRssMB as number);
        } else if (msg.t === "error") {
          result.stopped = { stage: msg.stage as StageKey, why: String(msg.message) };
        } else if (msg.t === "crash") {
          result.stopped = { stage: msg.stage as StageKey, why: `${String(msg.stage)} threw ${String(msg.message)}`, crashed: true };
        }
      }
    });
    proc.stderr.on("data", (c: Buffer) => {
      stderr = (stderr + c.toString("utf8")).slice(-4000);
    });
    proc.on("exit", (code, signal) => {
      clearInterval(sampler);
      clearTimeout(cap);
      result.wallMs = performance.now() - t0;
      if (killedForCap) {
        const next = nextStage(lastStage);
        result.stopped = { stage: next, why: `stopped at the job cap (${Math.round(jobCapMs / 1000)} s) during ${next}` };
      } else if (!result.stopped && (code !== 0 || signal)) {
        result.stopped = { stage: nextStage(lastStage), why: `child ended with ${signal ?? `exit ${code}`}: ${stderr.trim().split("\n").slice(-6).join(" | ")}` };
      }
      resolve(result);
    });
  });
}

function nextStage(last: StageKey | "start"): StageKey {
  if (last === "start") return "parse";
  const i = STAGES.findIndex((s) => s.key === last);
  return STAGES[Math.min(i + 1, STAGES.length - 1)]!.key;
}

const median = (xs: number[]): number => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
};

/** Median of each run's sum over the given stages (only runs that reached all of them). */
function totalMs(r: JobResult, keys: readonly StageKey[]): number | undefined {
  const runs: number[] = [];
  for (let rep = 0; rep < r.runs; rep++) {
    let sum = 0;
    for (const k of keys) {
      const t = r.times.get(k)?.[rep];
      if (t === undefined) return runs.length ? median(runs) : undefined;
      sum += t;
    }
    runs.push(sum);
  }
  return runs.length ? median(runs) : undefined;
}

const TARGET_KEYS = STAGES.filter((s) => s.target).map((s) => s.key);
const ALL_KEYS = STAGES.map((s) => s.key);

function fmtMs(ms: number | undefined): string {
  if (ms === undefined) return "—";
  if (ms < 10) return ms.toFixed(1);
  if (ms < 100_000) return Math.round(ms).toString();
  return `${(ms / 1000).toFixed(0)} s`;
}

function table(headers: string[], rows: string[][], rightAlign: (i: number) => boolean = (i) => i > 0): string {
  const widths = headers.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? "").length)));
  const line = (cells: string[]) => "| " + cells.map((c, i) => (rightAlign(i) ? c.padStart(widths[i]!) : c.padEnd(widths[i]!))).join(" | ") + " |";
  return [line(headers), "|" + widths.map((w, i) => (rightAlign(i) ? "-".repeat(w + 1) + ":" : ":" + "-".repeat(w + 1))).join("|") + "|", ...rows.map(line)].join("\n");
}

interface PlanEntry {
  family: Family;
  sizes: number[];
}

function parseArgs(argv: string[]) {
  const get = (name: string) => {
    const i = argv.indexOf(name);
    return i >= 0 ? argv[i + 1] : undefined;
  };
  return {
    quick: argv.includes("--quick"),
    only: get("--only") as Family | undefined,
    stageCapMs: Number(get("--stage-cap") ?? 60) * 1000,
    jobCapMs: Number(get("--job-cap") ?? 600) * 1000,
    profile: get("--profile"),
    sizes: get("--sizes")?.split(",").map(Number),
    startModes: Object.fromEntries((get("--start-modes") ?? "").split(",").filter(Boolean).map((kv) => kv.split("="))) as Partial<Record<ReducibleStage, Mode>>,
  };
}

function repsFor(gates: number): number {
  return gates < 2_000 ? 5 : gates < 20_000 ? 3 : gates < 100_000 ? 2 : 1;
}

async function parent(): Promise<void> {
  const args = parseArgs(process.argv.slice(2));
  if (args.profile) return profile(args.profile, args.startModes);
  const plan: PlanEntry[] = args.quick
    ? [
        { family: "c17", sizes: [5] },
        { family: "rca", sizes: [8, 16, 32] },
        { family: "random", sizes: [1000, 2000] },
      ]
    : [
        { family: "c17", sizes: [5] },
        { family: "rca", sizes: [8, 16, 32, 64, 128, 256] },
        { family: "cla", sizes: [8, 16, 32, 64, 128, 256] },
        { family: "mul", sizes: [4, 8, 16, 32] },
        { family: "chain", sizes: [1000, 2000, 4000] },
        { family: "random", sizes: [1000, 2000, 5000, 10_000, 20_000, 50_000, 100_000, 200_000] },
      ];
  const entries = (args.only ? plan.filter((p) => p.family === args.only) : plan).map((p) => (args.sizes ? { ...p, sizes: args.sizes } : p));
  const print = (s: string) => process.stdout.write(s + "\n");
  print(`gatewright benchmark — ${new Date().toISOString()}`);
  print(`node ${process.version}, ${cpus().length} × ${cpus()[0]?.model ?? "cpu"}, ${(totalmem() / 2 ** 30).toFixed(0)} GiB; load average at start ${loadavg().map((x) => x.toFixed(2)).join(" ")}`);
  print(`stage cap ${args.stageCapMs / 1000} s, job cap ${args.jobCapMs / 1000} s; times in ms, medians of the runs shown in 'runs'\n`);

  const results: JobResult[] = [];
  for (const entry of entries) {
    const modes: Record<ReducibleStage, Mode> = { optimize: "full", equivalence: "full", plan: "full", ...args.startModes };
    let ended: string | undefined;
    for (const size of entry.sizes) {
      if (ended) {
        print(`  ${entry.family} ${size}: not run (${ended})`);
        continue;
      }
      const gates = gateCount(designOf(entry.family, size).text);
      const job: Job = { family: entry.family, size, reps: repsFor(gates), modes: { ...modes }, repeatBudgetMs: 60_000 };
      const capMs = args.jobCapMs;
      const r = await runJob(job, capMs);
      results.push(r);
      const shown = ALL_KEYS.map((k) => `${k} ${fmtMs(r.times.get(k) ? median(r.times.get(k)!) : undefined)}`).join(", ");
      print(`  ${entry.family} ${size} (${r.gates} gates, ${r.runs} run${r.runs === 1 ? "" : "s"}, ${(r.wallMs / 1000).toFixed(0)} s): ${shown}; peak ${r.peakRssMB} MB; ${emitText(r)}${r.stopped ? ` — ${r.stopped.why}` : ""}`);
      // CPU time is less disturbed than wall time when other work shares the processors.
      const cpuShown = ALL_KEYS.map((k) => `${k} ${fmtMs(r.cpu.get(k)?.length ? median(r.cpu.get(k)!) : undefined)}`).join(", ");
      print(`    CPU (medians, ms): ${cpuShown}`);
      // Time caps: reduce, then skip, the stages that ran too long.
      for (const k of ["optimize", "equivalence", "plan"] as const) {
        const t = r.times.get(k);
        const tooLong = (t && median(t) > args.stageCapMs) || r.stopped?.stage === k;
        if (!tooLong) continue;
        if (modes[k] === "full") modes[k] = "reduced";
        else if (modes[k] === "reduced" && k !== "plan") modes[k] = "skipped";
      }
      // A crash is recorded and the family goes on (the other stages' figures still count); a
      // stage that cannot be reduced and ran past the job cap ends the family.
      if (r.stopped && !r.stopped.crashed) {
        if (!(["optimize", "equivalence", "plan"] as string[]).includes(r.stopped.stage)) ended = `${r.stopped.stage} did not finish at ${size}`;
        else if (r.stopped.stage === "plan" && job.modes.plan === "reduced") ended = `the reduced stimulus did not finish at ${size}`;
      }
    }
  }
  print("");
  report(results, args, print);
}

/** The emit stage (emit and write): wall and CPU time (medians), memory at its start, peak while it ran, output size. */
function emitText(r: JobResult): string {
  const t = r.times.get("emit");
  const c = r.cpu.get("emit");
  if (!t?.length) return "emit —";
  const bytes = typeof r.info.outputBytes === "number" ? `, ${(r.info.outputBytes / 1e6).toFixed(1)} MB written` : "";
  return `emit ${fmtMs(median(t))} ms (CPU ${fmtMs(c?.length ? median(c) : undefined)} ms), RSS ${r.stageStartMB.get("emit") ?? "—"} MB at its start, ${r.stagePeakMB.get("emit") ?? "—"} MB peak during it${bytes}`;
}

function report(results: JobResult[], args: { stageCapMs: number; jobCapMs: number }, print: (s: string) => void): void {
  const cell = (r: JobResult, k: StageKey) => {
    const t = r.times.get(k);
    const note = r.notes.get(k) ?? (r.job.modes[k as ReducibleStage] !== undefined && r.job.modes[k as ReducibleStage] !== "full" ? r.job.modes[k as ReducibleStage] : undefined);
    if (!t || t.length === 0) return r.stopped?.stage === k ? (r.stopped.crashed ? "crash" : r.stopped.why.startsWith("stopped") ? "> cap" : "failed") : "—";
    // A stage that ran once and then crashed (the NAND fallback's second try, say).
    const crashed = r.stopped?.crashed && r.stopped.stage === k ? " + crash" : "";
    return fmtMs(median(t)) + (note ? ` (${note})` : "") + crashed;
  };
  print("## Every design: stage times (ms, medians), totals and peak memory\n");
  print(
    table(
      ["design", "gates", "cells", "runs", ...STAGES.map((s) => s.label), "target path", "all stages", "peak RSS MB"],
      results.map((r) => [
        r.job.family === "c17" ? "c17" : `${r.job.family} ${r.job.size}`,
        String(r.gates),
        r.info.cells !== undefined ? String(r.info.cells) : "—",
        String(r.runs),
        ...STAGES.map((s) => cell(r, s.key)),
        fmtMs(totalMs(r, TARGET_KEYS)),
        fmtMs(totalMs(r, ALL_KEYS)) + (r.stopped ? " (stopped)" : ""),
        String(r.peakRssMB),
      ]),
      (i) => i > 0,
    ),
  );
  print("\ntarget path: parse, build, optimize, map, size (uniform) and emit (all six files); all stages: as synthesize() runs them, with the equivalence check, hazard check and testbench stimulus.");
  print("\n## Emit and write (all six files into a scratch folder)\n");
  for (const r of results) print(`- ${r.job.family === "c17" ? "c17" : `${r.job.family} ${r.job.size}`}: ${emitText(r)}`);
  const stopped = results.filter((r) => r.stopped);
  for (const r of stopped) print(`stopped: ${r.job.family} ${r.job.size}: ${r.stopped!.why}`);

  // Doubling ratios: time(2N)/time(N) for every pair of sizes in a family, per doubling.
  print("\n## Scaling: time ratio per doubling of the design (target ≤ 2.00 × 1.15 = 2.30)\n");
  const rows: string[][] = [];
  const families = [...new Set(results.map((r) => r.job.family))];
  for (const fam of families) {
    const rs = results.filter((r) => r.job.family === fam && r.gates > 0).sort((a, b) => a.gates - b.gates);
    for (let i = 1; i < rs.length; i++) {
      const a = rs[i - 1]!;
      const b = rs[i]!;
      const doublings = Math.log2(b.gates / a.gates);
      if (doublings <= 0) continue;
      const per = (x?: number, y?: number) => (x && y ? (y / x) ** (1 / doublings) : undefined);
      const sameModes = JSON.stringify(a.job.modes) === JSON.stringify(b.job.modes);
      const tRatio = per(totalMs(a, TARGET_KEYS), totalMs(b, TARGET_KEYS));
      const allRatio = sameModes ? per(totalMs(a, ALL_KEYS), totalMs(b, ALL_KEYS)) : undefined;
      const verdict = (x?: number) => (x === undefined ? "—" : `${x.toFixed(2)} ${x <= 2.3 ? "met" : "not met"}`);
      const med = (r: JobResult, k: StageKey) => (r.times.get(k)?.length ? median(r.times.get(k)!) : undefined);
      const worst = STAGES.map((s) => ({ s: s.label, before: med(a, s.key) ?? 0, x: per(med(a, s.key), med(b, s.key)) }))
        .filter((x) => x.x !== undefined && x.before > 20)
        .sort((p, q) => q.x! - p.x!)[0];
      // The stages both runs finished, in the same mode: a figure even when a stage crashed.
      const common = STAGES.filter((st) => med(a, st.key) !== undefined && med(b, st.key) !== undefined && (a.notes.get(st.key) ?? "") === (b.notes.get(st.key) ?? ""));
      const sum = (r: JobResult) => common.reduce((x, st) => x + med(r, st.key)!, 0);
      const commonRatio = common.length ? per(sum(a), sum(b)) : undefined;
      rows.push([
        fam,
        `${a.gates} → ${b.gates}`,
        doublings.toFixed(2),
        verdict(tRatio),
        sameModes ? verdict(allRatio) : "— (modes differ)",
        common.length === STAGES.length ? "all" : `${verdict(commonRatio)} (${common.map((st) => st.label).join(", ")})`,
        worst ? `${worst.s} ${worst.x!.toFixed(2)}` : "—",
      ]);
    }
  }
  print(table(["family", "gates", "doublings", "target path, per doubling", "all stages, per doubling", "stages both finished, per doubling", "steepest stage (> 20 ms)"], rows, (i) => i === 2));

  // The issue's targets at 100,000 gates.
  print("\n## Targets (issue 7): 100,000-gate random network\n");
  const r100 = results.find((r) => r.job.family === "random" && r.job.size === 100_000);
  const r50 = results.find((r) => r.job.family === "random" && r.job.size === 50_000);
  const r200 = results.find((r) => r.job.family === "random" && r.job.size === 200_000);
  const target = totalMs(r100 ?? ({ runs: 0, times: new Map() } as unknown as JobResult), TARGET_KEYS);
  const verdict = (ok: boolean | undefined) => (ok === undefined ? "not measured" : ok ? "met" : "not met");
  const ratio = (a?: JobResult, b?: JobResult) => {
    const x = a && totalMs(a, TARGET_KEYS);
    const y = b && totalMs(b, TARGET_KEYS);
    return x && y ? y / x : undefined;
  };
  const d1 = ratio(r50, r100);
  const d2 = ratio(r100, r200);
  print(
    table(
      ["target", "figure", "verdict"],
      [
        ["target path ≤ 3 s", target !== undefined ? `${(target / 1000).toFixed(1)} s` : "—", verdict(target === undefined ? undefined : target <= 3000)],
        ["all stages (for comparison)", (() => { const x = r100 && totalMs(r100, ALL_KEYS); return x !== undefined ? `${(x / 1000).toFixed(1)} s${r100?.stopped ? " (stopped)" : ""}` : "—"; })(), "—"],
        ["peak RSS ≤ 1 GB", r100 ? `${r100.peakRssMB} MB` : "—", verdict(r100 ? r100.peakRssMB <= 1024 : undefined)],
        ["50k → 100k time ≤ 2 × (±15 %)", d1 ? `${d1.toFixed(2)} ×` : "—", verdict(d1 === undefined ? undefined : d1 <= 2.3)],
        ["100k → 200k time ≤ 2 × (±15 %)", d2 ? `${d2.toFixed(2)} ×` : "—", verdict(d2 === undefined ? undefined : d2 <= 2.3)],
      ],
      (i) => i === 1,
    ),
  );
  print(`\nload average at the end ${loadavg().map((x) => x.toFixed(2)).join(" ")} (on ${cpus().length} cores: figures above 1 per core mean the runs shared the processors).`);
  print(`time caps: a stage over ${args.stageCapMs / 1000} s runs reduced on the family's larger sizes, then skipped; a child over ${args.jobCapMs / 1000} s is stopped and ends its family.`);
}

// ---------------------------------------------------------------------------------------------
// Profiling one design: node --cpu-prof in the child, then the hottest functions

async function profile(spec: string, modes: Partial<Record<ReducibleStage, Mode>>): Promise<void> {
  const [family, sizeText] = spec.split(":") as [Family, string];
  const size = Number(sizeText);
  const dir = mkdtempSync(join(tmpdir(), "gw-bench-prof-"));
  const job: Job = { family, size, reps: 1, modes: { optimize: "full", equivalence: "full", plan: "full", ...modes }, repeatBudgetMs: 0 };
  const r = await runJob(job, 3_600_000, ["--cpu-prof", `--cpu-prof-dir=${dir}`]);
  process.stdout.write(`${family} ${size}: ${ALL_KEYS.map((k) => `${k} ${fmtMs(r.times.get(k)?.[0])}`).join(", ")}; peak ${r.peakRssMB} MB${r.stopped ? ` — ${r.stopped.why}` : ""}\n`);
  const files = existsSync(dir) ? readdirSync(dir).filter((f) => f.endsWith(".cpuprofile")) : [];
  for (const f of files) process.stdout.write(summarizeProfile(join(dir, f)) + "\n");
  process.stdout.write(`profile files in ${dir}\n`);
}

interface ProfileNode {
  id: number;
  callFrame: { functionName: string; url: string; lineNumber: number };
  children?: number[];
}

function summarizeProfile(path: string): string {
  const p = JSON.parse(readFileSync(path, "utf8")) as { nodes: ProfileNode[]; samples: number[]; timeDeltas: number[] };
  const byId = new Map(p.nodes.map((n) => [n.id, n]));
  const parentOf = new Map<number, number>();
  for (const n of p.nodes) for (const c of n.children ?? []) parentOf.set(c, n.id);
  const dt = new Map<number, number>();
  p.samples.forEach((s, i) => dt.set(s, (dt.get(s) ?? 0) + (p.timeDeltas[i] ?? 0)));
  const key = (n: ProfileNode) => `${n.callFrame.functionName || "(anonymous)"}  ${n.callFrame.url.replace(/^.*\/work\/main\//, "").replace(/^file:\/\//, "")}`;
  const self = new Map<string, number>();
  const incl = new Map<string, number>();
  for (const [id, t] of dt) {
    const n = byId.get(id)!;
    self.set(key(n), (self.get(key(n)) ?? 0) + t);
    const seen = new Set<string>();
    for (let x: number | undefined = id; x !== undefined; x = parentOf.get(x)) {
      const k = key(byId.get(x)!);
      if (seen.has(k)) continue;
      seen.add(k);
      incl.set(k, (incl.get(k) ?? 0) + t);
    }
  }
  const top = (m: Map<string, number>, n: number) =>
    [...m].filter(([k]) => k.includes("src/") || k.includes("node_modules/")).sort((a, b) => b[1] - a[1]).slice(0, n).map(([k, t]) => `  ${(t / 1000).toFixed(0).padStart(8)} ms  ${k}`).join("\n");
  return `self time (gatewright and libraries):\n${top(self, 15)}\ninclusive time:\n${top(incl, 25)}`;
}

// ---------------------------------------------------------------------------------------------

if (process.argv[2] === "--child") {
  child(JSON.parse(process.argv[3]!) as Job).catch((e: unknown) => {
    // Rethrown outside the promise, so the child's handler names the stage.
    setImmediate(() => {
      throw e;
    });
  });
} else {
  parent().catch((e: unknown) => {
    process.stderr.write(`bench failed: ${(e as Error).stack ?? e}\n`);
    process.exitCode = 1;
  });
}
