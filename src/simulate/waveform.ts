// Measurements on simulated waveforms. Pure functions over (time, value) vectors; `time` must be
// non-decreasing (as ngspice writes it). Values between samples are taken as linear, the same
// assumption ngspice's own `.meas` makes.

export type Edge = "rise" | "fall";
export type Direction = Edge | "either";

type Vec = ArrayLike<number>;

/** Index i with time[i] <= t < time[i+1] (clamped to 0 … n-2). */
function segmentIndex(time: Vec, t: number): number {
  let lo = 0;
  let hi = time.length - 1;
  if (hi < 1) return 0;
  if (t <= time[0]!) return 0;
  if (t >= time[hi]!) return hi - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (time[mid]! <= t) lo = mid;
    else hi = mid;
  }
  return lo;
}

/** The value at time t, by linear interpolation; the end values outside the simulated span. */
export function sampleAt(time: Vec, values: Vec, t: number): number {
  const n = Math.min(time.length, values.length);
  if (n === 0) return Number.NaN;
  if (n === 1 || t <= time[0]!) return values[0]!;
  if (t >= time[n - 1]!) return values[n - 1]!;
  const i = segmentIndex(time, t);
  const t0 = time[i]!;
  const t1 = time[i + 1]!;
  const v0 = values[i]!;
  const v1 = values[i + 1]!;
  if (t1 === t0) return v1;
  return v0 + ((v1 - v0) * (t - t0)) / (t1 - t0);
}

/**
 * Times at which `values` crosses `level`, interpolated between samples. A rising crossing goes
 * from below the level to at-or-above it; a falling one from above to at-or-below.
 */
export function crossings(time: Vec, values: Vec, level: number, direction: Direction = "either"): number[] {
  const out: number[] = [];
  const n = Math.min(time.length, values.length);
  for (let i = 1; i < n; i++) {
    const a = values[i - 1]! - level;
    const b = values[i]! - level;
    const rising = a < 0 && b >= 0;
    const falling = a > 0 && b <= 0;
    if (!(rising || falling)) continue;
    if (direction === "rise" && !rising) continue;
    if (direction === "fall" && !falling) continue;
    const t0 = time[i - 1]!;
    const t1 = time[i]!;
    out.push(t0 + ((t1 - t0) * a) / (a - b));
  }
  return out;
}

export interface DelayMeasurement {
  /** When the input crossed its level. */
  inputSeconds: number;
  /** When the output crossed its level. */
  outputSeconds: number;
  delaySeconds: number;
}

export interface DelayOptions {
  /** Which input edges may cause the output edge; default either. */
  inputEdge?: Direction;
  /** Output crossings later than this after the input crossing are not counted. */
  maxDelaySeconds?: number;
}

/**
 * Propagation delays from `vin` to `vout`, measured between the times each crosses its level
 * (usually the 50 % point of its swing). `edge` is the output's transition: "fall" gives t_PHL,
 * "rise" gives t_PLH. Each output crossing in that direction is paired with the latest input
 * crossing before it that has not been paired yet; output edges with no such input edge are
 * skipped.
 */
export function propagationDelay(
  time: Vec,
  vin: Vec,
  vout: Vec,
  levelIn: number,
  levelOut: number,
  edge: Edge,
  options: DelayOptions = {},
): DelayMeasurement[] {
  const inputs = crossings(time, vin, levelIn, options.inputEdge ?? "either");
  const outputs = crossings(time, vout, levelOut, edge);
  const result: DelayMeasurement[] = [];
  let used = -1; // index of the last input crossing already paired
  let k = 0;
  for (const tOut of outputs) {
    while (k < inputs.length && inputs[k]! <= tOut) k++;
    const j = k - 1;
    if (j <= used || j < 0) continue;
    const tIn = inputs[j]!;
    if (options.maxDelaySeconds !== undefined && tOut - tIn > options.maxDelaySeconds) continue;
    used = j;
    result.push({ inputSeconds: tIn, outputSeconds: tOut, delaySeconds: tOut - tIn });
  }
  return result;
}

export interface Levels {
  min: number;
  max: number;
  /** Time average (trapezoidal integral over the window divided by its length). */
  mean: number;
}

