// DTL NAND, high fan-out, with speed-up capacitor and Schottky clamp: the nand-hifan cell (src/cells/nand-hifan) with a speed-up capacitor and a Schottky anti-saturation clamp.
//   C_SU (input node to base, across the follower and the level-shift diode): see src/cells/fast-kit for the model
//   D_SC: Schottky, anode at the base, cathode at the collector (the Baker clamp idea, common practice)
// The DC equations are the base cell's; what the additions change is in src/cells/fast-kit and the
// switching model in src/electrical/timing.ts.
import { nandHifanCell } from "../nand-hifan/index.js";
import { deriveFastCell } from "../fast-kit/index.js";
import type { CellDefinition } from "../types.js";

export const nandHifanFastCell: CellDefinition = deriveFastCell(nandHifanCell, {
  id: "nand-hifan-fast",
  variant: "high-fanout-fast",
  title: "DTL NAND, high fan-out, with speed-up capacitor and Schottky clamp",
  keyPrefix: "gw_nandhf",
  capacitor: true,
  clamp: true,
});
