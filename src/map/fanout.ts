// Fan-out legalization: no net drives more loads (cell input pins) than the limit. A net over
// it is split: its driving cell is duplicated (each copy computes the same function and takes a
// share of the loads) or buffers are inserted (two inverters each, driving up to the limit),
// whichever costs less in the cost model. State nets, primary inputs and wired-AND nets are
// only ever buffered. Cells are visited from the outputs back to the inputs, so the loads a
// copy adds to its operands' nets are seen when those nets are visited.
import type { CostModel } from "./cost.js";
import { NetlistEditor } from "./edit.js";
import type { CellFunction, CellNetlist } from "./types.js";

export interface FanoutResult {
  netlist: CellNetlist;
  duplicated: number;
  buffers: number;
  netsSplit: number;
}

/** With `inPlace` the netlist is edited in place (the caller hands it over). */
export function legalizeFanout(netlist: CellNetlist, opts: { maxFanout: number; model: CostModel; inverter: CellFunction; inPlace?: boolean }): FanoutResult {
  const N = opts.maxFanout;
  if (!(N >= 2)) return { netlist: { ...netlist }, duplicated: 0, buffers: 0, netsSplit: 0 };
  if (netlist.nets.every((n) => n.loads.length <= N)) return { netlist: { ...netlist, maxFanout: N }, duplicated: 0, buffers: 0, netsSplit: 0 };
  const ed = new NetlistEditor(netlist, !!opts.inPlace);
  const stateNets = new Set(netlist.stateNets);
  let duplicated = 0;
  let buffers = 0;
  let netsSplit = 0;
  const invCost = opts.model.cellCost(opts.inverter, 1);

  // Cells in an order where every cell comes after the cells driving its inputs (state nets cut).
  const order: number[] = [];
  const seen = new Uint8Array(netlist.cells.length);
  for (let root = 0; root < netlist.cells.length; root++) {
    if (seen[root]) continue;
    const stack: { c: number; i: number }[] = [{ c: root, i: 0 }];
    seen[root] = 1;
    while (stack.length) {
      const top = stack[stack.length - 1]!;
      const ins = netlist.cells[top.c]!.inputs;
      if (top.i < ins.length) {
        const net = ins[top.i++]!;
        if (stateNets.has(net)) continue;
        const d = netlist.nets[net]!.driver;
        const drivers = d.kind === "cell" ? [d.cell, ...(netlist.nets[net]!.tiedCells ?? [])] : [];
        for (const dc of drivers) if (!seen[dc]) {
          seen[dc] = 1;
          stack.push({ c: dc, i: 0 });
        }
        continue;
      }
      stack.pop();
      order.push(top.c);
    }
  }

  const buffer = (net: number) => {
    const loads = ed.nets[net]!.loads;
    while (loads.length > N) {
      // The first loads are the net's own (buffer inputs are appended): a one-level tree while
      // the buffers fit, deeper only beyond N·N loads.
      const count = Math.min(N, loads.length - N + 1);
      const mid = ed.newNet(`${ed.nets[net]!.name}_b`);
      const out = ed.newNet(`${ed.nets[net]!.name}_b`);
      ed.moveFirstLoads(net, count, out);
      ed.addCell(opts.inverter, [net], mid);
      ed.addCell(opts.inverter, [mid], out);
      buffers++;
    }
  };
  const split = (net: number, canDuplicate: boolean) => {
    const L = ed.nets[net]!.loads.length;
    if (L <= N) return;
    netsSplit++;
    const copies = Math.ceil(L / N) - 1;
    const bufs = Math.ceil((L - N) / (N - 1));
    const driver = ed.nets[net]!.driver;
    if (canDuplicate && driver.kind === "cell") {
      const c = ed.cells[driver.cell]!;
      const dupCost = copies * opts.model.cellCost(c.fn, c.inputs.length);
      if (dupCost <= bufs * 2 * invCost) {
        for (let k = 0; k < copies; k++) {
          const loads = ed.nets[net]!.loads;
          const out = ed.newNet(ed.nets[net]!.name);
          ed.moveFirstLoads(net, Math.min(N, loads.length - N), out);
          ed.addCell(c.fn, [...c.inputs], out);
          duplicated++;
        }
        return;
      }
    }
    buffer(net);
  };

  for (let k = order.length - 1; k >= 0; k--) {
    const c = ed.cells[order[k]!]!;
    const net = c.output;
    const n = ed.nets[net]!;
    if (n.driver.kind !== "cell" || n.driver.cell !== order[k]) continue; // a tied cell: its net is visited with its driver
    split(net, !stateNets.has(net) && !n.tiedCells?.length);
  }
  for (const net of netlist.stateNets) split(net, false);
  for (const net of netlist.inputs) split(net, false);
  for (let net = 0; net < ed.nets.length; net++) if (ed.nets[net]!.driver.kind === "tie" && ed.nets[net]!.loads.length > N) buffer(net);
  return { netlist: ed.finish({ maxFanout: N }), duplicated, buffers, netsSplit };
}
