// Number formatting for the outputs: SPICE values (where "m" is milli and "meg" is mega), and
// engineering notation with SI prefixes and units for people.

const SPICE_SUFFIX: [number, string][] = [
  [1e12, "t"],
  [1e9, "g"],
  [1e6, "meg"],
  [1e3, "k"],
  [1, ""],
  [1e-3, "m"],
  [1e-6, "u"],
  [1e-9, "n"],
  [1e-12, "p"],
  [1e-15, "f"],
];

function trim(x: number, digits: number): string {
  let s = x.toPrecision(digits);
  if (s.includes("e")) return String(Number(s));
  if (s.includes(".")) s = s.replace(/0+$/, "").replace(/\.$/, "");
  return s;
}

/** A value for a SPICE netlist: 4.7k, 2.2meg, 20p, 5. */
export function spiceNumber(x: number, digits = 6): string {
  if (x === 0 || !Number.isFinite(x)) return String(x);
  const a = Math.abs(x);
  for (const [scale, suffix] of SPICE_SUFFIX) {
    if (a >= scale * 0.9999999) return trim(x / scale, digits) + suffix;
  }
  return x.toExponential(digits - 1);
}

/** A model parameter: plain exponent notation (IS=2.52e-09 reads the same in every SPICE). */
export function spiceParam(x: number): string {
  if (Number.isInteger(x) && Math.abs(x) < 1e6) return String(x);
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return trim(x, 6);
  return Number(x.toPrecision(6)).toExponential().replace("e+", "e");
}

const SI: [number, string][] = [
  [1e9, "G"],
  [1e6, "M"],
  [1e3, "k"],
  [1, ""],
  [1e-3, "m"],
  [1e-6, "µ"],
  [1e-9, "n"],
  [1e-12, "p"],
  [1e-15, "f"],
];

/** Engineering notation for people: 2.18 mA, 4.7 kΩ, 312 ns. */
export function eng(x: number, unit: string, digits = 3): string {
  if (!Number.isFinite(x)) return x > 0 ? "∞" : x < 0 ? "−∞" : "n/a";
  if (x === 0) return `0 ${unit}`.trim();
  const a = Math.abs(x);
  for (const [scale, prefix] of SI) {
    if (a >= scale * 0.99995) return `${trim(x / scale, digits)} ${prefix}${unit}`.trim();
  }
  return `${x.toExponential(digits - 1)} ${unit}`.trim();
}

/** A plain number with a fixed count of significant digits. */
export function num(x: number, digits = 3): string {
  if (!Number.isFinite(x)) return x > 0 ? "∞" : "n/a";
  return trim(x, digits);
}

/** Compressed designator ranges: R1, R2, R3, R5 → "R1-R3, R5". */
export function designatorRanges(designators: string[]): string {
  const byPrefix = new Map<string, number[]>();
  const other: string[] = [];
  for (const d of designators) {
    const m = /^([A-Z]+)(\d+)$/.exec(d);
    if (!m) {
      other.push(d);
      continue;
    }
    if (!byPrefix.has(m[1]!)) byPrefix.set(m[1]!, []);
    byPrefix.get(m[1]!)!.push(Number(m[2]));
  }
  const parts: string[] = [];
  for (const [prefix, nums] of byPrefix) {
    nums.sort((a, b) => a - b);
    const text = numberRanges(prefix, nums);
    if (text !== "") parts.push(text);
  }
  for (const d of other) parts.push(d);
  return parts.join(", ");
}

/** Ranges of designators `prefix` + n for numbers already in ascending order: "R1-R3, R5". */
export function numberRanges(prefix: string, nums: ArrayLike<number>): string {
  let text = "";
  const add = (s: string) => (text = text === "" ? s : `${text}, ${s}`);
  for (let i = 0; i < nums.length; ) {
    let j = i;
    while (j + 1 < nums.length && nums[j + 1] === nums[j]! + 1) j++;
    if (j - i >= 2) add(`${prefix}${nums[i]}-${prefix}${nums[j]}`);
    else for (let k = i; k <= j; k++) add(`${prefix}${nums[k]}`);
    i = j + 1;
  }
  return text;
}

/** Natural order of designators: R2 before R10. */
export function compareDesignators(a: string, b: string): number {
  const ma = /^([A-Z]+)(\d+)$/.exec(a);
  const mb = /^([A-Z]+)(\d+)$/.exec(b);
  if (ma && mb && ma[1] === mb[1]) return Number(ma[2]) - Number(mb[2]);
  return a < b ? -1 : a > b ? 1 : 0;
}

/** A design parameter's value for people, by its unit. */
export function parameterText(value: number, unit: string): string {
  switch (unit) {
    case "ratio":
      return `${num(value * 100, 4)} %`;
    case "°C":
      return `${num(value, 4)} °C`;
    case "":
      return num(value, 4);
    case "values/decade":
    case "loads":
      return `${num(value, 4)} ${unit === "loads" ? (value === 1 ? "load" : "loads") : "values a decade"}`;
    default:
      return eng(value, unit);
  }
}
