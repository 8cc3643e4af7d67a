// Engineering notation (SI prefixes in steps of 10³) and axis ticks at 1-2-5 steps.

const PREFIXES: ReadonlyArray<readonly [number, string]> = [
  [-15, "f"],
  [-12, "p"],
  [-9, "n"],
  [-6, "µ"], // U+00B5 MICRO SIGN, as SI text commonly uses
  [-3, "m"],
  [0, ""],
  [3, "k"],
  [6, "M"],
  [9, "G"],
  [12, "T"],
];

export interface Prefix {
  /** Multiply a value by 1/factor to express it with the prefix. */
  factor: number;
  symbol: string;
}

/** The SI prefix (multiple of 10³) for a magnitude: 2.5e-9 → n, 0.75 → m, 0 → none. */
export function prefixFor(magnitude: number): Prefix {
  const m = Math.abs(magnitude);
  if (!Number.isFinite(m) || m === 0) return { factor: 1, symbol: "" };
  // A small allowance so 999.9999 µ from rounding reads as 1 m.
  const exp3 = Math.floor(Math.log10(m * (1 + 1e-9)) / 3) * 3;
  const clamped = Math.max(-15, Math.min(12, exp3));
  const found = PREFIXES.find(([e]) => e === clamped)!;
  return { factor: 10 ** found[0], symbol: found[1] };
}

/** `value` in engineering notation with `digits` significant figures: (2.5e-9, "s") → "2.5 ns". */
export function formatEngineering(value: number, unit: string, digits = 3): string {
  if (!Number.isFinite(value)) return `${value} ${unit}`.trim();
  const p = prefixFor(value);
  let scaled = value / p.factor;
  let text = Number(scaled.toPrecision(digits)).toString();
  // Rounding may carry into the next prefix (999.7 m at 3 figures → 1000 m → 1 V).
  if (Math.abs(Number(text)) >= 1000 && p.symbol !== "T") {
    const up = prefixFor(value * 1.001);
    scaled = value / up.factor;
    text = Number(scaled.toPrecision(digits)).toString();
    return `${text} ${up.symbol}${unit}`.trim();
  }
  return `${text} ${p.symbol}${unit}`.trim();
}

/** A tick step of 1, 2 or 5 × 10^k giving about `target` intervals over `span`. */
export function niceStep(span: number, target = 6): number {
  if (!(span > 0) || !Number.isFinite(span)) return 1;
  const raw = span / Math.max(1, target);
  const power = 10 ** Math.floor(Math.log10(raw));
  const r = raw / power;
  const mult = r <= 1 ? 1 : r <= 2 ? 2 : r <= 5 ? 5 : 10;
  return mult * power;
}

/** Tick positions: multiples of a 1-2-5 step covering [min, max]. */
export function niceTicks(min: number, max: number, target = 6): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (max < min) [min, max] = [max, min];
  if (max === min) return [min];
  const step = niceStep(max - min, target);
  const first = Math.ceil(min / step - 1e-9);
  const last = Math.floor(max / step + 1e-9);
  const ticks: number[] = [];
  for (let k = first; k <= last; k++) {
    // Remove floating noise such as 0.30000000000000004.
    ticks.push(Number((k * step).toPrecision(12)));
  }
  return ticks;
}

/** Decimal places needed to show ticks `step` apart after scaling by 1/factor. */
export function decimalsFor(step: number, factor: number): number {
  const s = Math.abs(step / factor);
  if (!(s > 0) || !Number.isFinite(s)) return 0;
  return Math.max(0, Math.min(9, -Math.floor(Math.log10(s) + 1e-9)));
}
