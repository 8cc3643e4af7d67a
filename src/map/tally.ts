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
  const order = operandsFirst(g) ?? evaluationOrder(g, new Set());
  if (!order) return undefined;
  let best: PartTally | undefined;
  for (const family of families) {
    const t = countFamily(g, order, family, model, maxFanout, inverter);
    if (!t) return undefined;
    if (!best || t.cost < best.cost) best = t;
  }
  return best;
}

/** The node ids in ascending order when every node's operands come before it (a graph made by
 *  a GraphBuilder without state signals), else undefined. Any evaluation order gives the same
 *  count: each node's choice is made from its operands' alone, and the fan-out pass sees every
 *  load of a net before the net, whichever order the cells were made in. */
function operandsFirst(g: LogicGraph): number[] | undefined {
  const nodes = g.nodes;
  const order: number[] = new Array(nodes.length);
  for (let id = 0; id < nodes.length; id++) {
    const fanins = nodes[id]!.fanins;
    for (let i = 0; i < fanins.length; i++) if (fanins[i]! >= id) return undefined;
    order[id] = id;
  }
  return order;
}

// Codes of the count's flat arrays: cell functions, and what drives a net.
const NAND = 0;
const NOR = 1;
const TIE = 0;
const INPUT = 1;
const CELL = 2;

