// DTL NAND with Schottky clamp: the nand cell (src/cells/nand) with a Schottky anti-saturation clamp.
//   D_SC: Schottky, anode at the base, cathode at the collector (the Baker clamp idea, common practice)
// The DC equations are the base cell's; what the additions change is in src/cells/fast-kit and the
// switching model in src/electrical/timing.ts.
import { nandCell } from "../nand/index.js";
import { deriveFastCell } from "../fast-kit/index.js";
import type { CellDefinition } from "../types.js";

export const nandClampCell: CellDefinition = deriveFastCell(nandCell, {
  id: "nand-clamp",
  variant: "clamped",
  title: "DTL NAND with Schottky clamp",
  keyPrefix: "gw_nands",
  capacitor: false,
  clamp: true,
});
