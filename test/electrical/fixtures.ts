// Small cell netlists built by hand for the sizing tests.
import type { CellFunction, CellNetlist, Net } from "../../src/map/types.js";

export interface GateSpec {
  fn: CellFunction;
  inputs: string[];
  output: string;
}

/** Builds a CellNetlist from named gates; names not driven by a gate are primary inputs. */
export function netlistOf(name: string, inputs: string[], outputs: string[], gates: GateSpec[]): CellNetlist {
  const nets: Net[] = [];
  const byName = new Map<string, number>();
  const net = (n: string): number => {
    let i = byName.get(n);
    if (i === undefined) {
      i = nets.length;
      byName.set(n, i);
      nets.push({ index: i, name: n, named: true, driver: { kind: "input", port: inputs.indexOf(n) }, loads: [] });
    }
    return i;
  };
  inputs.forEach(net);
  const cells = gates.map((g, index) => {
    const out = net(g.output);
    nets[out]!.driver = { kind: "cell", cell: index };
    return { index, fn: g.fn, inputs: g.inputs.map(net), output: out };
  });
  for (const c of cells) c.inputs.forEach((n, pin) => nets[n]!.loads.push({ cell: c.index, pin }));
  outputs.forEach((o, k) => (nets[net(o)]!.outputPort = k));
  return {
    name,
    inputs: inputs.map((i) => byName.get(i)!),
    outputs: outputs.map((o) => ({ name: o, net: byName.get(o)! })),
    nets,
    cells,
    stateNets: [],
    maxFanin: 8,
  };
}

/** ISCAS-85 c17 (Brglez and Fujiwara, 1985): six 2-input NAND gates (connections from memory). */
export function c17(): CellNetlist {
  return netlistOf("c17", ["1", "2", "3", "6", "7"], ["22", "23"], [
    { fn: "nand", inputs: ["1", "3"], output: "10" },
    { fn: "nand", inputs: ["3", "6"], output: "11" },
    { fn: "nand", inputs: ["2", "11"], output: "16" },
    { fn: "nand", inputs: ["11", "7"], output: "19" },
    { fn: "nand", inputs: ["10", "16"], output: "22" },
    { fn: "nand", inputs: ["16", "19"], output: "23" },
  ]);
}

/** One driver feeding `n` NAND inputs (and optionally `m` NOR inputs). */
export function fanoutNet(n: number, m = 0): CellNetlist {
  const gates: GateSpec[] = [{ fn: "nand", inputs: ["a", "b"], output: "x" }];
  const outs: string[] = [];
  for (let i = 0; i < n; i++) {
    gates.push({ fn: "nand", inputs: ["x", "c"], output: `y${i}` });
    outs.push(`y${i}`);
  }
  for (let i = 0; i < m; i++) {
    gates.push({ fn: "nor", inputs: ["x", "c"], output: `z${i}` });
    outs.push(`z${i}`);
  }
  return netlistOf(`fan${n}_${m}`, ["a", "b", "c"], outs, gates);
}
