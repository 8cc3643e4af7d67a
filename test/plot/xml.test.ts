// The tests' XML reader must reject what XML 1.0 (W3C) calls not well-formed, or the SVG checks
// that rely on it would prove nothing.
import { describe, expect, it } from "vitest";
import { parseXml } from "./xml.js";

describe("parseXml", () => {
  it("reads nesting, attributes, entities and text", () => {
    const root = parseXml(`<?xml version="1.0"?>\n<a x="1" y='&lt;2&gt;'><!-- c --><b>t &amp; u&#33;</b><c/></a>\n`);
    expect(root.name).toBe("a");
    expect(root.attributes.get("y")).toBe("<2>");
    expect(root.children.map((c) => c.name)).toEqual(["b", "c"]);
    expect(root.children[0]!.text).toBe("t & u!");
  });

  it.each([
    ["unclosed element", "<a><b></a>"],
    ["crossed nesting", "<a><b></a></b>"],
    ["bare ampersand", "<a>x & y</a>"],
    ["unknown entity", "<a>&nbsp;</a>"],
    ["unquoted attribute", "<a x=1/>"],
    ["duplicate attribute", '<a x="1" x="2"/>'],
    ["'<' in attribute", '<a x="<"/>'],
    ["two roots", "<a/><b/>"],
    ["text outside root", "<a/>text"],
    ["no root", "  "],
    ["never closed", "<a>"],
  ])("rejects %s", (_what, text) => {
    expect(() => parseXml(text)).toThrow();
  });
});
