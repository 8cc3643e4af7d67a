// Transfer curves: a DC sweep of one cell of each type with its worst-case load, at a corner.
// One input is swept while the others sit at their non-controlling level (high for diode-AND
// inputs, low for diode-OR inputs); the output carries the loads of the most heavily loaded
// instance of that type in the design, each load cell with its other inputs at their
// non-controlling level, so every load draws its full current. A diode-AND input is driven
// stiffly (a DTL low is a saturated transistor); a diode-OR input through the design's input
// pull-up resistance (a DTL high is a collector resistor), and the curve is plotted against the
// input pin's own voltage. Pure: netlist text out, curves in.
import { cellById } from "../cells/registry.js";
import type { SizedDesign } from "../electrical/types.js";
import { spiceNumber } from "../emit/format.js";
import type { SimulationRun } from "../simulate/run.js";
import { unityGainPoints, type TransferPoints } from "../simulate/waveform.js";
import type { VerifyCorner } from "./corners.js";

export interface TransferSetup {
  cellType: number;
  key: string;
  /** Instance whose load is reproduced, and what that load is. */
  instance: number;
  loadText: string;
  inputKind: "and" | "or";
  inNode: string;
  outNode: string;
}

export interface TransferCurve {
  cellType: string;
  corner: string;
  vinVolts: Float64Array;
  voutVolts: Float64Array;
  /** Unity-gain points and the noise margins they give (undefined when the slope never
   *  reaches −1, or the run failed). */
  points?: TransferPoints;
  loadText: string;
}

/** Sweep points per volt of supply. */
const POINTS_PER_VOLT = 100;

export function transferSetups(design: SizedDesign): TransferSetup[] {
  const out: TransferSetup[] = [];
  design.cellTypes.forEach((t, j) => {
    // The heaviest load: most diode-AND current sunk, then most diode-OR loads.
    let best = -1;
    for (const c of t.cells) {
      const a = design.instances[c]!.analysis;
      const b = best < 0 ? undefined : design.instances[best]!.analysis;
      if (!b || a.iLoadAmps > b.iLoadAmps || (a.iLoadAmps === b.iLoadAmps && a.orLoads > b.orLoads)) best = c;
    }
    if (best < 0) return;
    const net = design.netlist.nets[design.netlist.cells[best]!.output]!;
    const kinds = new Map<string, number>();
    for (const l of net.loads) {
      const k = design.cellTypes[design.instances[l.cell]!.cellType]!.key;
      kinds.set(k, (kinds.get(k) ?? 0) + 1);
    }
    const loadText = net.loads.length ? [...kinds].map(([k, n]) => `${n} × ${k}`).join(" + ") + ` (the load of U${best + 1})` : "no load";
    out.push({
      cellType: j,
      key: t.key,
      instance: best,
      loadText,
      inputKind: cellById(t.cellId)?.inputKind === "or" ? "or" : "and",
      inNode: `t${j}_in`,
      outNode: `t${j}_out`,
    });
  });
  return out;
}

/** The DC sweep netlist of every cell type at one corner (the design netlist is included). */
export function transferNetlist(design: SizedDesign, corner: VerifyCorner, netlistFile: string): { text: string; setups: TransferSetup[] } {
  const setups = transferSetups(design);
  const v = corner.supplyVolts;
  const lines: string[] = [
    `* ${design.netlist.name}: transfer curves of each cell type with its worst-case load, at ${corner.label}`,
    `.include "${netlistFile}"`,
    ".options reltol=1e-4 abstol=1e-12 vntol=1e-6",
    `VCC vcc 0 DC ${spiceNumber(v, 8)}`,
    "VSW sw 0 DC 0",
  ];
  for (const s of setups) {
    const t = design.cellTypes[s.cellType]!;
    const inactive = s.inputKind === "or" ? "0" : "vcc";
    lines.push(`* ${t.key}: input 1 swept, ${s.loadText}`);
    if (s.inputKind === "or") lines.push(`RT${s.cellType} sw ${s.inNode} ${spiceNumber(design.inputDriver.pullUpOhms)}`);
    else lines.push(`VT${s.cellType} sw ${s.inNode} DC 0`);
    const ins = Array.from({ length: t.fanin }, (_, k) => (k === 0 ? s.inNode : inactive));
    lines.push(`XT${s.cellType} ${ins.join(" ")} ${s.outNode} vcc ${t.key}`);
    // An open-collector type (wired-AND) is pulled up by its net's collector resistor.
    if (t.openCollector && t.values.rcOhms !== undefined) lines.push(`RPU${s.cellType} vcc ${s.outNode} ${spiceNumber(t.values.rcOhms)}`);
    const net = design.netlist.nets[design.netlist.cells[s.instance]!.output]!;
    net.loads.forEach((l, m) => {
      const lt = design.cellTypes[design.instances[l.cell]!.cellType]!;
      const lInactive = cellById(lt.cellId)?.inputKind === "or" ? "0" : "vcc";
      const pins = Array.from({ length: lt.fanin }, (_, k) => (k === l.pin ? s.outNode : lInactive));
      lines.push(`XL${s.cellType}_${m} ${pins.join(" ")} t${s.cellType}_l${m} vcc ${lt.key}`);
    });
  }
  lines.push(`.dc VSW 0 ${spiceNumber(v, 8)} ${spiceNumber(1 / POINTS_PER_VOLT)}`);
  lines.push(`.temp ${corner.tempC}`);
  lines.push(`.save v(sw) ${setups.flatMap((s) => [`v(${s.inNode})`, `v(${s.outNode})`]).join(" ")}`);
  lines.push(".end", "");
  return { text: lines.join("\n"), setups };
}

/** The curves of one sweep run. */
export function transferCurves(run: SimulationRun, setups: readonly TransferSetup[], corner: VerifyCorner): TransferCurve[] {
  return setups.map((s) => {
    const vin = run.vectors.get(`v(${s.inNode})`) ?? new Float64Array();
    const vout = run.vectors.get(`v(${s.outNode})`) ?? new Float64Array();
    const c: TransferCurve = { cellType: s.key, corner: corner.id, vinVolts: vin, voutVolts: vout, loadText: s.loadText };
    const p = run.errors.length ? undefined : unityGainPoints(vin, vout);
    if (p) c.points = p;
    return c;
  });
}
