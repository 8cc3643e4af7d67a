// The diagnostic catalogue: codes well-formed, unique, in their ranges, and every code the
// sources use is listed (the catalogue is the one place codes are defined).
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { CATALOGUE } from "../../src/diagnostics/catalogue.js";
import { diag, formatDiagnostic, positionOf } from "../../src/diagnostics/index.js";

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    if (f === "generated") return [];
    return statSync(p).isDirectory() ? sourceFiles(p) : p.endsWith(".ts") ? [p] : [];
  });
}

describe("diagnostic catalogue", () => {
  const codes = Object.keys(CATALOGUE);
  it("codes are GW plus four digits, and titles are unique", () => {
    for (const c of codes) expect(c).toMatch(/^GW[1-9]\d{3}$/);
    const titles = Object.values(CATALOGUE).map((e) => e.title);
    expect(new Set(titles).size).toBe(titles.length);
  });

  it("every code used in src/ is in the catalogue, and the catalogue file lists each code once", () => {
    const used = new Set<string>();
    for (const f of sourceFiles("src")) {
      if (f.endsWith("catalogue.ts")) continue;
      for (const m of readFileSync(f, "utf8").matchAll(/"(GW\d{4})"/g)) used.add(m[1]!);
    }
    for (const c of used) expect(codes, `code ${c} used in src but not catalogued`).toContain(c);
    const text = readFileSync("src/diagnostics/catalogue.ts", "utf8");
    for (const c of codes) expect(text.split(`${c}:`).length - 1, c).toBe(1);
  });

  it("formats file:line:column with the source line and a caret under the span", () => {
    const text = "input a;\noutput y;\ny = a & bb;\n";
    const d = diag("GW2001", "'bb' is not an input and is never assigned", { file: "t.logic", span: { start: 27, length: 2 } }, { hint: "did you mean 'b'?" });
    expect(positionOf(d, text)).toEqual({ line: 3, column: 9 });
    const out = formatDiagnostic(d, () => text);
    expect(out.split("\n")).toEqual([
      "t.logic:3:9: error GW2001: 'bb' is not an input and is never assigned",
      "  3 | y = a & bb;",
      "    |         ^^",
      "  hint: did you mean 'b'?",
    ]);
  });
});
