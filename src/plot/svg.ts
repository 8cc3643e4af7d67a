// A small SVG line-plot renderer: stacked panels sharing one horizontal axis, several series per
// panel with a legend, ticks and unit-labelled axis titles in engineering notation, dashed and
// labelled threshold lines. Pure: a plot description in, SVG text out.
import { decimalsFor, niceStep, niceTicks, prefixFor } from "./scale.js";

export interface PlotSeries {
  name: string;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** CSS colour; default from a colour-blind-safe palette (Okabe & Ito). */
  color?: string;
  dashed?: boolean;
}

export interface PlotThreshold {
  value: number;
  label: string;
  color?: string;
}

export interface PlotMarker {
  x: number;
  label: string;
  color?: string;
}

export interface PlotPanel {
  series: PlotSeries[];
  /** Quantity name for the vertical axis title, e.g. "Voltage". */
  yLabel: string;
  /** Base unit, e.g. "V", "A", "W"; the prefix is chosen from the data. */
  yUnit: string;
  thresholds?: PlotThreshold[];
  /** Vertical dashed lines at values of the horizontal axis (e.g. input thresholds on a
   *  transfer curve), labelled at their top. */
  markers?: PlotMarker[];
  /** Fixed vertical range; default the data's range with a margin. */
  yRange?: readonly [number, number];
  /** A compact panel for logic-level signals (inputs): lower, with few ticks. */
  digital?: boolean;
  heightPx?: number;
  /** Small caption at the panel's top left. */
  title?: string;
}

export interface Plot {
  title: string;
  /** Quantity name for the shared horizontal axis, e.g. "Time". */
  xLabel: string;
  xUnit: string;
  /** Top to bottom; all share the horizontal axis. */
  panels: PlotPanel[];
  widthPx?: number;
  xRange?: readonly [number, number];
  /** Prefix for element ids, so several plots can share one page. */
  idPrefix?: string;
}

const PALETTE = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000", "#F0E442"];

const MARGIN_LEFT = 78;
const MARGIN_RIGHT = 170;
const MARGIN_TOP = 44;
const MARGIN_BOTTOM = 52;
const PANEL_GAP = 16;
const ANALOG_HEIGHT = 200;
const DIGITAL_HEIGHT = 64;
const FONT = "font-family=\"sans-serif\"";

/** Escapes text for XML content and attribute values. */
export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&apos;" })[c]!);
}

function num(v: number): string {
  return Number.isFinite(v) ? (Math.round(v * 100) / 100).toString() : "0";
}

interface Range {
  min: number;
  max: number;
}

function dataRange(arrays: ArrayLike<number>[], extra: number[] = []): Range {
  let min = Infinity;
  let max = -Infinity;
  for (const a of arrays) {
    for (let i = 0; i < a.length; i++) {
      const v = a[i]!;
      if (!Number.isFinite(v)) continue;
      if (v < min) min = v;
      if (v > max) max = v;
    }
  }
  for (const v of extra) {
    if (!Number.isFinite(v)) continue;
    min = Math.min(min, v);
    max = Math.max(max, v);
  }
  if (min === Infinity) return { min: 0, max: 1 };
  if (min === max) {
    const pad = min === 0 ? 1 : Math.abs(min) * 0.1;
    return { min: min - pad, max: max + pad };
  }
  return { min, max };
}

function padded(r: Range, fraction: number): Range {
  const pad = (r.max - r.min) * fraction;
  return { min: r.min - pad, max: r.max + pad };
}

/**
 * Pixel points of a series, broken where values are not finite. Long series are thinned to the
 * first, lowest, highest and last sample of each pixel column, which keeps spikes visible.
 */
function seriesPath(s: PlotSeries, xr: Range, yr: Range, left: number, top: number, w: number, h: number): string {
  const n = Math.min(s.x.length, s.y.length);
  const px = (x: number) => left + ((x - xr.min) / (xr.max - xr.min)) * w;
  const py = (y: number) => top + h - ((y - yr.min) / (yr.max - yr.min)) * h;
  const parts: string[] = [];
  let pen = false;
  const emit = (x: number, y: number) => {
    parts.push(`${pen ? "L" : "M"}${num(px(x))} ${num(py(y))}`);
    pen = true;
  };
  const thin = n > 4 * w;
  let bucket = Number.NaN;
  let group: number[] = [];
  const flush = () => {
    if (group.length === 0) return;
    let lo = group[0]!;
    let hi = group[0]!;
    for (const i of group) {
      if (s.y[i]! < s.y[lo]!) lo = i;
      if (s.y[i]! > s.y[hi]!) hi = i;
    }
    const keep = [...new Set([group[0]!, lo, hi, group[group.length - 1]!])].sort((a, b) => a - b);
    for (const i of keep) emit(s.x[i]!, s.y[i]!);
    group = [];
  };
  for (let i = 0; i < n; i++) {
    const x = s.x[i]!;
    const y = s.y[i]!;
    if (!Number.isFinite(x) || !Number.isFinite(y)) {
      flush();
      pen = false;
      continue;
    }
    if (!thin) {
      emit(x, y);
      continue;
    }
    const b = Math.floor(px(x));
    if (b !== bucket) {
      flush();
      bucket = b;
    }
    group.push(i);
  }
  flush();
  return parts.join("");
}

