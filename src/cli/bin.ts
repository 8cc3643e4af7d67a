#!/usr/bin/env node
// The gatewright command.
import { spawnSync } from "node:child_process";
import { statSync } from "node:fs";
import { hideBin } from "yargs/helpers";
import { RESTARTED_ENV, YOUNG_GENERATION_FLAG, wantsLargerYoungGeneration } from "./heap.js";
import { main } from "./main.js";

const args = hideBin(process.argv);
const sizeOf = (path: string): number | undefined => {
  try {
    const s = statSync(path);
    return s.isFile() ? s.size : undefined;
  } catch {
    return undefined;
  }
};

if (wantsLargerYoungGeneration(args, process.execArgv, process.env, sizeOf)) {
  // A large design: the same command again, with the larger young generation (src/cli/heap.ts).
  const again = spawnSync(process.execPath, [...process.execArgv, YOUNG_GENERATION_FLAG, process.argv[1]!, ...args], {
    stdio: "inherit",
    env: { ...process.env, [RESTARTED_ENV]: "1" },
  });
  if (again.error) {
    process.stderr.write(`gatewright: could not start node again for a large design (${again.error.message}); running with the default heap\n`);
    run();
  } else if (again.signal) process.kill(process.pid, again.signal);
  else process.exitCode = again.status ?? 1;
} else run();

function run(): void {
  main(args).then(
    (code) => {
      process.exitCode = code;
    },
    (e: unknown) => {
      process.stderr.write(`gatewright: internal error: ${(e as Error).message}\n`);
      process.exitCode = 1;
    },
  );
}
