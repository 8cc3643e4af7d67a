// Compiles every grammars/*.ne into src/parse/generated/*.ts with nearley's own compiler.
// Run by `npm run grammars` (part of `prepare`, `build` and `test`), so a fresh clone never
// runs a stale grammar.
import { execFileSync } from "node:child_process";
import { mkdirSync, readdirSync, existsSync, statSync } from "node:fs";
import { dirname, join, basename } from "node:path";
import { fileURLToPath } from "node:url";
import { createRequire } from "node:module";

const root = join(dirname(fileURLToPath(import.meta.url)), "..", "..");
const require = createRequire(import.meta.url);
const nearleyc = require.resolve("nearley/bin/nearleyc.js");
const outDir = join(root, "src", "parse", "generated");
mkdirSync(outDir, { recursive: true });
for (const file of readdirSync(join(root, "grammars"))) {
  if (!file.endsWith(".ne")) continue;
  const src = join(root, "grammars", file);
  const out = join(outDir, basename(file, ".ne") + ".ts");
  if (existsSync(out) && statSync(out).mtimeMs >= statSync(src).mtimeMs) continue;
  execFileSync(process.execPath, [nearleyc, src, "-o", out], { stdio: "inherit" });
}
