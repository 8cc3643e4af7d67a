// Quantities typed by users in options and data files: "4.7k", "5 V", "10 mA", "2.2 kohm", "2k2",
// "-40 degC", "20 pF", "1 MHz", "60 ns", "5 %". Converted once, here, to a number in SI base units
// (temperature in °C). Never throws: a bad quantity comes back as an error message.
import { createRequire } from "node:module";
import type { Unit } from "mathjs";

/** mathjs, loaded when a quantity with a unit is first read: loading it builds all of its
 *  functions (about a second), which a run with plain numbers or no options need not pay. */
let mathjs: typeof import("mathjs") | undefined;
function mathUnit(text: string): Unit {
  mathjs ??= createRequire(import.meta.url)("mathjs") as typeof import("mathjs");
  return mathjs.unit(text);
}

export type Dimension =
  | "voltage"
  | "current"
  | "resistance"
  | "capacitance"
  | "time"
  | "frequency"
  | "temperature"
  | "power"
  | "ratio";

export type QuantityResult = { value: number } | { error: string };

interface DimensionInfo {
  /** Unit the number is returned in. */
  base: string;
  /** How the unit is named in messages. */
  shown: string;
  /** Example for messages. */
  example: string;
}

const DIMENSIONS: Record<Dimension, DimensionInfo> = {
  voltage: { base: "V", shown: "a voltage in V", example: "5 V" },
  current: { base: "A", shown: "a current in A", example: "10 mA" },
  resistance: { base: "ohm", shown: "a resistance in ohm", example: "4.7k or 2.2 kohm" },
  capacitance: { base: "F", shown: "a capacitance in F", example: "20 pF" },
  time: { base: "s", shown: "a time in s", example: "60 ns" },
  frequency: { base: "Hz", shown: "a frequency in Hz", example: "1 MHz" },
  temperature: { base: "degC", shown: "a temperature in degC", example: "-40 degC" },
  power: { base: "W", shown: "a power in W", example: "250 mW" },
  ratio: { base: "", shown: "a plain number or percentage", example: "5 %" },
};

// SPICE-style multipliers. "M" is taken as mega (the way parts are marked: 2.2M), "m" as milli;
// "meg" (any case) is mega as in SPICE.
const MULTIPLIERS: Record<string, number> = {
  f: 1e-15,
  p: 1e-12,
  n: 1e-9,
  u: 1e-6,
  µ: 1e-6,
  m: 1e-3,
  k: 1e3,
  K: 1e3,
  M: 1e6,
  meg: 1e6,
  G: 1e9,
  g: 1e9,
  T: 1e12,
};

const NUMBER = String.raw`[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?`;
const BARE = new RegExp(String.raw`^(${NUMBER})\s*(meg|MEG|Meg|[fpnuµmkKMGgT])?$`);
// "2k2" = 2.2k, "4R7" = 4.7, "1M5" = 1.5M (IEC 60062 letter-and-digit code).
const RKM = /^(\d+)([RrkKM])(\d+)$/;
const PERCENT = new RegExp(String.raw`^(${NUMBER})\s*%$`);
const PPM = new RegExp(String.raw`^(${NUMBER})\s*ppm$`);

/** Rounds away binary noise from unit conversion (60 ns → 6e-8, not 6.000000000000001e-8). */
function clean(x: number): number {
  return x === 0 ? 0 : Number(x.toPrecision(12));
}

function describe(u: Unit): string | undefined {
  for (const [dim, info] of Object.entries(DIMENSIONS) as [Dimension, DimensionInfo][]) {
    if (dim === "ratio") continue;
    try {
      if (u.equalBase(mathUnit(info.base))) return info.shown.replace(/ in .*$/, "");
    } catch {
      // not comparable
    }
  }
  return undefined;
}

// The commonest unit texts, a number with an SI prefix and the dimension's own unit ("12V",
// "10 mA", "60 ns", "1 MHz", "2.2 kohm", "-40 degC"), read without loading mathjs: the same
// value mathjs gives (test/electrical/quantity.test.ts compares the two), in a fraction of the
// time. Everything else, and every error, is mathjs's.
const PLAIN_PREFIX: Record<string, number> = { "": 1, f: 1e-15, p: 1e-12, n: 1e-9, u: 1e-6, m: 1e-3, k: 1e3, M: 1e6, G: 1e9, T: 1e12 };
const PLAIN = new RegExp(String.raw`^(${NUMBER})\s*([fpnumkMGT]?)(V|A|F|s|Hz|W|ohm|degC)$`);

