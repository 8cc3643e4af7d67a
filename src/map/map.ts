// Technology mapping onto DTL cells: every AND/OR/XOR/NOT of the optimized logic graph becomes
// NAND-k and NOR-k cells, choosing per node and per polarity the cheaper realization by
// dynamic programming over the cost model, with inverters shared. Loops are kept exactly as
// written: each state signal becomes a net of the same name driven by the cell computing it.
//
// With mixed cells the mapping is made three ways, mixed per node, NAND only and NOR only, and
// the cheapest netlist (after wired-AND and fan-out legalization) is kept: the per-node choice
// counts shared logic once per reader, so a single-family mapping sometimes comes out cheaper
// for a whole design.
import { diag, type Diagnostic, type StageResult } from "../diagnostics/index.js";
import type { LogicGraph } from "../logic/graph.js";
import { evaluationOrder } from "../logic/loops.js";
import type { CellFunction, CellInstance, CellNetlist, Net, NetDriver } from "./types.js";
import { limitFanin } from "./fanin.js";
import { dtlCostModel, netlistCost, type CostModel } from "./cost.js";
import { legalizeFanout } from "./fanout.js";
import { applyWiredAnd } from "./wired.js";

export type CellChoice = "mixed" | "nand" | "nor";

/** Loads one net may drive unless told otherwise: DTL families of the 1960s quoted a fan-out of
 *  about 8 (REFERENCES.md, from memory), and the basic gate of Millman & Halkias ex. 6-5 manages
 *  11 at a gain of 30 (derived), so 8 leaves margin. */
export const DEFAULT_MAX_FANOUT = 8;

/** Above this many nodes (after fan-in splitting) mixed cells are mapped once, per node, without
 *  the single-family trials: they triple the time of the mapping. */
export const FAMILY_TRIAL_MAX_NODES = 3000;

export interface MapOptions {
  stateNames: readonly string[];
  maxFanin: number;
  /** Which cell functions may be used. `nand` and `nor` allow only that family (and its inverter). */
  cells?: CellChoice;
  /** Cost of one cell of a function and fan-in (default: the cost model's). */
  cellCost?: (fn: CellFunction, fanin: number) => number;
  /** Cost model for choosing between realizations (default: DTL parts, `dtlCostModel()`). */
  costModel?: CostModel;
  /** Most loads on one net (default DEFAULT_MAX_FANOUT; 0: no limit). */
  maxFanout?: number;
  /** Tie open-collector outputs together (wired-AND) where it saves parts (default off). */
  wiredAnd?: boolean;
}

/** Default cell cost: the DTL part model with its default weights (see src/map/cost.ts). */
export function partCost(fn: CellFunction, fanin: number): number {
  return dtlCostModel().cellCost(fn, fanin);
}

