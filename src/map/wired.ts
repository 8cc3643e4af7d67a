// Wired-AND (opt-in): DTL outputs are open collectors with a pull-up R_C, so tying several
// outputs to one node gives the AND of them with one collector resistor (any transistor that
// conducts pulls the node low; "collector dotting", common practice for DTL). It saves parts in
// two places:
//   - inputs of a NAND cell that come from cells driving nothing else: those outputs are tied
//     onto one net and the NAND needs one input diode for them (and loses k − 1 resistors R_C);
//     a NAND left with one input becomes the cheaper inverter of the allowed families;
//   - an inverter of such a tied net feeding only another inverter: both go, and the tied cells
//     drive the second inverter's net directly.
// State nets, primary inputs and outputs are never tied onto (an output may be tied onto only
// through the second rule, where the tied cells then drive it).
import type { CostModel } from "./cost.js";
import { NetlistEditor } from "./edit.js";
import type { CellFunction, CellNetlist } from "./types.js";

export interface WiredResult {
  netlist: CellNetlist;
  /** Cells whose outputs were tied onto another cell's net. */
  tied: number;
  /** Cells removed (inverter pairs). */
  removed: number;
}

export function applyWiredAnd(netlist: CellNetlist, opts: { model: CostModel; allowNor: boolean; allowNand: boolean }): WiredResult {
  const ed = new NetlistEditor(netlist);
  const stateNets = new Set(netlist.stateNets);
  const inputs = new Set(netlist.inputs);
  let tied = 0;
  let removed = 0;
  const dead = new Set<number>();
  // A net that may be tied: driven by cells only, read by exactly one pin, nobody's port.
  const tieable = (net: number, reader: number): boolean => {
    const n = ed.nets[net]!;
    if (n.driver.kind !== "cell" || stateNets.has(net) || inputs.has(net) || n.outputPort !== undefined) return false;
    if (n.loads.length !== 1 || n.loads[0]!.cell !== reader) return false;
    return ed.driversOf(net).every((c) => c !== reader);
  };
  const cheaperInverter = (): CellFunction => {
    if (!opts.allowNor) return "nand";
    if (!opts.allowNand) return "nor";
    return opts.model.cellCost("nor", 1) <= opts.model.cellCost("nand", 1) ? "nor" : "nand";
  };
  for (let ci = 0; ci < netlist.cells.length; ci++) {
    const c = ed.cells[ci]!;
    if (c.fn !== "nand" || c.inputs.length < 2) continue;
    const pins = c.inputs.map((net, pin) => ({ net, pin })).filter((x) => tieable(x.net, ci));
    const distinct = [...new Map(pins.map((x) => [x.net, x])).values()];
    if (distinct.length < 2) continue;
    const target = distinct[0]!.net;
    const tn = ed.nets[target]!;
    tn.tiedCells ??= [];
    for (const { net } of distinct.slice(1)) {
      for (const d of ed.driversOf(net)) {
        ed.cells[d]!.output = target;
        ed.cells[d]!.tiedOutput = true;
        tn.tiedCells.push(d);
        tied++;
      }
      // Remove the pin reading `net` (find it again: pins shift as others go).
      const pin = ed.cells[ci]!.inputs.indexOf(net);
      ed.removePin(ci, pin);
      ed.removeNet(net);
    }
    if (ed.cells[ci]!.inputs.length === 1) ed.cells[ci]!.fn = cheaperInverter();
  }
  // Inverter pairs around a tied net: w → INV → y → INV → z, with w and y read only there.
  for (let ci = 0; ci < ed.cells.length; ci++) {
    if (dead.has(ci)) continue;
    const x = ed.cells[ci]!;
    if (x.inputs.length !== 1 || x.tiedOutput) continue;
    const w = x.inputs[0]!;
    const wn = ed.nets[w]!;
    if (!wn.tiedCells?.length || wn.loads.length !== 1 || stateNets.has(w) || wn.outputPort !== undefined) continue;
    const y = x.output;
    const yn = ed.nets[y]!;
    if (yn.tiedCells?.length || yn.loads.length !== 1 || stateNets.has(y) || yn.outputPort !== undefined) continue;
    const zi = yn.loads[0]!.cell;
    const z = ed.cells[zi]!;
    if (dead.has(zi) || z.inputs.length !== 1 || z.tiedOutput) continue;
    const zNet = z.output;
    const zn = ed.nets[zNet]!;
    if (stateNets.has(zNet) || zn.tiedCells?.length) continue;
    // The tied cells drive z's net directly.
    const drivers = ed.driversOf(w);
    drivers.forEach((d, k) => {
      ed.cells[d]!.output = zNet;
      ed.cells[d]!.tiedOutput = k > 0;
    });
    zn.driver = { kind: "cell", cell: drivers[0]! };
    zn.tiedCells = drivers.slice(1);
    ed.removeCell(ci);
    ed.removeCell(zi);
    dead.add(ci);
    dead.add(zi);
    ed.removeNet(w);
    ed.removeNet(y);
    removed += 2;
  }
  return { netlist: ed.finish(), tied, removed };
}
