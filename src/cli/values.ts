// Option values as the user typed them: read strictly, and shown in messages as typed.
import { diag, type Diagnostic } from "../diagnostics/index.js";

/** An option's value as a message shows it: control characters replaced, long text cut. */
export function shownValue(text: unknown): string {
  const s = String(text).replace(/[\u0000-\u001f\u007f]/g, "?");
  return s.length > 60 ? `${s.slice(0, 40)}... (${s.length.toLocaleString("en")} characters)` : s;
}

/**
 * A whole-number option given as text (or as a number, for defaults): the number, or a GW6003
 * quoting the text as the user wrote it. Only decimal digits are read ("0x10", "1e3", "" and
 * "8 cells" are not whole numbers here).
 */
export function wholeNumberOption(raw: unknown, flag: string, min: number, max: number, message: string, diagnostics: Diagnostic[]): number | undefined {
  if (raw === undefined) return undefined;
  const text = typeof raw === "number" ? String(raw) : String(raw).trim();
  const n = /^[+]?\d{1,15}$/.test(text) ? Number(text) : typeof raw === "number" ? raw : NaN;
  if (!Number.isInteger(n) || n < min || n > max) {
    diagnostics.push(diag("GW6003", `--${flag} ${shownValue(raw)}: ${message}`));
    return undefined;
  }
  return n;
}
