// Basic DTL NAND-k (k = 1 is the inverter). Millman & Halkias, Integrated Electronics, ch. 6,
// Example 6-5.
//
//   in_i ──|◄── p        input diodes DIN_i, cathodes at the inputs
//   vcc ──R_P── p ──►|── m ──►|── b       two level-shift diodes DLS1, DLS2
//   b ──R_B── 0          base return
//   vcc ──R_C── out, Q1: collector out, base b, emitter 0
//
// All inputs high: p = 2·V_D + V_BE(sat); I_1 = (V_CC − p)/R_P; I_2 = V_BE(sat)/R_B;
// I_B = I_1 − I_2; I_C = (V_CC − V_CE(sat))/R_C; saturated while β·I_B ≥ I_C + N·I_load.
// One input low (at the driver's V_CE(sat)): p = V_OL + V_D, the transistor needs
// 2·V_γ(diode) + V_γ(BE) at p to conduct, so the input reads low up to 2·V_γ + V_γBE − V_D.
// Load on a driver: a low input sinks (V_CC − V_D − V_OL)/R_P into the driver; a high input
// draws only leakage.
import type {
  CellDefinition,
  CellEnv,
  CellOperatingPoint,
  CellTopology,
  CellValues,
  ComponentStress,
  InputDrive,
  OutputLoad,
} from "../types.js";
import { modelInputLowThreshold } from "../../electrical/thresholds.js";
import { outputHighVolts, orLoadsAmps, outputLowVolts, ownCollectorAmps } from "../output-stage.js";

function topology(fanin: number): CellTopology {
  const pins: string[] = [];
  for (let i = 1; i <= fanin; i++) pins.push(`in${i}`);
  pins.push("out", "vcc");
  const components: CellTopology["components"] = [];
  for (let i = 1; i <= fanin; i++) {
    components.push({ name: `DIN${i}`, role: "DIN", kind: "D", nodes: ["p", `in${i}`], inputPin: i, model: "diode" });
  }
  components.push(
    { name: "RP", role: "RP", kind: "R", nodes: ["vcc", "p"], valueKey: "rpOhms" },
    { name: "DLS1", role: "DLS", kind: "D", nodes: ["p", "m"], model: "diode" },
    { name: "DLS2", role: "DLS", kind: "D", nodes: ["m", "b"], model: "diode" },
    { name: "RB", role: "RB", kind: "R", nodes: ["b", "0"], valueKey: "rbOhms" },
    { name: "RC", role: "RC", kind: "R", nodes: ["vcc", "out"], valueKey: "rcOhms" },
    { name: "Q1", role: "Q", kind: "Q", nodes: ["out", "b", "0"], model: "npn" },
  );
  return { pins, components };
}

/** Input node level with the transistor saturated. */
export function nandInputNodeOnVolts(env: CellEnv): number {
  return 2 * env.dev.vDiodeOnVolts + env.dev.vBESatVolts;
}

/** Current one low input sinks into its driver: (V_CC − V_D − V_OL)/R_P. */
export function nandInputLowAmps(env: CellEnv, rpOhms: number): number {
  return Math.max(0, env.vccVolts - env.dev.vDiodeOnVolts - env.dev.vCESatVolts) / rpOhms;
}

function analyze(values: CellValues, env: CellEnv, load: OutputLoad, drive: InputDrive): CellOperatingPoint {
  const rp = values.rpOhms!;
  const rb = values.rbOhms!;
  const rc = values.rcOhms!;
  const d = env.dev;
  const vcc = env.vccVolts;
  const vP = nandInputNodeOnVolts(env);
  const i1 = Math.max(0, vcc - vP) / rp;
  const i2 = d.vBESatVolts / rb;
  const iB = i1 - i2;
  const iC = ownCollectorAmps(env, rc);
  const iLoad = load.andSinkAmps;
  const betaNeeded = iB > 0 ? (iC + iLoad) / iB : Infinity;
  const satMargin = iB > 0 ? (d.betaMin * iB) / (iC + iLoad) : 0;
  const vOL = outputLowVolts(env, rc, iB, iLoad, satMargin);
  const vOH = outputHighVolts(env, load);
  // V_IL from the model cards where the devices have them (src/electrical/thresholds.ts); the
  // book's cut-in sum otherwise.
  const vILBook = 2 * d.vDiodeCutInVolts + d.vBECutInVolts - d.vDiodeOnVolts;
  const vIL = modelInputLowThreshold(d, vcc, { chain: ["diode", "diode"], input: { kind: "and", pullUpOhms: rp }, rbOhms: rb, rcOhms: rc }) ?? vILBook;
  const vIH = vP - d.vDiodeCutInVolts;
  // One low input carries the whole R_P current into its driver, whose low level is at most V_OL.
  const inputLow = Math.max(0, vcc - d.vDiodeOnVolts - drive.vLowMaxVolts) / rp;
  const supplyLow = i1 + iC;
  const supplyHigh = inputLow + orLoadsAmps(env, rc, load);
  return {
    vccVolts: vcc,
    tempC: d.tempC,
    i1Amps: i1,
    i2Amps: i2,
    iBAmps: iB,
    iCAmps: iC,
    iLoadAmps: iLoad,
    betaNeeded,
    satMargin,
    vInputNodeVolts: vP,
    vOLVolts: vOL,
    vOHVolts: vOH,
    vILVolts: vIL,
    vIHVolts: vIH,
    noiseMarginLowVolts: vIL - drive.vLowMaxVolts,
    noiseMarginHighVolts: drive.vHighMinVolts - vIH,
    iTurnOffAmps: i2,
    inputLowAmps: nandInputLowAmps(env, rp),
    supplyCurrentLowAmps: supplyLow,
    supplyCurrentHighAmps: supplyHigh,
    powerLowWatts: vcc * supplyLow,
    powerHighWatts: vcc * supplyHigh,
    extra: { vILBookVolts: vILBook },
  };
}

