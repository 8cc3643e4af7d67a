// From a cell netlist to load situations: for each cell, what hangs on its output (diode-AND
// and diode-OR loads, counted per net) and what drives its inputs. Cells alike in every respect
// share one situation, so the search evaluates each case once.
import type { CellDefinition } from "../cells/types.js";
import type { CellNetlist } from "../map/types.js";

export interface Situation {
  key: string;
  def: CellDefinition;
  fanin: number;
  /** Cells in this situation. */
  cells: number[];
  /** Diode-AND loads on the output, per load cell id: [cellId, count]. */
  andLoadsByType: [string, number][];
  andLoads: number;
  orLoads: number;
  /** Input pins on the output net (for capacitance). */
  loadPins: number;
  /** Some input net of this cell also feeds diode-OR loads, so its high level is clamped. */
  inputsSeeOrClamp: boolean;
  /** Largest number of diode-OR loads sharing the driver of one of this cell's inputs. */
  orDriveLoads: number;
  /** The output is a primary output. */
  primaryOutput: boolean;
  /** Wired-AND: other transistors tied onto this cell's output net (0: not a wired net). */
  tiedCollectors: number;
  /** False for a cell tied onto another's net (it has no R_C; the net's driver holds it). */
  ownsPullUp: boolean;
  /** For a tied cell: the cell id of its net's driver, whose R_C is the pull-up. */
  pullUpCellId?: string;
  /** Largest number of transistors on one wired net among this cell's inputs (0: none wired). */
  inputWiredCollectors: number;
  /** Largest number of diode-AND loads on one wired net among this cell's inputs. */
  inputWiredAndLoads: number;
}

export interface NetLoading {
  /** Diode-AND loads per load cell id, [cellId, count], in order of cell id. */
  andLoadsByType: [string, number][];
  /** The same as text, "id:count,id:count" (part of a situation's key). */
  andLoadsText: string;
  andLoads: number;
  orLoads: number;
  pins: number;
}

/** Loads on every net: distinct load cells by input kind (two pins of one cell on one net are
 *  one load: they share that cell's pull-up or base). Nets with the same diode-AND loads share
 *  one `andLoadsByType` list (read only). */
export function netLoading(netlist: CellNetlist, defs: readonly CellDefinition[]): NetLoading[] {
  // The diode-AND cell ids, in the order the lists give them.
  const andIds: string[] = [];
  for (const d of defs) if (d.inputKind === "and" && !andIds.includes(d.id)) andIds.push(d.id);
  andIds.sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  const andIndex = new Map(andIds.map((id, i) => [id, i] as const));
  const kindOf = defs.map((d) => (d.inputKind === "and" ? andIndex.get(d.id)! : -1));
  const counts = new Int32Array(andIds.length);
  // The last net each cell was counted on (a cell with two pins on one net is one load).
  const seenOn = new Int32Array(netlist.cells.length).fill(-1);
  const lists = new Map<string, [string, number][]>();
  return netlist.nets.map((net, ni) => {
    let andLoads = 0;
    let orLoads = 0;
    for (const l of net.loads) {
      if (seenOn[l.cell] === ni) continue;
      seenOn[l.cell] = ni;
      const k = kindOf[l.cell]!;
      if (k >= 0) {
        andLoads++;
        counts[k]!++;
      } else {
        orLoads++;
      }
    }
    let andLoadsText = "";
    if (andLoads > 0)
      for (let k = 0; k < andIds.length; k++) {
        if (counts[k] === 0) continue;
        andLoadsText += `${andLoadsText ? "," : ""}${andIds[k]}:${counts[k]}`;
      }
    let andLoadsByType = lists.get(andLoadsText);
    if (!andLoadsByType) {
      andLoadsByType = [];
      for (let k = 0; k < andIds.length; k++) if (counts[k]! > 0) andLoadsByType.push([andIds[k]!, counts[k]!]);
      lists.set(andLoadsText, andLoadsByType);
    }
    if (andLoads > 0) counts.fill(0);
    return { andLoadsByType, andLoadsText, andLoads, orLoads, pins: net.loads.length };
  });
}

export interface SituationOptions {
  /** Every output sized for this many loads (diode-AND always, diode-OR when the design has any
   *  diode-OR cells), instead of what the netlist has. */
  fanoutOverride?: number;
  /** Group cells alike (uniform sizing); false gives one situation per cell. */
  group: boolean;
  /** False: leave out the wired-AND terms (leakage and capacitance of tied collectors), to
   *  find whether they are what makes a design infeasible. Default true. */
  wired?: boolean;
}

