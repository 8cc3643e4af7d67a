// IEC 60063 preferred-number series.
import { describe, expect, it } from "vitest";
import {
  formatOhms,
  nearestValue,
  nextDown,
  nextUp,
  parseSeriesName,
  seriesMantissas,
  seriesTolerance,
  valuesInRange,
} from "../../src/electrical/eseries.js";

describe("E-series tables (IEC 60063)", () => {
  it("E6, E12 and E24 are exactly the published tables", () => {
    // IEC 60063, E6/E12/E24 tables.
    expect(seriesMantissas("E6")).toEqual([10, 15, 22, 33, 47, 68]);
    expect(seriesMantissas("E12")).toEqual([10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82]);
    expect(seriesMantissas("E24")).toEqual([
      10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91,
    ]);
  });

  it("E48 and E96 are exactly the published tables", () => {
    // IEC 60063, E48/E96 tables.
    expect(seriesMantissas("E48")).toEqual([
      100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205, 215, 226, 237, 249, 261, 274,
      287, 301, 316, 332, 348, 365, 383, 402, 422, 442, 464, 487, 511, 536, 562, 590, 619, 649, 681, 715, 750, 787,
      825, 866, 909, 953,
    ]);
    expect(seriesMantissas("E96")).toEqual([
      100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154, 158, 162, 165,
      169, 174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243, 249, 255, 261, 267, 274, 280,
      287, 294, 301, 309, 316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453, 464, 475,
      487, 499, 511, 523, 536, 549, 562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806,
      825, 845, 866, 887, 909, 931, 953, 976,
    ]);
  });

  it("E24 departs from the geometric rule exactly at 27 30 33 36 39 43 47 82 (derived)", () => {
    // Derived from IEC 60063: compare each E24 value with round(10^(i/24)·10).
    const differ = seriesMantissas("E24").filter((m, i) => m !== Math.round(10 ** (i / 24) * 10));
    expect(differ).toEqual([27, 30, 33, 36, 39, 43, 47, 82]);
  });

  it("E96 follows the geometric rule at three figures without exception (derived)", () => {
    const differ = seriesMantissas("E96").filter((m, i) => m !== Math.round(10 ** (i / 96) * 100));
    expect(differ).toEqual([]);
  });

  it("E48 is every second E96 value; E12 every second E24; E6 every second E12 (derived)", () => {
    const e96 = seriesMantissas("E96");
    expect(seriesMantissas("E48")).toEqual(e96.filter((_, i) => i % 2 === 0));
    expect(seriesMantissas("E12")).toEqual(seriesMantissas("E24").filter((_, i) => i % 2 === 0));
    expect(seriesMantissas("E6")).toEqual(seriesMantissas("E12").filter((_, i) => i % 2 === 0));
  });

  it("E192 holds E96 as every second value and departs from the rule only at 920 (from memory)", () => {
    const e192 = seriesMantissas("E192");
    expect(e192.filter((_, i) => i % 2 === 0)).toEqual(seriesMantissas("E96"));
    expect(e192.filter((m, i) => m !== Math.round(10 ** (i / 192) * 100))).toEqual([920]);
  });

  it("usual tolerances: E6 20 %, E12 10 %, E24 5 %, E48 2 %, E96 1 % (common practice)", () => {
    expect([seriesTolerance("E6"), seriesTolerance("E12"), seriesTolerance("E24"), seriesTolerance("E48"), seriesTolerance("E96")]).toEqual([
      0.2, 0.1, 0.05, 0.02, 0.01,
    ]);
  });
});

describe("standard values in use", () => {
  it("lists the values of a range across decades, ends included", () => {
    expect(valuesInRange("E12", 100, 1000)).toEqual([100, 120, 150, 180, 220, 270, 330, 390, 470, 560, 680, 820, 1000]);
    expect(valuesInRange("E6", 4700, 22000)).toEqual([4700, 6800, 10000, 15000, 22000]);
    expect(valuesInRange("E24", 1e6, 1e5)).toEqual([]);
    expect(valuesInRange("E96", 100, 1e6).length).toBe(4 * 96 + 1);
  });

  it("nearest, next up and next down", () => {
    expect(nearestValue("E24", 4600)).toBe(4700);
    expect(nearestValue("E12", 5000)).toBe(4700); // log midpoint of 4.7k–5.6k is 5.13k
    expect(nearestValue("E12", 5200)).toBe(5600);
    expect(nextUp("E24", 4701)).toBe(5100);
    expect(nextUp("E24", 4700)).toBe(4700);
    expect(nextDown("E24", 4699)).toBe(4300);
    expect(nextDown("E96", 1000)).toBe(1000);
    expect(nextUp("E96", 9770)).toBe(10000);
  });

  it("formats values the way parts are marked", () => {
    expect(formatOhms(4700)).toBe("4.7k");
    expect(formatOhms(470)).toBe("470");
    expect(formatOhms(2.2e6)).toBe("2.2M");
    expect(formatOhms(1050)).toBe("1.05k");
    expect(formatOhms(10000)).toBe("10k");
    expect(formatOhms(100)).toBe("100");
  });

  it("reads series names case-insensitively", () => {
    expect(parseSeriesName("e24")).toBe("E24");
    expect(parseSeriesName("E7")).toBeUndefined();
  });
});
