// Running a synthesized design's testbench in a simulator and comparing every sampled output
// with the logic. The simulator is handed in (only src/simulate starts one).
import type { Simulator, SimulationRun } from "../simulate/engine.js";
import { sampleTime, spiceNamesOf } from "../emit/index.js";
import { outputLevels } from "../emit/spice.js";
import { fileNamesOf } from "../emit/index.js";
import type { Synthesis } from "../pipeline/synthesize.js";
import { compareRun, type RunComparison } from "./compare.js";

export interface TestbenchVerdict {
  run: SimulationRun;
  comparison: RunComparison;
}

export async function runTestbench(s: Synthesis, simulator: Simulator): Promise<TestbenchVerdict> {
  if (!s.files || !s.design || !s.stimulus || s.stepSeconds === undefined) throw new Error("runTestbench needs a complete synthesis");
  const names = fileNamesOf(s.design.netlist.name);
  const byName = new Map(s.files.map((f) => [f.name, f.content]));
  const run = await simulator.run(byName.get(names.testbench)!, { files: new Map([[names.netlist, byName.get(names.netlist)!]]) });
  const spice = spiceNamesOf(s.design);
  const time = run.vectors.get("time") ?? new Float64Array();
  const outputs = s.design.netlist.outputs.map((o, k) => ({
    name: o.name,
    node: spice.outputs[k]!,
    values: run.vectors.get(`v(${spice.outputs[k]!})`) ?? new Float64Array(),
    levels: outputLevels(s.design!, k),
  }));
  const comparison = compareRun({
    time,
    outputs,
    expected: s.stimulus.expected,
    sampleTimes: s.stimulus.vectors.map((_, i) => sampleTime(i, s.stepSeconds!)),
  });
  if (run.errors.length) comparison.pass = false;
  return { run, comparison };
}
