// Waveform measurements on synthetic signals whose answers are known in closed form.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  crossings,
  levelsOver,
  propagationDelay,
  sampleAt,
  supplyCurrentPeaks,
  supplyPower,
  unityGainPoints,
} from "../../src/simulate/waveform.js";

function grid(t0: number, t1: number, n: number): Float64Array {
  return Float64Array.from({ length: n }, (_, i) => t0 + ((t1 - t0) * i) / (n - 1));
}

describe("sampleAt", () => {
  it("interpolates a straight line exactly and holds the end values outside", () => {
    const t = Float64Array.from([0, 1, 3]);
    const v = Float64Array.from([0, 2, 6]);
    expect(sampleAt(t, v, 0.5)).toBe(1);
    expect(sampleAt(t, v, 2)).toBe(4);
    expect(sampleAt(t, v, -1)).toBe(0);
    expect(sampleAt(t, v, 9)).toBe(6);
  });

  it("returns the samples themselves and stays between neighbours (property)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: 1e-3, max: 10, noNaN: true }), fc.double({ min: -5, max: 5, noNaN: true })), {
          minLength: 2,
          maxLength: 30,
        }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (steps, frac) => {
          const t: number[] = [0];
          for (const [dt] of steps.slice(1)) t.push(t[t.length - 1]! + dt);
          const v = steps.map(([, y]) => y);
          for (let i = 0; i < t.length; i++) expect(sampleAt(t, v, t[i]!)).toBeCloseTo(v[i]!, 9);
          const k = Math.floor(frac * (t.length - 1));
          const tq = t[k]! + frac * (t[Math.min(k + 1, t.length - 1)]! - t[k]!);
          const y = sampleAt(t, v, tq);
          const lo = Math.min(v[k]!, v[Math.min(k + 1, v.length - 1)]!);
          const hi = Math.max(v[k]!, v[Math.min(k + 1, v.length - 1)]!);
          expect(y).toBeGreaterThanOrEqual(lo - 1e-9);
          expect(y).toBeLessThanOrEqual(hi + 1e-9);
        },
      ),
    );
  });
});

describe("crossings", () => {
  it("finds the zero crossings of a sine at multiples of half a period", () => {
    // sin(2π f t), f = 1 MHz: zeros at k · 0.5 µs; rising at even k, falling at odd k.
    const t = grid(0.1e-6, 3.9e-6, 4001);
    const v = t.map((x) => Math.sin(2 * Math.PI * 1e6 * x));
    const rise = crossings(t, v, 0, "rise");
    const fall = crossings(t, v, 0, "fall");
    expect(rise.map((x) => x / 1e-6)).toEqual([expect.closeTo(1, 5), expect.closeTo(2, 5), expect.closeTo(3, 5)]);
    expect(fall.map((x) => x / 1e-6)).toEqual([
      expect.closeTo(0.5, 5),
      expect.closeTo(1.5, 5),
      expect.closeTo(2.5, 5),
      expect.closeTo(3.5, 5),
    ]);
    expect(crossings(t, v, 0)).toHaveLength(7);
  });

  it("finds where an RC charge curve passes 50 %: t = τ·ln 2", () => {
    const tau = 2e-9;
    const t = grid(0, 10e-9, 2001);
    const v = t.map((x) => 1 - Math.exp(-x / tau));
    expect(crossings(t, v, 0.5, "rise")[0]! / tau).toBeCloseTo(Math.LN2, 5);
    expect(crossings(t, v, 0.5, "fall")).toEqual([]);
  });
});

describe("propagationDelay", () => {
  // An ideal inverter delayed by 3 ns on the falling output and 5 ns on the rising output,
  // with linear 1 ns edges: the 50 % points are exactly those delays apart.
  const t = grid(0, 100e-9, 10001);
  const ramp = (x: number, at: number, up: boolean) => {
    const f = Math.min(1, Math.max(0, (x - at) / 1e-9));
    return up ? 5 * f : 5 * (1 - f);
  };
  const vin = t.map((x) => (x < 50e-9 ? ramp(x, 20e-9, true) : ramp(x, 60e-9, false)));
  const vout = t.map((x) => (x < 55e-9 ? ramp(x, 23e-9, false) : ramp(x, 65e-9, true)));

  it("gives t_PHL and t_PLH at the 50 % points", () => {
    const phl = propagationDelay(t, vin, vout, 2.5, 2.5, "fall");
    const plh = propagationDelay(t, vin, vout, 2.5, 2.5, "rise");
    expect(phl).toHaveLength(1);
    expect(plh).toHaveLength(1);
    expect(phl[0]!.delaySeconds / 1e-9).toBeCloseTo(3, 6);
    expect(phl[0]!.inputSeconds / 1e-9).toBeCloseTo(20.5, 6);
    expect(plh[0]!.delaySeconds / 1e-9).toBeCloseTo(5, 6);
  });

  it("respects the input edge and the longest delay asked for", () => {
    expect(propagationDelay(t, vin, vout, 2.5, 2.5, "fall", { inputEdge: "fall" })).toEqual([]);
    expect(propagationDelay(t, vin, vout, 2.5, 2.5, "rise", { maxDelaySeconds: 4e-9 })).toEqual([]);
  });
});

