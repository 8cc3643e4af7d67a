// Keeping diagnostic lists bounded. A large or hostile design can produce one diagnostic per
// signal (an "input never used" warning for each of 100,000 inputs, a "more than one driver"
// error for each of 150,000 assignments); nobody reads them all, and printing them costs more
// than the run. Every stage's list is therefore cut the way the readers cut theirs: the first
// MAX_STAGE_ERRORS errors, the first MAX_REPEATED diagnostics of each warning or note code, and
// one closing note (GW2034) per cut saying how many were left out.
//
// Lists are appended element by element, never with `push(...list)`: a spread passes one
// argument per element and overflows the call stack somewhere above 100,000 elements.
import { diag, type Diagnostic } from "./diagnostic.js";
import type { DiagnosticCode } from "./catalogue.js";
import { CATALOGUE } from "./catalogue.js";

/** Errors kept from one stage (the readers stop at the same number). */
export const MAX_STAGE_ERRORS = 50;
/** Warnings or notes of one code kept from one stage. */
export const MAX_REPEATED = 50;

/** Appends `from` to `into` without spreading (safe for any length). */
export function appendDiagnostics(into: Diagnostic[], from: readonly Diagnostic[] | undefined): Diagnostic[] {
  if (from) for (const d of from) into.push(d);
  return into;
}

/** Collects one stage's diagnostics and keeps them bounded (see the top of this file). */
export class DiagnosticLimiter {
  private readonly kept: Diagnostic[] = [];
  private errorsSeen = 0;
  private errorsDropped = 0;
  private readonly perCode = new Map<DiagnosticCode, number>();
  private readonly dropped = new Map<DiagnosticCode, number>();

  constructor(
    private readonly file: string | undefined,
    private readonly maxErrors = MAX_STAGE_ERRORS,
    private readonly maxRepeated = MAX_REPEATED,
  ) {}

  /** Errors offered so far (kept or not). */
  get errors(): number {
    return this.errorsSeen;
  }

  /** True when a diagnostic with this code would no longer be kept: a caller may skip work
   *  that only serves the message (a "did you mean" search, for example). */
  full(code: DiagnosticCode): boolean {
    if (CATALOGUE[code].severity === "error") return this.errorsSeen >= this.maxErrors;
    return (this.perCode.get(code) ?? 0) >= this.maxRepeated;
  }

  push(d: Diagnostic): void {
    if (d.code === "GW2034") {
      this.kept.push(d);
      return;
    }
    if (d.severity === "error") {
      this.errorsSeen++;
      if (this.errorsSeen > this.maxErrors) {
        this.errorsDropped++;
        return;
      }
      this.kept.push(d);
      return;
    }
    const n = (this.perCode.get(d.code) ?? 0) + 1;
    this.perCode.set(d.code, n);
    if (n > this.maxRepeated) {
      this.dropped.set(d.code, (this.dropped.get(d.code) ?? 0) + 1);
      return;
    }
    this.kept.push(d);
  }

  pushAll(ds: readonly Diagnostic[]): void {
    for (const d of ds) this.push(d);
  }

  /** True when something was left out. */
  get cut(): boolean {
    return this.errorsDropped > 0 || this.dropped.size > 0;
  }

  /** The kept diagnostics followed by one closing note per cut. */
  finish(): Diagnostic[] {
    const out = this.kept.slice();
    const where = this.file !== undefined ? { file: this.file } : undefined;
    if (this.errorsDropped > 0) {
      out.push(
        diag("GW2034", `${this.errorsDropped.toLocaleString("en")} more error${this.errorsDropped === 1 ? "" : "s"} not shown; the first ${this.maxErrors} are`, where, {
          hint: "fix these and run again",
        }),
      );
    }
    for (const [code, n] of this.dropped) {
      const entry = CATALOGUE[code];
      out.push(
        diag("GW2034", `${n.toLocaleString("en")} more ${code} ${entry.severity}${n === 1 ? "" : "s"} (${entry.title}) not shown; the first ${this.maxRepeated} are`, where),
      );
    }
    return out;
  }
}

/** One stage's diagnostics cut to the limits above (the list itself when nothing is cut). */
export function capDiagnostics(ds: readonly Diagnostic[], file?: string, maxErrors = MAX_STAGE_ERRORS, maxRepeated = MAX_REPEATED): Diagnostic[] {
  const limiter = new DiagnosticLimiter(file, maxErrors, maxRepeated);
  limiter.pushAll(ds);
  return limiter.cut ? limiter.finish() : (ds as Diagnostic[]);
}
