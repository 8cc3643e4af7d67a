// Building blocks of the fast cell variants: a speed-up capacitor across the level-shift path
// into the base, and an anti-saturation clamp (a Schottky diode from base to collector: the Baker
// clamp idea, common practice). Each variant folder (nand-cap, nand-clamp, nand-fast, nor-*,
// nand-hifan-*) builds its CellDefinition from its base cell with `deriveFastCell`, so the DC
// design equations (input levels, thresholds, currents) stay the base cell's own; only what the
// two techniques change is added here.
//
// Speed-up capacitor C_SU (NAND: input node p to base b; NOR: each input to the base, since the
// diode-OR input diode blocks a falling input from reaching p):
// - no DC effect; on a falling input the node swings down by ΔV and C_SU pulls the charge
//   C_SU·ΔV out of the base at once (turn-off charge removal); on a rising input the charge that
//   recharges it is delivered into the base (turn-on overdrive). The timing model is in
//   src/electrical/timing.ts.
// - the driver must sink C_SU·ΔV when it pulls the input low (input loading), and the supply
//   delivers C_SU·ΔV·V_CC per cycle (dynamic power).
// - rating: it sees at most the supply; the part is rated at the next standard voltage at least
//   twice the highest supply (common practice), see src/emit/bom.ts.
// Schottky clamp D_SC (anode at the base, cathode at the collector):
// - once the collector falls to V_BE − V_F(Schottky) the diode takes the excess base current, so
//   the transistor stays just out of saturation: almost no stored charge, hence no storage time.
// - the low output level rises from V_CE(sat) to V_BE − V_F; its worst (highest) value uses the
//   active V_BE and the Schottky's least forward drop at each temperature. The low-state noise
//   margin of every load driven by a clamped cell is taken against that level.
// - the diode's junction capacitance sits from base to collector (more Miller charge).
// - ratings: reverse voltage up to the supply when the output is high and the base at ground
//   (more when a speed-up capacitor drives the base below ground), forward current up to the
//   whole base drive.
import { DEFAULT_DEVICES, DEFAULT_NPN_MODEL, DEFAULT_SCHOTTKY, schottkyAt, type SchottkyAtTemp } from "../../electrical/devices.js";
import type {
  CellDefinition,
  CellEnv,
  CellOperatingPoint,
  CellTopology,
  CellValues,
  ComponentStress,
  InputDrive,
  OutputLoad,
  TopologyComponent,
} from "../types.js";

/** Key of the speed-up capacitor's value (farads) in a cell's values. */
export const CAPACITOR_KEY = "csuFarads";
/** Key of the capacitor's tolerance (a fraction) in a cell's values: the sizing records it there
 *  so every analysis can take the capacitor at its low end (slowest) or high end (most load). */
export const CAPACITOR_TOLERANCE_KEY = "csuTolerance";
/** Capacitor used when a caller gives none (quick starts and examples). */
export const EXAMPLE_CAPACITOR_FARADS = 33e-12;

export interface FastSpec {
  id: string;
  variant: string;
  title: string;
  keyPrefix: string;
  capacitor: boolean;
  clamp: boolean;
}

/** The clamp diode's drops at an environment (the sizing puts them in CellEnv.schottky). */
export function schottkyOf(env: CellEnv): SchottkyAtTemp {
  return env.schottky ?? schottkyAt(DEFAULT_SCHOTTKY, env.dev.tempC);
}

const VT25 = (1.380649e-23 * 298.15) / 1.602176634e-19;

/** Low output level of a clamped cell whose transistor sinks `iCAmps` in all with base drive
 *  `iBAmps` and saturation margin `satMargin` (β_min·I_B/I_C): V_BE at that current by the NPN
 *  card (Gummel–Poon forward current with its knee, I_C·(1 + I_C/IKF) = IS·exp(V_BE/(NF·V_T)),
 *  plus R_B·I_B), less the Schottky's drop at the least current it takes, I_B·(1 − 1/margin);
 *  both at 25 °C, moved by their temperature coefficients (−2 mV/°C, −1.5 mV/°C). */
