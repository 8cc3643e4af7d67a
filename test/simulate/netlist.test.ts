// Netlist text preparation: SPICE card conventions (title line, `.include`, `.end`, `.control`)
// as the ngspice manual describes them.
import { describe, expect, it } from "vitest";
import {
  inlineIncludes,
  normalizeIncludeName,
  referencedFiles,
  stripControlSections,
  withControlBlock,
} from "../../src/simulate/netlist.js";

describe("inlineIncludes", () => {
  const cells = "* cells\n.subckt inv a y\nR1 a y 1k\n.ends inv\n.end\n* after the end: ignored\n";

  it("replaces quoted, unquoted and .inc forms, dropping the file's own .end but not .ends", () => {
    const files = new Map([["cells.cir", cells]]);
    for (const line of ['.include "cells.cir"', ".include cells.cir", ".INC 'cells.cir'", "  .inc cells.cir  "]) {
      const out = inlineIncludes(`title\n${line}\nX1 a y inv\n.end\n`, files);
      expect(out).toContain(".subckt inv a y");
      expect(out).toContain(".ends inv");
      expect(out).not.toContain("after the end");
      expect(out).not.toMatch(/^\s*\.inc/im);
      // Exactly one .end left: the testbench's own, last.
      expect(out.match(/^\.end$/gm)).toHaveLength(1);
      expect(out.trimEnd().endsWith(".end")).toBe(true);
    }
  });

  it("never reads the title line as a card", () => {
    const out = inlineIncludes(".include cells.cir\nR1 a 0 1\n.end\n", new Map([["cells.cir", cells]]));
    expect(out.split("\n")[0]).toBe(".include cells.cir");
    expect(out).not.toContain(".subckt");
  });

  it("inlines nested includes and matches names after normalising ./ and ..", () => {
    const files = new Map([
      ["lib/top.cir", '.include "lib/leaf.cir"\n* top\n'],
      ["lib/leaf.cir", ".model QX NPN(BF=50)\n"],
    ]);
    const out = inlineIncludes('bench\n.include "./lib/x/../top.cir"\n.end\n', files);
    expect(out).toContain("* top");
    expect(out).toContain(".model QX NPN(BF=50)");
    expect(referencedFiles(out)).toEqual([]);
  });

  it("leaves unknown files and include cycles for the simulator to report", () => {
    const files = new Map([
      ["a.cir", ".include b.cir\n"],
      ["b.cir", ".include a.cir\n"],
    ]);
    const out = inlineIncludes("bench\n.include a.cir\n.include missing.cir\n.end\n", files);
    expect(referencedFiles(out)).toEqual(["a.cir", "missing.cir"]);
  });
});

describe("netlist helpers", () => {
  it("lists .include and two-word .lib files, not one-word .lib sections", () => {
    expect(referencedFiles('t\n.include "a b.cir"\n.lib models.lib tt\n.lib tt\n.endl\n')).toEqual(["a b.cir", "models.lib"]);
  });

  it("normalises include names", () => {
    expect(normalizeIncludeName("./a/./b/../c.cir")).toBe("a/c.cir");
    expect(normalizeIncludeName("../c.cir")).toBe("../c.cir");
  });

  it("takes .control sections out", () => {
    const r = stripControlSections("t\nR1 a 0 1\n.control\nrun\n.endc\n.op\n.end\n");
    expect(r.removed).toBe(1);
    expect(r.netlist).toBe("t\nR1 a 0 1\n.op\n.end\n");
  });

  it("puts a control block before the final .end, or adds .end", () => {
    expect(withControlBlock("t\nR1 a 0 1\n.end\n", ["run"])).toBe("t\nR1 a 0 1\n.control\nrun\n.endc\n.end\n");
    expect(withControlBlock("t\n.subckt s a\n.ends\nR1 a 0 1\n", ["run"])).toBe(
      "t\n.subckt s a\n.ends\nR1 a 0 1\n.control\nrun\n.endc\n.end\n",
    );
  });
});
