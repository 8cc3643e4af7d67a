// The input hash put into generated JSON by reading the JSON text back and printing it again:
// how synth and verify stored it before the JSON writer took it from the emit context
// (EmitContext.inputHash). Kept as the reference the tests hold the writer to.
import { INPUT_HASH_KEY } from "../../src/verify/reuse.js";

/** The generated JSON text with the hash added after its "generator" entry. */
export function withInputHash(jsonText: string, hash: string): string {
  let data: Record<string, unknown>;
  try {
    data = JSON.parse(jsonText) as Record<string, unknown>;
  } catch {
    return jsonText;
  }
  const out: Record<string, unknown> = {};
  let placed = false;
  for (const [k, v] of Object.entries(data)) {
    if (k === INPUT_HASH_KEY) continue;
    out[k] = v;
    if (k === "generator") {
      out[INPUT_HASH_KEY] = hash;
      placed = true;
    }
  }
  if (!placed) out[INPUT_HASH_KEY] = hash;
  return JSON.stringify(out, null, 2) + "\n";
}

/** The files of a run with the hash put into its JSON file (named `jsonName`), by reading the
 *  JSON text back. */
export function filesWithInputHash<T extends { name: string; content: string }>(files: readonly T[], jsonName: string, hash: string): T[] {
  return files.map((f) => (f.name === jsonName ? { ...f, content: withInputHash(f.content, hash) } : f));
}

