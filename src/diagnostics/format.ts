// Printing diagnostics: file:line:column, the source line, a caret under the span, the hint.
import type { Diagnostic } from "./diagnostic.js";

export interface LineCol {
  line: number; // 1-based
  column: number; // 1-based
}

/** The last text's line starts: printing many diagnostics of one large file scans it once. */
let cachedText: string | undefined;
let cachedStarts: number[] = [];

/** Offsets of the first character of each line (shared with the cache: read it, do not change it). */
export function lineStarts(text: string): number[] {
  if (text === cachedText) return cachedStarts;
  const starts = [0];
  for (let i = 0; i < text.length; i++) {
    if (text.charCodeAt(i) === 10) starts.push(i + 1);
  }
  cachedText = text;
  cachedStarts = starts;
  return starts;
}

export function lineColOf(starts: readonly number[], offset: number): LineCol {
  let lo = 0;
  let hi = starts.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (starts[mid]! <= offset) lo = mid;
    else hi = mid - 1;
  }
  return { line: lo + 1, column: offset - starts[lo]! + 1 };
}

export interface SourceLookup {
  /** Returns the text of a file the diagnostics may point into, if known. */
  (file: string): string | undefined;
}

const MAX_SHOWN_LINE = 200;

/** Formats one diagnostic as plain text (no colour). */
export function formatDiagnostic(d: Diagnostic, sources: SourceLookup): string {
  const out: string[] = [];
  let where = d.file ?? "gatewright";
  const text = d.file !== undefined ? sources(d.file) : undefined;
  let snippet: string[] = [];
  if (text !== undefined && d.start !== undefined) {
    const starts = lineStarts(text);
    const start = Math.min(d.start, text.length);
    const lc = lineColOf(starts, start);
    where += `:${lc.line}:${lc.column}`;
    const lineStart = starts[lc.line - 1]!;
    let lineEnd = text.indexOf("\n", lineStart);
    if (lineEnd < 0) lineEnd = text.length;
    let lineText = text.slice(lineStart, lineEnd).replace(/\r$/, "");
    let col0 = lc.column - 1;
    // Keep very long lines readable: show a window around the column.
    let prefix = "";
    if (lineText.length > MAX_SHOWN_LINE) {
      const from = Math.max(0, col0 - 40);
      lineText = lineText.slice(from, from + MAX_SHOWN_LINE);
      if (from > 0) {
        prefix = "...";
        col0 = col0 - from + 3;
      }
    }
    lineText = prefix + lineText.replace(/\t/g, " ").replace(/[\u0000-\u0008\u000b-\u001f\u007f]/g, "?");
    const len = Math.max(1, Math.min(d.length ?? 1, lineText.length - col0));
    const gutter = String(lc.line);
    snippet = [
      `  ${gutter} | ${lineText}`,
      `  ${" ".repeat(gutter.length)} | ${" ".repeat(Math.max(0, col0))}${"^".repeat(len)}`,
    ];
  }
  out.push(`${where}: ${d.severity} ${d.code}: ${d.message}`);
  out.push(...snippet);
  if (d.hint) out.push(`  hint: ${d.hint}`);
  for (const r of d.related ?? []) {
    let rw = "";
    if (r.file !== undefined) {
      const rt = sources(r.file);
      rw = r.file;
      if (rt !== undefined && r.start !== undefined) {
        const lc = lineColOf(lineStarts(rt), r.start);
        rw += `:${lc.line}:${lc.column}`;
      }
      rw += ": ";
    }
    out.push(`  note: ${rw}${r.message}`);
  }
  return out.join("\n");
}

/** Line and column of a diagnostic, for tests and JSON output. */
export function positionOf(d: Diagnostic, text: string): LineCol | undefined {
  if (d.start === undefined) return undefined;
  return lineColOf(lineStarts(text), d.start);
}
