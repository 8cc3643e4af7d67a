// DTL NOR with speed-up capacitors and Schottky clamp: the nor cell (src/cells/nor) with a speed-up capacitor on each input and a Schottky anti-saturation clamp.
//   C_SU (each input to the base): see src/cells/fast-kit for the model
//   D_SC: Schottky, anode at the base, cathode at the collector (the Baker clamp idea, common practice)
// The DC equations are the base cell's; what the additions change is in src/cells/fast-kit and the
// switching model in src/electrical/timing.ts.
import { norCell } from "../nor/index.js";
import { deriveFastCell } from "../fast-kit/index.js";
import type { CellDefinition } from "../types.js";

export const norFastCell: CellDefinition = deriveFastCell(norCell, {
  id: "nor-fast",
  variant: "fast",
  title: "DTL NOR with speed-up capacitors and Schottky clamp",
  keyPrefix: "gw_norf",
  capacitor: true,
  clamp: true,
});
