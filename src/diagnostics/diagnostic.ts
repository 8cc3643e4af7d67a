// A diagnostic is data. Stages return them; only the CLI prints them.
// Offsets are UTF-16 code-unit offsets into the source text; line and column are computed
// only when a diagnostic is printed (see format.ts).
import { CATALOGUE, type DiagnosticCode } from "./catalogue.js";

export type Severity = "error" | "warning" | "note";

export interface Span {
  start: number;
  length: number;
}

export interface RelatedInfo {
  message: string;
  file?: string;
  start?: number;
  length?: number;
}

export interface Diagnostic {
  code: DiagnosticCode;
  severity: Severity;
  message: string;
  file?: string;
  start?: number;
  length?: number;
  hint?: string;
  related?: RelatedInfo[];
  /** The options or data-file keys the diagnostic is about, by their field names (for example
   *  `betaMin`), so the shell can name them as the user wrote them (`--beta-min`). */
  about?: string[];
}

/** Builds a diagnostic whose severity comes from the catalogue. */
export function diag(
  code: DiagnosticCode,
  message: string,
  where?: { file?: string; span?: Span },
  extra?: { hint?: string; related?: RelatedInfo[]; severity?: Severity; about?: string[] },
): Diagnostic {
  const d: Diagnostic = {
    code,
    severity: extra?.severity ?? CATALOGUE[code].severity,
    message,
  };
  if (where?.file !== undefined) d.file = where.file;
  if (where?.span) {
    d.start = where.span.start;
    d.length = where.span.length;
  }
  if (extra?.hint) d.hint = extra.hint;
  if (extra?.related?.length) d.related = extra.related;
  if (extra?.about?.length) d.about = extra.about;
  return d;
}

export function hasErrors(ds: readonly Diagnostic[]): boolean {
  return ds.some((d) => d.severity === "error");
}

/** Result of a stage: a value (absent when the stage could not produce one) and diagnostics. */
export interface StageResult<T> {
  value?: T;
  diagnostics: Diagnostic[];
}

/** Joins two spans into one covering both. */
export function joinSpans(a: Span, b: Span): Span {
  const start = Math.min(a.start, b.start);
  const end = Math.max(a.start + a.length, b.start + b.length);
  return { start, length: end - start };
}