function axisTitle(label: string, unitPrefix: string, unit: string): string {
  const u = `${unitPrefix}${unit}`;
  return u === "" ? label : `${label} (${u})`;
}

/** Renders a plot as a standalone SVG document. */
export function renderSvgPlot(plot: Plot): string {
  const id = (plot.idPrefix ?? "gw").replace(/[^A-Za-z0-9_-]/g, "_");
  const width = plot.widthPx ?? 880;
  const plotW = width - MARGIN_LEFT - MARGIN_RIGHT;
  const heights = plot.panels.map((p) => p.heightPx ?? (p.digital ? DIGITAL_HEIGHT : ANALOG_HEIGHT));
  const totalH = MARGIN_TOP + heights.reduce((a, b) => a + b, 0) + PANEL_GAP * Math.max(0, plot.panels.length - 1) + MARGIN_BOTTOM;

  const allX = plot.panels.flatMap((p) => p.series.map((s) => s.x));
  const xr: Range = plot.xRange ? { min: plot.xRange[0], max: plot.xRange[1] } : dataRange(allX);
  if (!(xr.max > xr.min)) xr.max = xr.min + 1;
  const xTicks = niceTicks(xr.min, xr.max, Math.max(3, Math.round(plotW / 90)));
  const xPrefix = prefixFor(Math.max(Math.abs(xr.min), Math.abs(xr.max)));
  const xDecimals = decimalsFor(niceStep(xr.max - xr.min, Math.max(3, Math.round(plotW / 90))), xPrefix.factor);
  const xPx = (x: number) => MARGIN_LEFT + ((x - xr.min) / (xr.max - xr.min)) * plotW;

  const out: string[] = [];
  out.push(`<?xml version="1.0" encoding="UTF-8"?>`);
  out.push(
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${num(totalH)}" viewBox="0 0 ${width} ${num(totalH)}" ${FONT} font-size="12">`,
  );
  out.push(`<title>${escapeXml(plot.title)}</title>`);
  out.push(`<rect x="0" y="0" width="${width}" height="${num(totalH)}" fill="#ffffff"/>`);
  out.push(`<text x="${num(width / 2)}" y="24" text-anchor="middle" font-size="15" font-weight="bold" class="plot-title">${escapeXml(plot.title)}</text>`);

  let top = MARGIN_TOP;
  let colorIndex = 0;
  plot.panels.forEach((panel, pi) => {
    const h = heights[pi]!;
    const thresholds = panel.thresholds ?? [];
    const yr0: Range = panel.yRange
      ? { min: panel.yRange[0], max: panel.yRange[1] }
      : padded(dataRange(panel.series.map((s) => s.y), thresholds.map((t) => t.value)), 0.06);
    const yr = yr0.max > yr0.min ? yr0 : { min: yr0.min, max: yr0.min + 1 };
    const yTarget = panel.digital ? 2 : Math.max(3, Math.round(h / 40));
    const yTicks = niceTicks(yr.min, yr.max, yTarget);
    const yPrefix = prefixFor(Math.max(Math.abs(yr.min), Math.abs(yr.max)));
    const yDecimals = decimalsFor(niceStep(yr.max - yr.min, yTarget), yPrefix.factor);
    const yPx = (y: number) => top + h - ((y - yr.min) / (yr.max - yr.min)) * h;
    const clipId = `${id}-clip-${pi}`;

    out.push(`<g class="panel" data-panel="${pi}">`);
    out.push(`<clipPath id="${clipId}"><rect x="${MARGIN_LEFT}" y="${num(top)}" width="${num(plotW)}" height="${num(h)}"/></clipPath>`);
    out.push(`<rect x="${MARGIN_LEFT}" y="${num(top)}" width="${num(plotW)}" height="${num(h)}" fill="none" stroke="#333333" stroke-width="1"/>`);
    if (panel.title) {
      out.push(`<text x="${MARGIN_LEFT + 4}" y="${num(top + 13)}" font-size="11" fill="#333333" class="panel-title">${escapeXml(panel.title)}</text>`);
    }

    // Grid and ticks.
    for (const t of xTicks) {
      const x = xPx(t);
      out.push(`<line x1="${num(x)}" y1="${num(top)}" x2="${num(x)}" y2="${num(top + h)}" stroke="#e3e3e3" stroke-width="1"/>`);
      out.push(`<line x1="${num(x)}" y1="${num(top + h)}" x2="${num(x)}" y2="${num(top + h + 4)}" stroke="#333333" stroke-width="1"/>`);
    }
    for (const t of yTicks) {
      const y = yPx(t);
      out.push(`<line x1="${MARGIN_LEFT}" y1="${num(y)}" x2="${num(MARGIN_LEFT + plotW)}" y2="${num(y)}" stroke="#e3e3e3" stroke-width="1"/>`);
      out.push(`<line x1="${MARGIN_LEFT - 4}" y1="${num(y)}" x2="${MARGIN_LEFT}" y2="${num(y)}" stroke="#333333" stroke-width="1"/>`);
      out.push(
        `<text x="${MARGIN_LEFT - 7}" y="${num(y + 4)}" text-anchor="end" class="tick y-tick">${escapeXml((t / yPrefix.factor).toFixed(yDecimals))}</text>`,
      );
    }
    const yTitle = axisTitle(panel.yLabel, yPrefix.symbol, panel.yUnit);
    const yMid = top + h / 2;
    out.push(
      `<text x="16" y="${num(yMid)}" text-anchor="middle" transform="rotate(-90 16 ${num(yMid)})" class="axis-title y-title">${escapeXml(yTitle)}</text>`,
    );

    // Thresholds (under the series).
    for (const t of thresholds) {
      if (!Number.isFinite(t.value) || t.value < yr.min || t.value > yr.max) continue;
      const y = yPx(t.value);
      const color = t.color ?? "#777777";
      out.push(
        `<g class="threshold" data-threshold="${escapeXml(t.label)}"><line x1="${MARGIN_LEFT}" y1="${num(y)}" x2="${num(MARGIN_LEFT + plotW)}" y2="${num(y)}" stroke="${escapeXml(color)}" stroke-width="1" stroke-dasharray="6 4"/>` +
          `<text x="${num(MARGIN_LEFT + plotW - 4)}" y="${num(y - 4)}" text-anchor="end" font-size="10" fill="${escapeXml(color)}">${escapeXml(t.label)}</text></g>`,
      );
    }

    // Markers on the horizontal axis (under the series).
    (panel.markers ?? []).forEach((m, mi) => {
      if (!Number.isFinite(m.x) || m.x < xr.min || m.x > xr.max) return;
      const x = xPx(m.x);
      const color = m.color ?? "#777777";
      out.push(
        `<g class="marker" data-marker="${escapeXml(m.label)}"><line x1="${num(x)}" y1="${num(top)}" x2="${num(x)}" y2="${num(top + h)}" stroke="${escapeXml(color)}" stroke-width="1" stroke-dasharray="3 3"/>` +
          `<text x="${num(x + 3)}" y="${num(top + h - 6 - 12 * mi)}" font-size="10" fill="${escapeXml(color)}">${escapeXml(m.label)}</text></g>`,
      );
    });

    // Series.
    out.push(`<g clip-path="url(#${clipId})">`);
    const colors: string[] = [];
    for (const s of panel.series) {
      const color = s.color ?? PALETTE[colorIndex++ % PALETTE.length]!;
      colors.push(color);
      const d = seriesPath(s, xr, yr, MARGIN_LEFT, top, plotW, h);
      out.push(
        `<path class="series" data-series="${escapeXml(s.name)}" d="${d === "" ? "M0 0" : d}" fill="none" stroke="${escapeXml(color)}" stroke-width="1.5" stroke-linejoin="round"${s.dashed ? ' stroke-dasharray="5 3"' : ""}/>`,
      );
    }
    out.push(`</g>`);

    // Legend.
    const lx = MARGIN_LEFT + plotW + 14;
    panel.series.forEach((s, si) => {
      const ly = top + 12 + si * 17;
      out.push(
        `<g class="legend-entry" data-series="${escapeXml(s.name)}"><line x1="${num(lx)}" y1="${num(ly - 4)}" x2="${num(lx + 22)}" y2="${num(ly - 4)}" stroke="${escapeXml(colors[si]!)}" stroke-width="2"${s.dashed ? ' stroke-dasharray="5 3"' : ""}/>` +
          `<text x="${num(lx + 28)}" y="${num(ly)}" class="legend">${escapeXml(s.name)}</text></g>`,
      );
    });
    out.push(`</g>`);
    top += h + PANEL_GAP;
  });

  // Shared horizontal axis under the last panel.
  const bottom = top - PANEL_GAP;
  for (const t of xTicks) {
    out.push(
      `<text x="${num(xPx(t))}" y="${num(bottom + 17)}" text-anchor="middle" class="tick x-tick">${escapeXml((t / xPrefix.factor).toFixed(xDecimals))}</text>`,
    );
  }
  out.push(
    `<text x="${num(MARGIN_LEFT + plotW / 2)}" y="${num(bottom + 40)}" text-anchor="middle" class="axis-title x-title">${escapeXml(axisTitle(plot.xLabel, xPrefix.symbol, plot.xUnit))}</text>`,
  );
  out.push(`</svg>`);
  return out.join("\n") + "\n";
}
