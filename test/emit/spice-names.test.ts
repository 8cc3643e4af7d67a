// SPICE node names (src/emit/spice-names.ts). ngspice folds the case of names and reads '.',
// '(', ')', '=', ',' and white space as syntax (ngspice manual, section 2.1, "General Structure
// and Conventions"), and node 0 is ground: the expected names below follow the module's stated
// rule from that: lower case [a-z0-9_], not starting with a digit, unique, never a reserved
// name, a taken name getting the first free suffix _2, _3, ...
import { describe, expect, it } from "vitest";
import { SpiceNamer } from "../../src/emit/spice-names.js";

describe("SpiceNamer", () => {
  it("keeps safe names, and gives a source the same name each time it is asked", () => {
    const n = new SpiceNamer();
    expect(n.nameOf("a")).toBe("a");
    expect(n.nameOf("b_1")).toBe("b_1");
    expect(n.nameOf("a")).toBe("a");
    expect(n.anyRenamed()).toBe(false);
    expect(n.renamed()).toEqual([]);
  });

  it("renames unsafe, reserved and colliding names, and lists the renamed in the order named", () => {
    const n = new SpiceNamer();
    expect(n.nameOf("A")).toBe("a");
    expect(n.nameOf("a")).toBe("a_2");
    expect(n.nameOf("vcc")).toBe("vcc_2");
    expect(n.nameOf("0")).toBe("n0");
    expect(n.nameOf("x.y")).toBe("x_y");
    // A source spelled like a name already given to another keeps neither: it takes the next.
    expect(n.nameOf("a_2")).toBe("a_2_2");
    expect(n.nameOf("A")).toBe("a");
    expect(n.nameOf("a")).toBe("a_2");
    expect(n.anyRenamed()).toBe(true);
    expect(n.renamed()).toEqual([
      { source: "A", spice: "a" },
      { source: "a", spice: "a_2" },
      { source: "vcc", spice: "vcc_2" },
      { source: "0", spice: "n0" },
      { source: "x.y", spice: "x_y" },
      { source: "a_2", spice: "a_2_2" },
    ]);
    const seen: string[] = [];
    n.forEachRenamed((s, t) => seen.push(`${s}->${t}`));
    expect(seen).toEqual(["A->a", "a->a_2", "vcc->vcc_2", "0->n0", "x.y->x_y", "a_2->a_2_2"]);
  });

  it("a reserved name is never given out", () => {
    const n = new SpiceNamer();
    n.reserve("VBIAS");
    expect(n.nameOf("vbias")).toBe("vbias_2");
    // Reserving a name already given keeps it with its source.
    expect(n.nameOf("q")).toBe("q");
    n.reserve("q");
    expect(n.nameOf("q")).toBe("q");
  });
});
