// DTL NAND with speed-up capacitor: the nand cell (src/cells/nand) with a speed-up capacitor.
//   C_SU (input node to base): see src/cells/fast-kit for the model
// The DC equations are the base cell's; what the additions change is in src/cells/fast-kit and the
// switching model in src/electrical/timing.ts.
import { nandCell } from "../nand/index.js";
import { deriveFastCell } from "../fast-kit/index.js";
import type { CellDefinition } from "../types.js";

export const nandCapCell: CellDefinition = deriveFastCell(nandCell, {
  id: "nand-cap",
  variant: "speed-up",
  title: "DTL NAND with speed-up capacitor",
  keyPrefix: "gw_nandc",
  capacitor: true,
  clamp: false,
});
