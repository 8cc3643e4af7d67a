// The SVG plot renderer: well-formed XML (W3C XML 1.0, checked by the reader in xml.ts), the
// series and labels asked for, SI prefixes (BIPM, The International System of Units, 9th ed.,
// table of prefixes) and 1-2-5 tick steps (common practice).
import { describe, expect, it } from "vitest";
import { renderSvgPlot, type Plot } from "../../src/plot/svg.js";
import { formatEngineering, niceTicks, prefixFor } from "../../src/plot/scale.js";
import { allElements, parseXml } from "./xml.js";

function timeAxis(n: number, t1: number): Float64Array {
  return Float64Array.from({ length: n }, (_, i) => (t1 * i) / (n - 1));
}

function sampleTransient(): Plot {
  const t = timeAxis(2001, 200e-9);
  const a = t.map((x) => (x > 50e-9 && x < 150e-9 ? 5 : 0));
  const b = t.map((x) => (x > 100e-9 ? 5 : 0));
  const y = t.map((x) => (x > 105e-9 && x < 155e-9 ? 0.2 : 4.8));
  const icc = t.map((x) => -(2e-3 + 8e-3 * Math.exp(-(((x - 105e-9) / 2e-9) ** 2))));
  return {
    title: "NAND2 <transient> & \"checks\"",
    xLabel: "Time",
    xUnit: "s",
    panels: [
      { series: [{ name: "a", x: t, y: a }], yLabel: "a", yUnit: "V", digital: true },
      { series: [{ name: "b", x: t, y: b }], yLabel: "b", yUnit: "V", digital: true },
      {
        series: [{ name: "y = !(a & b)", x: t, y }],
        yLabel: "Voltage",
        yUnit: "V",
        thresholds: [
          { value: 1.5, label: "V_IH" },
          { value: 0.8, label: "V_IL" },
        ],
      },
      { series: [{ name: "i(vcc)", x: t, y: icc.map((v) => -v), dashed: true }], yLabel: "Supply current", yUnit: "A" },
    ],
  };
}

