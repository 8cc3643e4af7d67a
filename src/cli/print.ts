// Printing diagnostics and summaries to the terminal.
import { formatDiagnostic, type Diagnostic } from "../diagnostics/index.js";

export function printDiagnostics(ds: readonly Diagnostic[], sources: Map<string, string>, stream: { write(s: string): unknown } = process.stderr): void {
  const order = { error: 0, warning: 1, note: 2 } as const;
  const sorted = [...ds].sort((a, b) => (a.file === b.file ? (a.start ?? 0) - (b.start ?? 0) : 0) || order[a.severity] - order[b.severity]);
  for (const d of sorted) stream.write(formatDiagnostic(d, (f) => sources.get(f)) + "\n");
}
