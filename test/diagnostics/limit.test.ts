// Bounded diagnostic lists (src/diagnostics/limit.ts): the first 50 errors of a stage, the first
// 50 warnings or notes of each code, one GW2034 note per cut with the count left out, and
// appending that never spreads a list into arguments.
import { describe, expect, it } from "vitest";
import { appendDiagnostics, capDiagnostics, diag, DiagnosticLimiter, MAX_REPEATED, MAX_STAGE_ERRORS, type Diagnostic } from "../../src/diagnostics/index.js";

const at = (i: number) => ({ file: "d.logic", span: { start: i, length: 1 } });

describe("bounded diagnostic lists", () => {
  it("keeps a list within the limits as it is (the same array)", () => {
    const ds = [diag("GW2006", "input 'a' is never used", at(0)), diag("GW2001", "'b' is not an input and is never assigned", at(2))];
    expect(capDiagnostics(ds, "d.logic")).toBe(ds);
  });

  it("cuts errors at 50 and each warning code at 50, in order, with one count per cut", () => {
    const ds: Diagnostic[] = [];
    for (let i = 0; i < 120; i++) ds.push(diag("GW2006", `input 'i${i}' is never used`, at(i)));
    for (let i = 0; i < 60; i++) ds.push(diag(i % 2 ? "GW2002" : "GW2001", `error ${i}`, at(i)));
    for (let i = 0; i < 3; i++) ds.push(diag("GW2007", `'t${i}' is assigned but never used`, at(i)));
    const kept = capDiagnostics(ds, "d.logic");
    expect(MAX_STAGE_ERRORS).toBe(50);
    expect(MAX_REPEATED).toBe(50);
    expect(kept.filter((d) => d.code === "GW2006").map((d) => d.message)).toEqual(ds.slice(0, 50).map((d) => d.message));
    expect(kept.filter((d) => d.severity === "error").map((d) => d.message)).toEqual(ds.slice(120, 170).map((d) => d.message));
    expect(kept.filter((d) => d.code === "GW2007")).toHaveLength(3);
    const notes = kept.filter((d) => d.code === "GW2034").map((d) => d.message);
    expect(notes).toEqual(["10 more errors not shown; the first 50 are", "70 more GW2006 warnings (input never used) not shown; the first 50 are"]);
    expect(kept.filter((d) => d.code === "GW2034").every((d) => d.file === "d.logic" && d.severity === "note")).toBe(true);
  });

  it("says when a message's extra work can be skipped", () => {
    const limiter = new DiagnosticLimiter("d.logic", 2, 1);
    expect(limiter.full("GW2001")).toBe(false);
    limiter.push(diag("GW2001", "one", at(0)));
    limiter.push(diag("GW2002", "two", at(1)));
    expect(limiter.full("GW2001")).toBe(true);
    expect(limiter.full("GW2006")).toBe(false);
    limiter.push(diag("GW2006", "w", at(2)));
    expect(limiter.full("GW2006")).toBe(true);
    expect(limiter.errors).toBe(2);
  });

  it("appends 300,000 diagnostics without overflowing the stack (a spread would)", () => {
    const many = Array.from({ length: 300_000 }, (_, i) => diag("GW2006", "w", at(i)));
    // On Node 20, `into.push(...many)` throws "RangeError: Maximum call stack size exceeded".
    const into: Diagnostic[] = [diag("GW2001", "first", at(0))];
    expect(appendDiagnostics(into, many)).toHaveLength(300_001);
    expect(into[300_000]).toBe(many[299_999]);
  });
});
