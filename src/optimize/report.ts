// What the optimizer did, as data for the report: parts before (the logic as written, mapped
// directly) and after, each pass with its cost, and notes where a heuristic was used or a limit
// reached.
import type { CostModelName, PartTally, PartWeights } from "../map/cost.js";

export type OptLevel = 0 | 1 | 2;

export interface PassRecord {
  /** Pass name (the file under src/optimize/ that did it). */
  pass: string;
  /** Cost in the chosen model before and after the pass. */
  costBefore: number;
  costAfter: number;
  /** False when the result was no cheaper and the pass's work was dropped. */
  accepted: boolean;
}

export type NoteKind = "heuristic" | "limit" | "dont-cares" | "hazard";

export interface OptimizationNote {
  kind: NoteKind;
  pass: string;
  message: string;
  /** The output or state signal the note is about, if one. */
  signal?: string;
}

export interface OptimizationReport {
  level: OptLevel;
  costModel: { name: CostModelName; description: string; weights?: PartWeights };
  /** Mapping options the costs were taken with. */
  mapping: { cells: "mixed" | "nand" | "nor"; maxFanin: number; maxFanout: number; wiredAnd: boolean };
  /** The logic as written, mapped directly (what --opt 0 builds). */
  before: PartTally;
  /** The logic the optimizer hands on, mapped with the same options. */
  after: PartTally;
  /** With wired-AND outputs: the same logic mapped without them (the saving is the difference). */
  afterWithoutWiredAnd?: PartTally;
  passes: PassRecord[];
  notes: OptimizationNote[];
  /** Two-level minimization: how many cones each way. */
  twoLevel: { exact: number; exactBounded: number; heuristic: number; hazardFree: number; keptAsWritten: number };
}

export function emptyTwoLevelCounts(): OptimizationReport["twoLevel"] {
  return { exact: 0, exactBounded: 0, heuristic: 0, hazardFree: 0, keptAsWritten: 0 };
}
