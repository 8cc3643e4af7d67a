export * from "./types.js";
export { mapToCells, partCost, type MapOptions, type CellChoice } from "./map.js";
export { cellsToLogic } from "./to-logic.js";
export { limitFanin } from "./fanin.js";
