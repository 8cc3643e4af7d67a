// Running a synthesized design's testbench in a simulator and comparing every sampled output
// (and every sampled state signal) with the logic. The simulator is handed in (only
// src/simulate starts one).
import type { Simulator, SimulationRun } from "../simulate/engine.js";
import { sampleTime, spiceNamesOf } from "../emit/index.js";
import { netLevels, outputLevels, sampledStateNets } from "../emit/spice.js";
import { fileNamesOf } from "../emit/index.js";
import type { Synthesis } from "../pipeline/synthesize.js";
import { compareRun, type RunComparison } from "./compare.js";

export interface TestbenchVerdict {
  run: SimulationRun;
  comparison: RunComparison;
}

export interface VerifyOptions {
  /** `all` (default): every sample; `edges`: for a clocked design, only the samples just
   *  before each rising clock edge (each a full clock period after the previous edge), which is
   *  what a design running at its clock limit must get right. */
  samples?: "all" | "edges";
}

export async function runTestbench(s: Synthesis, simulator: Simulator, opts: VerifyOptions = {}): Promise<TestbenchVerdict> {
  if (!s.files || !s.design || !s.stimulus || s.stepSeconds === undefined) throw new Error("runTestbench needs a complete synthesis");
  const names = fileNamesOf(s.design.netlist.name);
  const byName = new Map(s.files.map((f) => [f.name, f.content]));
  const run = await simulator.run(byName.get(names.testbench)!, { files: new Map([[names.netlist, byName.get(names.netlist)!]]) });
  const spice = spiceNamesOf(s.design);
  const time = run.vectors.get("time") ?? new Float64Array();
  const st = s.stimulus;
  const outputs = s.design.netlist.outputs.map((o, k) => ({
    name: o.name,
    node: spice.outputs[k]!,
    values: run.vectors.get(`v(${spice.outputs[k]!})`) ?? new Float64Array(),
    levels: outputLevels(s.design!, k),
  }));
  const stateNets = sampledStateNets(s.design, spice, st);
  const states = stateNets.map((sn) => ({ name: sn.name, node: sn.node, values: run.vectors.get(`v(${sn.node})`) ?? new Float64Array(), levels: netLevels(s.design!, sn.net) }));
  const input: Parameters<typeof compareRun>[0] = {
    time,
    outputs,
    expected: st.expected,
    sampleTimes: st.vectors.map((_, i) => sampleTime(i, s.stepSeconds!)),
    states,
    expectedStates: st.expected.map((_, i) => stateNets.map((sn) => st.stateExpected![i]![sn.index]!)),
  };
  if (opts.samples === "edges" && st.edgeSteps) input.steps = st.edgeSteps;
  const comparison = compareRun(input);
  if (run.errors.length) comparison.pass = false;
  return { run, comparison };
}