export function clampedLowVoltsAt(env: CellEnv, iCAmps: number, iBAmps: number, satMargin: number): number {
  const q = env.dev.models?.npn ?? DEFAULT_NPN_MODEL.params;
  const s = schottkyOf(env);
  const ikf = q.IKF ?? Infinity;
  const ic = Math.max(iCAmps, 1e-6);
  const vbe25 = (q.NF ?? 1) * VT25 * Math.log((ic * (1 + ic / ikf)) / (q.IS ?? 1e-16)) + (q.RB ?? 0) * Math.max(0, iBAmps);
  const vbe = vbe25 + DEFAULT_DEVICES.junctionTempCoVoltsPerC * (env.dev.tempC - 25);
  const iDiv = Math.max(1e-7, iBAmps * (1 - 1 / Math.max(satMargin, 1 + 1e-9)));
  const p = s.params;
  const vf25 = (p.N ?? 1) * VT25 * Math.log(iDiv / (p.IS ?? 1e-8) + 1) + (p.RS ?? 0) * iDiv;
  const vf = vf25 + s.tempCoVoltsPerC * (env.dev.tempC - 25);
  return Math.max(env.dev.vCESatVolts, vbe - vf);
}

/** Collector current the bound below assumes: the NPN card's knee IKF (gain falls off fast above
 *  it, so the sizing's cells stay below it), or 50 mA without one. */
export function clampBoundAmps(env: CellEnv): number {
  const ikf = (env.dev.models?.npn ?? DEFAULT_NPN_MODEL.params).IKF;
  return ikf !== undefined && ikf > 0 ? ikf : 50e-3;
}

/** Highest low level any clamped driver gives, for its loads' noise margins: the level at the
 *  bound current, with the base drive of the required saturation margin (1.2, the default) at
 *  β_min. */
export function clampedLowVolts(env: CellEnv): number {
  const hit = boundLowMemo.get(env);
  if (hit !== undefined) return hit;
  const ic = clampBoundAmps(env);
  const v = clampedLowVoltsAt(env, ic, (1.2 * ic) / env.dev.betaMin, 1.2);
  boundLowMemo.set(env, v);
  return v;
}

// The sizing asks for the bound level of the same few corner environments many times over.
const boundLowMemo = new WeakMap<CellEnv, number>();

/** Capacitor value of a set of values, nominal, and its tolerance. */
export function capacitorOf(values: CellValues): { farads: number; tolerance: number } {
  return { farads: values[CAPACITOR_KEY] ?? EXAMPLE_CAPACITOR_FARADS, tolerance: values[CAPACITOR_TOLERANCE_KEY] ?? 0 };
}

/** Voltage swing of the node a speed-up capacitor is driven from, between the cell's off and on
 *  states: NAND input node V_OL + V_D → 2·V_D + V_BE(sat) (or the follower's level); NOR input
 *  the driver's V_OL → the clamp level V_D + V_D + V_BE(sat). */
export function speedUpSwingVolts(base: CellDefinition, env: CellEnv, op: CellOperatingPoint, drive: InputDrive): number {
  const d = env.dev;
  if (base.inputKind === "and") return Math.max(0, op.vInputNodeVolts - (drive.vLowMaxVolts + d.vDiodeOnVolts));
  return Math.max(0, 2 * d.vDiodeOnVolts + d.vBESatVolts - drive.vLowMaxVolts);
}