describe("levelsOver", () => {
  it("gives min, max and the time average of a ramp and of a sine", () => {
    const t = grid(0, 1, 101);
    const ramp = t.map((x) => 2 * x);
    const r = levelsOver(t, ramp, 0.25, 0.75);
    expect(r.min).toBeCloseTo(0.5, 12);
    expect(r.max).toBeCloseTo(1.5, 12);
    expect(r.mean).toBeCloseTo(1, 12);
    // Mean of sin² over whole periods is 1/2.
    const s = grid(0, 2e-6, 20001);
    const sq = s.map((x) => Math.sin(2 * Math.PI * 1e6 * x) ** 2);
    expect(levelsOver(s, sq, 0, 2e-6).mean).toBeCloseTo(0.5, 6);
  });
});

describe("supply power and current peaks", () => {
  it("gives P = V·I for a steady draw and the mean of a periodic one", () => {
    const t = grid(0, 1e-6, 1001);
    // ngspice's branch current of a supply delivering 10 mA reads −10 mA.
    const steady = supplyPower(t, 5, t.map(() => -10e-3));
    expect(steady.averageWatts).toBeCloseTo(0.05, 12);
    expect(steady.averageAmps).toBeCloseTo(10e-3, 12);
    expect(steady.energyJoules).toBeCloseTo(0.05e-6, 15);
    // i = −(10 mA + 4 mA·sin ωt) over whole periods: the sine averages out, the peak is 14 mA.
    const wavy = supplyPower(t, 5, t.map((x) => -(10e-3 + 4e-3 * Math.sin(2 * Math.PI * 4e6 * x))));
    expect(wavy.averageWatts).toBeCloseTo(0.05, 6);
    // Peaks fall between samples (250 a period), hence 5 digits.
    expect(wavy.peakAmps).toBeCloseTo(14e-3, 5);
    expect(wavy.peakWatts).toBeCloseTo(0.07, 5);
  });

  it("finds switching spikes on a stepped supply current, and not the steps", () => {
    // Baseline 2 mA, stepping to 6 mA at 50 ns (a gate turning on); Gaussian spikes of 20 mA and
    // 10 mA at 20 ns and 50 ns, σ = 0.5 ns (so width at half height = 2·√(2 ln 2)·σ ≈ 1.177 ns).
    const t = grid(0, 100e-9, 20001);
    const sigma = 0.5e-9;
    const gauss = (x: number, at: number) => Math.exp(-((x - at) ** 2) / (2 * sigma * sigma));
    const delivered = t.map((x) => (x < 50e-9 ? 2e-3 : 6e-3) + 20e-3 * gauss(x, 20e-9) + 10e-3 * gauss(x, 50e-9));
    const branch = delivered.map((d) => -d);
    const peaks = supplyCurrentPeaks(t, branch, { minProminenceAmps: 1e-3, maxWidthSeconds: 5e-9 });
    expect(peaks).toHaveLength(2);
    expect(peaks[0]!.timeSeconds / 1e-9).toBeCloseTo(20, 3);
    expect(peaks[0]!.amps).toBeCloseTo(22e-3, 6);
    expect(peaks[0]!.prominenceAmps).toBeCloseTo(20e-3, 6);
    expect(peaks[0]!.widthSeconds / sigma).toBeCloseTo(2 * Math.sqrt(2 * Math.LN2), 2);
    expect(peaks[1]!.timeSeconds / 1e-9).toBeCloseTo(50, 3);
    // The step itself is no spike.
    expect(supplyCurrentPeaks(t, t.map((x) => (x < 50e-9 ? -2e-3 : -6e-3)))).toEqual([]);
  });
});

describe("unityGainPoints", () => {
  it("finds V_IL and V_IH of a tanh transfer curve where dV_out/dV_in = −1 in closed form", () => {
    // V_out = (V_DD/2)·(1 − tanh(k(V_in − V_M))): slope −(V_DD/2)·k·sech²(x), x = k(V_in − V_M).
    // Slope −1 at cosh x = √(V_DD·k/2), i.e. V_in = V_M ∓ acosh(√(V_DD·k/2))/k.
    const vdd = 5;
    const k = 4;
    const vm = 2;
    const vin = grid(0, 5, 5001);
    const vout = vin.map((x) => (vdd / 2) * (1 - Math.tanh(k * (x - vm))));
    const p = unityGainPoints(vin, vout)!;
    const dx = Math.acosh(Math.sqrt((vdd * k) / 2)) / k;
    expect(p.vIlVolts).toBeCloseTo(vm - dx, 5);
    expect(p.vIhVolts).toBeCloseTo(vm + dx, 5);
    expect(p.vOhVolts).toBeCloseTo(vdd * (1 - Math.tanh(-k * vm)) / 2, 9);
    expect(p.vOlVolts).toBeCloseTo((vdd / 2) * (1 - Math.tanh(k * (5 - vm))), 9);
    expect(p.noiseMarginLowVolts).toBeCloseTo(p.vIlVolts - p.vOlVolts, 12);
    expect(p.noiseMarginHighVolts).toBeCloseTo(p.vOhVolts - p.vIhVolts, 12);
    // V_out = V_in somewhere between V_IL and V_IH.
    expect(p.vSwitchVolts!).toBeGreaterThan(p.vIlVolts);
    expect(p.vSwitchVolts!).toBeLessThan(p.vIhVolts);
    // The same curve swept downwards gives the same points.
    const down = unityGainPoints(Float64Array.from(vin).reverse(), Float64Array.from(vout).reverse())!;
    expect(down.vIlVolts).toBeCloseTo(p.vIlVolts, 9);
  });

  it("is undefined for a curve that never reaches a gain of −1", () => {
    const vin = grid(0, 5, 501);
    expect(unityGainPoints(vin, vin.map((x) => 5 - 0.5 * x))).toBeUndefined();
  });
});
