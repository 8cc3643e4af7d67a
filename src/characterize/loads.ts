// The worst-case load and input drive of each sized cell type, read from the design's netlist,
// as the sizing reckons them (src/electrical/situations.ts):
// - diode-AND loads draw current only while the output is low and diode-OR loads only while it
//   is high, so the heaviest load of a type is the diode-AND loads of its instance that sinks the
//   most current together with the diode-OR loads of its instance that feeds the most of them;
// - a forced fan-out f replaces the netlist's loads by f diode-AND loads of the basic diode-AND
//   cell (the heaviest of its sized types) and, when the design has diode-OR cells, f of those;
// - a diode-OR input is fed, when high, by its driver's collector resistor at its high end,
//   shared between the diode-OR loads on that net; the weakest load gets the share factor's part
//   of an equal share. A primary input is driven like a DTL output (SizedDesign.inputDriver).
import { cellById } from "../cells/registry.js";
import type { CellDefinition, CellEnv } from "../cells/types.js";
import type { SizedDesign } from "../electrical/types.js";

/** Identical load cells on one output, simulated as one cell with every conductance and junction
 *  area scaled by `count` (exactly equivalent to `count` cells in parallel). */
export interface LoadGroup {
  /** Index into design.cellTypes. */
  cellType: number;
  /** Input pins (0-based) of each load cell tied to the driven net. */
  pins: number[];
  count: number;
}

export interface CellLoad {
  andGroups: LoadGroup[];
  orGroups: LoadGroup[];
  andLoads: number;
  orLoads: number;
  /** Input pins on the output net, each with its share of wiring capacitance. */
  loadPins: number;
  wiringFarads: number;
  /** Some output of this type feeds no diode-OR load, so its unclamped high level counts too. */
  alsoUnclamped: boolean;
  text: string;
}

export interface CellDrive {
  inputKind: "and" | "or";
  /** Diode-OR inputs: source resistance per load at the worst net (driver's R_C at its high end
   *  × loads on the net ÷ share factor). */
  orSourceOhms?: number;
  text: string;
}

function parameter(design: SizedDesign, name: string): number | undefined {
  return design.parameters.find((p) => p.name === name)?.value;
}

/** The sizing's device assumptions at 25 °C (for ranking loads by their current and estimating
 *  collector currents), at the nominal supply or the one given. */
export function sizingEnv(design: SizedDesign, vccVolts?: number): CellEnv {
  const p = (n: string, d: number): number => parameter(design, n) ?? d;
  return {
    vccVolts: vccVolts ?? p("supplyVolts", 5),
    orShareFactor: p("orShareFactor", 0.8),
    dev: {
      tempC: 25,
      vDiodeOnVolts: p("vDiodeOnVolts", 0.7),
      vDiodeCutInVolts: p("vDiodeCutInVolts", 0.6),
      vBECutInVolts: p("vBECutInVolts", 0.5),
      vBEActiveVolts: p("vBEActiveVolts", 0.7),
      vBESatVolts: p("vBESatVolts", 0.8),
      vCESatVolts: p("vCESatVolts", 0.2),
      betaMin: p("betaMin", 30),
      betaMax: p("betaMax", 400),
    },
  };
}

export function defOfType(design: SizedDesign, typeIndex: number): CellDefinition {
  const t = design.cellTypes[typeIndex]!;
  const def = cellById(t.cellId);
  if (!def) throw new Error(`unknown cell ${t.cellId}`);
  return def;
}

/** Distinct load cells on a net with the pins they tie to it. */
function loadCells(design: SizedDesign, net: number): Map<number, number[]> {
  const m = new Map<number, number[]>();
  for (const l of design.netlist.nets[net]!.loads) m.set(l.cell, [...(m.get(l.cell) ?? []), l.pin]);
  return m;
}

function groupsOf(design: SizedDesign, cells: Map<number, number[]>): LoadGroup[] {
  const byKey = new Map<string, LoadGroup>();
  for (const [cell, pins] of cells) {
    const cellType = design.instances[cell]!.cellType;
    const k = `${cellType}|${pins.join(",")}`;
    const g = byKey.get(k);
    if (g) g.count++;
    else byKey.set(k, { cellType, pins: [...pins], count: 1 });
  }
  return [...byKey.values()];
}

function describe(design: SizedDesign, groups: LoadGroup[]): string {
  const counts = new Map<string, number>();
  for (const g of groups) {
    const k = design.cellTypes[g.cellType]!.key;
    counts.set(k, (counts.get(k) ?? 0) + g.count);
  }
  return [...counts].map(([k, n]) => `${n} × ${k}`).join(" + ");
}

const isOrType = (design: SizedDesign, typeIndex: number): boolean => defOfType(design, typeIndex).inputKind === "or";

