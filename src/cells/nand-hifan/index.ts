// High-fan-out DTL NAND-k: a transistor stage replaces the first level-shift diode.
// Millman & Halkias, Integrated Electronics, ch. 6, Example 6-6.
//
//   in_i ──|◄── p            input diodes DIN_i, cathodes at the inputs
//   vcc ──R_X── x ──R_P── p  pull-up in two parts; x is the collector of QLS
//   QLS: collector x, base p, emitter e     (emitter follower: current gain for the base drive)
//   e ──►|── b               remaining level-shift diode DLS1
//   b ──R_B── 0; vcc ──R_C── out; Q1: collector out, base b, emitter 0
//
// All inputs high: e = V_D + V_BE(sat), p = e + V_BE(active);
// I_B1 = (V_CC − p)/((β+1)·R_X + R_P); the follower's emitter current I_1 = (β+1)·I_B1 all
// comes through R_X; I_B2 = I_1 − V_BE(sat)/R_B is the output transistor's base current.
// QLS cannot saturate: its base is fed from its own collector through R_P, so V_CE > V_BE.
// One input low: p = V_OL + V_D, QLS is off and the input sinks (V_CC − V_D − V_OL)/(R_X + R_P).
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
    { name: "RX", role: "RX", kind: "R", nodes: ["vcc", "x"], valueKey: "rxOhms" },
    { name: "RP", role: "RP", kind: "R", nodes: ["x", "p"], valueKey: "rpOhms" },
    { name: "QLS", role: "QLS", kind: "Q", nodes: ["x", "p", "e"], model: "npn" },
    { name: "DLS1", role: "DLS", kind: "D", nodes: ["e", "b"], model: "diode" },
    { name: "RB", role: "RB", kind: "R", nodes: ["b", "0"], valueKey: "rbOhms" },
    { name: "RC", role: "RC", kind: "R", nodes: ["vcc", "out"], valueKey: "rcOhms" },
    { name: "Q1", role: "Q", kind: "Q", nodes: ["out", "b", "0"], model: "npn" },
  );
  return { pins, components };
}

interface FollowerPoint {
  vEVolts: number;
  vPVolts: number;
  iB1Amps: number;
  iEAmps: number;
  vXVolts: number;
}

/** The emitter follower with all inputs high, at gain `beta`. */
export function hifanFollower(env: CellEnv, rxOhms: number, rpOhms: number, beta: number): FollowerPoint {
  const d = env.dev;
  const vE = d.vDiodeOnVolts + d.vBESatVolts;
  const vP = vE + d.vBEActiveVolts;
  const iB1 = Math.max(0, env.vccVolts - vP) / ((beta + 1) * rxOhms + rpOhms);
  const iE = (beta + 1) * iB1;
  return { vEVolts: vE, vPVolts: vP, iB1Amps: iB1, iEAmps: iE, vXVolts: env.vccVolts - rxOhms * iE };
}

/** Current one low input sinks into its driver: (V_CC − V_D − V_OL)/(R_X + R_P). */
export function hifanInputLowAmps(env: CellEnv, rxOhms: number, rpOhms: number): number {
  return Math.max(0, env.vccVolts - env.dev.vDiodeOnVolts - env.dev.vCESatVolts) / (rxOhms + rpOhms);
}

function analyze(values: CellValues, env: CellEnv, load: OutputLoad, drive: InputDrive): CellOperatingPoint {
  const rx = values.rxOhms!;
  const rp = values.rpOhms!;
  const rb = values.rbOhms!;
  const rc = values.rcOhms!;
  const d = env.dev;
  const vcc = env.vccVolts;
  const weak = hifanFollower(env, rx, rp, d.betaMin);
  const strong = hifanFollower(env, rx, rp, d.betaMax);
  const i2 = d.vBESatVolts / rb;
  const iB = weak.iEAmps - i2;
  const iC = ownCollectorAmps(env, rc);
  const iLoad = load.andSinkAmps;
  const betaNeeded = iB > 0 ? (iC + iLoad) / iB : Infinity;
  const satMargin = iB > 0 ? (d.betaMin * iB) / (iC + iLoad) : 0;
  const vOL = outputLowVolts(env, rc, iB, iLoad, satMargin);
  const vOH = outputHighVolts(env, load);
  // V_IL from the model cards where the devices have them (src/electrical/thresholds.ts): the
  // follower's base-emitter junction and one diode in the chain, the input pulled up through
  // R_X + R_P with the follower's collector current also in R_X; the book's cut-in sum otherwise.
  const vILBook = d.vBECutInVolts + d.vDiodeCutInVolts + d.vBECutInVolts - d.vDiodeOnVolts;
  const vIL =
    modelInputLowThreshold(d, vcc, { chain: ["follower", "diode"], input: { kind: "and", pullUpOhms: rx + rp, collectorSharedOhms: rx }, rbOhms: rb, rcOhms: rc }) ?? vILBook;
  const vIH = weak.vPVolts - d.vDiodeCutInVolts;
  const inputLow = Math.max(0, vcc - d.vDiodeOnVolts - drive.vLowMaxVolts) / (rx + rp);
  const supplyLow = strong.iEAmps + iC;
  const supplyHigh = inputLow + orLoadsAmps(env, rc, load);
  return {
    vccVolts: vcc,
    tempC: d.tempC,
    i1Amps: weak.iEAmps,
    i2Amps: i2,
    iBAmps: iB,
    iCAmps: iC,
    iLoadAmps: iLoad,
    betaNeeded,
    satMargin,
    vInputNodeVolts: weak.vPVolts,
    vOLVolts: vOL,
    vOHVolts: vOH,
    vILVolts: vIL,
    vIHVolts: vIH,
    noiseMarginLowVolts: vIL - drive.vLowMaxVolts,
    noiseMarginHighVolts: drive.vHighMinVolts - vIH,
    iTurnOffAmps: i2,
    inputLowAmps: hifanInputLowAmps(env, rx, rp),
    supplyCurrentLowAmps: supplyLow,
    supplyCurrentHighAmps: supplyHigh,
    powerLowWatts: vcc * supplyLow,
    powerHighWatts: vcc * supplyHigh,
    extra: {
      iB1Amps: weak.iB1Amps,
      followerEmitterAmps: weak.iEAmps,
      followerEmitterMaxAmps: strong.iEAmps,
      followerCollectorVolts: strong.vXVolts,
      vILBookVolts: vILBook,
    },
  };
}

