// DTL NAND with speed-up capacitor and Schottky clamp: the nand cell (src/cells/nand) with a speed-up capacitor and a Schottky anti-saturation clamp.
//   C_SU (input node to base): see src/cells/fast-kit for the model
//   D_SC: Schottky, anode at the base, cathode at the collector (the Baker clamp idea, common practice)
// The DC equations are the base cell's; what the additions change is in src/cells/fast-kit and the
// switching model in src/electrical/timing.ts.
import { nandCell } from "../nand/index.js";
import { deriveFastCell } from "../fast-kit/index.js";
import type { CellDefinition } from "../types.js";

export const nandFastCell: CellDefinition = deriveFastCell(nandCell, {
  id: "nand-fast",
  variant: "fast",
  title: "DTL NAND with speed-up capacitor and Schottky clamp",
  keyPrefix: "gw_nandf",
  capacitor: true,
  clamp: true,
});
