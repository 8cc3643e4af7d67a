// DTL NOR with speed-up capacitors: the nor cell (src/cells/nor) with a speed-up capacitor on each input.
//   C_SU (each input to the base): see src/cells/fast-kit for the model
// The DC equations are the base cell's; what the additions change is in src/cells/fast-kit and the
// switching model in src/electrical/timing.ts.
import { norCell } from "../nor/index.js";
import { deriveFastCell } from "../fast-kit/index.js";
import type { CellDefinition } from "../types.js";

export const norCapCell: CellDefinition = deriveFastCell(norCell, {
  id: "nor-cap",
  variant: "speed-up",
  title: "DTL NOR with speed-up capacitors",
  keyPrefix: "gw_norc",
  capacitor: true,
  clamp: false,
});
