// Characterization of sized cells in a real simulator: each cell type with its worst-case load
// at the sizing's corners, measured figures beside the analytic ones, and checks that fail the
// run when the simulation contradicts the sizing.
export type { CellCharacterization, CellFigures, CharacterizationCheck, CheckId, Characterization, CornerCharacterization } from "./types.js";
export { worstDrives, worstLoads, type CellDrive, type CellLoad, type LoadGroup } from "./loads.js";
export { dcNetlist, gainAtCurrent, halfPeriodSeconds, outputCollectorAmps, sweepStepVolts, tranNetlist, type CopySetup, type NetlistOptions, type RunSetup } from "./netlist.js";
export { characterizationView } from "./view.js";
export { criteria, readCharacterization, DELAY_ACCURACY } from "./measure.js";
export { characterizationCorners, characterizationFromRuns, characterizationPlan, characterizeDesign, type CharacterizeOptions } from "./run.js";
