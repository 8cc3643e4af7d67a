// Preferred numbers for resistors: the IEC 60063 E-series tables.
// The tables are stored as published (E24 and below do not follow the geometric rule exactly),
// not computed. Values are the mantissas of one decade, 10 ≤ m < 100 for E6..E24 (two figures)
// and 100 ≤ m < 1000 for E48..E192 (three figures).

export type SeriesName = "E6" | "E12" | "E24" | "E48" | "E96" | "E192";

export const SERIES_NAMES: readonly SeriesName[] = ["E6", "E12", "E24", "E48", "E96", "E192"];

const E6 = [10, 15, 22, 33, 47, 68];
const E12 = [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82];
const E24 = [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91];
const E48 = [
  100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205, 215, 226, 237, 249, 261, 274, 287,
  301, 316, 332, 348, 365, 383, 402, 422, 442, 464, 487, 511, 536, 562, 590, 619, 649, 681, 715, 750, 787, 825, 866,
  909, 953,
];
const E96 = [
  100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154, 158, 162, 165, 169,
  174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243, 249, 255, 261, 267, 274, 280, 287, 294,
  301, 309, 316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499, 511,
  523, 536, 549, 562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887,
  909, 931, 953, 976,
];
// E192 (0.5 %), from memory: it equals round(100·10^(i/192)) except 920 (the rule gives 919), and
// every second value is E96; the tests check both facts.
const E192 = [
  100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120, 121, 123, 124, 126, 127, 129, 130,
  132, 133, 135, 137, 138, 140, 142, 143, 145, 147, 149, 150, 152, 154, 156, 158, 160, 162, 164, 165, 167, 169, 172,
  174, 176, 178, 180, 182, 184, 187, 189, 191, 193, 196, 198, 200, 203, 205, 208, 210, 213, 215, 218, 221, 223, 226,
  229, 232, 234, 237, 240, 243, 246, 249, 252, 255, 258, 261, 264, 267, 271, 274, 277, 280, 284, 287, 291, 294, 298,
  301, 305, 309, 312, 316, 320, 324, 328, 332, 336, 340, 344, 348, 352, 357, 361, 365, 370, 374, 379, 383, 388, 392,
  397, 402, 407, 412, 417, 422, 427, 432, 437, 442, 448, 453, 459, 464, 470, 475, 481, 487, 493, 499, 505, 511, 517,
  523, 530, 536, 542, 549, 556, 562, 569, 576, 583, 590, 597, 604, 612, 619, 626, 634, 642, 649, 657, 665, 673, 681,
  690, 698, 706, 715, 723, 732, 741, 750, 759, 768, 777, 787, 796, 806, 816, 825, 835, 845, 856, 866, 876, 887, 898,
  909, 920, 931, 942, 953, 965, 976, 988,
];

const TABLES: Record<SeriesName, readonly number[]> = { E6, E12, E24, E48, E96, E192 };

/** Mantissas of one decade as published, e.g. E24 → [10, 11, ..., 91]. */
export function seriesMantissas(series: SeriesName): readonly number[] {
  return TABLES[series];
}

/** The tolerance a series is usually made in (E6 20 %, E12 10 %, E24 5 %, E48 2 %, E96 1 %, E192 0.5 %). */
export function seriesTolerance(series: SeriesName): number {
  switch (series) {
    case "E6":
      return 0.2;
    case "E12":
      return 0.1;
    case "E24":
      return 0.05;
    case "E48":
      return 0.02;
    case "E96":
      return 0.01;
    case "E192":
      return 0.005;
  }
}

/** Parses a series name case-insensitively ("e24" → "E24"). */
export function parseSeriesName(text: string): SeriesName | undefined {
  const up = text.trim().toUpperCase();
  return (SERIES_NAMES as readonly string[]).includes(up) ? (up as SeriesName) : undefined;
}

function figures(series: SeriesName): number {
  return TABLES[series][0]! >= 100 ? 3 : 2;
}

/** Exact value of mantissa index i in decade d (value = m · 10^(d − figures + 1)), rounded to kill float noise. */
function valueAt(series: SeriesName, decade: number, i: number): number {
  const m = TABLES[series][i]!;
  const exp = decade - (figures(series) - 1);
  const v = exp >= 0 ? m * 10 ** exp : m / 10 ** -exp;
  return Number(v.toPrecision(6));
}

/** Every standard value of a series in [minOhms, maxOhms], ascending. */
export function valuesInRange(series: SeriesName, minOhms: number, maxOhms: number): number[] {
  const out: number[] = [];
  if (!(minOhms > 0) || !(maxOhms >= minOhms) || !Number.isFinite(maxOhms)) return out;
  const n = TABLES[series].length;
  const d0 = Math.floor(Math.log10(minOhms)) - 1;
  const d1 = Math.floor(Math.log10(maxOhms)) + 1;
  for (let d = d0; d <= d1; d++) {
    for (let i = 0; i < n; i++) {
      const v = valueAt(series, d, i);
      if (v >= minOhms * (1 - 1e-12) && v <= maxOhms * (1 + 1e-12)) out.push(v);
    }
  }
  return out;
}

function neighbours(series: SeriesName, ohms: number): { below: number; above: number } {
  const d = Math.floor(Math.log10(ohms));
  const vals = valuesInRange(series, 10 ** (d - 1), 10 ** (d + 2));
  let below = vals[0]!;
  let above = vals[vals.length - 1]!;
  for (const v of vals) {
    if (v <= ohms * (1 + 1e-12)) below = v;
  }
  for (let i = vals.length - 1; i >= 0; i--) {
    if (vals[i]! >= ohms * (1 - 1e-12)) above = vals[i]!;
  }
  return { below, above };
}

/** The standard value nearest to `ohms` on a logarithmic scale (ties go up). */
export function nearestValue(series: SeriesName, ohms: number): number {
  const { below, above } = neighbours(series, ohms);
  return Math.log(ohms / below) < Math.log(above / ohms) ? below : above;
}

/** The smallest standard value ≥ `ohms`. */
export function nextUp(series: SeriesName, ohms: number): number {
  return neighbours(series, ohms).above;
}

/** The largest standard value ≤ `ohms`. */
export function nextDown(series: SeriesName, ohms: number): number {
  return neighbours(series, ohms).below;
}

/** Formats a value the way resistors are marked on parts lists: 470, 4.7k, 1.05k, 2.2M, 0.47. */
export function formatOhms(ohms: number): string {
  const trim = (x: number): string => {
    const s = Number(x.toPrecision(3)).toString();
    return s;
  };
  if (ohms >= 1e6) return `${trim(ohms / 1e6)}M`;
  if (ohms >= 1e3) return `${trim(ohms / 1e3)}k`;
  return trim(ohms);
}

/** Formats a capacitance the way capacitors are marked: 10p, 4.7n, 100n, 2.2u. */
export function formatFarads(farads: number): string {
  const trim = (x: number): string => Number(x.toPrecision(3)).toString();
  if (farads >= 1e-6) return `${trim(farads * 1e6)}u`;
  if (farads >= 1e-9) return `${trim(farads * 1e9)}n`;
  return `${trim(farads * 1e12)}p`;
}
