// Reading thresholds of any net of a sized design: the testbench's own rule (src/emit/spice.ts,
// netLevels: the worst-case input thresholds of the cells the net drives; a net that drives
// nothing is read with the strictest thresholds in the design), plus whether the net's high
// level is clamped by diode-OR inputs, and the same thresholds tightened by measured curves.
import { cellById } from "../cells/registry.js";
import type { SizedDesign } from "../electrical/types.js";
import { netLevels, OR_READ_BAND_VOLTS } from "../emit/spice.js";

export interface NetThresholds {
  vilVolts: number;
  vihVolts: number;
  /** The net drives diode-OR inputs: when high, their input diodes clamp it at their input
   *  level, so its high level is set by the loads (and its high-state margin is a current
   *  margin in the sizing, not a voltage one). */
  highClamped: boolean;
}

export function netThresholds(design: SizedDesign, net: number): NetThresholds {
  const n = design.netlist.nets[net]!;
  const lv = netLevels(design, net);
  const isOr = (cell: number) => cellById(design.cellTypes[design.instances[cell]!.cellType]!.cellId)?.inputKind === "or";
  return { vilVolts: lv.vilVolts, vihVolts: lv.vihVolts, highClamped: n.loads.some((l) => isOr(l.cell)) };
}

/** Unity-gain input thresholds of a cell type measured on its transfer curve at one condition. */
export interface MeasuredThresholds {
  vIlVolts: number;
  vIhVolts: number;
}

/**
 * The thresholds a net is read with at one condition: the testbench's rule (see netLevels)
 * applied to the input thresholds of the driven cells as measured on their transfer curves at
 * that condition (unity-gain points, common practice), and to the sizing's worst-case figures
 * for any cell type without a measured curve. The measured figures are the circuit's own at the
 * condition; the sizing's hold for every corner at once, with piecewise-linear junction drops.
 */
export function netThresholdsAt(design: SizedDesign, net: number, measured: ReadonlyMap<string, MeasuredThresholds> | undefined): NetThresholds & { fromCurves: boolean } {
  const base = netThresholds(design, net);
  if (!measured || measured.size === 0) return { ...base, fromCurves: false };
  const n = design.netlist.nets[net]!;
  const types = n.loads.length ? n.loads.map((l) => design.cellTypes[design.instances[l.cell]!.cellType]!) : design.cellTypes;
  const isOr = (t: (typeof types)[number]) => cellById(t.cellId)?.inputKind === "or";
  let used = false;
  const th = types.map((t) => {
    const m = measured.get(t.key);
    if (m) used = true;
    return { or: isOr(t), vil: m ? m.vIlVolts : t.analysis.vILVolts, vih: m ? m.vIhVolts : t.analysis.vIHVolts };
  });
  if (!used) return { ...base, fromCurves: false };
  const vil = Math.min(...th.map((x) => x.vil));
  // A diode-AND input reads high above its V_IH; a diode-OR input once it conducts: above its
  // V_IL, by the testbench's small band.
  const vihAnd = Math.max(...th.filter((x) => !x.or).map((x) => x.vih));
  const vihOr = Math.max(...th.filter((x) => x.or).map((x) => x.vil)) + OR_READ_BAND_VOLTS;
  const hasAnd = th.some((x) => !x.or);
  const hasOr = th.some((x) => x.or);
  const vih = hasAnd ? (hasOr ? Math.max(vihAnd, vihOr) : vihAnd) : vihOr;
  return { vilVolts: vil, vihVolts: vih, highClamped: base.highClamped, fromCurves: true };
}
