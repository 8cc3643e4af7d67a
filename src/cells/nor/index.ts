// DTL NOR-k with a diode-OR front end (k = 1 is an inverter).
//
//   in_i ──►|── m        input diodes DIN_i, anodes at the inputs
//   m ──►|── b           one level-shift diode DLS1 (raises the low-state noise margin)
//   b ──R_B── 0          base return
//   vcc ──R_C── out, Q1: collector out, base b, emitter 0
//
// There is no pull-up inside the cell: an input driven high is fed by its driver's R_C, which
// the input clamps at V_D + V_D + V_BE(sat). Equations (our derivation, same piecewise-linear
// device assumptions as Millman & Halkias ch. 6):
// - Input high, transistor saturated: the driver's R_C (at V_CC, driver transistor off) feeds
//   every diode-OR load on its net; they all clamp at the same level, so the driver delivers
//   (V_CC − V_clamp)/R_C between N loads. The weakest load is taken to get share·1/N of it
//   (share < 1 covers spread of the clamp levels). Worst case for a load is ONE input high
//   (all inputs high only adds drivers); worst case for the driver is all its N loads at once.
// - I_B = I_in − V_BE(sat)/R_B; saturated while β·I_B ≥ I_C + I_load.
// - All inputs low: the transistor conducts only when an input reaches
//   2·V_γ(diode) + V_γ(BE), so V_IL = 2·V_γ + V_γBE.
// - The input is current-driven: its high-state noise margin is the series voltage that would
//   cut the driver's current to what saturation needs: (I_in − I_needed)·R_source.
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
    components.push({ name: `DIN${i}`, role: "DIN", kind: "D", nodes: [`in${i}`, "m"], inputPin: i, model: "diode" });
  }
  components.push(
    { name: "DLS1", role: "DLS", kind: "D", nodes: ["m", "b"], model: "diode" },
    { name: "RB", role: "RB", kind: "R", nodes: ["b", "0"], valueKey: "rbOhms" },
    { name: "RC", role: "RC", kind: "R", nodes: ["vcc", "out"], valueKey: "rcOhms" },
    { name: "Q1", role: "Q", kind: "Q", nodes: ["out", "b", "0"], model: "npn" },
  );
  return { pins, components };
}

/** Level a conducting diode-OR input sits at: V_D (input) + V_D (level shift) + V_BE(sat). */
export function norInputClampVolts(env: CellEnv): number {
  return 2 * env.dev.vDiodeOnVolts + env.dev.vBESatVolts;
}

function analyze(values: CellValues, env: CellEnv, load: OutputLoad, drive: InputDrive): CellOperatingPoint {
  const rb = values.rbOhms!;
  const rc = values.rcOhms!;
  const d = env.dev;
  const vcc = env.vccVolts;
  const iIn = drive.orSourceAmps;
  const i2 = d.vBESatVolts / rb;
  const iB = iIn - i2;
  const iC = ownCollectorAmps(env, rc);
  const iLoad = load.andSinkAmps;
  const betaNeeded = iB > 0 ? (iC + iLoad) / iB : Infinity;
  const satMargin = iB > 0 ? (d.betaMin * iB) / (iC + iLoad) : 0;
  const vOL = outputLowVolts(env, rc, iB, iLoad, satMargin);
  const vOH = outputHighVolts(env, load);
  // V_IL from the model cards where the devices have them (src/electrical/thresholds.ts): the
  // input diode and the level-shift diode in the chain, the pin driven through the weakest
  // driver's share of its pull-up; the book's cut-in sum otherwise.
  const vILBook = 2 * d.vDiodeCutInVolts + d.vBECutInVolts;
  const vIL =
    modelInputLowThreshold(d, vcc, { chain: ["diode", "diode"], input: { kind: "or", sourceOhms: Number.isFinite(drive.orSourceOhms) ? drive.orSourceOhms : 0 }, rbOhms: rb, rcOhms: rc }) ?? vILBook;
  const vClamp = norInputClampVolts(env);
  const iNeeded = (iC + iLoad) / d.betaMin + i2;
  const nmHigh = (iIn - iNeeded) * drive.orSourceOhms;
  const supplyLow = iC;
  const supplyHigh = orLoadsAmps(env, rc, load);
  return {
    vccVolts: vcc,
    tempC: d.tempC,
    i1Amps: iIn,
    i2Amps: i2,
    iBAmps: iB,
    iCAmps: iC,
    iLoadAmps: iLoad,
    betaNeeded,
    satMargin,
    vInputNodeVolts: d.vDiodeOnVolts + d.vBESatVolts,
    vOLVolts: vOL,
    vOHVolts: vOH,
    vILVolts: vIL,
    vIHVolts: vClamp,
    noiseMarginLowVolts: vIL - drive.vLowMaxVolts,
    noiseMarginHighVolts: nmHigh,
    iTurnOffAmps: i2,
    inputLowAmps: 0,
    supplyCurrentLowAmps: supplyLow,
    supplyCurrentHighAmps: supplyHigh,
    powerLowWatts: vcc * supplyLow,
    powerHighWatts: vcc * supplyHigh,
    extra: { baseDriveNeededAmps: iNeeded, vILBookVolts: vILBook },
  };
}

