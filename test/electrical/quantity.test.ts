// Quantities with units (mathjs units plus SPICE-style multipliers, IEC 60062 letter code).
import { describe, expect, it } from "vitest";
import * as math from "mathjs";
import { parseQuantity } from "../../src/electrical/quantity.js";

const ok = (text: string, dim: Parameters<typeof parseQuantity>[1]): number => {
  const r = parseQuantity(text, dim);
  if ("error" in r) throw new Error(r.error);
  return r.value;
};
const err = (text: string, dim: Parameters<typeof parseQuantity>[1]): string => {
  const r = parseQuantity(text, dim);
  if (!("error" in r)) throw new Error(`expected an error for ${text}, got ${r.value}`);
  return r.error;
};

describe("parseQuantity", () => {
  it("reads SI units and prefixes", () => {
    expect(ok("5 V", "voltage")).toBe(5);
    expect(ok("5V", "voltage")).toBe(5);
    expect(ok("10 mA", "current")).toBe(0.01);
    expect(ok("2.2 kohm", "resistance")).toBe(2200);
    expect(ok("4.7 kΩ", "resistance")).toBe(4700);
    expect(ok("20 pF", "capacitance")).toBe(2e-11);
    expect(ok("1 MHz", "frequency")).toBe(1e6);
    expect(ok("60 ns", "time")).toBe(6e-8);
    expect(ok("250 mW", "power")).toBe(0.25);
  });

  it("reads bare numbers in the base unit, with SPICE-style multipliers", () => {
    expect(ok("4.7k", "resistance")).toBe(4700);
    expect(ok("2.2M", "resistance")).toBe(2.2e6);
    expect(ok("1meg", "resistance")).toBe(1e6);
    expect(ok("12", "voltage")).toBe(12);
    expect(ok("3p", "capacitance")).toBe(3e-12);
    expect(ok("1e-3", "current")).toBe(0.001);
  });

  it("reads the letter-and-digit code (IEC 60062): 2k2, 4R7, 1M5", () => {
    expect(ok("2k2", "resistance")).toBe(2200);
    expect(ok("4R7", "resistance")).toBe(4.7);
    expect(ok("1M5", "resistance")).toBe(1.5e6);
  });

  it("returns temperatures in degrees Celsius", () => {
    expect(ok("-40 degC", "temperature")).toBe(-40);
    expect(ok("85", "temperature")).toBe(85);
    expect(ok("77 degF", "temperature")).toBe(25);
    expect(ok("300 K", "temperature")).toBeCloseTo(26.85, 9);
  });

  it("reads ratios as numbers or percentages", () => {
    expect(ok("5 %", "ratio")).toBe(0.05);
    expect(ok("0.1", "ratio")).toBe(0.1);
  });

  it("names the expected unit when the dimension is wrong", () => {
    expect(err("5 V", "current")).toMatch(/is a voltage.*expected a current in A/);
    expect(err("10 mA", "resistance")).toMatch(/expected a resistance in ohm/);
  });

  it("rejects text that is not a quantity, without throwing", () => {
    expect(err("", "voltage")).toMatch(/empty/);
    expect(err("abc", "voltage")).toMatch(/expected a voltage in V/);
    expect(err("V", "voltage")).toMatch(/no number/);
    expect(err("five volts", "voltage")).toMatch(/expected a voltage/);
    expect(err("5 %", "voltage")).toMatch(/expected a voltage/);
    expect(err("lots", "ratio")).toMatch(/not a ratio/);
  });
});

// The commonest unit texts are read without mathjs (src/electrical/quantity.ts, plainUnit); the
// reference is mathjs itself (the registry's general-purpose units library), read the way
// parseQuantity reads everything else.
describe("unit texts read without mathjs", () => {
  const units: [Parameters<typeof parseQuantity>[1], string][] = [
    ["voltage", "V"],
    ["current", "A"],
    ["capacitance", "F"],
    ["time", "s"],
    ["frequency", "Hz"],
    ["power", "W"],
    ["resistance", "ohm"],
  ];
  const numbers = ["0", "5", "12", "4.75", ".5", "-3", "1e3", "2.2E-2", "60", "1000000", "0.047", "7."];
  const prefixes = ["", "f", "p", "n", "u", "m", "k", "M", "G", "T"];
  const cleanRef = (x: number) => (x === 0 ? 0 : Number(x.toPrecision(12)));

  it("give mathjs's value for every number, prefix and unit", () => {
    let checked = 0;
    for (const [dim, base] of units)
      for (const n of numbers)
        for (const p of prefixes)
          for (const space of ["", " "]) {
            const text = `${n}${space}${p}${base}`;
            const reference = cleanRef(math.unit(text).toNumber(base));
            expect(ok(text, dim), text).toBe(reference);
            checked++;
          }
    for (const n of numbers) {
      expect(ok(`${n} degC`, "temperature")).toBe(cleanRef(math.unit(`${n} degC`).toNumber("degC")));
      checked++;
    }
    expect(checked).toBe(units.length * numbers.length * prefixes.length * 2 + numbers.length);
  });

  it("leave every other text to mathjs: other units of the dimension, wrong dimensions", () => {
    expect(ok("1 mV", "voltage")).toBeCloseTo(1e-3, 15);
    expect(ok("2 min", "time")).toBe(120);
    expect(ok("32 degF", "temperature")).toBeCloseTo(0, 9);
    expect(err("5 V", "current")).toMatch(/is a voltage, but expected a current/);
    // A prefix on degC is mathjs's to read (it takes it as a multiple: 5 kdegC is 5000 degC).
    expect(ok("5 kdegC", "temperature")).toBe(math.unit("5 kdegC").toNumber("degC"));
  });
});
