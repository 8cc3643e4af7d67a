// Wired-AND through the emitters: the SPICE netlist, the parts list, the report and the JSON of
// a design whose outputs are tied onto one collector resistor. Part counts are checked against
// a hand count from the cells as Millman & Halkias, Integrated Electronics, ch. 6, Example 6-5
// draws the NAND-k (k input diodes, two level-shift diodes, R_P, R_B, R_C, one transistor),
// less one R_C for every output tied onto another cell's net, and against the mapper's own tally.
import { describe, expect, it } from "vitest";
import { synthesize, type Synthesis } from "../../src/pipeline/synthesize.js";
import { bomRows, bomTotals } from "../../src/emit/bom.js";
import { fileNamesOf } from "../../src/emit/index.js";
import { tallyParts } from "../../src/map/index.js";

// y is the AND of three NANDs: with wired-AND the three NAND outputs are tied onto y (one R_C),
// with no inverter pair (common practice for DTL: "collector dotting").
const AOI = "input a, b, c, d, e, f;\noutput y;\ny = !(a & b) & !(c & d) & !(e & f);\n";

function build(wiredAnd: boolean): Synthesis {
  const s = synthesize(AOI, "aoi.logic", { maxFanin: 8, cells: "nand", cellsGiven: true, wiredAnd, sizing: { supplyVolts: 5 }, commandLine: "test" });
  expect(s.diagnostics.filter((d) => d.severity === "error").map((d) => `${d.code} ${d.message}`)).toEqual([]);
  expect(s.files).toBeDefined();
  return s;
}
const file = (s: Synthesis, name: keyof ReturnType<typeof fileNamesOf>) => s.files!.find((f) => f.name === fileNamesOf("aoi")[name])!.content;

describe("wired-AND in the emitted files", () => {
  const s = build(true);
  const d = s.design!;

  it("the mapping ties two outputs onto y, and GW4005 no longer refuses it", () => {
    expect(s.diagnostics.map((x) => x.code)).not.toContain("GW4005");
    expect(s.netlist!.cells).toHaveLength(3);
    expect(s.netlist!.cells.filter((c) => c.tiedOutput)).toHaveLength(2);
    expect(s.equivalence!.equivalent).toBe(true);
  });

  it("parts totals: one R_C for the net (hand count: 3 NAND-2 × (4 D, 3 R, 1 Q) − 2 R)", () => {
    const rows = bomRows(d);
    const totals = bomTotals(rows);
    const count = (k: string) => rows.filter((r) => r.kind === k).reduce((n, r) => n + r.quantity, 0);
    expect(count("R")).toBe(3 * 3 - 2);
    expect(count("D")).toBe(3 * 4);
    expect(count("Q")).toBe(3);
    expect(totals.parts).toBe(7 + 12 + 3);
    // The sizing's totals and the mapper's independent tally agree.
    expect(d.totals.resistors).toBe(7);
    expect(tallyParts(s.netlist!).parts).toBe(totals.parts);
    expect(s.optimizationReport!.after.parts).toBe(totals.parts);
  });

  it("SPICE: the tied cells' subcircuit has no RC; the one RC sits in the driver's", () => {
    const cir = file(s, "netlist");
    const block = (name: string) => cir.slice(cir.indexOf(`.subckt ${name} `), cir.indexOf(`.ends ${name}`));
    expect(block("gw_nand2_oc")).not.toMatch(/^RC /m);
    expect(block("gw_nand2_oc")).toMatch(/^Q1 out b 0 /m);
    expect(block("gw_nand2")).toMatch(/^RC vcc out /m);
    // All three outputs on node y; one instance of the driver type, two open-collector.
    const inst = cir.split("\n").filter((l) => l.startsWith("XU"));
    expect(inst).toHaveLength(3);
    for (const l of inst) expect(l.split(" ").slice(-3, -2)[0]).toBe("y");
    expect(inst.filter((l) => l.endsWith(" gw_nand2_oc"))).toHaveLength(2);
    expect(cir).toMatch(/\* Wired-AND nets/);
  });

  it("parts list names the net's one collector resistor", () => {
    const md = file(s, "bomMd");
    const y = s.netlist!.nets[s.netlist!.outputs[0]!.net]!;
    expect(y.driver.kind).toBe("cell");
    const rc = d.instances[y.driver.kind === "cell" ? y.driver.cell : -1]!.designators.RC!;
    expect(md).toMatch(new RegExp(`Wired-AND net y: one collector resistor, ${rc},`));
    expect(md).toMatch(/Totals: 22 parts/);
  });

  it("report: wired nets marked, and parts before/after show the saving against the same logic without wired-AND", () => {
    const md = file(s, "report");
    expect(md).toMatch(/\| Wired-AND \| 1 net, 2 tied outputs \(2 collector resistors saved\) \|/);
    expect(md).toMatch(/## Wired-AND nets/);
    expect(md).toMatch(/\| y \| U\d \(holds R_C\), U\d, U\d \| R\d+ /);
    const plain = build(false);
    const without = s.optimizationReport!.afterWithoutWiredAnd!;
    // The same logic mapped without wired-AND is what a build without --wired-and gives.
    expect(without.parts).toBe(tallyParts(plain.netlist!).parts);
    expect(without.parts).toBeGreaterThan(s.optimizationReport!.after.parts);
    expect(md).toContain(`Wired-AND saves ${without.parts - s.optimizationReport!.after.parts} parts`);
    expect(md).toMatch(/without wired-AND \| 5 \|/);
  });

  it("JSON: the net lists its tied cells and the open-collector type is marked", () => {
    const j = JSON.parse(file(s, "json"));
    expect(j.wiredNets).toHaveLength(1);
    expect(j.wiredNets[0].net).toBe("y");
    expect(j.wiredNets[0].tied).toHaveLength(2);
    expect(j.cellTypes.filter((t: { openCollector: boolean }) => t.openCollector)).toHaveLength(1);
    expect(j.nets.find((n: { name: string }) => n.name === "y").tied).toHaveLength(2);
  });
});
