// DTL NOR with Schottky clamp: the nor cell (src/cells/nor) with a Schottky anti-saturation clamp.
//   D_SC: Schottky, anode at the base, cathode at the collector (the Baker clamp idea, common practice)
// The DC equations are the base cell's; what the additions change is in src/cells/fast-kit and the
// switching model in src/electrical/timing.ts.
import { norCell } from "../nor/index.js";
import { deriveFastCell } from "../fast-kit/index.js";
import type { CellDefinition } from "../types.js";

export const norClampCell: CellDefinition = deriveFastCell(norCell, {
  id: "nor-clamp",
  variant: "clamped",
  title: "DTL NOR with Schottky clamp",
  keyPrefix: "gw_nors",
  capacitor: false,
  clamp: true,
});
