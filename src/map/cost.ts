// What a cell netlist costs. The DTL model counts parts as the basic cells are built
// (src/cells/nand, src/cells/nor): wide diode gates are cheap (one diode per input) while every
// gate costs a transistor and its resistors, so a few wide gates beat many narrow ones. The
// weights are options; the default (ours) counts a transistor as four parts' worth, a diode or
// a resistor as one. The two-input-NAND model counts gates as a two-input NAND network would
// (a cell of k inputs as k − 1 two-input gates, an inverter as one), for comparison with the
// textbook figures.
import type { CellFunction, CellNetlist } from "./types.js";

export interface PartWeights {
  transistor: number;
  diode: number;
  resistor: number;
}

export const DEFAULT_PART_WEIGHTS: PartWeights = { transistor: 4, diode: 1, resistor: 1 };
/** Every part counts one: the plain part count. */
export const PART_COUNT_WEIGHTS: PartWeights = { transistor: 1, diode: 1, resistor: 1 };

export interface CellParts {
  transistors: number;
  diodes: number;
  resistors: number;
}

/** Parts of a basic cell. NAND-k (Millman & Halkias ex. 6-5 topology): k input diodes, two
 *  level-shift diodes, R_P, R_B, R_C, one transistor. NOR-k (src/cells/nor): k input diodes,
 *  one level-shift diode, R_B, R_C, one transistor. k = 1 is the inverter of either family. */
export function cellParts(fn: CellFunction, fanin: number): CellParts {
  return fn === "nand" ? { transistors: 1, diodes: fanin + 2, resistors: 3 } : { transistors: 1, diodes: fanin + 1, resistors: 2 };
}

export type CostModelName = "dtl" | "nand2";

export interface CostModel {
  name: CostModelName;
  /** Weights of the DTL model (absent for the two-input-NAND model). */
  weights?: PartWeights;
  /** Cost of one basic cell. */
  cellCost(fn: CellFunction, fanin: number): number;
  /** Cost saved when a cell's output is tied onto another's collector resistor (wired-AND). */
  tiedSaving: number;
  /** Plain words for reports. */
  description: string;
}

export function dtlCostModel(weights: PartWeights = DEFAULT_PART_WEIGHTS): CostModel {
  return {
    name: "dtl",
    weights: { ...weights },
    cellCost(fn, fanin) {
      const p = cellParts(fn, fanin);
      return p.transistors * weights.transistor + p.diodes * weights.diode + p.resistors * weights.resistor;
    },
    tiedSaving: weights.resistor,
    description: `DTL parts: transistor ${weights.transistor}, diode ${weights.diode}, resistor ${weights.resistor}`,
  };
}

export function nand2CostModel(): CostModel {
  return {
    name: "nand2",
    cellCost: (_fn, fanin) => Math.max(1, fanin - 1),
    tiedSaving: 0,
    description: "two-input-NAND equivalents: a k-input cell counts k − 1, an inverter 1",
  };
}

export interface PartTally {
  cells: number;
  transistors: number;
  diodes: number;
  resistors: number;
  /** transistors + diodes + resistors */
  parts: number;
  /** Two-input-NAND equivalents (the comparison model). */
  nand2: number;
  /** Cost in the model the tally was made with. */
  cost: number;
}

/** Whether a cell's output is tied onto a net another cell drives (wired-AND: no R_C of its own). */
export function isTiedCell(netlist: CellNetlist, cell: number): boolean {
  return netlist.cells[cell]!.tiedOutput === true;
}

/** Parts of a netlist built from basic cells (the sizing may still choose other variants). */
export function tallyParts(netlist: CellNetlist, model: CostModel = dtlCostModel()): PartTally {
  const t: PartTally = { cells: 0, transistors: 0, diodes: 0, resistors: 0, parts: 0, nand2: 0, cost: 0 };
  for (const c of netlist.cells) {
    const p = cellParts(c.fn, c.inputs.length);
    t.cells++;
    t.transistors += p.transistors;
    t.diodes += p.diodes;
    t.resistors += p.resistors - (c.tiedOutput ? 1 : 0);
    t.nand2 += Math.max(1, c.inputs.length - 1);
    t.cost += model.cellCost(c.fn, c.inputs.length) - (c.tiedOutput ? model.tiedSaving : 0);
  }
  t.parts = t.transistors + t.diodes + t.resistors;
  return t;
}

/** Cost of a netlist in a model. */
export function netlistCost(netlist: CellNetlist, model: CostModel): number {
  return tallyParts(netlist, model).cost;
}
