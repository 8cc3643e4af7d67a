// The output stage every DTL cell shares: an NPN with emitter to ground and R_C from the supply
// to the collector. Low: the transistor saturates (V_CE(sat)) and sinks R_C's current plus the
// diode-AND loads' currents. High: the transistor is off and R_C pulls the output up; diode-OR
// loads clamp it at their input level and take R_C's current between them.
import type { CellEnv, CellOperatingPoint, CellTopology, OutputLoad } from "./types.js";

/** The cell's own collector current through R_C when saturated. */
export function ownCollectorAmps(env: CellEnv, rcOhms: number): number {
  return (env.vccVolts - env.dev.vCESatVolts) / rcOhms;
}

/** Output high level: the supply, or the diode-OR loads' clamp level when there are any. */
export function outputHighVolts(env: CellEnv, load: OutputLoad): number {
  return load.orLoads > 0 ? Math.min(env.vccVolts, load.orClampVolts) : env.vccVolts;
}

/** Current R_C delivers into diode-OR loads when the output is high. */
export function orLoadsAmps(env: CellEnv, rcOhms: number, load: OutputLoad): number {
  if (load.orLoads <= 0) return 0;
  return Math.max(0, env.vccVolts - load.orClampVolts) / rcOhms;
}

/** Share factor for n parallel diode-OR loads: a single load gets it all. */
export function shareFactor(env: CellEnv, n: number): number {
  return n <= 1 ? 1 : env.orShareFactor;
}

/** Least current the weakest of `n` diode-OR loads gets from a high output with collector
 *  resistor `rcOhms` (already at its high tolerance end). */
export function orDrivePerLoadAmps(env: CellEnv, rcOhms: number, n: number, clampVolts: number): number {
  const count = Math.max(1, n);
  return (shareFactor(env, count) * Math.max(0, env.vccVolts - clampVolts)) / (rcOhms * count);
}

/** Output low level. Saturated: V_CE(sat). Otherwise the transistor is active and the collector
 *  current is β·I_B: the output rises to what R_C leaves after that current. */
export function outputLowVolts(env: CellEnv, rcOhms: number, iBAmps: number, iLoadAmps: number, satMargin: number): number {
  if (satMargin >= 1) return env.dev.vCESatVolts;
  const iCollector = Math.max(0, env.dev.betaMin * iBAmps);
  // Current R_C must carry = collector current − load current; the output is what is left of the supply.
  const v = env.vccVolts - (iCollector - iLoadAmps) * rcOhms;
  return Math.min(env.vccVolts, Math.max(env.dev.vCESatVolts, v));
}

/** How many diode-AND loads of `perLoadAmps` each a saturated output can sink while keeping
 *  β_min·I_B ≥ margin·(I_C + N·I_load): N = ⌊(β·I_B/margin − I_C)/I_load⌋. */
export function fanoutCapacity(betaMin: number, iBAmps: number, iCAmps: number, perLoadAmps: number, margin = 1): number {
  if (!(perLoadAmps > 0) || !(iBAmps > 0)) return 0;
  return Math.max(0, Math.floor(((betaMin * iBAmps) / margin - iCAmps) / perLoadAmps + 1e-9));
}

// ---------------------------------------------------------------------------------------------
// Wired-AND: several open-collector outputs tied onto one net with one R_C (held by the net's
// driver cell; the tied cells have none). Common practice for DTL ("collector dotting"); the
// worst cases, derived from the single-output analysis of Millman & Halkias ch. 6 (Example 6-5):
//   - output low: the fewest transistors on is ONE, and it alone sinks the whole R_C current
//     plus every diode-AND load's current, so each tied transistor keeps the saturation check
//     β_min·I_B ≥ I_C + I_load of a single output (no sharing of the current is assumed);
//   - output high: every transistor on the net is off, and their collector leakage plus the
//     loads' high-state current come through R_C: V_OH = V_CC − (N·I_leak + I_loads,high)·R_C;
//   - each tied collector adds its junction capacitance to the net (src/electrical/timing.ts).

/** A cell's topology without its collector resistor: the open-collector form a tied cell takes.
 *  Every DTL cell's output stage has exactly one component of role "RC". */
export function openCollectorTopology(t: CellTopology): CellTopology {
  return { pins: t.pins, components: t.components.filter((c) => c.role !== "RC") };
}

/** How one cell's output stage sits on a wired net. */
export interface WiredOutput {
  /** False for a tied cell (no R_C of its own), true for the net's driver. */
  ownsPullUp: boolean;
  /** Transistors on the net in all (driver and tied), ≥ 2 on a wired net. */
  collectors: number;
  /** Current R_C carries when the net is high besides the diode-OR loads: the collectors'
   *  leakage and the diode-AND loads' reverse leakage, at this corner. */
  highLeakageAmps: number;
}

/** High level of a wired net through R_C (`rcOhms` at its high end): V_CC − I_leak·R_C, no
 *  higher than a diode-OR clamp. */
export function wiredHighVolts(env: CellEnv, load: OutputLoad, rcOhms: number, leakageAmps: number): number {
  return Math.min(outputHighVolts(env, load), env.vccVolts - leakageAmps * rcOhms);
}

/** A cell's operating point corrected for a wired net. The cell's own equations see R_C as its
 *  pull-up either way; what changes is whose parts carry R_C's current:
 *  - a tied cell has no R_C: its low state draws no collector-resistor current from the supply
 *    (its transistor still sinks it, so the saturation figures stand);
 *  - the driver's R_C carries I_C whenever ANY transistor on the net is on, also while its own
 *    is off: its "high" state (own transistor off) is then input current plus I_C, the worse of
 *    that and the diode-OR loads' current;
 *  - the high level droops by the leakage through R_C. */
export function onWiredNet(op: CellOperatingPoint, env: CellEnv, load: OutputLoad, rcOhms: number, w: WiredOutput): CellOperatingPoint {
  const vcc = env.vccVolts;
  const own = ownCollectorAmps(env, rcOhms);
  const orAmps = orLoadsAmps(env, rcOhms, load);
  let low = op.supplyCurrentLowAmps;
  let high = op.supplyCurrentHighAmps;
  if (!w.ownsPullUp) {
    low = Math.max(0, low - own);
    high = Math.max(0, high - orAmps);
  } else if (w.collectors > 1) {
    high = high - orAmps + Math.max(orAmps, own);
  }
  const vOH = w.collectors > 1 ? wiredHighVolts(env, load, rcOhms, w.highLeakageAmps) : op.vOHVolts;
  return {
    ...op,
    vOHVolts: Math.min(op.vOHVolts, vOH),
    supplyCurrentLowAmps: low,
    supplyCurrentHighAmps: high,
    powerLowWatts: vcc * low,
    powerHighWatts: vcc * high,
    extra: { ...op.extra, wiredCollectors: w.collectors, wiredLeakageAmps: w.highLeakageAmps },
  };
}
