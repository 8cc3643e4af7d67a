// The SVG plots of a verification: transient waveforms of the inputs and outputs with their
// reading thresholds, the transfer curve of each cell type at the corners, and the circuit's
// supply current. Pure: measured series in, SVG text out (rendered by src/plot).
import { renderSvgPlot, type PlotPanel, type PlotSeries } from "../plot/svg.js";
import { eng } from "../emit/format.js";

export interface Series {
  x: Float64Array;
  y: Float64Array;
}

/**
 * Keeps the first, lowest, highest and last sample of each of `buckets` equal spans of the
 * horizontal axis, so a long waveform keeps its spikes at a fraction of its size.
 */
export function decimate(x: ArrayLike<number>, y: ArrayLike<number>, buckets = 2000): Series {
  const n = Math.min(x.length, y.length);
  if (n <= 4 * buckets) return { x: Float64Array.from({ length: n }, (_, i) => x[i]!), y: Float64Array.from({ length: n }, (_, i) => y[i]!) };
  const x0 = x[0]!;
  const span = x[n - 1]! - x0 || 1;
  const keepX: number[] = [];
  const keepY: number[] = [];
  let i = 0;
  while (i < n) {
    const b = Math.min(buckets - 1, Math.floor(((x[i]! - x0) / span) * buckets));
    let j = i;
    let lo = i;
    let hi = i;
    while (j + 1 < n && Math.min(buckets - 1, Math.floor(((x[j + 1]! - x0) / span) * buckets)) === b) {
      j++;
      if (y[j]! < y[lo]!) lo = j;
      if (y[j]! > y[hi]!) hi = j;
    }
    for (const k of [...new Set([i, lo, hi, j])].sort((a, c) => a - c)) {
      keepX.push(x[k]!);
      keepY.push(y[k]!);
    }
    i = j + 1;
  }
  return { x: Float64Array.from(keepX), y: Float64Array.from(keepY) };
}

export interface WaveSignal {
  name: string;
  series: Series;
  vilVolts?: number;
  vihVolts?: number;
}

/** Most signals drawn in one waveform plot (the rest are named in its title). */
export const PLOT_INPUTS_MAX = 8;
export const PLOT_OUTPUTS_MAX = 12;

export function waveformPlot(design: string, cornerLabel: string, inputs: readonly WaveSignal[], outputs: readonly WaveSignal[], idPrefix: string): string {
  const shownIn = inputs.slice(0, PLOT_INPUTS_MAX);
  const shownOut = outputs.slice(0, PLOT_OUTPUTS_MAX);
  const left = inputs.length - shownIn.length + (outputs.length - shownOut.length);
  const panels: PlotPanel[] = [];
  for (const s of shownIn) panels.push({ series: [{ name: s.name, x: s.series.x, y: s.series.y, color: "#555555" }], yLabel: "Input", yUnit: "V", digital: true, title: `input ${s.name}` });
  for (const s of shownOut) {
    const thresholds = [];
    if (s.vihVolts !== undefined && s.vilVolts !== undefined && Math.abs(s.vihVolts - s.vilVolts) < 1e-6) {
      thresholds.push({ value: s.vihVolts, label: `reads 0 below, 1 above ${eng(s.vihVolts, "V")}`, color: "#555555" });
    } else {
      if (s.vihVolts !== undefined) thresholds.push({ value: s.vihVolts, label: `reads 1 above ${eng(s.vihVolts, "V")}`, color: "#009E73" });
      if (s.vilVolts !== undefined) thresholds.push({ value: s.vilVolts, label: `reads 0 below ${eng(s.vilVolts, "V")}`, color: "#D55E00" });
    }
    panels.push({ series: [{ name: s.name, x: s.series.x, y: s.series.y }], yLabel: "Voltage", yUnit: "V", thresholds, heightPx: 130, title: s.name });
  }
  return renderSvgPlot({
    title: `${design}: inputs and outputs at ${cornerLabel}${left > 0 ? ` (${left} more signals not drawn)` : ""}`,
    xLabel: "Time",
    xUnit: "s",
    panels,
    idPrefix,
  });
}

export interface TransferSeries {
  corner: string;
  vin: Float64Array;
  vout: Float64Array;
}

export function transferPlot(
  cellKey: string,
  loadText: string,
  curves: readonly TransferSeries[],
  engine: { vILVolts: number; vIHVolts: number; vOLVolts: number; vOHVolts: number },
  idPrefix: string,
): string {
  const series: PlotSeries[] = curves.map((c, i) => ({ name: c.corner, x: c.vin, y: c.vout, dashed: i > 0 && i % 2 === 0 }));
  // The axis spans the swept inputs and the thresholds, so both markers show.
  let xMax = Math.max(engine.vILVolts, engine.vIHVolts) * 1.05;
  for (const c of curves) for (const v of c.vin) if (v > xMax) xMax = v;
  return renderSvgPlot({
    xRange: [0, xMax],
    title: `${cellKey}: transfer curve with ${loadText}`,
    xLabel: "Input voltage",
    xUnit: "V",
    panels: [
      {
        series,
        yLabel: "Output voltage",
        yUnit: "V",
        heightPx: 320,
        thresholds: [
          { value: engine.vOHVolts, label: `V_OH worst (engine) ${eng(engine.vOHVolts, "V")}`, color: "#009E73" },
          { value: engine.vOLVolts, label: `V_OL worst (engine) ${eng(engine.vOLVolts, "V")}`, color: "#D55E00" },
        ],
        markers: [
          { x: engine.vILVolts, label: `V_IL worst ${eng(engine.vILVolts, "V")}`, color: "#D55E00" },
          { x: engine.vIHVolts, label: `V_IH worst ${eng(engine.vIHVolts, "V")}`, color: "#009E73" },
        ],
      },
    ],
    idPrefix,
  });
}

export interface SupplySeries {
  corner: string;
  /** Current the supply delivers to the circuit (positive). */
  series: Series;
  averageAmps: number;
}

export function supplyPlot(design: string, runs: readonly SupplySeries[], idPrefix: string): string {
  const nominal = runs[0];
  return renderSvgPlot({
    title: `${design}: supply current of the circuit (input drivers excluded)`,
    xLabel: "Time",
    xUnit: "s",
    panels: [
      {
        series: runs.map((r) => ({ name: r.corner, x: r.series.x, y: r.series.y })),
        yLabel: "Supply current",
        yUnit: "A",
        heightPx: 300,
        thresholds: nominal ? [{ value: nominal.averageAmps, label: `average ${eng(nominal.averageAmps, "A")} (${nominal.corner})` }] : [],
      },
    ],
    idPrefix,
  });
}