function stresses(values: CellValues, env: CellEnv, load: OutputLoad, _drive: InputDrive, fanin: number): ComponentStress[] {
  const rx = values.rxOhms!;
  const rp = values.rpOhms!;
  const rb = values.rbOhms!;
  const rc = values.rcOhms!;
  const d = env.dev;
  const vcc = env.vccVolts;
  const vPLow = d.vCESatVolts + d.vDiodeOnVolts;
  const iInLow = Math.max(0, vcc - vPLow) / (rx + rp);
  const strong = hifanFollower(env, rx, rp, d.betaMax);
  const iC = ownCollectorAmps(env, rc);
  const out: ComponentStress[] = [];
  for (let i = 1; i <= fanin; i++) {
    out.push({ name: `DIN${i}`, powerWatts: iInLow * d.vDiodeOnVolts, currentAmps: iInLow, voltageVolts: Math.max(0, vcc - vPLow) });
  }
  out.push(
    { name: "RX", powerWatts: Math.max(iInLow, strong.iEAmps) ** 2 * rx },
    { name: "RP", powerWatts: Math.max(iInLow, strong.iB1Amps) ** 2 * rp },
    {
      name: "QLS",
      powerWatts: Math.max(0, strong.vXVolts - strong.vEVolts) * strong.iEAmps,
      currentAmps: strong.iEAmps,
      voltageVolts: vcc,
    },
    { name: "DLS1", powerWatts: strong.iEAmps * d.vDiodeOnVolts, currentAmps: strong.iEAmps, voltageVolts: 0 },
    { name: "RB", powerWatts: d.vBESatVolts ** 2 / rb },
    { name: "RC", powerWatts: (vcc - d.vCESatVolts) ** 2 / rc },
    {
      name: "Q1",
      powerWatts: d.vCESatVolts * (iC + load.andSinkAmps) + d.vBESatVolts * strong.iEAmps,
      currentAmps: iC + load.andSinkAmps,
      voltageVolts: vcc,
    },
  );
  return out;
}

export const nandHifanCell: CellDefinition = {
  id: "nand-hifan",
  fn: "nand",
  variant: "high-fanout",
  title: "DTL NAND, high fan-out (transistor level shift)",
  keyPrefix: "gw_nandh",
  source: "Millman & Halkias, Integrated Electronics, ch. 6 (Example 6-6)",
  inputKind: "and",
  minFanin: 1,
  parameters: [
    { key: "rxOhms", role: "RX", label: "R_X (supply to level-shift collector)" },
    { key: "rpOhms", role: "RP", label: "R_P (level-shift collector to input node)" },
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
  outerKeys: ["rxOhms"],
  freeKey: "rbOhms",
  freeDirection: {
    saturation: "up",
    // V_IL (model cards) falls as R_B grows: less chain current at the threshold.
    "noise-margin-low": "down",
    "turn-off-current": "down",
    "delay-fall": "up",
    "delay-rise": "down",
  },
  timingHints: { nodePullUpKeys: ["rxOhms", "rpOhms"], follower: true },
  exampleValues: { rxOhms: 1750, rpOhms: 2000, rbOhms: 5000, rcOhms: 2200 },
  topology,
  analyze,
  toleranceCases(t) {
    return [
      { label: "R_X high, R_P high, R_B low, R_C low", factors: { rxOhms: 1 + t, rpOhms: 1 + t, rbOhms: 1 - t, rcOhms: 1 - t } },
      { label: "all resistors low", factors: { rxOhms: 1 - t, rpOhms: 1 - t, rbOhms: 1 - t, rcOhms: 1 - t }, skipTiming: true },
      { label: "R_X low, R_P low, R_B high, R_C low", factors: { rxOhms: 1 - t, rpOhms: 1 - t, rbOhms: 1 + t, rcOhms: 1 - t } },
      { label: "R_X low, R_P low, R_B high, R_C high", factors: { rxOhms: 1 - t, rpOhms: 1 - t, rbOhms: 1 + t, rcOhms: 1 + t } },
      { label: "all resistors high", factors: { rxOhms: 1 + t, rpOhms: 1 + t, rbOhms: 1 + t, rcOhms: 1 + t } },
    ];
  },
  inputLowAmpsWorst(values, t, env) {
    return hifanInputLowAmps(env, values.rxOhms! * (1 - t), values.rpOhms! * (1 - t));
  },
  inputCapacitanceFarads(cjo) {
    return cjo;
  },
  stresses,
};