/** The value of `text` in `base` when it is a plain number, an optional SI prefix and `base`
 *  itself (no prefix on degC); undefined otherwise. */
function plainUnit(text: string, base: string): number | undefined {
  const m = PLAIN.exec(text);
  if (!m || m[3] !== base || (base === "degC" && m[2] !== "")) return undefined;
  return clean(Number(m[1]) * PLAIN_PREFIX[m[2]!]!);
}

/** Parses `text` as a quantity of the given dimension; returns SI base units (°C for temperature). */
/** Longest quantity text read (a documented limit). */
export const MAX_QUANTITY_TEXT = 100;

export function parseQuantity(text: string, dimension: Dimension): QuantityResult {
  const info = DIMENSIONS[dimension];
  const expected = `expected ${info.shown} (for example "${info.example}")`;
  const t = text.trim();
  if (t === "") return { error: `empty value: ${expected}` };
  // Refused before any pattern or parser sees it: no quantity is this long, and a long run of
  // digits makes the number pattern backtrack for quadratic time (1 MB took minutes).
  if (t.length > MAX_QUANTITY_TEXT) return { error: `too long for a quantity (at most ${MAX_QUANTITY_TEXT} characters): ${expected}` };

  if (dimension === "ratio") {
    const pc = PERCENT.exec(t);
    if (pc) return { value: clean(Number(pc[1]) / 100) };
    const pp = PPM.exec(t);
    if (pp) return { value: clean(Number(pp[1]) / 1e6) };
    const n = Number(t);
    if (t.match(new RegExp(`^${NUMBER}$`)) && Number.isFinite(n)) return { value: n };
    return { error: `"${text}" is not a ratio: ${expected}` };
  }

  if (dimension !== "temperature") {
    const bare = BARE.exec(t);
    if (bare) {
      const base = Number(bare[1]);
      const suffix = bare[2];
      const mult = suffix === undefined ? 1 : (MULTIPLIERS[suffix] ?? MULTIPLIERS[suffix.toLowerCase()]!);
      const v = clean(base * mult);
      if (!Number.isFinite(v)) return { error: `"${text}" is not a finite number: ${expected}` };
      return { value: v };
    }
    const rkm = RKM.exec(t);
    if (rkm) {
      const letter = rkm[2]!;
      const mult = letter === "R" || letter === "r" ? 1 : MULTIPLIERS[letter]!;
      return { value: clean(Number(`${rkm[1]}.${rkm[3]}`) * mult) };
    }
  } else if (new RegExp(`^${NUMBER}$`).test(t)) {
    return { value: Number(t) };
  }

  // Everything else goes to mathjs units, after mapping the usual symbols to mathjs names.
  const forMath = t
    .replace(/[Ωω]/g, "ohm")
    .replace(/µ/g, "u")
    .replace(/°\s*C\b/g, "degC")
    .replace(/°\s*F\b/g, "degF")
    .replace(/\b([kKM]?)[oO]hms?\b/g, (_m, p: string) => `${p === "K" ? "k" : p}ohm`);
  const plain = plainUnit(forMath, info.base);
  if (plain !== undefined) return Number.isFinite(plain) ? { value: plain } : { error: `"${text}" is not a finite number: ${expected}` };
  let u: Unit;
  try {
    u = mathUnit(forMath);
  } catch (e) {
    const why = e instanceof Error ? e.message : String(e);
    return { error: `cannot read "${text}" (${why}): ${expected}` };
  }
  const value = (u as unknown as { value: number | null }).value;
  if (value === null || value === undefined) return { error: `"${text}" has a unit but no number: ${expected}` };
  let ok = false;
  try {
    ok = u.equalBase(mathUnit(info.base));
  } catch {
    ok = false;
  }
  if (!ok) {
    const found = describe(u);
    return { error: `"${text}" is ${found ?? "not a known electrical quantity"}, but ${expected}` };
  }
  const v = clean(u.toNumber(info.base));
  if (!Number.isFinite(v)) return { error: `"${text}" is not a finite number: ${expected}` };
  return { value: v };
}

/** True when a parse result is an error. */
export function isQuantityError(r: QuantityResult): r is { error: string } {
  return "error" in r;
}