export function mapToCells(source: LogicGraph, opts: MapOptions): StageResult<CellNetlist> {
  const diagnostics: Diagnostic[] = [];
  if (!Number.isInteger(opts.maxFanin) || opts.maxFanin < 2) {
    diagnostics.push(
      diag("GW4001", `the fan-in limit must be at least 2 (got ${opts.maxFanin})`, undefined, {
        hint: "two-input cells are the smallest that can build any logic",
      }),
    );
    return { diagnostics };
  }
  const maxFanout = opts.maxFanout ?? DEFAULT_MAX_FANOUT;
  if (!Number.isInteger(maxFanout) || maxFanout < 0 || maxFanout === 1) {
    diagnostics.push(
      diag("GW4002", `the fan-out limit must be at least 2 (got ${maxFanout}); 0 means no limit`, undefined, {
        hint: "a buffer drives the loads it takes over, so a limit of 1 could never be met",
      }),
    );
    return { diagnostics };
  }
  const baseModel = opts.costModel ?? dtlCostModel();
  const model: CostModel = opts.cellCost ? { ...baseModel, cellCost: opts.cellCost } : baseModel;
  const allow = opts.cells ?? "mixed";
  const g = limitFanin(source, opts.stateNames, opts.maxFanin);
  const families: CellChoice[] = allow === "mixed" ? (g.nodes.length <= FAMILY_TRIAL_MAX_NODES ? ["mixed", "nand", "nor"] : ["mixed"]) : [allow];
  let best: { netlist: CellNetlist; cost: number; tied: number; removed: number; duplicated: number; buffers: number; netsSplit: number } | undefined;
  for (const family of families) {
    let netlist = mapFamily(g, source, opts, family, model);
    let tied = 0;
    let removed = 0;
    if (opts.wiredAnd) {
      const w = applyWiredAnd(netlist, { model, allowNand: allow !== "nor", allowNor: allow !== "nand" });
      netlist = w.netlist;
      tied = w.tied;
      removed = w.removed;
    }
    const inverter: CellFunction = allow === "nand" ? "nand" : allow === "nor" ? "nor" : model.cellCost("nor", 1) <= model.cellCost("nand", 1) ? "nor" : "nand";
    const f = maxFanout > 0 ? legalizeFanout(netlist, { maxFanout, model, inverter, inPlace: true }) : { netlist, duplicated: 0, buffers: 0, netsSplit: 0 };
    const cost = netlistCost(f.netlist, model);
    if (!best || cost < best.cost) best = { netlist: f.netlist, cost, tied, removed, duplicated: f.duplicated, buffers: f.buffers, netsSplit: f.netsSplit };
  }
  const b = best!;
  if (b.netsSplit) {
    diagnostics.push(
      diag(
        "GW4003",
        `fan-out limited to ${maxFanout} loads a net: ${b.netsSplit} net${b.netsSplit > 1 ? "s" : ""} split, ${b.duplicated} cell${b.duplicated === 1 ? "" : "s"} duplicated, ${b.buffers} buffer${b.buffers === 1 ? "" : "s"} (two inverters each) added`,
        { file: source.file ?? source.name },
        { hint: "set the limit with --max-fanout (0: no limit)" },
      ),
    );
  }
  if (b.tied) {
    diagnostics.push(
      diag("GW4004", `wired-AND: ${b.tied} cell output${b.tied > 1 ? "s" : ""} tied onto another cell's collector resistor${b.removed ? `, ${b.removed} inverters saved` : ""}`, { file: source.file ?? source.name }),
    );
  }
  return { value: b.netlist, diagnostics };
}

type Pol = 0 | 1; // 0: the node's value, 1: its complement

// How a (node, polarity) is made, in the dynamic program's arrays.
const K_LEAF = 1;
const K_CONST = 2;
const K_PASS = 3;
const K_NAND = 4;
const K_NOR = 5;
const K_INV = 6;
const K_XOR_NAND = 7;
const K_XOR_NOR = 8;

type Choice =
  | { kind: "leaf" }
  | { kind: "const"; value: 0 | 1 }
  | { kind: "pass"; from: number; pol: Pol }
  | { kind: "cell"; fn: CellFunction; operands: [number, Pol][] }
  | { kind: "inv"; fn: CellFunction }
  | { kind: "xor4"; fn: CellFunction; a: number; b: number };