describe("renderSvgPlot", () => {
  const svg = renderSvgPlot(sampleTransient());
  const root = parseXml(svg);
  const elements = allElements(root);
  const texts = elements.filter((e) => e.name === "text").map((e) => e.text);

  it("writes a well-formed SVG document", () => {
    expect(root.name).toBe("svg");
    expect(root.attributes.get("xmlns")).toBe("http://www.w3.org/2000/svg");
    expect(Number(root.attributes.get("width"))).toBeGreaterThan(0);
    expect(elements.find((e) => e.name === "title")!.text).toBe('NAND2 <transient> & "checks"');
  });

  it("draws every series once, with a legend entry, stacked inputs above outputs", () => {
    const paths = elements.filter((e) => e.name === "path" && e.attributes.get("class") === "series");
    expect(paths.map((p) => p.attributes.get("data-series"))).toEqual(["a", "b", "y = !(a & b)", "i(vcc)"]);
    for (const p of paths) expect(p.attributes.get("d")).toMatch(/^M[\d.]+ [\d.]+(L[\d.]+ [\d.]+)+$/);
    const legends = elements.filter((e) => e.attributes.get("class") === "legend-entry");
    expect(legends.map((l) => l.attributes.get("data-series"))).toEqual(["a", "b", "y = !(a & b)", "i(vcc)"]);
    expect(texts).toContain("y = !(a & b)");
    // Panel order top to bottom: the digital inputs first.
    const panelTops = elements
      .filter((e) => e.attributes.get("class") === "panel")
      .map((g) => Number(g.children.find((c) => c.name === "rect")!.attributes.get("y")));
    expect(panelTops).toEqual([...panelTops].sort((x, y) => x - y));
    expect(panelTops).toHaveLength(4);
  });

  it("labels axes with units in engineering notation", () => {
    expect(texts).toContain("Time (ns)");
    expect(texts).toContain("Voltage (V)");
    expect(texts).toContain("Supply current (mA)");
    // Time ticks every 50 ns (1-2-5 steps) from 0 to 200.
    const xTicks = elements.filter((e) => e.attributes.get("class") === "tick x-tick").map((e) => e.text);
    expect(xTicks).toEqual(["0", "50", "100", "150", "200"]);
    const mA = elements.filter((e) => e.attributes.get("class") === "tick y-tick").map((e) => Number(e.text));
    expect(mA.some((v) => v >= 8)).toBe(true);
  });

  it("draws labelled, dashed threshold lines", () => {
    const th = elements.filter((e) => e.attributes.get("class") === "threshold");
    expect(th.map((g) => g.attributes.get("data-threshold"))).toEqual(["V_IH", "V_IL"]);
    for (const g of th) {
      expect(g.children.find((c) => c.name === "line")!.attributes.get("stroke-dasharray")).toBeTruthy();
      expect(g.children.find((c) => c.name === "text")!.text).toMatch(/^V_I[HL]$/);
    }
    // V_IH is drawn above V_IL (smaller y on screen).
    const y = th.map((g) => Number(g.children[0]!.attributes.get("y1")));
    expect(y[0]!).toBeLessThan(y[1]!);
  });

  it("thins very long series but keeps a spike's peak", () => {
    const t = timeAxis(200_001, 1e-6);
    const v = t.map((x, i) => (i === 123_457 ? 10 : Math.sin(2 * Math.PI * 3e6 * x)));
    const out = renderSvgPlot({ title: "long", xLabel: "Time", xUnit: "s", panels: [{ series: [{ name: "v", x: t, y: v }], yLabel: "V", yUnit: "V" }] });
    const path = allElements(parseXml(out)).find((e) => e.attributes.get("data-series") === "v" && e.name === "path")!;
    const segments = path.attributes.get("d")!.split(/[ML]/).filter(Boolean);
    expect(segments.length).toBeLessThan(5000);
    const ys = segments.map((s) => Number(s.split(" ")[1]));
    const top = allElements(parseXml(out)).find((e) => e.attributes.get("class") === "panel")!.children.find((c) => c.name === "rect")!;
    // The spike (the panel's maximum) reaches within a few pixels of the panel top.
    expect(Math.min(...ys) - Number(top.attributes.get("y"))).toBeLessThan(20);
  });

  it("breaks lines at missing values and copes with empty and flat series", () => {
    const out = renderSvgPlot({
      title: "gaps",
      xLabel: "Input",
      xUnit: "V",
      panels: [
        {
          series: [
            { name: "gappy", x: [0, 1, 2, 3], y: [1, Number.NaN, 2, 3] },
            { name: "flat", x: [0, 3], y: [2, 2] },
            { name: "empty", x: [], y: [] },
          ],
          yLabel: "Output",
          yUnit: "V",
        },
      ],
    });
    const paths = allElements(parseXml(out)).filter((e) => e.name === "path");
    expect(paths[0]!.attributes.get("d")!.match(/M/g)).toHaveLength(2);
    expect(paths).toHaveLength(3);
  });
});

describe("engineering notation and ticks", () => {
  it("uses SI prefixes in steps of 10³", () => {
    expect(formatEngineering(2.5e-9, "s")).toBe("2.5 ns");
    expect(formatEngineering(1.5e-6, "s")).toBe("1.5 µs");
    expect(formatEngineering(0.75, "V")).toBe("750 mV");
    expect(formatEngineering(-3.3e-3, "A")).toBe("-3.3 mA");
    expect(formatEngineering(4700, "Ω")).toBe("4.7 kΩ");
    expect(formatEngineering(0, "V")).toBe("0 V");
    expect(formatEngineering(0.9996, "V")).toBe("1 V");
    expect(prefixFor(1e-13).symbol).toBe("f");
    expect(prefixFor(999e-9).symbol).toBe("n");
  });

  it("places ticks at 1, 2 or 5 × 10^k", () => {
    expect(niceTicks(0, 200e-9, 4)).toEqual([0, 5e-8, 1e-7, 1.5e-7, 2e-7]);
    expect(niceTicks(-0.3, 5.3, 6)).toEqual([0, 1, 2, 3, 4, 5]);
    expect(niceTicks(0.1, 0.7, 6)).toEqual([0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7]);
  });
});
