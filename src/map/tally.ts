// The parts a mapping would produce, counted without building the netlist: the same fan-in
// splitting, the same choice per node and polarity (chooseRealizations), the same cells for the
// outputs, and the same fan-out legalization decisions (src/map/fanout.ts), kept as counts of
// loads per net instead of nets, loads and names. The optimizer prices graphs this way many
// times; the full mapping is made once, for the netlist.
//
// Counted only where the count is the mapping's exactly: logic without state signals (their
// nets are bound and buffered in an order of their own), without wired-AND, and with integer
// cell costs (so a sum does not depend on the order of the cells). Otherwise undefined, and the
// caller maps.
import type { LogicGraph } from "../logic/graph.js";
import { evaluationOrder } from "../logic/loops.js";
import { cellParts, dtlCostModel, type CostModel, type PartTally } from "./cost.js";
import { limitFanin } from "./fanin.js";
import {
  chooseRealizations,
  DEFAULT_MAX_FANOUT,
  FAMILY_TRIAL_MAX_NODES,
  K_CONST,
  K_INV,
  K_NAND,
  K_NOR,
  K_PASS,
  K_XOR_NAND,
  K_XOR_NOR,
  markNeeded,
  type CellChoice,
  type MapOptions,
} from "./map.js";
import type { CellFunction } from "./types.js";

/** The tally of `tallyParts(mapToCells(source, opts).value)`, or undefined where it is not
 *  counted (see above) or the options are not valid. */
export function tallyMapping(source: LogicGraph, opts: MapOptions): PartTally | undefined {
  if (opts.wiredAnd || opts.cellCost) return undefined;
  const maxFanout = opts.maxFanout ?? DEFAULT_MAX_FANOUT;
  if (!Number.isInteger(opts.maxFanin) || opts.maxFanin < 2) return undefined;
  if (!Number.isInteger(maxFanout) || maxFanout < 0 || maxFanout === 1) return undefined;
  const model = opts.costModel ?? dtlCostModel();
  const states = new Set(opts.stateNames);
  for (const n of source.nodes) if (n.op === "buf" && n.name !== undefined && states.has(n.name)) return undefined;
  const allow = opts.cells ?? "mixed";
  const g = limitFanin(source, opts.stateNames, opts.maxFanin);
  for (const n of g.nodes) if (n.op === "buf" && n.name !== undefined && states.has(n.name)) return undefined;
  const families: CellChoice[] = allow === "mixed" ? (g.nodes.length <= FAMILY_TRIAL_MAX_NODES ? ["mixed", "nand", "nor"] : ["mixed"]) : [allow];
  const inverter: CellFunction = allow === "nand" ? "nand" : allow === "nor" ? "nor" : model.cellCost("nor", 1) <= model.cellCost("nand", 1) ? "nor" : "nand";
  const order = evaluationOrder(g, new Set());
  if (!order) return undefined;
  let best: PartTally | undefined;
  for (const family of families) {
    const t = countFamily(g, order, family, model, maxFanout, inverter);
    if (!t) return undefined;
    if (!best || t.cost < best.cost) best = t;
  }
  return best;
}