function stresses(values: CellValues, env: CellEnv, load: OutputLoad, _drive: InputDrive, fanin: number): ComponentStress[] {
  const rp = values.rpOhms!;
  const rb = values.rbOhms!;
  const rc = values.rcOhms!;
  const d = env.dev;
  const vcc = env.vccVolts;
  const vPLow = d.vCESatVolts + d.vDiodeOnVolts;
  const iInLow = Math.max(0, vcc - vPLow) / rp;
  const i1 = Math.max(0, vcc - nandInputNodeOnVolts(env)) / rp;
  const iC = ownCollectorAmps(env, rc);
  const out: ComponentStress[] = [];
  for (let i = 1; i <= fanin; i++) {
    out.push({ name: `DIN${i}`, powerWatts: iInLow * d.vDiodeOnVolts, currentAmps: iInLow, voltageVolts: Math.max(0, vcc - vPLow) });
  }
  out.push(
    { name: "RP", powerWatts: (Math.max(0, vcc - vPLow) ** 2) / rp },
    { name: "DLS1", powerWatts: i1 * d.vDiodeOnVolts, currentAmps: i1, voltageVolts: 0 },
    { name: "DLS2", powerWatts: i1 * d.vDiodeOnVolts, currentAmps: i1, voltageVolts: 0 },
    { name: "RB", powerWatts: d.vBESatVolts ** 2 / rb },
    { name: "RC", powerWatts: (vcc - d.vCESatVolts) ** 2 / rc },
    {
      name: "Q1",
      powerWatts: d.vCESatVolts * (iC + load.andSinkAmps) + d.vBESatVolts * i1,
      currentAmps: iC + load.andSinkAmps,
      voltageVolts: vcc,
    },
  );
  return out;
}

export const nandCell: CellDefinition = {
  id: "nand",
  fn: "nand",
  variant: "basic",
  title: "DTL NAND (basic)",
  keyPrefix: "gw_nand",
  source: "Millman & Halkias, Integrated Electronics, ch. 6 (Example 6-5)",
  inputKind: "and",
  minFanin: 1,
  parameters: [
    { key: "rpOhms", role: "RP", label: "R_P (supply to input node)" },
    { key: "rbOhms", role: "RB", label: "R_B (base to ground)" },
    { key: "rcOhms", role: "RC", label: "R_C (collector)", shared: true },
  ],
  bisectKey: "rpOhms",
  bisectDirection: {
    saturation: "down",
    // V_IL rises with R_P: less current through the low input's diode.
    "noise-margin-low": "up",
    "delay-fall": "down",
    "input-current": "up",
    "power-ceiling": "up",
    "delay-rise": "up",
  },
  outerKeys: [],
  freeKey: "rbOhms",
  freeDirection: {
    saturation: "up",
    // V_IL (model cards) falls as R_B grows: less chain current at the threshold.
    "noise-margin-low": "down",
    "turn-off-current": "down",
    "delay-fall": "up",
    "delay-rise": "down",
  },
  timingHints: { nodePullUpKeys: ["rpOhms"], follower: false },
  exampleValues: { rpOhms: 5000, rbOhms: 5000, rcOhms: 2200 },
  topology,
  analyze,
  toleranceCases(t) {
    return [
      // Least base current, most collector current: the saturation worst case.
      { label: "R_P high, R_B low, R_C low", factors: { rpOhms: 1 + t, rbOhms: 1 - t, rcOhms: 1 - t } },
      // Most current everywhere: power, stress.
      { label: "all resistors low", factors: { rpOhms: 1 - t, rbOhms: 1 - t, rcOhms: 1 - t }, skipTiming: true },
      // Least turn-off current against the most collector current.
      { label: "R_P low, R_B high, R_C low", factors: { rpOhms: 1 - t, rbOhms: 1 + t, rcOhms: 1 - t } },
      // Slowest pull-up, most stored charge.
      { label: "R_P low, R_B high, R_C high", factors: { rpOhms: 1 - t, rbOhms: 1 + t, rcOhms: 1 + t } },
      // Least collector current, least input current.
      { label: "all resistors high", factors: { rpOhms: 1 + t, rbOhms: 1 + t, rcOhms: 1 + t } },
    ];
  },
  inputLowAmpsWorst(values, t, env) {
    return nandInputLowAmps(env, values.rpOhms! * (1 - t));
  },
  inputCapacitanceFarads(cjo) {
    return cjo;
  },
  stresses,
};
