// Vertical markers on a plot's horizontal axis (thresholds of a transfer curve): drawn as
// dashed lines with their labels when inside the axis range, left out when outside; the
// document stays well-formed XML (W3C XML 1.0, checked by test/plot/xml.ts).
import { describe, expect, it } from "vitest";
import { renderSvgPlot } from "../../src/plot/svg.js";
import { allElements, parseXml } from "./xml.js";

describe("plot markers", () => {
  it("draws the markers inside the range, with escaped labels, and skips the rest", () => {
    const x = Float64Array.from({ length: 101 }, (_, i) => i / 20);
    const y = x.map((v) => (v < 1.5 ? 5 : 0.1));
    const svg = renderSvgPlot({
      title: "inverter",
      xLabel: "Input voltage",
      xUnit: "V",
      panels: [{ series: [{ name: "25 °C", x, y }], yLabel: "Output voltage", yUnit: "V", markers: [{ x: 0.8, label: "V_IL <worst>" }, { x: 2, label: "V_IH" }, { x: 9, label: "off the axis" }] }],
    });
    const root = parseXml(svg);
    const markers = allElements(root).filter((e) => e.attributes.get("class") === "marker");
    expect(markers.map((m) => m.attributes.get("data-marker"))).toEqual(["V_IL <worst>", "V_IH"]);
    // Each marker is a vertical line: equal x at both ends, spanning the panel.
    for (const m of markers) {
      const line = m.children.find((c) => c.name === "line")!;
      expect(line.attributes.get("x1")).toBe(line.attributes.get("x2"));
      expect(Number(line.attributes.get("y2"))).toBeGreaterThan(Number(line.attributes.get("y1")));
      expect(line.attributes.get("stroke-dasharray")).toBeDefined();
    }
    // The 0.8 V marker sits left of the 2 V one.
    const xs = markers.map((m) => Number(m.children.find((c) => c.name === "line")!.attributes.get("x1")));
    expect(xs[0]).toBeLessThan(xs[1]!);
  });
});
