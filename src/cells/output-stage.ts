// The output stage every DTL cell shares: an NPN with emitter to ground and R_C from the supply
// to the collector. Low: the transistor saturates (V_CE(sat)) and sinks R_C's current plus the
// diode-AND loads' currents. High: the transistor is off and R_C pulls the output up; diode-OR
// loads clamp it at their input level and take R_C's current between them.
import type { CellEnv, OutputLoad } from "./types.js";

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
