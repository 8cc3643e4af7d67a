// Reusing outputs an earlier run wrote: the generated JSON carries a hash of everything the
// outputs depend on (tool version, source text, options), so verify can tell whether the files
// on disk are the ones this source and these options make, and simulate them as they are
// instead of rewriting them. Pure (hashing is a function of its input).
import { createHash } from "node:crypto";
import { INPUT_HASH_KEY } from "../emit/context.js";

/** Key under which the hash is stored in the generated JSON (the JSON writer puts it there when
 *  the emit context carries it: EmitContext.inputHash). */
export { INPUT_HASH_KEY };

/** JSON with object keys in sorted order, so equal options give equal text. */
function stableJson(x: unknown): string {
  if (x === undefined) return "null";
  if (x === null || typeof x !== "object") return JSON.stringify(x);
  if (Array.isArray(x)) return `[${x.map(stableJson).join(",")}]`;
  const o = x as Record<string, unknown>;
  return `{${Object.keys(o)
    .filter((k) => o[k] !== undefined)
    .sort()
    .map((k) => `${JSON.stringify(k)}:${stableJson(o[k])}`)
    .join(",")}}`;
}

/** "sha256:…" of the tool version, the source text and the synthesis options. */
export function inputHash(parts: { toolVersion: string; sourceText: string; options: unknown }): string {
  const h = createHash("sha256");
  h.update(`gatewright ${parts.toolVersion}\n`);
  h.update(stableJson(parts.options));
  h.update("\n");
  h.update(parts.sourceText);
  return `sha256:${h.digest("hex")}`;
}

/** The hash stored in a generated JSON text, if any. */
export function storedInputHash(jsonText: string): string | undefined {
  try {
    const v = (JSON.parse(jsonText) as Record<string, unknown>)[INPUT_HASH_KEY];
    return typeof v === "string" ? v : undefined;
  } catch {
    return undefined;
  }
}

/** The hash of a synthesis: every option its files depend on (the command line only goes into
 *  their header comments and is left out). */
export function synthesisHash(toolVersion: string, sourceText: string, o: { commandLine?: string } & Record<string, unknown>): string {
  const { commandLine: _commandLine, ...options } = o;
  return inputHash({ toolVersion, sourceText, options });
}
