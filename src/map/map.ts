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
export const K_LEAF = 1;
export const K_CONST = 2;
export const K_PASS = 3;
export const K_NAND = 4;
export const K_NOR = 5;
export const K_INV = 6;
export const K_XOR_NAND = 7;
export const K_XOR_NOR = 8;

/** One mapping of the fan-in-limited graph `g` with the given families. */
function mapFamily(g: LogicGraph, source: LogicGraph, opts: MapOptions, allow: CellChoice, model: CostModel): CellNetlist {
  const stateSet = new Set(opts.stateNames);
  const cutIds = new Set<number>();
  const nodes = g.nodes;
  const isCut = new Uint8Array(nodes.length);
  for (let id = 0; id < nodes.length; id++) {
    const n = nodes[id]!;
    if (n.op === "buf" && n.name !== undefined && stateSet.has(n.name)) {
      cutIds.add(id);
      isCut[id] = 1;
    }
  }
  const order = evaluationOrder(g, cutIds);
  if (!order) throw new Error("mapToCells: loop not broken at the state signals");

  const { kindOf, auxOf, invFn } = chooseRealizations(g, isCut, order, allow, model);
  const N2 = 2 * nodes.length;
  const checkKind = (at: number) => {
    const k = kindOf[at]!;
    if (k < K_LEAF || k > K_XOR_NOR) throw new Error("mapToCells: a node without a realization");
    return k;
  };

  // ----- realization -------------------------------------------------------------------------
  const nets: Net[] = [];
  const cells: CellInstance[] = [];
  // Names. A net the source did not name gets `_n<k>`, k counting up; a name is never given
  // twice and a generated one never takes a source name. Generated `_n<k>` names can only meet
  // the names that begin with "_n" (a suffixed name `<base>_<k>` never has that form), so only
  // those are looked up for them.
  const isGeneratedForm = (x: string) => x.charCodeAt(0) === 95 && x.charCodeAt(1) === 110; // "_n"
  const reservedN = new Set<string>();
  let sourceNamesMade: Set<string> | undefined;
  const sourceNames = (): Set<string> => {
    if (!sourceNamesMade) {
      sourceNamesMade = new Set<string>();
      for (const n of source.nodes) if (n.name !== undefined) sourceNamesMade.add(n.name);
      for (const p of source.outputs) sourceNamesMade.add(p.name);
    }
    return sourceNamesMade;
  };
  for (const n of source.nodes) if (n.name !== undefined && isGeneratedForm(n.name)) reservedN.add(n.name);
  for (const p of source.outputs) if (isGeneratedForm(p.name)) reservedN.add(p.name);
  const usedNames = new Set<string>();
  const useName = (x: string) => {
    usedNames.add(x);
    if (isGeneratedForm(x)) reservedN.add(x);
  };
  let genCounter = 0;
  const uniqueName = (base?: string): [string, boolean] => {
    if (base === undefined) {
      for (;;) {
        const cand = `_n${++genCounter}`;
        if (!reservedN.has(cand)) return [cand, false];
      }
    }
    if (!usedNames.has(base)) {
      useName(base);
      return [base, true];
    }
    for (;;) {
      const cand = `${base}_${++genCounter}`;
      if (!usedNames.has(cand) && !sourceNames().has(cand)) {
        useName(cand);
        return [cand, false];
      }
    }
  };
  const newNet = (driver: NetDriver, name?: string, keepName = false): number => {
    let nm: string;
    let named: boolean;
    if (keepName) {
      nm = name!;
      named = true;
      useName(nm);
    } else [nm, named] = uniqueName(name);
    return nets.push({ index: nets.length, name: nm, named, driver, loads: [] }) - 1;
  };
  const addCell = (fn: CellFunction, inputs: number[], out?: number): number => {
    const index = cells.length;
    const output = out ?? newNet({ kind: "cell", cell: index });
    nets[output]!.driver = { kind: "cell", cell: index };
    cells.push({ index, fn, inputs, output });
    for (let pin = 0; pin < inputs.length; pin++) nets[inputs[pin]!]!.loads.push({ cell: index, pin });
    return output;
  };

  // Net of each (node, polarity), at 2·id + polarity (-1: not realized yet).
  const memo = new Int32Array(N2).fill(-1);
  // Input and state nets first: names exactly as in the source.
  const inputs = g.inputs.map((p, port) => {
    const net = newNet({ kind: "input", port }, p.name, true);
    memo[2 * p.node] = net;
    return net;
  });
  const stateNets: number[] = [];
  for (const id of cutIds) {
    const net = newNet({ kind: "tie", value: 0 }, nodes[id]!.name!, true); // driver bound below
    memo[2 * id] = net;
    stateNets.push(net);
  }

  const need = markNeeded(g, cutIds, kindOf, auxOf);

  const realize = (at: number): number => {
    const hit = memo[at]!;
    if (hit >= 0) return hit;
    const kind = checkKind(at);
    const aux = auxOf[at]!;
    const id = at >> 1;
    const name = (at & 1) === 0 ? nodes[id]!.name : undefined;
    let net: number;
    switch (kind) {
      case K_LEAF:
        throw new Error("leaf without a net");
      case K_CONST:
        net = newNet({ kind: "tie", value: aux as 0 | 1 });
        break;
      case K_PASS:
        net = memo[aux]!;
        if (net < 0) throw new Error("operand realized out of order");
        break;
      case K_INV: {
        const other = memo[at ^ 1]!;
        if (other < 0) throw new Error("inverter operand realized out of order");
        net = addCell(invFn, [other], newNet({ kind: "tie", value: 0 }, name));
        break;
      }
      case K_NAND:
      case K_NOR: {
        const fanins = nodes[id]!.fanins;
        const ins: number[] = new Array(fanins.length);
        for (let i = 0; i < fanins.length; i++) {
          const x = memo[2 * fanins[i]! + aux]!;
          if (x < 0) throw new Error("cell operand realized out of order");
          ins[i] = x;
        }
        net = addCell(kind === K_NAND ? "nand" : "nor", ins, newNet({ kind: "tie", value: 0 }, name));
        break;
      }
      default: {
        // K_XOR_NAND, K_XOR_NOR: the four-gate XOR.
        const fn: CellFunction = kind === K_XOR_NAND ? "nand" : "nor";
        const fanins = nodes[id]!.fanins;
        const a = memo[2 * fanins[0]!]!;
        const b = memo[2 * fanins[1]!]!;
        const n1 = addCell(fn, [a, b]);
        const n2 = addCell(fn, [a, n1]);
        const n3 = addCell(fn, [b, n1]);
        net = addCell(fn, [n2, n3], newNet({ kind: "tie", value: 0 }, name));
        break;
      }
    }
    memo[at] = net;
    return net;
  };
  // Bottom-up in evaluation order; for each node the polarity realized directly first, so an
  // inverter finds its operand.
  for (let oi = 0; oi < order.length; oi++) {
    const id = order[oi]!;
    for (let pol = 0; pol < 2; pol++) {
      const at = 2 * id + pol;
      if (!need[at] || memo[at]! >= 0) continue;
      if (kindOf[at] === K_INV && memo[at ^ 1]! < 0) realize(at ^ 1);
      realize(at);
    }
  }

  // ----- binding state signals and outputs onto their named nets -------------------------------
  const reserved = new Set<number>([...inputs, ...stateNets]);
  const stateNetSet = new Set(stateNets);
  // Nets moved onto another (moveInto), and a node's net with the moves followed.
  const movedTo = new Map<number, number>();
  const dead = new Set<number>();
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
    dead.add(from);
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
    const f = nodes[id]!.fanins[0]!;
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
        useName(p.name);
      }
      nets[net]!.named = true;
      reserved.add(net);
    }
    nets[net]!.outputPort = i;
    outputs.push({ name: p.name, net });
  });

  // ----- compaction: drop emptied nets, renumber -----------------------------------------------
  let finalNets: Net[] = nets;
  let renumbered = (x: number) => x;
  if (dead.size) {
    const renumber = new Int32Array(nets.length).fill(-1);
    finalNets = [];
    for (const n of nets) {
      if (dead.has(n.index)) continue;
      const i = finalNets.length;
      renumber[n.index] = i;
      const x: Net = { index: i, name: n.name, named: n.named, driver: n.driver, loads: n.loads };
      if (n.outputPort !== undefined) x.outputPort = n.outputPort;
      finalNets.push(x);
    }
    renumbered = (x: number) => renumber[x]!;
    for (const c of cells) {
      const ins = c.inputs;
      for (let i = 0; i < ins.length; i++) ins[i] = renumber[ins[i]!]!;
      c.output = renumber[c.output]!;
    }
  }
  const netlist: CellNetlist = {
    name: source.name,
    inputs: inputs.map(renumbered),
    outputs: outputs.map((o) => ({ name: o.name, net: renumbered(o.net) })),
    nets: finalNets,
    cells,
    stateNets: stateNets.map(renumbered),
    maxFanin: opts.maxFanin,
  };
  return netlist;
}