/** Minimum, maximum and time-averaged value over [t0, t1] (the window's end values interpolated). */
export function levelsOver(time: Vec, values: Vec, t0: number, t1: number): Levels {
  const n = Math.min(time.length, values.length);
  if (n === 0 || !(t1 >= t0)) return { min: Number.NaN, max: Number.NaN, mean: Number.NaN };
  const points: Array<[number, number]> = [[t0, sampleAt(time, values, t0)]];
  for (let i = 0; i < n; i++) {
    const t = time[i]!;
    if (t > t0 && t < t1) points.push([t, values[i]!]);
  }
  if (t1 > t0) points.push([t1, sampleAt(time, values, t1)]);
  let min = Infinity;
  let max = -Infinity;
  let area = 0;
  for (let i = 0; i < points.length; i++) {
    const v = points[i]![1];
    if (v < min) min = v;
    if (v > max) max = v;
    if (i > 0) area += ((points[i]![0] - points[i - 1]![0]) * (v + points[i - 1]![1])) / 2;
  }
  const mean = t1 > t0 ? area / (t1 - t0) : points[0]![1];
  return { min, max, mean };
}

export interface SupplyPower {
  /** Average power the source delivered over the window. */
  averageWatts: number;
  peakWatts: number;
  /** Average and peak current the source delivered (sign flipped from ngspice's branch current). */
  averageAmps: number;
  peakAmps: number;
  energyJoules: number;
}

/**
 * Power delivered by a voltage source over [t0, t1] (default: the whole run), from its branch
 * current as ngspice reports it (`i(vcc)`: positive into the + terminal, so negative while the
 * source delivers) and its voltage (a constant or a vector).
 */
export function supplyPower(
  time: Vec,
  vSupplyVolts: Vec | number,
  iSupplyAmps: Vec,
  t0: number = time[0] ?? 0,
  t1: number = time[time.length - 1] ?? 0,
): SupplyPower {
  const n = Math.min(time.length, iSupplyAmps.length);
  const volts = (i: number) => (typeof vSupplyVolts === "number" ? vSupplyVolts : vSupplyVolts[i]!);
  const delivered = new Float64Array(n);
  const power = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    delivered[i] = -iSupplyAmps[i]!;
    power[i] = volts(i) * delivered[i]!;
  }
  const p = levelsOver(time, power, t0, t1);
  const c = levelsOver(time, delivered, t0, t1);
  return {
    averageWatts: p.mean,
    peakWatts: p.max,
    averageAmps: c.mean,
    peakAmps: c.max,
    energyJoules: p.mean * (t1 - t0),
  };
}

export interface CurrentPeak {
  timeSeconds: number;
  /** Current the source delivered at the peak. */
  amps: number;
  /** Height above the higher of the lowest points on either side before a higher value. */
  prominenceAmps: number;
  /** Width at half prominence. */
  widthSeconds: number;
}

export interface PeakOptions {
  /** Smallest prominence reported; default a quarter of (largest − smallest delivered current). */
  minProminenceAmps?: number;
  /** Peaks wider than this at half prominence are level changes, not spikes; default no limit. */
  maxWidthSeconds?: number;
}

/**
 * Current spikes a supply delivers (the switching transients that couple into neighbouring
 * circuits), from ngspice's branch current of the source. A peak is a local maximum of the
 * delivered current; its prominence and width are the usual signal-processing definitions
 * (common practice): prominence = height above the higher of the two minima between the peak and
 * the nearest higher sample on each side; width measured at half the prominence.
 */
export function supplyCurrentPeaks(time: Vec, iSupplyAmps: Vec, options: PeakOptions = {}): CurrentPeak[] {
  const n = Math.min(time.length, iSupplyAmps.length);
  if (n < 3) return [];
  const d = new Float64Array(n);
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    d[i] = -iSupplyAmps[i]!;
    lo = Math.min(lo, d[i]!);
    hi = Math.max(hi, d[i]!);
  }
  const minProminence = options.minProminenceAmps ?? (hi - lo) / 4;
  const peaks: CurrentPeak[] = [];
  for (let i = 1; i < n - 1; i++) {
    const v = d[i]!;
    if (!(v > d[i - 1]!)) continue;
    // Flat tops: take the last sample of the plateau, and require a drop after it.
    let j = i;
    while (j + 1 < n && d[j + 1] === v) j++;
    if (j + 1 >= n || !(d[j + 1]! < v)) {
      i = j;
      continue;
    }
    let leftMin = v;
    for (let k = i - 1; k >= 0 && d[k]! <= v; k--) leftMin = Math.min(leftMin, d[k]!);
    let rightMin = v;
    for (let k = j + 1; k < n && d[k]! <= v; k++) rightMin = Math.min(rightMin, d[k]!);
    const prominence = v - Math.max(leftMin, rightMin);
    if (prominence <= 0 || prominence < minProminence) {
      i = j;
      continue;
    }
    const half = v - prominence / 2;
    let a = i;
    while (a > 0 && d[a]! > half) a--;
    let b = j;
    while (b < n - 1 && d[b]! > half) b++;
    const interp = (k0: number, k1: number) => {
      const y0 = d[k0]!;
      const y1 = d[k1]!;
      return y1 === y0 ? time[k1]! : time[k0]! + ((time[k1]! - time[k0]!) * (half - y0)) / (y1 - y0);
    };
    const tLeft = d[a]! <= half ? interp(a, a + 1) : time[a]!;
    const tRight = d[b]! <= half ? interp(b - 1, b) : time[b]!;
    const width = tRight - tLeft;
    if (options.maxWidthSeconds === undefined || width <= options.maxWidthSeconds) {
      const tPeak = j === i ? time[i]! : (time[i]! + time[j]!) / 2;
      peaks.push({ timeSeconds: tPeak, amps: v, prominenceAmps: prominence, widthSeconds: width });
    }
    i = j;
  }
  return peaks;
}