/** One mapping of the fan-in-limited graph `g` with the given families. */
function mapFamily(g: LogicGraph, source: LogicGraph, opts: MapOptions, allow: CellChoice, model: CostModel): CellNetlist {
  const cost = model.cellCost;
  const nandOk = allow !== "nor";
  const norOk = allow !== "nand";
  const stateSet = new Set(opts.stateNames);
  const cutIds = new Set<number>();
  g.nodes.forEach((n, id) => {
    if (n.op === "buf" && n.name !== undefined && stateSet.has(n.name)) cutIds.add(id);
  });
  const order = evaluationOrder(g, cutIds);
  if (!order) throw new Error("mapToCells: loop not broken at the state signals");

  const invFn: CellFunction = !norOk ? "nand" : !nandOk ? "nor" : cost("nor", 1) <= cost("nand", 1) ? "nor" : "nand";
  const invCost = cost(invFn, 1);
  const INF = Number.POSITIVE_INFINITY;
  // The dynamic program over flat arrays (index 2·id + polarity): the cheapest cost and how it
  // is made, as a kind code and one number; Choice objects are made only for what is realized.
  const N2 = 2 * g.nodes.length;
  const costOf = new Float64Array(N2).fill(INF);
  const kindOf = new Uint8Array(N2);
  const auxOf = new Int32Array(N2);
  const cellCosts = new Map<string, number>();
  const cellCost = (fn: CellFunction, k: number) => {
    const key = `${fn}${k}`;
    let c = cellCosts.get(key);
    if (c === undefined) cellCosts.set(key, (c = cost(fn, k)));
    return c;
  };

  const consider = (at: number, c: number, kind: number, aux: number) => {
    if (c < costOf[at]!) {
      costOf[at] = c;
      kindOf[at] = kind;
      auxOf[at] = aux;
    }
  };

  for (const id of order) {
    const n = g.nodes[id]!;
    const p0 = 2 * id;
    const p1 = p0 + 1;
    if (n.op === "input" || cutIds.has(id)) {
      consider(p0, 0, K_LEAF, 0);
    } else if (n.op === "const0" || n.op === "const1") {
      const v = n.op === "const1" ? 1 : 0;
      consider(p0, 0, K_CONST, v);
      consider(p1, 0, K_CONST, v ? 0 : 1);
      continue;
    } else if (n.op === "buf") {
      const f = n.fanins[0]!;
      consider(p0, costOf[2 * f]!, K_PASS, 2 * f);
      consider(p1, costOf[2 * f + 1]!, K_PASS, 2 * f + 1);
    } else if (n.op === "not") {
      const f = n.fanins[0]!;
      consider(p0, costOf[2 * f + 1]!, K_PASS, 2 * f + 1);
      consider(p1, costOf[2 * f]!, K_PASS, 2 * f);
    } else if (n.op === "and" || n.op === "or") {
      const k = n.fanins.length;
      let sumPos = 0;
      let sumNeg = 0;
      for (const f of n.fanins) {
        sumPos += costOf[2 * f]!;
        sumNeg += costOf[2 * f + 1]!;
      }
      // aux: the polarity every operand is taken in.
      if (n.op === "and") {
        // !AND(x) = NAND(x);  AND(x) = NOR(!x)
        if (nandOk) consider(p1, cellCost("nand", k) + sumPos, K_NAND, 0);
        if (norOk) consider(p0, cellCost("nor", k) + sumNeg, K_NOR, 1);
      } else {
        // !OR(x) = NOR(x);  OR(x) = NAND(!x)
        if (norOk) consider(p1, cellCost("nor", k) + sumPos, K_NOR, 0);
        if (nandOk) consider(p0, cellCost("nand", k) + sumNeg, K_NAND, 1);
      }
    } else if (n.op === "xor") {
      const [a, b] = n.fanins as [number, number];
      const base = costOf[2 * a]! + costOf[2 * b]!;
      if (nandOk) consider(p0, 4 * cellCost("nand", 2) + base, K_XOR_NAND, 0);
      if (norOk) consider(p1, 4 * cellCost("nor", 2) + base, K_XOR_NOR, 0);
    }
    // Either polarity from the other through an inverter.
    consider(p0, costOf[p1]! + invCost, K_INV, 0);
    consider(p1, costOf[p0]! + invCost, K_INV, 0);
  }
  const choiceMemo: (Choice | undefined)[] = new Array(N2);
  const choiceOf = (id: number, pol: Pol): Choice => {
    const at = 2 * id + pol;
    let ch = choiceMemo[at];
    if (ch) return ch;
    const aux = auxOf[at]!;
    const n = g.nodes[id]!;
    switch (kindOf[at]) {
      case K_LEAF:
        ch = { kind: "leaf" };
        break;
      case K_CONST:
        ch = { kind: "const", value: aux as 0 | 1 };
        break;
      case K_PASS:
        ch = { kind: "pass", from: aux >> 1, pol: (aux & 1) as Pol };
        break;
      case K_NAND:
      case K_NOR:
        ch = { kind: "cell", fn: kindOf[at] === K_NAND ? "nand" : "nor", operands: n.fanins.map((f) => [f, aux as Pol]) };
        break;
      case K_INV:
        ch = { kind: "inv", fn: invFn };
        break;
      case K_XOR_NAND:
      case K_XOR_NOR:
        ch = { kind: "xor4", fn: kindOf[at] === K_XOR_NAND ? "nand" : "nor", a: n.fanins[0]!, b: n.fanins[1]! };
        break;
      default:
        throw new Error("mapToCells: a node without a realization");
    }
    choiceMemo[at] = ch;
    return ch;
  };

  // ----- realization -------------------------------------------------------------------------
  const nets: Net[] = [];
  const cells: CellInstance[] = [];
  const sourceNames = new Set<string>();
  for (const n of source.nodes) if (n.name !== undefined) sourceNames.add(n.name);
  for (const p of source.outputs) sourceNames.add(p.name);
  const usedNames = new Set<string>();
  let genCounter = 0;
  const uniqueName = (base?: string): [string, boolean] => {
    if (base !== undefined && !usedNames.has(base)) {
      usedNames.add(base);
      return [base, true];
    }
    for (;;) {
      const cand = base !== undefined ? `${base}_${++genCounter}` : `_n${++genCounter}`;
      if (!usedNames.has(cand) && !sourceNames.has(cand)) {
        usedNames.add(cand);
        return [cand, false];
      }
    }
  };
  const newNet = (driver: NetDriver, name?: string, keepName = false): number => {
    const [nm, named] = keepName ? [name!, true] : uniqueName(name);
    if (keepName) usedNames.add(nm);
    return nets.push({ index: nets.length, name: nm, named, driver, loads: [] }) - 1;
  };
  const addCell = (fn: CellFunction, inputs: number[], out?: number): number => {
    const index = cells.length;
    const output = out ?? newNet({ kind: "cell", cell: index });
    nets[output]!.driver = { kind: "cell", cell: index };
    cells.push({ index, fn, inputs, output });
    inputs.forEach((net, pin) => nets[net]!.loads.push({ cell: index, pin }));
    return output;
  };

  // Net of each (node, polarity), at 2·id + polarity (-1: not realized yet).
  const memo = new Int32Array(N2).fill(-1);
  const netOfNode = (id: number): number => memo[2 * id]!;
  // Input and state nets first: names exactly as in the source.
  const inputs = g.inputs.map((p, port) => {
    const net = newNet({ kind: "input", port }, p.name, true);
    memo[2 * p.node] = net;
    return net;
  });
  const stateNets: number[] = [];
  for (const id of cutIds) {
    const net = newNet({ kind: "tie", value: 0 }, g.nodes[id]!.name!, true); // driver bound below
    memo[2 * id] = net;
    stateNets.push(net);
  }

  // Which (node, polarity) pairs are needed: top-down over the choices.
  const need = new Uint8Array(N2);
  const roots: [number, Pol][] = [
    ...g.outputs.map((p) => [p.node, 0] as [number, Pol]),
    ...[...cutIds].map((id) => [g.nodes[id]!.fanins[0]!, 0] as [number, Pol]),
  ];
  const markStack = [...roots];
  while (markStack.length) {
    const [id, pol] = markStack.pop()!;
    if (need[2 * id + pol]) continue;
    need[2 * id + pol] = 1;
    const ch = choiceOf(id, pol);
    switch (ch.kind) {
      case "pass":
        markStack.push([ch.from, ch.pol]);
        break;
      case "inv":
        markStack.push([id, (1 - pol) as Pol]);
        break;
      case "cell":
        markStack.push(...ch.operands);
        break;
      case "xor4":
        markStack.push([ch.a, 0], [ch.b, 0]);
        break;
      default:
        break;
    }
  }

  const realize = (id: number, pol: Pol): number => {
    const hit = memo[2 * id + pol]!;
    if (hit >= 0) return hit;
    const ch = choiceOf(id, pol);
    const name = pol === 0 ? g.nodes[id]!.name : undefined;
    let net: number;
    switch (ch.kind) {
      case "leaf":
        throw new Error("leaf without a net");
      case "const":
        net = newNet({ kind: "tie", value: ch.value });
        break;
      case "pass":
        net = memo[2 * ch.from + ch.pol]!;
        if (net < 0) throw new Error("operand realized out of order");
        break;
      case "inv": {
        const other = memo[2 * id + (1 - pol)]!;
        if (other < 0) throw new Error("inverter operand realized out of order");
        net = addCell(ch.fn, [other], newNet({ kind: "tie", value: 0 }, name));
        break;
      }
      case "cell": {
        const ins = ch.operands.map(([f, p]) => memo[2 * f + p]!);
        if (ins.some((x) => x < 0)) throw new Error("cell operand realized out of order");
        net = addCell(ch.fn, ins, newNet({ kind: "tie", value: 0 }, name));
        break;
      }
      case "xor4": {
        const a = memo[2 * ch.a]!;
        const b = memo[2 * ch.b]!;
        const n1 = addCell(ch.fn, [a, b]);
        const n2 = addCell(ch.fn, [a, n1]);
        const n3 = addCell(ch.fn, [b, n1]);
        net = addCell(ch.fn, [n2, n3], newNet({ kind: "tie", value: 0 }, name));
        break;
      }
    }
    memo[2 * id + pol] = net;
    return net;
  };
  // Bottom-up in evaluation order; for each node the polarity realized directly first, so an
  // inverter finds its operand.
  for (const id of order) {
    for (const pol of [0, 1] as const) {
      if (!need[2 * id + pol] || memo[2 * id + pol]! >= 0) continue;
      const ch = choiceOf(id, pol);
      if (ch.kind === "inv") {
        const other = (1 - pol) as Pol;
        if (memo[2 * id + other]! < 0) realize(id, other);
      }
      realize(id, pol);
    }
  }

  // ----- binding state signals and outputs onto their named nets -------------------------------
  const reserved = new Set<number>([...inputs, ...stateNets]);
  const stateNetSet = new Set(stateNets);
  // Nets moved onto another (moveInto), and a node's net with the moves followed.
  const movedTo = new Map<number, number>();
  const netAt = (id: number, pol: Pol): number => {
    let net = memo[2 * id + pol]!;
    for (let next = movedTo.get(net); next !== undefined; next = movedTo.get(net)) net = next;
    return net;
  };
  const bufferInto = (from: number, target: number) => {
    const mid = addCell(invFn, [from]);
    addCell(invFn, [mid], target);
  };
  const moveInto = (from: number, target: number) => {
    // The net `from` is driven by a cell and is nobody's port: its driver and loads move to
    // `target`, and `from` is left empty (removed below).
    const src = nets[from]!;
    const drv = src.driver as { kind: "cell"; cell: number };
    cells[drv.cell]!.output = target;
    nets[target]!.driver = { kind: "cell", cell: drv.cell };
    for (const l of src.loads) {
      cells[l.cell]!.inputs[l.pin] = target;
      nets[target]!.loads.push(l);
    }
    src.loads = [];
    src.driver = { kind: "tie", value: 0 };
    (src as Net & { dead?: boolean }).dead = true;
    // Every node realized as `from` is now realized as `target` (read through netAt).
    movedTo.set(from, target);
  };
  const bindOnto = (from: number, target: number) => {
    const src = nets[from]!;
    if (stateSet.has(src.name) && stateNetSet.has(from)) bufferInto(from, target);
    else if (src.driver.kind === "cell" && !reserved.has(from)) moveInto(from, target);
    else if (src.driver.kind === "cell") {
      // Duplicate the driving cell (cheaper than a buffer of two inverters).
      const c = cells[src.driver.cell]!;
      addCell(c.fn, [...c.inputs], target);
    } else if (src.driver.kind === "tie") {
      nets[target]!.driver = { ...src.driver };
    } else bufferInto(from, target);
    reserved.add(target);
  };
  for (const id of cutIds) {
    const f = g.nodes[id]!.fanins[0]!;
    bindOnto(netAt(f, 0), netAt(id, 0));
  }
  const outputs: { name: string; net: number }[] = [];
  g.outputs.forEach((p, i) => {
    let net = netAt(p.node, 0);
    if (reserved.has(net)) {
      if (nets[net]!.outputPort === undefined && nets[net]!.name === p.name) {
        // A state signal that is also this output: the same net.
      } else {
        const target = newNet({ kind: "tie", value: 0 }, p.name, !usedNames.has(p.name));
        bindOnto(net, target);
        net = target;
      }
    } else {
      // Rename the net to the output's name.
      if (nets[net]!.name !== p.name) {
        usedNames.delete(nets[net]!.name);
        nets[net]!.name = p.name;
        usedNames.add(p.name);
      }
      nets[net]!.named = true;
      reserved.add(net);
    }
    nets[net]!.outputPort = i;
    outputs.push({ name: p.name, net });
  });

  // ----- compaction: drop emptied nets, renumber -----------------------------------------------
  const alive = nets.filter((n) => !(n as Net & { dead?: boolean }).dead);
  const renumber = new Map<number, number>();
  alive.forEach((n, i) => renumber.set(n.index, i));
  const finalNets: Net[] = alive.map((n, i) => {
    const x: Net = { index: i, name: n.name, named: n.named, driver: n.driver, loads: n.loads };
    if (n.outputPort !== undefined) x.outputPort = n.outputPort;
    return x;
  });
  for (const c of cells) {
    c.inputs = c.inputs.map((x) => renumber.get(x)!);
    c.output = renumber.get(c.output)!;
  }
  const netlist: CellNetlist = {
    name: source.name,
    inputs: inputs.map((x) => renumber.get(x)!),
    outputs: outputs.map((o) => ({ name: o.name, net: renumber.get(o.net)! })),
    nets: finalNets,
    cells,
    stateNets: stateNets.map((x) => renumber.get(x)!),
    maxFanin: opts.maxFanin,
  };
  void netOfNode;
  return netlist;
}