function countFamily(g: LogicGraph, order: readonly number[], allow: CellChoice, model: CostModel, maxFanout: number, inverter: CellFunction): PartTally | undefined {
  const nodes = g.nodes;
  const { kindOf, auxOf, invFn } = chooseRealizations(g, new Uint8Array(nodes.length), order, allow, model);
  const need = markNeeded(g, new Set(), kindOf, auxOf);
  const invCode = invFn === "nand" ? NAND : NOR;

  // Room for every net, cell and cell input the realization and the outputs can make, counted
  // from the needed (node, polarity) pairs, so the flat arrays below never grow.
  let maxCells = 2 * g.outputs.length;
  let maxPins = 0;
  let widest = 1;
  for (let at = 0; at < need.length; at++) {
    if (!need[at]) continue;
    const kind = kindOf[at]!;
    if (kind === K_INV) {
      maxCells += 1;
      maxPins += 1;
    } else if (kind === K_NAND || kind === K_NOR) {
      const k = nodes[at >> 1]!.fanins.length;
      maxCells += 1;
      maxPins += k;
      if (k > widest) widest = k;
    } else if (kind === K_XOR_NAND || kind === K_XOR_NOR) {
      maxCells += 4;
      maxPins += 8;
      if (widest < 2) widest = 2;
    }
  }
  widest = Math.max(widest, 2); // an output's buffer: two pins
  maxPins += g.outputs.length * widest;
  const maxNets = g.inputs.length + 2 * nodes.length + maxCells + g.outputs.length;

  // Cells made, by function and fan-in (at fn · stride + k), turned into the tally at the end.
  const stride = widest + 1;
  const made = new Float64Array(2 * stride);

  // Nets as numbers: what drives each (TIE, INPUT or CELL, and which cell) and how many loads
  // it has.
  const loads = new Int32Array(maxNets);
  const driverKind = new Uint8Array(maxNets);
  const driverCell = new Int32Array(maxNets).fill(-1);
  let netCount = 0;
  // Cells: function (NAND or NOR), inputs (a flat list from inStart[c]), output net.
  const cellFn = new Uint8Array(maxCells);
  const inStart = new Int32Array(maxCells + 1);
  const inNets = new Int32Array(maxPins);
  const cellOut = new Int32Array(maxCells);
  let cellCount = 0;
  let pinCount = 0;
  // A cell's inputs are written to inNets[pinCount ..] before it is added with their number.
  const addCell = (fn: number, k: number, output: number): number => {
    const c = cellCount++;
    driverKind[output] = CELL;
    driverCell[output] = c;
    cellFn[c] = fn;
    for (let i = pinCount; i < pinCount + k; i++) loads[inNets[i]!]!++;
    pinCount += k;
    inStart[c + 1] = pinCount;
    cellOut[c] = output;
    made[fn * stride + k]!++;
    return output;
  };
  const gate2 = (fn: number, a: number, b: number): number => {
    inNets[pinCount] = a;
    inNets[pinCount + 1] = b;
    return addCell(fn, 2, netCount++);
  };

  const memo = new Int32Array(2 * nodes.length).fill(-1);
  // Input nets first, net i for input port i (driverKind INPUT).
  for (const p of g.inputs) {
    driverKind[netCount] = INPUT;
    memo[2 * p.node] = netCount++;
  }
  const inputCount = netCount;
  const realize = (at: number): void => {
    const kind = kindOf[at]!;
    const aux = auxOf[at]!;
    let net: number;
    switch (kind) {
      case K_CONST:
        net = netCount++; // a tie
        break;
      case K_PASS:
        net = memo[aux]!;
        if (net < 0) throw new Error("tallyMapping: operand counted out of order");
        break;
      case K_INV:
        inNets[pinCount] = memo[at ^ 1]!;
        net = addCell(invCode, 1, netCount++);
        break;
      case K_NAND:
      case K_NOR: {
        const fanins = nodes[at >> 1]!.fanins;
        const k = fanins.length;
        for (let i = 0; i < k; i++) inNets[pinCount + i] = memo[2 * fanins[i]! + aux]!;
        net = addCell(kind === K_NAND ? NAND : NOR, k, netCount++);
        break;
      }
      case K_XOR_NAND:
      case K_XOR_NOR: {
        const fn = kind === K_XOR_NAND ? NAND : NOR;
        const fanins = nodes[at >> 1]!.fanins;
        const a = memo[2 * fanins[0]!]!;
        const b = memo[2 * fanins[1]!]!;
        const n1 = gate2(fn, a, b);
        const n2 = gate2(fn, a, n1);
        const n3 = gate2(fn, b, n1);
        net = gate2(fn, n2, n3);
        break;
      }
      default:
        // K_LEAF without a net, or no realization.
        throw new Error("tallyMapping: a node without a realization");
    }
    memo[at] = net;
  };
  for (let oi = 0; oi < order.length; oi++) {
    const id = order[oi]!;
    for (let at = 2 * id; at < 2 * id + 2; at++) {
      if (!need[at] || memo[at]! >= 0) continue;
      if (kindOf[at] === K_INV && memo[at ^ 1]! < 0) realize(at ^ 1);
      realize(at);
    }
  }

  // Outputs (mapToCells' binding without state signals): a net that is already a port (an
  // input, or an earlier output) gets a net of its own, through a buffer (an input), a copy of
  // its driving cell, or the same tie; any other net becomes the port.
  const reserved = new Uint8Array(netCount + 2 * g.outputs.length);
  reserved.fill(1, 0, inputCount);
  for (const p of g.outputs) {
    const net = memo[2 * p.node]!;
    if (net < 0) throw new Error("tallyMapping: an output without a net");
    if (!reserved[net]) {
      reserved[net] = 1;
      continue;
    }
    if (driverKind[net] === INPUT && g.inputs[net]?.name === p.name) continue; // the same net
    if (driverKind[net] === CELL) {
      const c = driverCell[net]!;
      const from = inStart[c]!;
      const k = inStart[c + 1]! - from;
      inNets.copyWithin(pinCount, from, from + k);
      reserved[addCell(cellFn[c]!, k, netCount++)] = 1;
    } else if (driverKind[net] === TIE) {
      reserved[netCount++] = 1;
    } else {
      // A buffer of two inverters; the port's net is made before the one between them.
      const target = netCount++;
      inNets[pinCount] = net;
      const mid = addCell(invCode, 1, netCount++);
      inNets[pinCount] = mid;
      addCell(invCode, 1, target);
      reserved[target] = 1;
    }
  }

  // Fan-out legalization (legalizeFanout): cells from the outputs back (reverse creation order
  // is a reverse topological order), then the inputs, then the ties.
  const N = maxFanout;
  let invPairs = 0;
  const copiesMade = new Float64Array(2 * stride);
  if (N >= 2) {
    const invCost = model.cellCost(inverter, 1);
    const buffer = (net: number) => {
      let L = loads[net]!;
      while (L > N) {
        const moved = Math.min(N, L - N + 1);
        L = L - moved + 1;
        invPairs++;
      }
      loads[net] = L;
    };
    for (let c = cellCount - 1; c >= 0; c--) {
      const net = cellOut[c]!;
      if (driverCell[net] !== c) continue;
      const L = loads[net]!;
      if (L <= N) continue;
      const copies = Math.ceil(L / N) - 1;
      const bufs = Math.ceil((L - N) / (N - 1));
      const fn = cellFn[c]!;
      const k = inStart[c + 1]! - inStart[c]!;
      if (copies * model.cellCost(fn === NAND ? "nand" : "nor", k) <= bufs * 2 * invCost) {
        for (let i = inStart[c]!; i < inStart[c + 1]!; i++) loads[inNets[i]!]! += copies;
        copiesMade[fn * stride + k]! += copies;
        let kept = L;
        for (let i = 0; i < copies; i++) kept -= Math.min(N, kept - N); // each copy takes a share
        loads[net] = kept;
      } else buffer(net);
    }
    for (let net = 0; net < inputCount; net++) buffer(net);
    for (let net = 0; net < netCount; net++) if (driverKind[net] === TIE) buffer(net);
  }

  // The tally: cells by function and fan-in (the mapping's cells, their copies and the
  // buffers' inverters), each priced once.
  const t: PartTally = { cells: 0, transistors: 0, diodes: 0, resistors: 0, parts: 0, nand2: 0, cost: 0 };
  const add = (fn: CellFunction, k: number, times: number): boolean => {
    if (!times) return true;
    const p = cellParts(fn, k);
    const c = model.cellCost(fn, k);
    t.cells += times;
    t.transistors += times * p.transistors;
    t.diodes += times * p.diodes;
    t.resistors += times * p.resistors;
    t.nand2 += times * Math.max(1, k - 1);
    t.cost += times * c;
    return Number.isInteger(c);
  };
  let exact = true;
  for (let fn = NAND; fn <= NOR; fn++)
    for (let k = 1; k < stride; k++) if (!add(fn === NAND ? "nand" : "nor", k, made[fn * stride + k]! + copiesMade[fn * stride + k]!)) exact = false;
  if (!add(inverter, 1, 2 * invPairs)) exact = false;
  if (!exact) return undefined;
  t.parts = t.transistors + t.diodes + t.resistors;
  return t;
}