/** Transistors on each net: 1 + tied cells for a net driven by a cell, 0 otherwise. */
export function collectorsOnNets(netlist: CellNetlist): number[] {
  return netlist.nets.map((n) => (n.driver.kind === "cell" ? 1 + (n.tiedCells?.length ?? 0) : 0));
}

export function buildSituations(
  netlist: CellNetlist,
  defs: readonly CellDefinition[],
  opts: SituationOptions,
): { situations: Situation[]; byCell: number[]; loading: NetLoading[] } {
  const loading = netLoading(netlist, defs);
  const hasOr = defs.some((d) => d.inputKind === "or");
  const heaviestAndType = (() => {
    // For a forced fan-out, loads are taken as the design's basic diode-AND cell.
    const and = defs.find((d) => d.inputKind === "and" && d.variant === "basic") ?? defs.find((d) => d.inputKind === "and");
    return and?.id;
  })();
  const situations: Situation[] = [];
  const index = new Map<string, number>();
  const byCell: number[] = [];
  const wiredTerms = opts.wired !== false;
  const collectors = collectorsOnNets(netlist);
  const overrideLoads: [string, number][] | undefined = opts.fanoutOverride === undefined ? undefined : heaviestAndType !== undefined ? [[heaviestAndType, opts.fanoutOverride]] : [];
  const overrideText = overrideLoads?.map(([t, c]) => `${t}:${c}`).join(",");
  // Cells are grouped by a compact key of small numbers (the kind, the diode-AND load list and
  // the pull-up's kind as indices); the readable key is written once per situation.
  const kindIndex = new Map<CellDefinition, number>();
  const listIndex = new Map<readonly [string, number][], number>();
  const pullUpIndex = new Map<string | undefined, number>();
  const indexIn = <K>(m: Map<K, number>, k: K): number => {
    let i = m.get(k);
    if (i === undefined) m.set(k, (i = m.size));
    return i;
  };
  const codes: number[] = [];
  /** Two UTF-16 units for a count of up to 2^32 − 1. */
  const put = (x: number) => codes.push(x & 0xffff, x >>> 16);
  for (const cell of netlist.cells) {
    const def = defs[cell.index]!;
    const out = loading[cell.output]!;
    let andLoadsByType = out.andLoadsByType;
    let andLoadsText = out.andLoadsText;
    let andLoads = out.andLoads;
    let orLoads = out.orLoads;
    let loadPins = out.pins;
    const f = opts.fanoutOverride;
    if (f !== undefined) {
      andLoads = f;
      andLoadsByType = overrideLoads!;
      andLoadsText = overrideText!;
      orLoads = hasOr ? f : 0;
      loadPins = Math.max(loadPins, f);
    }
    let inputsSeeOrClamp = false;
    let orDriveLoads = 0;
    for (const n of cell.inputs) {
      const l = loading[n]!;
      const orHere = f !== undefined && hasOr ? Math.max(f, l.orLoads) : l.orLoads;
      if (orHere > 0) inputsSeeOrClamp = true;
      orDriveLoads = Math.max(orDriveLoads, orHere);
    }
    const primaryOutput = netlist.nets[cell.output]?.outputPort !== undefined;
    const fanin = cell.inputs.length;
    // Wired-AND: the output net's other transistors, and the worst wired net among the inputs.
    const outNet = netlist.nets[cell.output]!;
    const ownsPullUp = !cell.tiedOutput;
    const tiedCollectors = wiredTerms ? Math.max(0, (collectors[cell.output] ?? 1) - 1) : 0;
    const pullUpCellId = !ownsPullUp && outNet.driver.kind === "cell" ? defs[outNet.driver.cell]!.id : undefined;
    let inputWiredCollectors = 0;
    let inputWiredAndLoads = 0;
    if (wiredTerms)
      for (const n of cell.inputs) {
        if ((collectors[n] ?? 0) < 2) continue;
        inputWiredCollectors = Math.max(inputWiredCollectors, collectors[n]!);
        inputWiredAndLoads = Math.max(inputWiredAndLoads, loading[n]!.andLoads);
      }
    let lookup: string;
    if (opts.group) {
      codes.length = 0;
      put(indexIn(kindIndex, def));
      put(fanin);
      put(indexIn(listIndex, andLoadsByType));
      put(orLoads);
      put(loadPins);
      put(inputsSeeOrClamp ? 1 : 0);
      put(orDriveLoads);
      put(ownsPullUp ? 0 : 1 + indexIn(pullUpIndex, pullUpCellId));
      put(tiedCollectors);
      put(inputWiredCollectors);
      put(inputWiredAndLoads);
      lookup = String.fromCharCode(...codes);
    } else lookup = `cell${cell.index}`;
    let si = index.get(lookup);
    if (si === undefined) {
      si = situations.length;
      index.set(lookup, si);
      situations.push({
        key: opts.group
          ? `${def.id}|${fanin}|${andLoadsText}|${orLoads}|${loadPins}|${inputsSeeOrClamp ? 1 : 0}|${orDriveLoads}|${ownsPullUp ? "" : `tied:${pullUpCellId}`}/${tiedCollectors}/${inputWiredCollectors}/${inputWiredAndLoads}`
          : lookup,
        def,
        fanin,
        cells: [],
        andLoadsByType: andLoadsByType.map(([t, c]) => [t, c]),
        andLoads,
        orLoads,
        loadPins,
        inputsSeeOrClamp,
        orDriveLoads,
        primaryOutput,
        tiedCollectors,
        ownsPullUp,
        ...(pullUpCellId !== undefined ? { pullUpCellId } : {}),
        inputWiredCollectors,
        inputWiredAndLoads,
      });
    }
    situations[si]!.cells.push(cell.index);
    byCell.push(si);
  }
  return { situations, byCell, loading };
}

