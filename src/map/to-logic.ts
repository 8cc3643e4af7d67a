// The logic a cell netlist computes, as a logic graph (for the equivalence check and for
// expected values in testbenches). Nets keep their names; state nets keep the state names.
// A net with tied cells (wired-AND) is the AND of its cells' outputs.
import type { LogicGraph, LogicNode } from "../logic/graph.js";
import type { CellNetlist } from "./types.js";

export function cellsToLogic(n: CellNetlist): LogicGraph {
  const nodes: LogicNode[] = [];
  const netNode = new Int32Array(n.nets.length).fill(-1);
  // Each net gets a node first (so loops can refer forward); its operation is filled after.
  n.nets.forEach((net, i) => {
    netNode[i] = nodes.push({ op: "buf", fanins: [], name: net.name }) - 1;
  });
  for (const net of n.nets) {
    const id = netNode[net.index]!;
    const d = net.driver;
    if (d.kind === "input") nodes[id] = { op: "input", fanins: [], name: net.name };
    else if (d.kind === "tie") nodes[id] = { op: d.value ? "const1" : "const0", fanins: [], name: net.name };
    else {
      const drivers = [d.cell, ...(net.tiedCells ?? [])];
      const outs = drivers.map((ci) => {
        const c = n.cells[ci]!;
        const ins = c.inputs.map((x) => netNode[x]!);
        const inner = ins.length === 1 ? ins[0]! : nodes.push({ op: c.fn === "nand" ? "and" : "or", fanins: ins }) - 1;
        return inner;
      });
      if (outs.length === 1) nodes[id] = { op: "not", fanins: [outs[0]!], name: net.name };
      else {
        // Wired-AND: the net is the AND of its cells' outputs.
        const inverted = outs.map((x) => nodes.push({ op: "not", fanins: [x] }) - 1);
        nodes[id] = { op: "and", fanins: inverted, name: net.name };
      }
    }
  }
  return {
    name: n.name,
    nodes,
    inputs: n.inputs.map((x) => ({ name: n.nets[x]!.name, node: netNode[x]! })),
    outputs: n.outputs.map((o) => ({ name: o.name, node: netNode[o.net]! })),
  };
}