function stresses(values: CellValues, env: CellEnv, load: OutputLoad, drive: InputDrive, fanin: number): ComponentStress[] {
  const rb = values.rbOhms!;
  const rc = values.rcOhms!;
  const d = env.dev;
  const vcc = env.vccVolts;
  const iIn = drive.orSourceMaxAmps;
  const iC = ownCollectorAmps(env, rc);
  const vM = d.vDiodeOnVolts + d.vBESatVolts;
  const out: ComponentStress[] = [];
  for (let i = 1; i <= fanin; i++) {
    out.push({ name: `DIN${i}`, powerWatts: iIn * d.vDiodeOnVolts, currentAmps: iIn, voltageVolts: vM });
  }
  out.push(
    { name: "DLS1", powerWatts: iIn * d.vDiodeOnVolts, currentAmps: iIn, voltageVolts: 0 },
    { name: "RB", powerWatts: d.vBESatVolts ** 2 / rb },
    { name: "RC", powerWatts: (vcc - d.vCESatVolts) ** 2 / rc },
    {
      name: "Q1",
      powerWatts: d.vCESatVolts * (iC + load.andSinkAmps) + d.vBESatVolts * iIn,
      currentAmps: iC + load.andSinkAmps,
      voltageVolts: vcc,
    },
  );
  return out;
}

export const norCell: CellDefinition = {
  id: "nor",
  fn: "nor",
  variant: "basic",
  title: "DTL NOR (diode-OR input)",
  keyPrefix: "gw_nor",
  source: "derived here with the device assumptions of Millman & Halkias, Integrated Electronics, ch. 6",
  inputKind: "or",
  minFanin: 1,
  parameters: [
    { key: "rbOhms", role: "RB", label: "R_B (base to ground)" },
    { key: "rcOhms", role: "RC", label: "R_C (collector)", shared: true },
  ],
  outerKeys: [],
  freeKey: "rbOhms",
  freeDirection: {
    saturation: "up",
    "noise-margin-high": "up",
    // V_IL (model cards) falls as R_B grows: less chain current at the threshold.
    "noise-margin-low": "down",
    "turn-off-current": "down",
    "delay-fall": "up",
    "delay-rise": "down",
  },
  exampleValues: { rbOhms: 5000, rcOhms: 2200 },
  topology,
  analyze,
  toleranceCases(t) {
    return [
      { label: "R_B low, R_C low", factors: { rbOhms: 1 - t, rcOhms: 1 - t } },
      { label: "R_B high, R_C low", factors: { rbOhms: 1 + t, rcOhms: 1 - t } },
      { label: "R_B high, R_C high", factors: { rbOhms: 1 + t, rcOhms: 1 + t } },
    ];
  },
  inputLowAmpsWorst() {
    return 0;
  },
  inputClampVolts: norInputClampVolts,
  inputCapacitanceFarads(cjo) {
    return cjo;
  },
  stresses,
};
