// The young generation the command runs with. A large design allocates heavily and keeps most
// of what it allocates (graphs, netlists, analyses), so with node's default young generation the
// collector copies the same survivors many times: at 100,000 gates a larger one cuts the run by
// about a tenth (medians of 3 on 2 cores, the benchmark's random network). The command starts
// itself again with it when a file on its command line is large (src/cli/bin.ts); small runs,
// which gain nothing, are not started twice.

/** node's flag for the larger young generation (its semi-spaces, in MB). */
export const YOUNG_GENERATION_FLAG = "--max-semi-space-size=64";

/** Input files at least this large (bytes) are run with YOUNG_GENERATION_FLAG. */
export const LARGE_INPUT_BYTES = 1_000_000;

/** Set in the environment of the command started again, so that it does not start itself a
 *  third time. */
export const RESTARTED_ENV = "GATEWRIGHT_YOUNG_GENERATION";

/** True when the command should start itself again with YOUNG_GENERATION_FLAG: not already
 *  given (by the user or a restart), and some argument names a file of LARGE_INPUT_BYTES or
 *  more. `sizeOf` gives a path's size in bytes, or undefined when it is not a file. */
export function wantsLargerYoungGeneration(args: readonly string[], execArgv: readonly string[], env: NodeJS.ProcessEnv, sizeOf: (path: string) => number | undefined): boolean {
  if (env[RESTARTED_ENV] !== undefined) return false;
  if (execArgv.some((a) => a.startsWith("--max-semi-space-size"))) return false;
  if ((env.NODE_OPTIONS ?? "").includes("--max-semi-space-size")) return false;
  return args.some((a) => !a.startsWith("-") && (sizeOf(a) ?? 0) >= LARGE_INPUT_BYTES);
}
