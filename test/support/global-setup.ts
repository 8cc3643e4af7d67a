// Compiles the grammars before any test runs, so tests never use stale generated parsers.
import { execFileSync } from "node:child_process";

export default function setup(): void {
  execFileSync(process.execPath, ["src/build/generate.mjs"], { stdio: "inherit" });
}
