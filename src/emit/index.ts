// Emit: a sized design → the text files of a run, as data (the CLI writes them). Each file's
// text is made when it is written (piece by piece, straight into the file: see output.ts) or
// first read.
import { writeBomCsv, writeBomMarkdown } from "./bom.js";
import type { EmitContext } from "./context.js";
import { producedFile, type OutputFile } from "./output.js";
import { writeDesignJson, writeReport } from "./report.js";
import { spiceNamesOf, writeNetlist, writeTestbench, type SpiceNames } from "./spice.js";

export type { OutputFile } from "./output.js";

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
  let spiceNames: SpiceNames | undefined;
  const names = () => (spiceNames ??= spiceNamesOf(ctx.design));
  const listing = [
    { name: f.netlist, what: "SPICE netlist: device models, one subcircuit per sized cell, and the design as a subcircuit" },
    { name: f.testbench, what: "ngspice testbench: supply, input drivers, transient run and sampled outputs with expected values" },
    { name: f.bomCsv, what: "parts list, RFC 4180 CSV" },
    { name: f.bomMd, what: "parts list, for people" },
    { name: f.report, what: "this report" },
    { name: f.json, what: "the report's facts for other programs" },
  ];
  return [
    producedFile(f.netlist, listing[0]!.what, (out) => writeNetlist(out, ctx, names())),
    producedFile(f.testbench, listing[1]!.what, (out) => writeTestbench(out, ctx, names(), f)),
    producedFile(f.bomCsv, listing[2]!.what, (out) => writeBomCsv(out, ctx, f)),
    producedFile(f.bomMd, listing[3]!.what, (out) => writeBomMarkdown(out, ctx, f)),
    producedFile(f.report, listing[4]!.what, (out) => writeReport(out, ctx, listing)),
    producedFile(f.json, listing[5]!.what, (out) => writeDesignJson(out, ctx, listing)),
  ];
}

export { spiceNamesOf, outputLevels, sampleTime } from "./spice.js";
export { makeStimulus, type Stimulus } from "./stimulus.js";
export { cautions } from "./report.js";
export type { EmitContext } from "./context.js";
