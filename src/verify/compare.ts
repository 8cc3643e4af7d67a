// Comparing a simulated testbench run with the logic's expected values, step by step.
// Pure: vectors in, a verdict out.
import type { Tri } from "../logic/evaluate.js";
import { sampleAt } from "../simulate/waveform.js";

export interface SampleCheck {
  step: number;
  /** The output (or state signal) sampled. */
  output: string;
  kind: "output" | "state";
  timeSeconds: number;
  volts: number;
  expected: Tri;
  /** 0 or 1 when the level is a clean logic level, "?" between the thresholds. */
  read: 0 | 1 | "?";
  ok: boolean;
}

export interface RunComparison {
  pass: boolean;
  /** Samples compared (expected value 0 or 1). */
  compared: number;
  /** Samples skipped because the logic does not decide them (X). */
  skipped: number;
  failures: SampleCheck[];
  /** Worst margins seen: highest low output, lowest high output. */
  worstLowVolts: number;
  worstHighVolts: number;
}

export interface CompareInput {
  time: Float64Array;
  /** Output waveforms by SPICE node name, in output order. */
  outputs: { name: string; node: string; values: Float64Array; levels: { vilVolts: number; vihVolts: number } }[];
  expected: Tri[][];
  sampleTimes: number[];
  /** State signals (internal nets of designs with stored state) and their expected values. */
  states?: { name: string; node: string; values: Float64Array; levels: { vilVolts: number; vihVolts: number } }[];
  expectedStates?: Tri[][];
  /** Compare only these steps (e.g. the samples just before each clock edge). Default: all. */
  steps?: readonly number[];
}

export function compareRun(x: CompareInput): RunComparison {
  const failures: SampleCheck[] = [];
  let compared = 0;
  let skipped = 0;
  let worstLow = -Infinity;
  let worstHigh = Infinity;
  const groups = [
    { kind: "output" as const, signals: x.outputs, expected: x.expected },
    { kind: "state" as const, signals: x.states ?? [], expected: x.expectedStates ?? [] },
  ];
  const only = x.steps ? new Set(x.steps) : undefined;
  x.sampleTimes.forEach((t, step) => {
    if (only && !only.has(step)) return;
    for (const g of groups) {
      g.signals.forEach((o, k) => {
        const expected = g.expected[step]?.[k] ?? "X";
        const volts = sampleAt(x.time, o.values, t);
        const read: 0 | 1 | "?" = volts <= o.levels.vilVolts ? 0 : volts >= o.levels.vihVolts ? 1 : "?";
        if (expected === "X") {
          skipped++;
          return;
        }
        compared++;
        if (g.kind === "output") {
          if (expected === 0) worstLow = Math.max(worstLow, volts);
          else worstHigh = Math.min(worstHigh, volts);
        }
        if (read !== expected) failures.push({ step, output: o.name, kind: g.kind, timeSeconds: t, volts, expected, read, ok: false });
      });
    }
  });
  return { pass: failures.length === 0 && compared > 0, compared, skipped, failures, worstLowVolts: worstLow, worstHighVolts: worstHigh };
}
