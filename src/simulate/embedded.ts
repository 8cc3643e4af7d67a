// ngspice compiled to WebAssembly (the eecircuit-engine package), run in a worker thread.
//
// How eecircuit-engine behaves (measured with version 1.8.0, ngspice 45.2 inside):
// - `new Simulation(); await sim.start()` compiles and starts the 20 MB module: about 1.2 s on the
//   main thread, about 2 s inside a worker thread. One instance runs any number of netlists in a
//   row: `setNetList(text)` then `await runSim()`, each run sending ngspice the commands
//   `source test.cir`, `destroy all`, `run`, `write out.raw` and reading `out.raw` back from its
//   in-memory file system (it reads no files of ours, so includes must be inlined).
// - A run executes synchronously once triggered: it blocks its thread until ngspice is done, so a
//   timer in the same thread cannot stop it. That is why the engine lives in a worker here: the
//   main thread stays free (progress display) and a run past its time limit is stopped by ending
//   the worker; the next run starts a fresh one.
// - ngspice's stderr lines are collected in `getError()` (and echoed to console.error, which the
//   worker silences); everything it prints is in `getInfo()`, including `.meas` results in the
//   form `name = value`. `getInfo()` is reset by each run.
// - On a netlist error (unknown model, bad card) ngspice prints the error, the run completes and
//   `write` saves the plot of constants: `runSim()` resolves with that plot ("Plotname:
//   constants"), which is not a result.
// - When an analysis fails (e.g. "timestep too small"), `write` finds no vectors and writes no file;
//   the engine then cannot read `out.raw`, swallows that, and `runSim()` never resolves. Worse, an
//   `out.raw` left by the previous run would be read as this run's result. The worker therefore
//   deletes `out.raw` before each run and, because the run is synchronous, knows after one timer
//   tick whether the promise resolved; if not, the run failed and the errors say why.
// - A missing `.include`/`.lib` file is fatal: ngspice prints "ERROR: fatal error in ngspice,
//   exit(1)" and the instance is dead. The worker checks referenced files against the engine's
//   file system first (it ships model cards such as modelcard.CMOS90) and refuses the run instead;
//   should a fatal error happen anyway, the worker is replaced.
import { existsSync, readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import { inlineIncludes, referencedFiles, stripControlSections } from "./netlist.js";
import { buildRun, DEFAULT_TIMEOUT_MS, failedRun, type RunOptions, type SimulationRun, type Simulator } from "./run.js";

const ENGINE_PACKAGE = "eecircuit-engine";

/** Runs inside the worker thread (plain JavaScript, CommonJS, evaluated from this string). */
const WORKER_SOURCE = String.raw`
const { parentPort, workerData } = require("node:worker_threads");
// The engine copies each ngspice stderr line to console.error and announces some modes on
// console.info; both are kept in getError()/getInfo() and returned, so they are silenced here.
console.error = () => {};
console.info = () => {};
console.warn = () => {};
let sim = null;
let fs = null;
const tick = (ms) => new Promise((resolve) => setTimeout(resolve, ms));
const ready = (async () => {
  const t0 = performance.now();
  const { Simulation } = await import(workerData.engineUrl);
  sim = new Simulation();
  await sim.start();
  const mod = typeof sim.__getSpiceModuleForTests === "function" ? sim.__getSpiceModuleForTests() : null;
  fs = mod && mod.FS ? mod.FS : null;
  parentPort.postMessage({ type: "ready", startupMs: performance.now() - t0, initInfo: sim.getInitInfo() });
})().catch((e) => {
  parentPort.postMessage({ type: "failed", message: String((e && e.stack) || e) });
});
function exists(name) {
  if (!fs) return true;
  try { return fs.analyzePath(name.startsWith("/") ? name : "/" + name).exists; } catch { return false; }
}
function rawFromResult(r) {
  // Used only when the engine's file system is not reachable: rebuild plain arrays.
  if (!r || !Array.isArray(r.data)) return null;
  const plotName = (/^Plotname:\s*(.*)$/m.exec(r.header || "") || [])[1] || "";
  return {
    plotName,
    names: r.data.map((d) => d.name),
    types: r.data.map((d) => d.type),
    arrays: r.data.map((d) => Float64Array.from(d.values, (v) => (typeof v === "number" ? v : Math.hypot(v.real, v.img)))),
  };
}
parentPort.on("message", async (msg) => {
  if (!msg || msg.type !== "run") return;
  await ready;
  if (!sim) return;
  const missing = msg.files.filter((f) => !exists(f));
  if (missing.length > 0) {
    parentPort.postMessage({ type: "result", id: msg.id, missing, info: "", stderr: [], fatal: false });
    return;
  }
  if (fs) { try { fs.unlink("/out.raw"); } catch {} }
  sim.setNetList(msg.netlist);
  let settled = false;
  let result = null;
  sim.runSim().then((r) => { settled = true; result = r; }, () => { settled = true; });
  // The run is synchronous once triggered; give the promise a few ticks to settle.
  for (let i = 0; i < 4 && !settled; i++) await tick(i === 0 ? 0 : 10);
  const info = sim.getInfo();
  const stderr = sim.getError().slice();
  const fatal = /fatal error in ngspice/i.test(info);
  let raw = null;
  let plot = null;
  if (fs && exists("/out.raw")) {
    try { raw = fs.readFile("/out.raw"); } catch { raw = null; }
  } else if (!fs && settled) {
    plot = rawFromResult(result);
  }
  const transfer = [];
  if (raw) { raw = new Uint8Array(raw); transfer.push(raw.buffer); }
  if (plot) for (const a of plot.arrays) transfer.push(a.buffer);
  parentPort.postMessage({ type: "result", id: msg.id, raw, plot, info, stderr, fatal, settled }, transfer);
});
`;

interface ReadyMessage {
  type: "ready";
  startupMs: number;
  initInfo: string;
}
interface FailedMessage {
  type: "failed";
  message: string;
}
interface ResultMessage {
  type: "result";
  id: number;
  missing?: string[];
  raw?: Uint8Array | null;
  plot?: { plotName: string; names: string[]; types: string[]; arrays: Float64Array[] } | null;
  info: string;
  stderr: string[];
  fatal: boolean;
  settled?: boolean;
}
type WorkerMessage = ReadyMessage | FailedMessage | ResultMessage;

/** Where the engine's ES module is, found along Node's own package lookup paths. */
export function locateEngineModule(): string | undefined {
  const require = createRequire(import.meta.url);
  const paths = require.resolve.paths(ENGINE_PACKAGE) ?? [];
  for (const base of paths) {
    const dir = join(base, ENGINE_PACKAGE);
    const manifestPath = join(dir, "package.json");
    if (!existsSync(manifestPath)) continue;
    try {
      const manifest = JSON.parse(readFileSync(manifestPath, "utf8")) as {
        exports?: Record<string, { import?: string } | string>;
        module?: string;
        main?: string;
      };
      const dot = manifest.exports?.["."];
      const entry = (typeof dot === "string" ? dot : dot?.import) ?? manifest.module ?? manifest.main;
      if (entry) {
        const file = join(dir, entry);
        if (existsSync(file)) return pathToFileURL(file).href;
      }
    } catch {
      // An unreadable manifest: keep looking further up.
    }
  }
  return undefined;
}

function versionFrom(text: string): string | undefined {
  return /ngspice-([\w.+-]+)/.exec(text)?.[1];
}

/** Vectors rebuilt from the engine's own parse, as raw-file bytes, so both paths share one reader. */
function rawBytesFromPlot(plot: NonNullable<ResultMessage["plot"]>): Uint8Array {
  const points = plot.arrays[0]?.length ?? 0;
  const header =
    `Title: embedded\nPlotname: ${plot.plotName}\nFlags: real\nNo. Variables: ${plot.names.length}\n` +
    `No. Points: ${points}\nVariables:\n` +
    plot.names.map((n, i) => `\t${i}\t${n}\t${plot.types[i] ?? "notype"}\n`).join("") +
    "Binary:\n";
  const head = new TextEncoder().encode(header);
  const bytes = new Uint8Array(head.length + points * plot.names.length * 8);
  bytes.set(head);
  const view = new DataView(bytes.buffer, head.length);
  for (let p = 0; p < points; p++) {
    plot.arrays.forEach((a, v) => view.setFloat64((p * plot.arrays.length + v) * 8, a[p]!, true));
  }
  return bytes;
}

interface Pending {
  resolve: (m: ResultMessage | { type: "lost"; reason: string }) => void;
}

class EmbeddedEngine implements Simulator {
  readonly name = "ngspice (embedded, eecircuit-engine)";
  version?: string;
  /** Time the last engine start took, in milliseconds (worker start, module compile, ngspice init). */
  startupMs?: number;
  private worker?: Worker;
  private starting?: Promise<Worker>;
  private queue: Promise<unknown> = Promise.resolve();
  private nextId = 1;
  private readonly pending = new Map<number, Pending>();

  constructor(private readonly engineUrl: string) {}

  /** Starts the worker if none is running. Rejects with a readable message when it cannot. */
  start(): Promise<Worker> {
    if (this.worker) return Promise.resolve(this.worker);
    if (this.starting) return this.starting;
    this.starting = new Promise<Worker>((resolve, reject) => {
      const worker = new Worker(WORKER_SOURCE, { eval: true, workerData: { engineUrl: this.engineUrl } });
      let started = false;
      worker.on("message", (m: WorkerMessage) => {
        if (m.type === "ready") {
          started = true;
          this.startupMs = m.startupMs;
          this.version = versionFrom(m.initInfo);
          this.worker = worker;
          this.starting = undefined;
          worker.unref();
          resolve(worker);
        } else if (m.type === "failed") {
          this.starting = undefined;
          void worker.terminate();
          reject(new Error(`the embedded ngspice engine did not start: ${m.message}`));
        } else if (m.type === "result") {
          const p = this.pending.get(m.id);
          this.pending.delete(m.id);
          p?.resolve(m);
        }
      });
      const lost = (reason: string) => {
        if (this.worker === worker) this.worker = undefined;
        if (!started) {
          this.starting = undefined;
          reject(new Error(`the embedded ngspice engine did not start: ${reason}`));
        }
        for (const [id, p] of this.pending) {
          this.pending.delete(id);
          p.resolve({ type: "lost", reason });
        }
      };
      worker.on("error", (e) => lost(e instanceof Error ? e.message : String(e)));
      worker.on("exit", (code) => lost(`the engine's worker thread ended (exit code ${code})`));
    });
    return this.starting;
  }

  run(netlist: string, options: RunOptions = {}): Promise<SimulationRun> {
    const job = this.queue.then(() => this.runNow(netlist, options));
    this.queue = job.catch(() => undefined);
    return job;
  }

  private async discardWorker(): Promise<void> {
    const w = this.worker;
    this.worker = undefined;
    if (w) await w.terminate();
  }

  private async runNow(netlist: string, options: RunOptions): Promise<SimulationRun> {
    const warnings: string[] = [];
    // Inline first, so a .control section inside an included file is caught too.
    const inlined = options.files && options.files.size > 0 ? inlineIncludes(netlist, options.files) : netlist;
    const stripped = stripControlSections(inlined);
    if (stripped.removed > 0) warnings.push("the netlist's .control section was ignored; the simulator runs the analyses itself");
    const text = stripped.netlist;
    const files = referencedFiles(text);

    let worker: Worker;
    try {
      worker = await this.start();
    } catch (e) {
      return failedRun(this.name, [e instanceof Error ? e.message : String(e)]);
    }
    const timeoutMs = options.timeoutMs ?? DEFAULT_TIMEOUT_MS;
    const id = this.nextId++;
    const t0 = performance.now();
    worker.ref();
    let timer: NodeJS.Timeout | undefined;
    const reply = await new Promise<ResultMessage | { type: "lost"; reason: string } | { type: "timeout" }>((resolve) => {
      this.pending.set(id, { resolve });
      timer = setTimeout(() => {
        this.pending.delete(id);
        resolve({ type: "timeout" });
      }, timeoutMs);
      worker.postMessage({ type: "run", id, netlist: text, files });
    });
    clearTimeout(timer);
    const elapsedMs = performance.now() - t0;
    if (reply.type === "timeout") {
      await this.discardWorker();
      return failedRun(this.name, [
        `the simulation did not finish within ${(timeoutMs / 1000).toFixed(1)} s and was stopped`,
      ], elapsedMs);
    }
    if (this.worker === worker) worker.unref();
    if (reply.type === "lost") {
      return failedRun(this.name, [`the embedded ngspice engine stopped during the run: ${reply.reason}`], elapsedMs);
    }
    if (reply.missing && reply.missing.length > 0) {
      return failedRun(
        this.name,
        reply.missing.map(
          (f) => `cannot find include file "${f}": the embedded engine reads no files; pass its text in the run's files`,
        ),
        elapsedMs,
      );
    }
    if (reply.fatal) await this.discardWorker();
    const rawBytes = reply.raw ?? (reply.plot ? rawBytesFromPlot(reply.plot) : undefined);
    return buildRun({
      simulator: this.name,
      ...(rawBytes ? { rawBytes } : {}),
      log: reply.info,
      stderr: reply.stderr,
      extraWarnings: warnings,
      elapsedMs,
    });
  }

  async close(): Promise<void> {
    await this.queue;
    await this.discardWorker();
    if (shared === this) shared = undefined;
  }
}

let shared: EmbeddedEngine | undefined;

/**
 * The embedded ngspice engine, shared by the whole process: the first call starts it (about 2 s),
 * later calls return the same instance. Runs are queued and executed one at a time. `close()`
 * ends it; a later call starts a new one. Rejects only when the engine cannot start at all.
 */
export async function embeddedSimulator(): Promise<Simulator & { readonly startupMs?: number }> {
  if (!shared) {
    const url = locateEngineModule();
    if (!url) throw new Error(`the ${ENGINE_PACKAGE} package is not installed, so the embedded simulator is not available`);
    shared = new EmbeddedEngine(url);
  }
  const engine = shared;
  try {
    await engine.start();
  } catch (e) {
    if (shared === engine) shared = undefined;
    throw e;
  }
  return engine;
}
