// The price the optimizer works to: a graph costs what the cells it maps onto cost, mapped with
// the same options the pipeline will use (families, fan-in and fan-out limits, wired-AND).
import type { LogicGraph } from "../logic/graph.js";
import { mapToCells, type CellChoice } from "../map/map.js";
import { tallyParts, type CostModel, type PartTally } from "../map/cost.js";
import type { CellNetlist } from "../map/types.js";
import { tallyMapping } from "../map/tally.js";

export interface MappingTarget {
  stateNames: readonly string[];
  maxFanin: number;
  cells: CellChoice;
  model: CostModel;
  /** 0: no limit. */
  maxFanout: number;
  wiredAnd: boolean;
}

export function mapForCost(g: LogicGraph, t: MappingTarget): CellNetlist {
  const m = mapToCells(g, { stateNames: t.stateNames, maxFanin: t.maxFanin, cells: t.cells, costModel: t.model, maxFanout: t.maxFanout, wiredAnd: t.wiredAnd });
  if (!m.value) throw new Error(`mapping for the cost failed: ${m.diagnostics.map((d) => d.message).join("; ")}`);
  return m.value;
}

/** What the mapping costs: counted without building the netlist where the count is exact
 *  (src/map/tally.ts), else from the netlist. */
export function mappedTally(g: LogicGraph, t: MappingTarget): PartTally {
  const counted = tallyMapping(g, { stateNames: t.stateNames, maxFanin: t.maxFanin, cells: t.cells, costModel: t.model, maxFanout: t.maxFanout, wiredAnd: t.wiredAnd });
  if (counted) return counted;
  return tallyParts(mapForCost(g, t), t.model);
}

export function mappedCost(g: LogicGraph, t: MappingTarget): number {
  return mappedTally(g, t).cost;
}