/** The worst-case load of every cell type (index as design.cellTypes). */
export function worstLoads(design: SizedDesign): CellLoad[] {
  const env = sizingEnv(design);
  const tol = design.resistorTolerance;
  const wiring = parameter(design, "wiringCapacitancePerLoadFarads") ?? 3e-12;
  const forced = parameter(design, "fanoutOverride");
  const hasOr = design.cellTypes.some((_, j) => isOrType(design, j));
  const sinkOf = (typeIndex: number): number => defOfType(design, typeIndex).inputLowAmpsWorst(design.cellTypes[typeIndex]!.values, tol, env);

  return design.cellTypes.map((t) => {
    if (forced !== undefined) {
      const f = Math.round(forced);
      // The basic diode-AND cell of the design with the heaviest input (any diode-AND cell when
      // every one is a variant, as the sizing takes it), and a diode-OR cell.
      let andType = -1;
      let orType = -1;
      const anyBasicAnd = design.cellTypes.some((_, j) => defOfType(design, j).inputKind === "and" && defOfType(design, j).variant === "basic");
      design.cellTypes.forEach((u, j) => {
        const def = defOfType(design, j);
        if (def.inputKind === "and" && (def.variant === "basic" || !anyBasicAnd) && (andType < 0 || sinkOf(j) > sinkOf(andType))) andType = j;
        if (def.inputKind === "or" && (orType < 0 || (u.values.rbOhms ?? Infinity) < (design.cellTypes[orType]!.values.rbOhms ?? Infinity))) orType = j;
      });
      const andGroups = andType >= 0 ? [{ cellType: andType, pins: [0], count: f }] : [];
      const orGroups = hasOr && orType >= 0 ? [{ cellType: orType, pins: [0], count: f }] : [];
      const all = [...andGroups, ...orGroups];
      return {
        andGroups,
        orGroups,
        andLoads: andGroups.length ? f : 0,
        orLoads: orGroups.length ? f : 0,
        loadPins: andGroups.length + orGroups.length > 0 ? f * all.length : 0,
        wiringFarads: wiring,
        alsoUnclamped: false,
        text: `forced fan-out ${f}: ${describe(design, all) || "no cell to load with"}`,
      };
    }
    // The instance sinking the most diode-AND current, and the one feeding the most diode-OR loads.
    let andBest: { cell: number; amps: number; cells: Map<number, number[]> } | undefined;
    let orBest: { cell: number; count: number; cells: Map<number, number[]> } | undefined;
    let alsoUnclamped = false;
    let pinsMax = 0;
    for (const c of t.cells) {
      const net = design.netlist.cells[c]!.output;
      const cells = loadCells(design, net);
      const andCells = new Map<number, number[]>();
      const orCells = new Map<number, number[]>();
      for (const [cell, pins] of cells) (isOrType(design, design.instances[cell]!.cellType) ? orCells : andCells).set(cell, pins);
      let amps = 0;
      for (const cell of andCells.keys()) amps += sinkOf(design.instances[cell]!.cellType);
      if (!andBest || amps > andBest.amps) andBest = { cell: c, amps, cells: andCells };
      if (orCells.size > 0 && (!orBest || orCells.size > orBest.count)) orBest = { cell: c, count: orCells.size, cells: orCells };
      if (orCells.size === 0) alsoUnclamped = true;
      pinsMax = Math.max(pinsMax, design.netlist.nets[net]!.loads.length);
    }
    const andGroups = andBest ? groupsOf(design, andBest.cells) : [];
    const orGroups = orBest ? groupsOf(design, orBest.cells) : [];
    const andLoads = andGroups.reduce((n, g) => n + g.count, 0);
    const orLoads = orGroups.reduce((n, g) => n + g.count, 0);
    const loadPins = Math.max(pinsMax, [...andGroups, ...orGroups].reduce((n, g) => n + g.count * g.pins.length, 0));
    const whose =
      andBest && orBest && andBest.cell !== orBest.cell && andLoads > 0
        ? ` (diode-AND loads of U${andBest.cell + 1}, diode-OR loads of U${orBest.cell + 1})`
        : andLoads + orLoads > 0
          ? ` (the load of U${(andLoads > 0 ? andBest! : orBest!).cell + 1})`
          : "";
    const what = describe(design, [...andGroups, ...orGroups]);
    return {
      andGroups,
      orGroups,
      andLoads,
      orLoads,
      loadPins,
      wiringFarads: wiring,
      alsoUnclamped: orLoads > 0 && alsoUnclamped,
      text: what ? `${what}${whose}` : "no cell load (a primary output)",
    };
  });
}

/** The worst-case input drive of every cell type (index as design.cellTypes). */
export function worstDrives(design: SizedDesign): CellDrive[] {
  const tol = design.resistorTolerance;
  const share = parameter(design, "orShareFactor") ?? 0.8;
  const forced = parameter(design, "fanoutOverride");
  const hasOr = design.cellTypes.some((_, j) => isOrType(design, j));
  const nl = design.netlist;
  return design.cellTypes.map((t, j) => {
    const def = defOfType(design, j);
    if (def.inputKind !== "or") return { inputKind: "and", text: "a stiff voltage source (a saturated DTL output when low)" };
    let worst = 0;
    let text = "";
    for (const c of t.cells) {
      for (const net of nl.cells[c]!.inputs) {
        const n0 = [...loadCells(design, net).keys()].filter((cell) => isOrType(design, design.instances[cell]!.cellType)).length;
        const n = Math.max(1, forced !== undefined && hasOr ? Math.max(Math.round(forced), n0) : n0);
        const driver = nl.nets[net]!.driver;
        const rc = driver.kind === "cell" ? design.cellTypes[design.instances[driver.cell]!.cellType]!.values.rcOhms : design.inputDriver.pullUpOhms;
        if (rc === undefined) continue;
        const r = (rc * (1 + tol) * n) / (n <= 1 ? 1 : share);
        if (r > worst) {
          worst = r;
          const from = driver.kind === "cell" ? `U${driver.cell + 1}'s collector resistor` : "the input driver's pull-up";
          text = `${from} at its high end shared by ${n} diode-OR load${n > 1 ? "s" : ""}${n > 1 ? ` (the weakest getting ${Math.round(share * 100)} % of an equal share)` : ""}`;
        }
      }
    }
    if (!(worst > 0)) {
      worst = design.inputDriver.pullUpOhms * (1 + tol);
      text = "the input driver's pull-up at its high end";
    }
    return { inputKind: "or", orSourceOhms: worst, text };
  });
}
