// Every cell gatewright can build. Adding a variant = adding a folder under src/cells/ that
// exports a CellDefinition, and one line here.
import type { CellFunction } from "../map/types.js";
import type { CellDefinition } from "./types.js";
import { nandCell } from "./nand/index.js";
import { norCell } from "./nor/index.js";
import { nandHifanCell } from "./nand-hifan/index.js";
import { nandCapCell } from "./nand-cap/index.js";
import { nandClampCell } from "./nand-clamp/index.js";
import { nandFastCell } from "./nand-fast/index.js";
import { norCapCell } from "./nor-cap/index.js";
import { norClampCell } from "./nor-clamp/index.js";
import { norFastCell } from "./nor-fast/index.js";
import { nandHifanClampCell } from "./nand-hifan-clamp/index.js";
import { nandHifanFastCell } from "./nand-hifan-fast/index.js";

export const CELLS: readonly CellDefinition[] = [
  nandCell,
  norCell,
  nandHifanCell,
  // Fast variants (speed-up capacitor, Schottky clamp, both): src/cells/fast-kit.
  nandCapCell,
  nandClampCell,
  nandFastCell,
  norCapCell,
  norClampCell,
  norFastCell,
  nandHifanClampCell,
  nandHifanFastCell,
];

export function cellById(id: string): CellDefinition | undefined {
  return CELLS.find((c) => c.id === id);
}

/** The basic cell of a logic function. */
export function basicCellFor(fn: CellFunction): CellDefinition {
  const c = CELLS.find((x) => x.fn === fn && x.variant === "basic");
  if (!c) throw new Error(`no basic cell for ${fn}`);
  return c;
}

/** Variants of a function other than the basic one, in registry order. */
export function variantsFor(fn: CellFunction): CellDefinition[] {
  return CELLS.filter((x) => x.fn === fn && x.variant !== "basic");
}

/** The fast variants built on cell `baseId` (speed-up capacitor, Schottky clamp or both), in
 *  registry order. */
export function fastVariantsOf(baseId: string): CellDefinition[] {
  return CELLS.filter((x) => x.speedUp?.baseId === baseId);
}