export interface TransferPoints {
  /** Highest input still read as low: the first point where the slope falls to −1. */
  vIlVolts: number;
  /** Lowest input read as high: the last point where the slope comes back from −1. */
  vIhVolts: number;
  /** Output at V_IL and at V_IH. */
  vOutAtVIlVolts: number;
  vOutAtVIhVolts: number;
  /** Output at the lowest and at the highest input of the sweep (V_OH and V_OL of the curve). */
  vOhVolts: number;
  vOlVolts: number;
  /** Where the output equals the input (switching threshold), if the curve crosses that line. */
  vSwitchVolts?: number;
  /** NM_L = V_IL − V_OL and NM_H = V_OH − V_IH (common practice, unity-gain definition). */
  noiseMarginLowVolts: number;
  noiseMarginHighVolts: number;
}

/**
 * The unity-gain points of an inverting transfer curve (dV_out/dV_in = −1): V_IL and V_IH, with the
 * noise margins they give. The slope is taken between neighbouring samples and placed at their
 * midpoint; the −1 crossings are interpolated linearly. Undefined when the slope never reaches −1.
 */
export function unityGainPoints(vinVolts: Vec, voutVolts: Vec): TransferPoints | undefined {
  let n = Math.min(vinVolts.length, voutVolts.length);
  if (n < 3) return undefined;
  let vin = Array.from({ length: n }, (_, i) => vinVolts[i]!);
  let vout = Array.from({ length: n }, (_, i) => voutVolts[i]!);
  if (vin[n - 1]! < vin[0]!) {
    vin = vin.reverse();
    vout = vout.reverse();
  }
  // Drop repeated input values (a sweep may repeat its end point).
  const xs: number[] = [];
  const ys: number[] = [];
  for (let i = 0; i < n; i++) {
    if (xs.length > 0 && !(vin[i]! > xs[xs.length - 1]!)) continue;
    xs.push(vin[i]!);
    ys.push(vout[i]!);
  }
  n = xs.length;
  if (n < 3) return undefined;
  const mid: number[] = [];
  const slope: number[] = [];
  for (let i = 0; i + 1 < n; i++) {
    mid.push((xs[i]! + xs[i + 1]!) / 2);
    slope.push((ys[i + 1]! - ys[i]!) / (xs[i + 1]! - xs[i]!));
  }
  const at = (k: number) => {
    // Interpolate the slope = −1 point between midpoints k and k+1.
    const s0 = slope[k]!;
    const s1 = slope[k + 1]!;
    return s1 === s0 ? mid[k + 1]! : mid[k]! + ((mid[k + 1]! - mid[k]!) * (-1 - s0)) / (s1 - s0);
  };
  let vIl: number | undefined;
  for (let k = 0; k + 1 < slope.length; k++) {
    if (slope[k]! > -1 && slope[k + 1]! <= -1) {
      vIl = at(k);
      break;
    }
  }
  let vIh: number | undefined;
  for (let k = slope.length - 2; k >= 0; k--) {
    if (slope[k]! <= -1 && slope[k + 1]! > -1) {
      vIh = at(k);
      break;
    }
  }
  if (vIl === undefined || vIh === undefined) return undefined;
  const vOh = ys[0]!;
  const vOl = ys[n - 1]!;
  const diff = ys.map((y, i) => y - xs[i]!);
  const sw = crossings(xs, diff, 0, "fall")[0];
  const result: TransferPoints = {
    vIlVolts: vIl,
    vIhVolts: vIh,
    vOutAtVIlVolts: sampleAt(xs, ys, vIl),
    vOutAtVIhVolts: sampleAt(xs, ys, vIh),
    vOhVolts: vOh,
    vOlVolts: vOl,
    noiseMarginLowVolts: vIl - vOl,
    noiseMarginHighVolts: vOh - vIh,
  };
  if (sw !== undefined) result.vSwitchVolts = sw;
  return result;
}
