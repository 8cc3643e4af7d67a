// DTL NAND, high fan-out, with Schottky clamp: the nand-hifan cell (src/cells/nand-hifan) with a Schottky anti-saturation clamp.
//   D_SC: Schottky, anode at the base, cathode at the collector (the Baker clamp idea, common practice)
// The DC equations are the base cell's; what the additions change is in src/cells/fast-kit and the
// switching model in src/electrical/timing.ts.
import { nandHifanCell } from "../nand-hifan/index.js";
import { deriveFastCell } from "../fast-kit/index.js";
import type { CellDefinition } from "../types.js";

export const nandHifanClampCell: CellDefinition = deriveFastCell(nandHifanCell, {
  id: "nand-hifan-clamp",
  variant: "high-fanout-clamped",
  title: "DTL NAND, high fan-out, with Schottky clamp",
  keyPrefix: "gw_nandhs",
  capacitor: false,
  clamp: true,
});
