export * from "./types.js";
export { mapToCells, partCost, DEFAULT_MAX_FANOUT, type MapOptions, type CellChoice } from "./map.js";
export { cellsToLogic } from "./to-logic.js";
export { limitFanin } from "./fanin.js";
export { tallyMapping } from "./tally.js";
export * from "./cost.js";
export { legalizeFanout, type FanoutResult } from "./fanout.js";
export { applyWiredAnd, type WiredResult } from "./wired.js";
