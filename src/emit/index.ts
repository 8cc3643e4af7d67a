// Emit: a sized design → the text files of a run, as data (the CLI writes them).
import { renderBom } from "./bom.js";
import type { EmitContext } from "./context.js";
import { designJson, renderReport } from "./report.js";
import { renderNetlist, renderTestbench, spiceNamesOf } from "./spice.js";

export interface OutputFile {
  name: string;
  content: string;
  what: string;
}

export function fileNamesOf(design: string) {
  return {
    netlist: `${design}.cir`,
    testbench: `${design}.tb.cir`,
    bomCsv: `${design}.bom.csv`,
    bomMd: `${design}.bom.md`,
    report: `${design}.report.md`,
    json: `${design}.json`,
  };
}

export function emitDesign(ctx: EmitContext): OutputFile[] {
  const name = ctx.design.netlist.name;
  const f = fileNamesOf(name);
  const names = spiceNamesOf(ctx.design);
  const listing = [
    { name: f.netlist, what: "SPICE netlist: device models, one subcircuit per sized cell, and the design as a subcircuit" },
    { name: f.testbench, what: "ngspice testbench: supply, input drivers, transient run and sampled outputs with expected values" },
    { name: f.bomCsv, what: "parts list, RFC 4180 CSV" },
    { name: f.bomMd, what: "parts list, for people" },
    { name: f.report, what: "this report" },
    { name: f.json, what: "the report's facts for other programs" },
  ];
  const bom = renderBom(ctx, f);
  return [
    { name: f.netlist, content: renderNetlist(ctx, names), what: listing[0]!.what },
    { name: f.testbench, content: renderTestbench(ctx, names, f), what: listing[1]!.what },
    { name: f.bomCsv, content: bom.csv, what: listing[2]!.what },
    { name: f.bomMd, content: bom.markdown, what: listing[3]!.what },
    { name: f.report, content: renderReport(ctx, listing), what: listing[4]!.what },
    { name: f.json, content: JSON.stringify(designJson(ctx, listing), null, 2) + "\n", what: listing[5]!.what },
  ];
}

export { spiceNamesOf, outputLevels, sampleTime } from "./spice.js";
export { makeStimulus, type Stimulus } from "./stimulus.js";
export { cautions } from "./report.js";
export type { EmitContext } from "./context.js";