export function deriveFastCell(base: CellDefinition, spec: FastSpec): CellDefinition {
  const perInput = base.inputKind === "or";
  const topology = (fanin: number): CellTopology => {
    const t = base.topology(fanin);
    const extra: TopologyComponent[] = [];
    if (spec.capacitor) {
      if (perInput) {
        for (let i = 1; i <= fanin; i++) extra.push({ name: `CSU${i}`, role: "CSU", kind: "C", nodes: [`in${i}`, "b"], inputPin: i, valueKey: CAPACITOR_KEY });
      } else extra.push({ name: "CSU", role: "CSU", kind: "C", nodes: ["p", "b"], valueKey: CAPACITOR_KEY });
    }
    if (spec.clamp) extra.push({ name: "DSC", role: "DSC", kind: "D", nodes: ["b", "out"], model: "schottky" });
    return { pins: t.pins, components: [...t.components, ...extra] };
  };

  const analyze = (values: CellValues, env: CellEnv, load: OutputLoad, drive: InputDrive): CellOperatingPoint => {
    // Every cell's analyze returns a fresh operating point: completed in place (the sizing calls
    // this in its innermost loop).
    const op = base.analyze(values, env, load, drive);
    const extra: Record<string, number> = op.extra;
    if (spec.clamp) {
      // Driven into the clamp (enough base drive): the output sits at V_BE − V_F. Without
      // enough drive the transistor is active and the base cell's level (higher) stands.
      const vClamp = clampedLowVoltsAt(env, op.iCAmps + op.iLoadAmps, op.iBAmps, op.satMargin);
      extra.clampLowVolts = vClamp;
      extra.clampBoundLowVolts = clampedLowVolts(env);
      extra.clampDivertedAmps = Math.max(0, op.iBAmps - (op.iCAmps + op.iLoadAmps) / env.dev.betaMin);
      op.vOLVolts = Math.max(op.vOLVolts, vClamp);
    }
    if (spec.capacitor) {
      const c = capacitorOf(values);
      const swing = speedUpSwingVolts(base, env, op, drive);
      extra.speedUpSwingVolts = swing;
      // Charge the capacitor moves each edge, at its high end, and the energy it costs the
      // supply per cycle.
      extra.speedUpChargeCoulombs = c.farads * (1 + c.tolerance) * swing;
      extra.speedUpEnergyJoules = extra.speedUpChargeCoulombs * env.vccVolts;
    }
    return op;
  };

  const stresses = (values: CellValues, env: CellEnv, load: OutputLoad, drive: InputDrive, fanin: number): ComponentStress[] => {
    const out = base.stresses(values, env, load, drive, fanin);
    if (spec.capacitor) {
      // At most the supply across it (the input node and the inputs stay within 0..V_CC).
      if (perInput) for (let i = 1; i <= fanin; i++) out.push({ name: `CSU${i}`, powerWatts: 0, voltageVolts: env.vccVolts });
      else out.push({ name: "CSU", powerWatts: 0, voltageVolts: env.vccVolts });
    }
    if (spec.clamp) {
      // Forward: the whole base drive at its largest (the clamp can take all of it); reverse: the
      // supply with the base at ground, plus the capacitor's kick below ground.
      const strong = base.analyze(values, env, load, { ...drive, orSourceAmps: Math.max(drive.orSourceAmps, drive.orSourceMaxAmps) });
      const i1 = Math.max(0, strong.i1Amps);
      const kick = spec.capacitor ? speedUpSwingVolts(base, env, strong, drive) : 0;
      const vF = schottkyOf(env).vForwardVolts;
      out.push({ name: "DSC", powerWatts: i1 * vF, currentAmps: i1, voltageVolts: env.vccVolts + kick });
    }
    return out;
  };

  const def: CellDefinition = {
    ...base,
    id: spec.id,
    variant: spec.variant,
    title: spec.title,
    keyPrefix: spec.keyPrefix,
    source: `${base.source}; ${[spec.capacitor ? "speed-up capacitor" : "", spec.clamp ? "Schottky anti-saturation clamp (Baker clamp, common practice)" : ""].filter(Boolean).join(" and ")}`,
    exampleValues: spec.capacitor ? { ...base.exampleValues, [CAPACITOR_KEY]: EXAMPLE_CAPACITOR_FARADS } : { ...base.exampleValues },
    speedUp: { clamp: spec.clamp, baseId: base.id, ...(spec.capacitor ? { capacitorKey: CAPACITOR_KEY } : {}) },
    topology,
    analyze,
    stresses,
  };
  return def;
}

/** Level of a diode-AND cell's input node with the output transistor on: 2·V_D + V_BE(sat), or
 *  V_D + V_BE(sat) + V_BE for the follower of the high-fan-out cells. */
export function inputNodeOnVolts(def: CellDefinition, env: CellEnv): number {
  const d = env.dev;
  return def.timingHints?.follower ? d.vDiodeOnVolts + d.vBESatVolts + d.vBEActiveVolts : 2 * d.vDiodeOnVolts + d.vBESatVolts;
}

/** Standard voltage ratings of ceramic capacitors (common practice). */
export const CAPACITOR_VOLTAGE_RATINGS = [6.3, 10, 16, 25, 50, 100, 200, 250, 500, 630, 1000];

/** The rating for a capacitor that sees at most `volts`: the next standard rating at least twice
 *  that (common practice: derate ceramic capacitors to half their rated voltage). */
export function capacitorVoltageRating(volts: number): number | undefined {
  return CAPACITOR_VOLTAGE_RATINGS.find((r) => r >= 2 * volts * (1 - 1e-9));
}