function countFamily(g: LogicGraph, order: readonly number[], allow: CellChoice, model: CostModel, maxFanout: number, inverter: CellFunction): PartTally | undefined {
  const nodes = g.nodes;
  const { kindOf, auxOf, invFn } = chooseRealizations(g, new Uint8Array(nodes.length), order, allow, model);
  const need = markNeeded(g, new Set(), kindOf, auxOf);
  const t: PartTally = { cells: 0, transistors: 0, diodes: 0, resistors: 0, parts: 0, nand2: 0, cost: 0 };
  let exact = true;
  const count = (fn: CellFunction, k: number, times = 1) => {
    const p = cellParts(fn, k);
    const c = model.cellCost(fn, k);
    if (!Number.isInteger(c)) exact = false;
    t.cells += times;
    t.transistors += times * p.transistors;
    t.diodes += times * p.diodes;
    t.resistors += times * p.resistors;
    t.nand2 += times * Math.max(1, k - 1);
    t.cost += times * c;
  };

  // Nets as numbers: what drives each (0 a tie, 1 an input, 2 a cell) and how many loads it has.
  const loads: number[] = [];
  const driverKind: number[] = [];
  const driverCell: number[] = [];
  const newNet = (kind: number, cell = -1): number => {
    loads.push(0);
    driverKind.push(kind);
    driverCell.push(cell);
    return loads.length - 1;
  };
  // Cells: function (0 NAND, 1 NOR), inputs (a flat list from inStart[c]), output net.
  const cellFn: number[] = [];
  const inStart: number[] = [0];
  const inNets: number[] = [];
  const cellOut: number[] = [];
  const addCell = (fn: CellFunction, ins: readonly number[], out?: number): number => {
    const c = cellFn.length;
    const output = out ?? newNet(2, c);
    driverKind[output] = 2;
    driverCell[output] = c;
    cellFn.push(fn === "nand" ? 0 : 1);
    for (const x of ins) {
      inNets.push(x);
      loads[x]!++;
    }
    inStart.push(inNets.length);
    cellOut.push(output);
    count(fn, ins.length);
    return output;
  };

  const memo = new Int32Array(2 * nodes.length).fill(-1);
  const inputNets: number[] = g.inputs.map((p) => (memo[2 * p.node] = newNet(1)));
  const realize = (at: number): number => {
    const hit = memo[at]!;
    if (hit >= 0) return hit;
    const kind = kindOf[at]!;
    const aux = auxOf[at]!;
    const fanins = nodes[at >> 1]!.fanins;
    let net: number;
    switch (kind) {
      case K_CONST:
        net = newNet(0);
        break;
      case K_PASS:
        net = memo[aux]!;
        if (net < 0) throw new Error("tallyMapping: operand counted out of order");
        break;
      case K_INV:
        net = addCell(invFn, [memo[at ^ 1]!]);
        break;
      case K_NAND:
      case K_NOR:
        net = addCell(
          kind === K_NAND ? "nand" : "nor",
          fanins.map((f) => memo[2 * f + aux]!),
        );
        break;
      case K_XOR_NAND:
      case K_XOR_NOR: {
        const fn: CellFunction = kind === K_XOR_NAND ? "nand" : "nor";
        const a = memo[2 * fanins[0]!]!;
        const b = memo[2 * fanins[1]!]!;
        const n1 = addCell(fn, [a, b]);
        const n2 = addCell(fn, [a, n1]);
        const n3 = addCell(fn, [b, n1]);
        net = addCell(fn, [n2, n3]);
        break;
      }
      default:
        // K_LEAF without a net, or no realization.
        throw new Error("tallyMapping: a node without a realization");
    }
    memo[at] = net;
    return net;
  };
  for (const id of order) {
    for (let pol = 0; pol < 2; pol++) {
      const at = 2 * id + pol;
      if (!need[at] || memo[at]! >= 0) continue;
      if (kindOf[at] === K_INV && memo[at ^ 1]! < 0) realize(at ^ 1);
      realize(at);
    }
  }

  // Outputs (mapToCells' binding without state signals): a net that is already a port (an
  // input, or an earlier output) gets a net of its own, through a buffer (an input), a copy of
  // its driving cell, or the same tie; any other net becomes the port.
  const reserved = new Set<number>(inputNets);
  for (const p of g.outputs) {
    const net = memo[2 * p.node]!;
    if (net < 0) throw new Error("tallyMapping: an output without a net");
    if (!reserved.has(net)) {
      reserved.add(net);
      continue;
    }
    if (driverKind[net] === 1 && g.inputs[inputNets.indexOf(net)]?.name === p.name) continue; // the same net
    if (driverKind[net] === 2) {
      const c = driverCell[net]!;
      addCell(cellFn[c] ? "nor" : "nand", inNets.slice(inStart[c]!, inStart[c + 1]!), newNet(2));
      reserved.add(loads.length - 1);
    } else if (driverKind[net] === 0) {
      reserved.add(newNet(0));
    } else {
      const target = newNet(2);
      addCell(invFn, [addCell(invFn, [net])], target);
      reserved.add(target);
    }
  }

  // Fan-out legalization (legalizeFanout): cells from the outputs back (reverse creation order
  // is a reverse topological order), then the inputs, then the ties.
  const N = maxFanout;
  if (N >= 2) {
    const invCost = model.cellCost(inverter, 1);
    const buffer = (net: number) => {
      let L = loads[net]!;
      let pairs = 0;
      while (L > N) {
        const moved = Math.min(N, L - N + 1);
        L = L - moved + 1;
        pairs++;
      }
      loads[net] = L;
      if (pairs) count(inverter, 1, 2 * pairs);
    };
    const cellsMade = cellFn.length;
    for (let c = cellsMade - 1; c >= 0; c--) {
      const net = cellOut[c]!;
      if (driverCell[net] !== c) continue;
      const L = loads[net]!;
      if (L <= N) continue;
      const copies = Math.ceil(L / N) - 1;
      const bufs = Math.ceil((L - N) / (N - 1));
      const fn: CellFunction = cellFn[c] ? "nor" : "nand";
      const k = inStart[c + 1]! - inStart[c]!;
      if (copies * model.cellCost(fn, k) <= bufs * 2 * invCost) {
        for (let i = inStart[c]!; i < inStart[c + 1]!; i++) loads[inNets[i]!]! += copies;
        count(fn, k, copies);
        let kept = L;
        for (let i = 0; i < copies; i++) kept -= Math.min(N, kept - N); // each copy takes a share
        loads[net] = kept;
      } else buffer(net);
    }
    for (const net of inputNets) buffer(net);
    for (let net = 0; net < loads.length; net++) if (driverKind[net] === 0) buffer(net);
  }
  if (!exact) return undefined;
  t.parts = t.transistors + t.diodes + t.resistors;
  return t;
}