/**
 * The dynamic program of the mapping: for every (node, polarity), at 2·id + polarity, how it is
 * made most cheaply (a kind code K_* and one number: the operand's index for K_PASS, the
 * operands' polarity for a cell, the value for K_CONST), and the inverter's function.
 */
export function chooseRealizations(
  g: LogicGraph,
  isCut: Uint8Array,
  order: readonly number[],
  allow: CellChoice,
  model: CostModel,
): { kindOf: Uint8Array; auxOf: Int32Array; invFn: CellFunction } {
  const cost = model.cellCost;
  const nandOk = allow !== "nor";
  const norOk = allow !== "nand";
  const nodes = g.nodes;
  const invFn: CellFunction = !norOk ? "nand" : !nandOk ? "nor" : cost("nor", 1) <= cost("nand", 1) ? "nor" : "nand";
  const invCost = cost(invFn, 1);
  const INF = Number.POSITIVE_INFINITY;
  // The dynamic program over flat arrays (index 2·id + polarity): the cheapest cost and how it
  // is made, as a kind code and one number.
  const N2 = 2 * nodes.length;
  const costOf = new Float64Array(N2).fill(INF);
  const kindOf = new Uint8Array(N2);
  const auxOf = new Int32Array(N2);
  // Cell costs by fan-in, per function (asked of the model once each).
  const nandCosts: number[] = [];
  const norCosts: number[] = [];
  const cellCost = (fn: CellFunction, k: number) => {
    const table = fn === "nand" ? nandCosts : norCosts;
    let c = table[k];
    if (c === undefined) table[k] = c = cost(fn, k);
    return c;
  };

  const consider = (at: number, c: number, kind: number, aux: number) => {
    if (c < costOf[at]!) {
      costOf[at] = c;
      kindOf[at] = kind;
      auxOf[at] = aux;
    }
  };

  for (let oi = 0; oi < order.length; oi++) {
    const id = order[oi]!;
    const n = nodes[id]!;
    const p0 = 2 * id;
    const p1 = p0 + 1;
    const op = n.op;
    if (op === "input" || isCut[id]) {
      consider(p0, 0, K_LEAF, 0);
    } else if (op === "const0" || op === "const1") {
      const v = op === "const1" ? 1 : 0;
      consider(p0, 0, K_CONST, v);
      consider(p1, 0, K_CONST, v ? 0 : 1);
      continue;
    } else if (op === "buf") {
      const f = n.fanins[0]!;
      consider(p0, costOf[2 * f]!, K_PASS, 2 * f);
      consider(p1, costOf[2 * f + 1]!, K_PASS, 2 * f + 1);
    } else if (op === "not") {
      const f = n.fanins[0]!;
      consider(p0, costOf[2 * f + 1]!, K_PASS, 2 * f + 1);
      consider(p1, costOf[2 * f]!, K_PASS, 2 * f);
    } else if (op === "and" || op === "or") {
      const fanins = n.fanins;
      const k = fanins.length;
      let sumPos = 0;
      let sumNeg = 0;
      for (let i = 0; i < k; i++) {
        const f = fanins[i]!;
        sumPos += costOf[2 * f]!;
        sumNeg += costOf[2 * f + 1]!;
      }
      // aux: the polarity every operand is taken in.
      if (op === "and") {
        // !AND(x) = NAND(x);  AND(x) = NOR(!x)
        if (nandOk) consider(p1, cellCost("nand", k) + sumPos, K_NAND, 0);
        if (norOk) consider(p0, cellCost("nor", k) + sumNeg, K_NOR, 1);
      } else {
        // !OR(x) = NOR(x);  OR(x) = NAND(!x)
        if (norOk) consider(p1, cellCost("nor", k) + sumPos, K_NOR, 0);
        if (nandOk) consider(p0, cellCost("nand", k) + sumNeg, K_NAND, 1);
      }
    } else if (op === "xor") {
      const a = n.fanins[0]!;
      const b = n.fanins[1]!;
      const base = costOf[2 * a]! + costOf[2 * b]!;
      if (nandOk) consider(p0, 4 * cellCost("nand", 2) + base, K_XOR_NAND, 0);
      if (norOk) consider(p1, 4 * cellCost("nor", 2) + base, K_XOR_NOR, 0);
    }
    // Either polarity from the other through an inverter.
    consider(p0, costOf[p1]! + invCost, K_INV, 0);
    consider(p1, costOf[p0]! + invCost, K_INV, 0);
  }
  return { kindOf, auxOf, invFn };
}