/** What a search must evaluate for one cell kind: the situations no other situation dominates
 *  (for the constraints), and one situation per power class with the number of cells it stands
 *  for (for the objective). */
export interface SituationSet {
  constraint: Situation[];
  power: { situation: Situation; cells: number }[];
}

function dominates(a: Situation, b: Situation): boolean {
  if (a.def !== b.def) return false;
  if (a.orLoads > 0 !== b.orLoads > 0) return false;
  if (a.orLoads < b.orLoads || a.loadPins < b.loadPins || a.orDriveLoads < b.orDriveLoads || a.fanin < b.fanin) return false;
  if (b.inputsSeeOrClamp && !a.inputsSeeOrClamp) return false;
  if (a.andLoads < b.andLoads) return false;
  // Wired-AND: more tied collectors (capacitance, leakage) and worse wired inputs are harder;
  // the driver of a wired net carries R_C's current in both states (power).
  if (a.tiedCollectors < b.tiedCollectors || a.inputWiredCollectors < b.inputWiredCollectors || a.inputWiredAndLoads < b.inputWiredAndLoads) return false;
  if (b.ownsPullUp && !a.ownsPullUp) return false;
  const count = (s: Situation, id: string): number => s.andLoadsByType.find(([t]) => t === id)?.[1] ?? 0;
  for (const [id, n] of b.andLoadsByType) if (count(a, id) < n) return false;
  return true;
}

/** Reduces situations of one kind to what decides feasibility and power. A situation with no
 *  fewer loads of every kind, no fewer diode-OR loads on its inputs' drivers, no smaller fan-in,
 *  no fewer tied collectors and no better input levels is at least as hard for every constraint;
 *  power depends only on the cell kind, whether the output feeds diode-OR loads and how the
 *  cell sits on a wired net (driver or tied). */
export function reduceSituations(situations: readonly Situation[]): SituationSet {
  const constraint: Situation[] = [];
  for (const s of situations) {
    if (situations.some((t) => t !== s && dominates(t, s) && (!dominates(s, t) || situations.indexOf(t) < situations.indexOf(s)))) continue;
    constraint.push(s);
  }
  const groups = new Map<string, { situation: Situation; cells: number }>();
  for (const s of situations) {
    const k = `${s.def.id}|${s.orLoads > 0 ? 1 : 0}|${s.ownsPullUp ? 1 : 0}|${s.tiedCollectors > 0 ? 1 : 0}`;
    const g = groups.get(k);
    if (g) g.cells += s.cells.length;
    else groups.set(k, { situation: s, cells: s.cells.length });
  }
  return { constraint, power: [...groups.values()] };
}
