// Generates the sources that are built from other files, so a fresh clone never runs stale
// output: grammars/*.ne → src/parse/generated/*.ts (nearley's own compiler), and
// templates/*.hbs → src/emit/generated/templates.ts (the template texts, so emitting stays a
// pure function with no file reads). Run by `npm run generate` (part of `prepare` and `build`)
// and by the test suite's global setup.
import { execFileSync } from "node:child_process";
import { mkdirSync, readdirSync, existsSync, statSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join, basename } from "node:path";
import { fileURLToPath } from "node:url";
import { createRequire } from "node:module";

const root = join(dirname(fileURLToPath(import.meta.url)), "..", "..");
const require = createRequire(import.meta.url);
const nearleyc = require.resolve("nearley/bin/nearleyc.js");

const grammarOut = join(root, "src", "parse", "generated");
mkdirSync(grammarOut, { recursive: true });
for (const file of readdirSync(join(root, "grammars")).sort()) {
  if (!file.endsWith(".ne")) continue;
  const src = join(root, "grammars", file);
  const out = join(grammarOut, basename(file, ".ne") + ".ts");
  if (existsSync(out) && statSync(out).mtimeMs >= statSync(src).mtimeMs) continue;
  execFileSync(process.execPath, [nearleyc, src, "-o", out], { stdio: "inherit" });
}

const templateDir = join(root, "templates");
const templateOut = join(root, "src", "emit", "generated");
mkdirSync(templateOut, { recursive: true });
const entries = readdirSync(templateDir)
  .filter((f) => f.endsWith(".hbs"))
  .sort()
  .map((f) => `  ${JSON.stringify(basename(f, ".hbs"))}: ${JSON.stringify(readFileSync(join(templateDir, f), "utf8"))},`);
const text = `// Generated from templates/*.hbs by src/build/generate.mjs. Do not edit.\nexport const TEMPLATES: Record<string, string> = {\n${entries.join("\n")}\n};\n`;
const target = join(templateOut, "templates.ts");
if (!existsSync(target) || readFileSync(target, "utf8") !== text) writeFileSync(target, text);
