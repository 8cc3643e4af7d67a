// Text preparation of SPICE netlists before they go to a simulator: include files inlined,
// `.control` sections taken out (each simulator path adds its own commands), a command block
// put in front of the final `.end`. Pure functions over text.

/** Matches `.include "x.cir"`, `.include x.cir`, `.inc 'x.cir'` (ngspice accepts all three). */
const INCLUDE_LINE = /^\s*\.inc(?:lude)?\s+(?:"([^"]*)"|'([^']*)'|(\S+))\s*$/i;
/** `.lib file section` (two words) refers to a file; `.lib section` (one word) opens a section. */
const LIB_FILE_LINE = /^\s*\.lib\s+(?:"([^"]*)"|'([^']*)'|(\S+))\s+\S+\s*$/i;
/** The `.end` card, not `.ends` / `.endc` / `.endl`. */
const END_LINE = /^\s*\.end\s*$/i;

const MAX_INCLUDE_DEPTH = 32;

function splitLines(text: string): string[] {
  return text.split(/\r?\n/);
}

function includeName(line: string): string | undefined {
  const m = INCLUDE_LINE.exec(line);
  if (!m) return undefined;
  return m[1] ?? m[2] ?? m[3];
}

/** Posix-style normalisation of a relative file name: `./a/../b.cir` → `b.cir`. */
export function normalizeIncludeName(name: string): string {
  const parts: string[] = [];
  for (const part of name.replace(/\\/g, "/").split("/")) {
    if (part === "" || part === ".") continue;
    if (part === ".." && parts.length > 0 && parts[parts.length - 1] !== "..") parts.pop();
    else parts.push(part);
  }
  return (name.startsWith("/") ? "/" : "") + parts.join("/");
}

function lookupFile(files: ReadonlyMap<string, string>, name: string): string | undefined {
  const direct = files.get(name);
  if (direct !== undefined) return direct;
  const wanted = normalizeIncludeName(name);
  for (const [key, text] of files) {
    if (normalizeIncludeName(key) === wanted) return text;
  }
  return undefined;
}

/** The text of an included file up to (not including) its own `.end` card. */
function bodyOfIncludedFile(text: string): string[] {
  const lines = splitLines(text);
  const end = lines.findIndex((l) => END_LINE.test(l));
  const body = end >= 0 ? lines.slice(0, end) : lines;
  while (body.length > 0 && body[body.length - 1]!.trim() === "") body.pop();
  return body;
}

function inlineLines(
  lines: readonly string[],
  files: ReadonlyMap<string, string>,
  stack: readonly string[],
  firstIsTitle: boolean,
): string[] {
  const out: string[] = [];
  lines.forEach((line, index) => {
    const name = firstIsTitle && index === 0 ? undefined : includeName(line);
    if (name === undefined) {
      out.push(line);
      return;
    }
    const key = normalizeIncludeName(name);
    const text = lookupFile(files, name);
    // Unknown files and include cycles keep their line, so the simulator reports them.
    if (text === undefined || stack.includes(key) || stack.length >= MAX_INCLUDE_DEPTH) {
      out.push(line);
      return;
    }
    out.push(`* begin include "${name}"`);
    for (const each of inlineLines(bodyOfIncludedFile(text), files, [...stack, key], false)) out.push(each);
    out.push(`* end include "${name}"`);
  });
  return out;
}

/**
 * Replaces `.include "x.cir"` / `.inc x.cir` lines with the text of the named file (its own
 * `.end` card and anything after it dropped), recursively. Names are matched exactly, then after
 * normalising `./` and `..`. The first line of the testbench is its title and is never read as a
 * card (SPICE convention); included files have no title line. Files not in `files`, and include
 * cycles, are left as they are so the simulator reports them.
 */
export function inlineIncludes(testbench: string, files: ReadonlyMap<string, string>): string {
  return inlineLines(splitLines(testbench), files, [], true).join("\n");
}

/** Files a netlist still refers to through `.include`, `.inc` or `.lib file section`. */
export function referencedFiles(netlist: string): string[] {
  const names: string[] = [];
  splitLines(netlist).forEach((line, index) => {
    if (index === 0) return;
    const inc = includeName(line);
    if (inc !== undefined) names.push(inc);
    const lib = LIB_FILE_LINE.exec(line);
    if (lib) names.push((lib[1] ?? lib[2] ?? lib[3])!);
  });
  return names;
}

/**
 * Takes `.control` … `.endc` sections out of a netlist. Both simulator paths drive ngspice with
 * their own command sequence (run, write the raw file); a second sequence would run the analyses
 * twice or write elsewhere.
 */
export function stripControlSections(netlist: string): { netlist: string; removed: number } {
  const out: string[] = [];
  let inside = false;
  let removed = 0;
  splitLines(netlist).forEach((line, index) => {
    if (index > 0 && /^\s*\.control\b/i.test(line)) {
      inside = true;
      removed++;
      return;
    }
    if (inside) {
      if (/^\s*\.endc\b/i.test(line)) inside = false;
      return;
    }
    out.push(line);
  });
  return { netlist: out.join("\n"), removed };
}

/** Puts a `.control` block with `commands` just before the final `.end` (adding `.end` if absent). */
export function withControlBlock(netlist: string, commands: readonly string[]): string {
  const lines = splitLines(netlist);
  let end = -1;
  for (let i = lines.length - 1; i > 0; i--) {
    if (END_LINE.test(lines[i]!)) {
      end = i;
      break;
    }
  }
  const block = [".control", ...commands, ".endc"];
  if (end < 0) {
    while (lines.length > 1 && lines[lines.length - 1]!.trim() === "") lines.pop();
    return [...lines, ...block, ".end", ""].join("\n");
  }
  return [...lines.slice(0, end), ...block, ...lines.slice(end)].join("\n");
}