/** The (node, polarity) pairs a mapping realizes: from the outputs and the state signals'
 *  operands down through the choices. */
export function markNeeded(g: LogicGraph, cutIds: ReadonlySet<number>, kindOf: Uint8Array, auxOf: Int32Array): Uint8Array {
  const nodes = g.nodes;
  const N2 = 2 * nodes.length;
  const checkKind = (at: number) => {
    const k = kindOf[at]!;
    if (k < K_LEAF || k > K_XOR_NOR) throw new Error("mapToCells: a node without a realization");
    return k;
  };
  // A stack of 2·id + pol.
  const need = new Uint8Array(N2);
  let stack = new Int32Array(Math.max(16, g.outputs.length + cutIds.size));
  let sp = 0;
  const push = (at: number) => {
    if (sp === stack.length) {
      const bigger = new Int32Array(2 * stack.length);
      bigger.set(stack);
      stack = bigger;
    }
    stack[sp++] = at;
  };
  for (const p of g.outputs) push(2 * p.node);
  for (const id of cutIds) push(2 * nodes[id]!.fanins[0]!);
  while (sp > 0) {
    const at = stack[--sp]!;
    if (need[at]) continue;
    need[at] = 1;
    const kind = checkKind(at);
    const aux = auxOf[at]!;
    if (kind === K_PASS) push(aux);
    else if (kind === K_INV) push(at ^ 1);
    else if (kind === K_NAND || kind === K_NOR) {
      const fanins = nodes[at >> 1]!.fanins;
      for (let i = 0; i < fanins.length; i++) push(2 * fanins[i]! + aux);
    } else if (kind === K_XOR_NAND || kind === K_XOR_NOR) {
      const fanins = nodes[at >> 1]!.fanins;
      push(2 * fanins[0]!);
      push(2 * fanins[1]!);
    }
  }

  return need;
}
