// The system `ngspice` binary, run in batch mode in a temporary directory.
//
// ngspice's plain batch run with a raw file (`ngspice -b -r out.raw tb.cir`) skips `.meas`
// ("No .measure possible in batch mode (-b) with -r rawfile set!"). So the netlist is given a
// `.control` block — `run`, `write out.raw`, `quit` — and run as `ngspice -b tb.cir`: still batch
// mode, the same command sequence the embedded engine uses, with `.meas` results on stdout.
// Observed with ngspice 39: a netlist error exits with status 1 and writes no raw file; a failed
// analysis (timestep too small) exits with status 0 and writes no raw file; messages go to stderr.
import { spawn, execFile } from "node:child_process";
import { mkdtemp, readFile, rm, writeFile, mkdir } from "node:fs/promises";
import { tmpdir } from "node:os";
import { dirname, isAbsolute, join, relative } from "node:path";
import { normalizeIncludeName, stripControlSections, withControlBlock } from "./netlist.js";
import { buildRun, DEFAULT_TIMEOUT_MS, failedRun, type RunOptions, type SimulationRun, type Simulator } from "./run.js";

const MAX_CAPTURE_CHARS = 4_000_000;

export interface SystemSimulatorOptions {
  /** Raw file format ngspice is told to write (`set filetype=…`); both are read. Default binary. */
  rawFormat?: "binary" | "ascii";
}

function probeVersion(binary: string): Promise<string | undefined> {
  return new Promise((resolve) => {
    execFile(binary, ["--version"], { timeout: 15_000 }, (error, stdout, stderr) => {
      const text = `${stdout ?? ""}${stderr ?? ""}`;
      const version = /ngspice-([\w.+-]+)/.exec(text)?.[1];
      if (error && version === undefined) resolve(undefined);
      else resolve(version ?? "unknown");
    });
  });
}

class SystemNgspice implements Simulator {
  readonly name: string;

  constructor(
    private readonly binary: string,
    readonly version: string,
    private readonly rawFormat: "binary" | "ascii",
  ) {
    this.name = `ngspice ${version} (system, ${binary})`;
  }

  async run(netlist: string, options: RunOptions = {}): Promise<SimulationRun> {
    const warnings: string[] = [];
    const stripped = stripControlSections(netlist);
    if (stripped.removed > 0) warnings.push("the netlist's .control section was ignored; the simulator runs the analyses itself");
    const text = withControlBlock(stripped.netlist, [`set filetype=${this.rawFormat}`, "run", "write out.raw", "quit"]);
    const t0 = performance.now();
    let dir: string | undefined;
    try {
      dir = await mkdtemp(join(tmpdir(), "gatewright-ngspice-"));
      for (const [name, content] of options.files ?? []) {
        const safe = normalizeIncludeName(name);
        const target = join(dir, safe);
        const rel = relative(dir, target);
        if (isAbsolute(safe) || rel.startsWith("..") || rel === "") {
          warnings.push(`include file "${name}" was not written: only names inside the netlist's folder can be given`);
          continue;
        }
        await mkdir(dirname(target), { recursive: true });
        await writeFile(target, content, "utf8");
      }
      await writeFile(join(dir, "tb.cir"), text, "utf8");
      const proc = await this.execute(dir, options.timeoutMs ?? DEFAULT_TIMEOUT_MS);
      const elapsedMs = performance.now() - t0;
      const extraErrors: string[] = [];
      if (proc.spawnError) extraErrors.push(`ngspice could not be run: ${proc.spawnError}`);
      if (proc.timedOut) {
        extraErrors.push(`the simulation did not finish within ${((options.timeoutMs ?? DEFAULT_TIMEOUT_MS) / 1000).toFixed(1)} s and was stopped`);
      }
      let rawBytes: Uint8Array | undefined;
      try {
        rawBytes = new Uint8Array(await readFile(join(dir, "out.raw")));
      } catch {
        rawBytes = undefined;
      }
      const run = buildRun({
        simulator: this.name,
        ...(rawBytes ? { rawBytes } : {}),
        log: proc.stdout,
        stderr: proc.stderr,
        extraErrors,
        extraWarnings: warnings,
        elapsedMs,
      });
      if (proc.exitCode !== 0 && proc.exitCode !== null && run.errors.length === 0) {
        run.errors.push(`ngspice exited with status ${proc.exitCode}`);
      }
      return run;
    } catch (e) {
      return failedRun(this.name, [`the system ngspice run could not be prepared: ${e instanceof Error ? e.message : String(e)}`], performance.now() - t0);
    } finally {
      if (dir) await rm(dir, { recursive: true, force: true }).catch(() => undefined);
    }
  }

  private execute(
    cwd: string,
    timeoutMs: number,
  ): Promise<{ stdout: string; stderr: string; exitCode: number | null; timedOut: boolean; spawnError?: string }> {
    return new Promise((resolve) => {
      let stdout = "";
      let stderr = "";
      let timedOut = false;
      let spawnError: string | undefined;
      const child = spawn(this.binary, ["-b", "tb.cir"], { cwd, stdio: ["ignore", "pipe", "pipe"] });
      const keep = (acc: string, chunk: Buffer) => {
        const next = acc + chunk.toString("utf8");
        return next.length > MAX_CAPTURE_CHARS ? next.slice(-MAX_CAPTURE_CHARS) : next;
      };
      child.stdout.on("data", (c: Buffer) => (stdout = keep(stdout, c)));
      child.stderr.on("data", (c: Buffer) => (stderr = keep(stderr, c)));
      const timer = setTimeout(() => {
        timedOut = true;
        child.kill("SIGKILL");
      }, timeoutMs);
      let done = false;
      const finish = (code: number | null) => {
        if (done) return;
        done = true;
        clearTimeout(timer);
        const result: { stdout: string; stderr: string; exitCode: number | null; timedOut: boolean; spawnError?: string } = {
          stdout,
          stderr,
          exitCode: code,
          timedOut,
        };
        if (spawnError !== undefined) result.spawnError = spawnError;
        resolve(result);
      };
      child.on("error", (e) => {
        spawnError = e.message;
        // A process that never started sends no "close".
        if (child.pid === undefined) finish(null);
      });
      child.on("close", (code) => finish(code));
    });
  }
}

/**
 * The system `ngspice` (or `binary`), or undefined when it is not installed or does not start.
 * Runs are independent processes and may overlap.
 */
export async function systemSimulator(binary = "ngspice", options: SystemSimulatorOptions = {}): Promise<Simulator | undefined> {
  const version = await probeVersion(binary);
  if (version === undefined) return undefined;
  return new SystemNgspice(binary, version, options.rawFormat ?? "binary");
}
