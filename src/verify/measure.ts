// Measurements on the waveforms of one verification run: the levels each signal settles at,
// the noise margins they leave against the thresholds of the cells they drive, propagation
// delays at the 50 % points, and the supply current: average power and the spikes at each
// switching step. Pure functions over vectors.
import type { Tri } from "../logic/evaluate.js";
import { crossings, levelsOver, sampleAt, supplyPower } from "../simulate/waveform.js";

export interface SignalLevels {
  /** Highest level sampled where the logic expects 0, and the median of those samples. */
  lowMaxVolts: number;
  lowTypVolts: number;
  /** Lowest level sampled where the logic expects 1, and the median. */
  highMinVolts: number;
  highTypVolts: number;
  lowSamples: number;
  highSamples: number;
  /** V_IL − highest low level; lowest high level − V_IH (NaN without samples of that value). */
  noiseMarginLowVolts: number;
  noiseMarginHighVolts: number;
}

function median(xs: number[]): number {
  if (xs.length === 0) return Number.NaN;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/** Levels and noise margins of one signal over the samples whose expected value is 0 or 1. */
export function measureLevels(
  time: ArrayLike<number>,
  values: ArrayLike<number>,
  expected: readonly Tri[],
  sampleTimes: readonly number[],
  thresholds: { vilVolts: number; vihVolts: number },
): SignalLevels {
  const lows: number[] = [];
  const highs: number[] = [];
  sampleTimes.forEach((t, i) => {
    const e = expected[i];
    if (e === 0) lows.push(sampleAt(time, values, t));
    else if (e === 1) highs.push(sampleAt(time, values, t));
  });
  const lowMax = lows.length ? Math.max(...lows) : Number.NaN;
  const highMin = highs.length ? Math.min(...highs) : Number.NaN;
  return {
    lowMaxVolts: lowMax,
    lowTypVolts: median(lows),
    highMinVolts: highMin,
    highTypVolts: median(highs),
    lowSamples: lows.length,
    highSamples: highs.length,
    noiseMarginLowVolts: thresholds.vilVolts - lowMax,
    noiseMarginHighVolts: highMin - thresholds.vihVolts,
  };
}

export interface EdgeDelay {
  output: string;
  /** "fall": t_PHL (output going low); "rise": t_PLH. */
  edge: "fall" | "rise";
  delaySeconds: number;
  /** The input whose edge came first at this step (the cause, with one input changing a step). */
  fromInput: string;
  step: number;
  inputSeconds: number;
  outputSeconds: number;
}

export interface DelayInput {
  time: ArrayLike<number>;
  vectors: readonly (0 | 1)[][];
  stepSeconds: number;
  sampleTimes: readonly number[];
  inputs: { name: string; values: ArrayLike<number>; level50Volts: number }[];
  outputs: { name: string; values: ArrayLike<number>; level50Volts: number; expected: readonly Tri[] }[];
}

/**
 * Propagation delays: at every step where the logic moves an output from 0 to 1 or back, the
 * time from the first 50 % crossing of an input that changed at the step's start to the last
 * 50 % crossing of the output in its new direction before the sample (the time after which it
 * stays; a hazard's glitch does not shorten it).
 */
export function measureDelays(x: DelayInput): EdgeDelay[] {
  const out: EdgeDelay[] = [];
  // Crossings once per waveform; each step looks up its window.
  const inCross = x.inputs.map((inp) => crossings(x.time, inp.values, inp.level50Volts));
  const outCross = x.outputs.map((o) => ({ fall: crossings(x.time, o.values, o.level50Volts, "fall"), rise: crossings(x.time, o.values, o.level50Volts, "rise") }));
  const firstAtOrAfter = (ts: number[], t: number) => {
    let lo = 0;
    let hi = ts.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (ts[mid]! < t) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  for (let i = 1; i < x.vectors.length; i++) {
    const t0 = i * x.stepSeconds;
    const tSample = x.sampleTimes[i]!;
    let tIn = Infinity;
    let from = "";
    x.inputs.forEach((inp, k) => {
      if (x.vectors[i]![k] === x.vectors[i - 1]![k]) return;
      const cs = inCross[k]!;
      const j = firstAtOrAfter(cs, t0);
      const c = cs[j];
      if (c !== undefined && c <= tSample && c < tIn) {
        tIn = c;
        from = inp.name;
      }
    });
    if (!Number.isFinite(tIn)) continue;
    x.outputs.forEach((o, k) => {
      const a = o.expected[i - 1];
      const b = o.expected[i];
      if (a === "X" || b === "X" || a === undefined || b === undefined || a === b) return;
      const edge = b === 0 ? "fall" : "rise";
      const cs = outCross[k]![edge];
      // The last crossing in the new direction before the sample.
      const j = firstAtOrAfter(cs, tSample + Number.EPSILON * tSample) - 1;
      const tOut = cs[j];
      if (tOut === undefined || tOut < t0) return;
      out.push({ output: o.name, edge, delaySeconds: Math.max(0, tOut - tIn), fromInput: from, step: i, inputSeconds: tIn, outputSeconds: tOut });
    });
  }
  return out;
}

export interface DelaySummary {
  tPHLMaxSeconds?: number;
  tPLHMaxSeconds?: number;
  tPHLMeanSeconds?: number;
  tPLHMeanSeconds?: number;
  edges: number;
}

export function summarizeDelays(delays: readonly EdgeDelay[], output: string): DelaySummary {
  const mine = delays.filter((d) => d.output === output);
  const of = (e: "fall" | "rise") => mine.filter((d) => d.edge === e).map((d) => d.delaySeconds);
  const s: DelaySummary = { edges: mine.length };
  const f = of("fall");
  const r = of("rise");
  if (f.length) {
    s.tPHLMaxSeconds = Math.max(...f);
    s.tPHLMeanSeconds = f.reduce((a, b) => a + b, 0) / f.length;
  }
  if (r.length) {
    s.tPLHMaxSeconds = Math.max(...r);
    s.tPLHMeanSeconds = r.reduce((a, b) => a + b, 0) / r.length;
  }
  return s;
}

export interface StepSpike {
  step: number;
  /** When the delivered current peaked. */
  timeSeconds: number;
  /** Peak current above the larger of the settled currents before and after the step. */
  excessAmps: number;
  /** Charge of that excess over the step: what a bypass capacitor must supply locally. */
  chargeCoulombs: number;
  /** Settled supply current before and after the step. */
  beforeAmps: number;
  afterAmps: number;
}

export interface SupplyMeasures {
  averageWatts: number;
  averageAmps: number;
  peakAmps: number;
  /** Lowest and highest settled (sampled) supply current. */
  staticMinAmps: number;
  staticMaxAmps: number;
  /** One entry per step after the first, in step order. */
  spikes: StepSpike[];
}

/**
 * The circuit's supply from its branch current (ngspice sign: negative while the source
 * delivers): average power and current over the run after the first step (which includes
 * power-up), peak current, settled levels at the sample points, and at each later step the
 * switching spike: the current above max(settled before, settled after), its peak and charge.
 */
export function measureSupply(time: ArrayLike<number>, iBranchAmps: ArrayLike<number>, supplyVolts: number, stepSeconds: number, sampleTimes: readonly number[]): SupplyMeasures {
  const n = Math.min(time.length, iBranchAmps.length);
  const delivered = new Float64Array(n);
  for (let i = 0; i < n; i++) delivered[i] = -iBranchAmps[i]!;
  const tEnd = n ? time[n - 1]! : 0;
  const tStart = sampleTimes.length > 1 ? Math.min(stepSeconds, tEnd) : time[0] ?? 0;
  const p = supplyPower(time, supplyVolts, iBranchAmps, tStart, tEnd);
  const settled = sampleTimes.map((t) => sampleAt(time, delivered, t));
  const spikes: StepSpike[] = [];
  let i = 0;
  for (let s = 1; s < sampleTimes.length; s++) {
    const t0 = s * stepSeconds;
    const t1 = sampleTimes[s]!;
    const before = settled[s - 1]!;
    const after = settled[s]!;
    const base = Math.max(before, after);
    let peak = 0;
    let tPeak = t0;
    let charge = 0;
    let prevT = t0;
    let prevX = Math.max(0, sampleAt(time, delivered, t0) - base);
    while (i < n && time[i]! <= t0) i++;
    for (; i < n && time[i]! <= t1; i++) {
      const t = time[i]!;
      const x = Math.max(0, delivered[i]! - base);
      charge += ((t - prevT) * (x + prevX)) / 2;
      if (x > peak) {
        peak = x;
        tPeak = t;
      }
      prevT = t;
      prevX = x;
    }
    spikes.push({ step: s, timeSeconds: tPeak, excessAmps: peak, chargeCoulombs: charge, beforeAmps: before, afterAmps: after });
  }
  const all = levelsOver(time, delivered, time[0] ?? 0, tEnd);
  return {
    averageWatts: p.averageWatts,
    averageAmps: p.averageAmps,
    peakAmps: all.max,
    staticMinAmps: settled.length ? Math.min(...settled) : Number.NaN,
    staticMaxAmps: settled.length ? Math.max(...settled) : Number.NaN,
    spikes,
  };
}
