// Switching times by charge control (Moll, Proc. IRE 42, 1954; Millman & Taub, Pulse, Digital
// and Switching Waveforms). Inputs switch as fast edges (behind a driver's pull-up, or a step of
// a given rise time); delays are to the output crossing 50 % of its swing (V_OL..V_OH).
//
// Output falling (t_PHL): the input node charges through its pull-up to the level where the
// path conducts; the base current I_B1 then charges the emitter junction, supplies the Miller
// charge of the collector junction while the output swings, and builds up the base charge
// (collector current rising with τ_β = β·τ_F, Turn-on 10–90 %: τ·ln((β·I_B1 − 0.1·I_C)/(β·I_B1 − 0.9·I_C))).
// Output rising (t_PLH): storage time t_s = τ_s·ln((I_B1 + I_B2)/(I_B2 + I_C/β)) with the
// reverse base current I_B2 = V_BE/R_B, then the collector current decays and R_C charges the
// output node (load inputs, wiring and the collector junction). The diode-AND loads' input
// diodes conduct until the output nears their node's on level less a diode: below that their
// junctions take no charge and (in an R_C-limited rise) their pull-ups help R_C.
// Wired-AND: every other transistor tied onto the net adds its collector junction (base held
// near ground by its R_B, so reverse biased by the output level) to the capacitance R_C must
// charge on the rise and the one conducting transistor must discharge on the fall.
// Fast variants (src/cells/fast-kit), capacitor at its low end (slowest):
// - speed-up capacitor C_SU: on the output's rise the driving node falls by ΔV and C_SU pulls
//   C_SU·ΔV out of the base at once, and the collector with it (the saturated collector
//   junction's stored charge ties them); the output's pull-up then refills the base side through
//   that junction, draining the stored charge, until the base side is refilled (the rest drains
//   through R_B as usual) or the stored charge is gone (the output rises, the base still held low
//   by what is not refilled, which takes the Miller charge: the rise R_C-limited up to a knee).
//   Through a Miller-limited rise the base sinks with the collector current, and the capacitance
//   held on it hands that charge to R_B, less the depth the base starts the rise below its on
//   level. Where the capacitor takes about the stored charge (clamped: the Miller charge of the
//   swing) the estimate is steep, as ngspice is; the engine's holds a margin of the charge back
//   (CAPACITOR_CHARGE_MARGIN).
//   On the output's fall the charge that recharges C_SU is delivered into the base (the input
//   node need not charge the level-shift diodes first); a NOR's capacitors form a divider with
//   the base's capacitance, so its transistor turns on through the rising input's capacitor
//   (capacitorFedFall).
// - Schottky clamp: no stored charge (t_s = 0); its junction capacitance adds to the collector
//   junction's Miller charge on both edges and to the capacitance R_C charges. The capacitor's
//   charge is spare but for the band below the base's on level where the transistor conducts.
// - a diode-AND load with a speed-up capacitor hands its C_SU·ΔV to its driver when the driver
//   pulls it low (OutputLoad.speedUpChargeCoulombs), counted in the driver's fall.
import type { CellDefinition, CellEnv, CellOperatingPoint, CellValues, InputDrive, OutputLoad } from "../cells/types.js";
import type { CellTiming } from "./types.js";
import { capacitorOf, speedUpSwingVolts } from "../cells/fast-kit/index.js";
import { DEFAULT_SCHOTTKY_MODEL } from "./devices.js";

/** Storage time by charge control: t_s = τ_s·ln((I_B1 + I_B2)/(I_B2 + I_C/β)). */
export function storageTimeSeconds(tauSSeconds: number, iB1Amps: number, iB2Amps: number, iCAmps: number, beta: number): number {
  const num = iB1Amps + iB2Amps;
  const den = iB2Amps + iCAmps / beta;
  if (!(den > 0) || num <= den) return 0;
  return tauSSeconds * Math.log(num / den);
}

/** Turn-on (collector current 10–90 %): τ·ln((β·I_B1 − 0.1·I_C)/(β·I_B1 − 0.9·I_C)). */
export function turnOnTimeSeconds(tauSeconds: number, iB1Amps: number, iCAmps: number, beta: number): number {
  const drive = beta * iB1Amps;
  if (drive <= 0.9 * iCAmps) return Infinity;
  return tauSeconds * Math.log((drive - 0.1 * iCAmps) / (drive - 0.9 * iCAmps));
}

/** Fall of the collector current (90–10 %): τ·ln((0.9·I_C + β·I_B2)/(0.1·I_C + β·I_B2)). */
export function fallTimeSeconds(tauSeconds: number, iB2Amps: number, iCAmps: number, beta: number): number {
  return tauSeconds * Math.log((0.9 * iCAmps + beta * iB2Amps) / (0.1 * iCAmps + beta * iB2Amps));
}

/** Storage time constant of a transistor from its SPICE transit times (Ebers–Moll charge control):
 *  τ_s = (TF + α_R·TR)/(1/BF + 1/(1 + BR)), α_R = BR/(1 + BR). */
export function storageTimeConstantSeconds(npn: Record<string, number>): number {
  const tf = npn.TF ?? 0;
  const tr = npn.TR ?? 0;
  const bf = npn.BF ?? 100;
  const br = npn.BR ?? 1;
  const alphaR = br / (1 + br);
  return (tf + alphaR * tr) / (1 / bf + 1 / (1 + br));
}

/** Mean depletion capacitance of a junction as its voltage moves between v1 and v2 (forward
 *  positive), from the SPICE depletion charge: the graded-junction charge below FC·VJ, and above
 *  it SPICE's linear extension of the capacitance, C = CJ0/(1 − FC)^(1+M)·(1 − FC·(1 + M) +
 *  M·V/VJ), with FC 0.5 (SPICE 3f5's junction charge, as ngspice computes it; ngspice manual,
 *  diode model). */
export function meanJunctionCapacitanceFarads(cj0: number, vj: number, m: number, v1: number, v2: number): number {
  if (cj0 <= 0) return 0;
  const fc = 0.5;
  const knee = fc * vj;
  const f2 = (1 - fc) ** (1 + m);
  const f3 = 1 - fc * (1 + m);
  if (Math.abs(v1 - v2) < 1e-9) return v1 < knee ? cj0 / (1 - v1 / vj) ** m : (cj0 / f2) * (f3 + (m * v1) / vj);
  const q = (v: number): number => {
    if (v < knee) return ((cj0 * vj) / (1 - m)) * (1 - (1 - v / vj) ** (1 - m));
    const qKnee = ((cj0 * vj) / (1 - m)) * (1 - (1 - fc) ** (1 - m));
    return qKnee + (cj0 / f2) * (f3 * (v - knee) + (m / (2 * vj)) * (v * v - knee * knee));
  };
  return Math.abs((q(v1) - q(v2)) / (v1 - v2));
}

const BOLTZMANN_OVER_Q = 1.380649e-23 / 1.602176634e-19;

/** The collector current at which the typical V_BE is taken (typicalDrops). */
const TYPICAL_TRANSISTOR_AMPS = 1e-3;

/** Junction drops of the SPICE models at typical switching currents (diode 0.5 mA, transistor
 *  1 mA), at `tempC` with −2 mV/°C from 25 °C. Timing uses these: the book's 0.7/0.8 V are
 *  deliberately pessimistic for DC levels and would understate the base drive. */
export function typicalDrops(
  diode: Record<string, number>,
  npn: Record<string, number>,
  tempC: number,
  tcVoltsPerC: number,
): { vDiodeOnVolts: number; vBEActiveVolts: number; vBESatVolts: number } {
  const vt = BOLTZMANN_OVER_Q * (25 + 273.15);
  const dIs = diode.IS ?? 1e-14;
  const dN = diode.N ?? 1;
  const qIs = npn.IS ?? 1e-16;
  const qN = npn.NF ?? 1;
  const shift = tcVoltsPerC * (tempC - 25);
  const vD = dN * vt * Math.log(0.5e-3 / dIs) + shift;
  const vBE = qN * vt * Math.log(TYPICAL_TRANSISTOR_AMPS / qIs) + shift;
  // In saturation the base-emitter drop sits a little higher (forced gain well below BF).
  return { vDiodeOnVolts: vD, vBEActiveVolts: vBE, vBESatVolts: vBE + 0.04 };
}

export interface TimingInputs {
  def: CellDefinition;
  values: CellValues;
  env: CellEnv;
  load: OutputLoad;
  drive: InputDrive;
  op: CellOperatingPoint;
  npn: Record<string, number>;
  diode: Record<string, number>;
  fanin: number;
  /** Wiring capacitance on the input node (diode-OR inputs are charged by their driver). */
  inputWiringFarads?: number;
  /** The clamp diode's model parameters (fast cells; default the generic Schottky). */
  schottky?: Record<string, number>;
  /** Share of a speed-up capacitor's charge the rising edge is also worked out without, the
   *  slower result taken (default CAPACITOR_CHARGE_MARGIN, the engine's; 0: the plain estimate). */
  capacitorChargeMargin?: number;
}

/** The sizing's margin on a speed-up capacitor's charge near the point where it takes about the
 *  stored charge (see cellTiming). */
export const CAPACITOR_CHARGE_MARGIN = 0.2;

/** Time for the output to rise from vFrom to vTo when R_C pulls it toward vTarget through
 *  capacitance cTotal, while the collector junction's Miller current must be carried off by the
 *  reverse base current: the slope is min(I_B2/C_jc, (vTarget − v)/(R_C·C)). */
export function millerLimitedRiseSeconds(
  vFrom: number,
  vTo: number,
  vTarget: number,
  rcOhms: number,
  cTotalFarads: number,
  iB2Amps: number,
  cjcFarads: number,
): number {
  if (vTo <= vFrom) return 0;
  const tau = rcOhms * cTotalFarads;
  const rc = (v1: number, v2: number): number => (vTarget > v2 ? tau * Math.log((vTarget - v1) / (vTarget - v2)) : Infinity);
  if (!(cjcFarads > 0) || !(iB2Amps > 0)) return rc(vFrom, vTo);
  const slew = iB2Amps / cjcFarads;
  // Where the two limits meet.
  const vStar = vTarget - slew * tau;
  if (vStar >= vTo) return (vTo - vFrom) / slew;
  if (vStar > vFrom) return (vStar - vFrom) / slew + rc(vStar, vTo);
  return rc(vFrom, vTo);
}

/** Diode-AND loads seen from the output they hang on: while the output is below offVolts, their
 *  pull-ups send conductance·(sourceVolts − v) into it. */
export interface LoadPull {
  conductance: number;
  sourceVolts: number;
  offVolts: number;
}

/** Time for the output to rise from vFrom to vTo, R_C pulling it toward vTarget: below the
 *  loads' turn-off (LoadPull) through capacitance cBelowFarads with their pull-ups helping (an RC
 *  charge toward the Thévenin level of the two), above it through cAboveFarads toward vTarget
 *  alone. */
export function loadAidedRiseSeconds(
  vFrom: number,
  vTo: number,
  vTarget: number,
  rcOhms: number,
  cBelowFarads: number,
  cAboveFarads: number,
  loads: LoadPull | undefined,
): number {
  if (vTo <= vFrom) return 0;
  const plain = (v1: number, v2: number): number => millerLimitedRiseSeconds(v1, v2, vTarget, rcOhms, cAboveFarads, 0, 0);
  if (!loads || !(loads.conductance > 0) || vFrom >= loads.offVolts) return plain(vFrom, vTo);
  const g = 1 / rcOhms + loads.conductance;
  const vTh = (vTarget / rcOhms + loads.conductance * loads.sourceVolts) / g;
  const vMid = Math.min(vTo, loads.offVolts);
  const tAided = vTh > vMid ? (cBelowFarads / g) * Math.log((vTh - vFrom) / (vTh - vMid)) : Infinity;
  return tAided + plain(vMid, vTo);
}

/** A junction's depletion capacitance with a memo: switching analyses ask for the same voltage
 *  ranges over and over (they depend on the corner, not on the resistor values). */
class Junction {
  private readonly memo = new Map<number, Map<number, number>>();
  constructor(
    readonly cj0: number,
    readonly vj: number,
    readonly m: number,
  ) {}
  mean(v1: number, v2: number): number {
    let inner = this.memo.get(v1);
    if (!inner) {
      if (this.memo.size > 4096) this.memo.clear();
      inner = new Map();
      this.memo.set(v1, inner);
    }
    let c = inner.get(v2);
    if (c === undefined) {
      c = meanJunctionCapacitanceFarads(this.cj0, this.vj, this.m, v1, v2);
      inner.set(v2, c);
    }
    return c;
  }
  charge(v1: number, v2: number): number {
    return this.mean(v1, v2) * Math.abs(v2 - v1);
  }
}

const junctions = new WeakMap<Record<string, number>, Map<string, Junction>>();

function junctionOf(params: Record<string, number>, cj: string, vj: string, m: string, defVj: number, defM: number): Junction {
  let byName = junctions.get(params);
  if (!byName) {
    byName = new Map();
    junctions.set(params, byName);
  }
  let j = byName.get(cj);
  if (!j) {
    j = new Junction(params[cj] ?? (cj === "CJO" ? params.CJ0 ?? 0 : 0), params[vj] ?? defVj, params[m] ?? defM);
    byName.set(cj, j);
  }
  return j;
}

const lsCache = new WeakMap<CellDefinition, number>();

/** Number of level-shift diodes in a cell's topology. */
function levelShiftDiodes(def: CellDefinition): number {
  let n = lsCache.get(def);
  if (n === undefined) {
    n = def.topology(1).components.filter((c) => c.role === "DLS").length;
    lsCache.set(def, n);
  }
  return n;
}

/** Propagation delays of a cell for an input stepping fast between the driver's low and high
 *  levels (a voltage step for diode-AND inputs; through the driver's pull-up for diode-OR
 *  inputs), with the real load on the output, measured at 50 % of each swing. */
export function cellTiming(t: TimingInputs): CellTiming {
  const { def, values, env, load, op, npn, diode } = t;
  const d = env.dev;
  const vcc = env.vccVolts;
  const tf = npn.TF ?? 0;
  const je = junctionOf(npn, "CJE", "VJE", "MJE", 0.75, 0.33);
  const jc = junctionOf(npn, "CJC", "VJC", "MJC", 0.75, 0.33);
  const jd = junctionOf(diode, "CJO", "VJ", "M", 1, 0.5);
  const ttd = diode.TT ?? 0;
  const rc = values.rcOhms!;
  const vOL = op.vOLVolts;
  const vOH = op.vOHVolts;
  const v50 = (vOL + vOH) / 2;
  const iB1 = Math.max(op.iBAmps, 1e-12);
  const iCs = op.iCAmps + op.iLoadAmps;
  const betaOn = d.betaMin;
  const betaOff = d.betaMax;
  const vBE = d.vBEActiveVolts;
  const nLs = levelShiftDiodes(def);
  const andInput = def.inputKind === "and";
  const vPLow = d.vCESatVolts + d.vDiodeOnVolts;
  const vPOn = op.vInputNodeVolts;
  // Collector junctions of the other transistors on a wired net, over each half swing.
  const tied = load.tiedCollectors ?? 0;
  const cTiedFall = tied * jc.mean(-vOH, -v50);
  const cTiedRise = tied * jc.mean(-vOL, -v50);
  // Fast variants: the speed-up capacitor at its low end, the swing that drives it, the clamp.
  const su = def.speedUp;
  const cSu = su?.capacitorKey !== undefined ? capacitorOf(values).farads * (1 - capacitorOf(values).tolerance) : 0;
  const suSwing = cSu > 0 ? speedUpSwingVolts(def, env, op, t.drive) : 0;
  const js = su?.clamp ? junctionOf(t.schottky ?? DEFAULT_SCHOTTKY_MODEL.params, "CJO", "VJ", "M", 0.35, 0.35) : undefined;

  // --- Output falling -------------------------------------------------------------------
  // Charge the base side needs before the output moves: the input node up to its on level
  // (diode-AND cells), the emitter junction to V_BE, and the base charge τ_F·I_RC behind the
  // collector current R_C sends in at the 50 % point. The static load is not part of it: the
  // diode-AND loads' input diodes conduct only once the output is below their input node, well
  // under the 50 % point. Beyond that current, the collector current discharges the load: the
  // output's fall against the Miller current is loadDischargeSeconds below (R_C's current, held
  // by that base charge, asks no Miller current of its own).
  let qNode = 0;
  let qKick = 0;
  let tNode = 0;
  const cMiller = jc.mean(vBE - vOH, vBE - v50) + (js ? js.mean(vBE - vOH, vBE - v50) : 0);
  const qMiller = cMiller * (vOH - v50);
  let followerLag: { v0: number; rX: number; tau: number } | undefined;
  // The reverse current a rising diode-AND input's pull-up sends back through the input diode
  // (absent: a stiff step).
  const rSrc = t.drive.andSourceOhms;
  const iRecover = rSrc !== undefined && rSrc > 0 ? Math.max(1e-9, vcc - vPOn) / rSrc : undefined;
  let capFed: { cSu: number; cHold: number; cInOwn: number; vIn50: number; vCond: number; vLow: number; rs: number } | undefined;
  // R_C's current at the 50 % point.
  const iRc50 = Math.max(0, vcc - v50) / rc;
  let qBase = je.charge(0, d.vBECutInVolts) +
    je.mean(0, d.vBECutInVolts) * (vBE - d.vBECutInVolts) +
    tf * iRc50;
  if (andInput) {
    // Node capacitance: the other input diodes, and the level-shift diodes (or the follower).
    const cOthers = (t.fanin - 1) * jd.mean(-(vOH - vPLow), -(vOH - vPOn));
    // The stepped input diode hands its stored and depletion charge to the node as it recovers,
    // less what of the stored charge recombines meanwhile (inputStoredShare).
    qKick = ttd * op.inputLowAmps * inputStoredShare(ttd, op.inputLowAmps, iRecover, t.drive.edgeSeconds) + jd.charge(d.vDiodeOnVolts, vPOn - vOH);
    if (def.timingHints?.follower) {
      // The follower's base (the input node) is raised by the pull-up alone, charging the other
      // input diodes and the follower's junctions; once it conducts, its emitter current drives
      // the output transistor.
      // The follower's emitter junction is bootstrapped: the emitter follows the base up from
      // below cut-in, so the junction takes only its charge from cut-in to V_BE, not the node's
      // whole swing. Its collector junction rides up with the collector node, which only R_X
      // ties to the supply (its discharge is the follower's lag below).
      qNode = cOthers * Math.max(0, vPOn - vPLow) + je.mean(d.vBECutInVolts, vBE) * Math.max(0, vBE - d.vBECutInVolts);
      if (cSu > 0) {
        // A speed-up capacitor ties the follower's base to the output transistor's base: until
        // it has charged by its off-to-on change, the base is fed through it by the pull-up alone.
        const qVia = Math.min(qBase + qMiller, cSu * Math.max(0, vPOn - d.vBESatVolts - vPLow));
        qNode += qVia;
        qBase -= qVia;
      }
      const rPull = def.timingHints.nodePullUpKeys.reduce((acc, k) => acc + (values[k] ?? 0), 0);
      const iNode = Math.max(vcc - (vPLow + vPOn) / 2, 1e-3) / rPull;
      tNode = Math.max(0, qNode - qKick) / iNode;
      qKick = Math.max(0, qKick - qNode);
      // The follower's lag. With the input low its collector node x sits high (R_X and the pull-up
      // divide the supply); the kick's charge, passed through the follower's collector junction,
      // collapses V_CB at once by q/C_jc, to V_0. The rest of V_CB then drains only as fast as the
      // pull-up's current can discharge that junction (the follower's own Miller effect): V_CB
      // decays with τ_x = R_P·C_jc, and the drive into the output falls V_CB/R_X short of the
      // static figure meanwhile.
      const keys = def.timingHints.nodePullUpKeys;
      if (keys.length > 1) {
        const rX = values[keys[0]!] ?? 0;
        const rPb = values[keys[keys.length - 1]!] ?? 0;
        const vXOff = vcc - (rX * (vcc - vPLow)) / rPull;
        const vcbOff = Math.max(0, vXOff - vPLow);
        const cjf = jc.mean(-vcbOff, 0);
        const v0 = cjf > 0 ? Math.max(0, vcbOff - qKick / cjf) : 0;
        followerLag = { v0, rX, tau: rPb * jc.mean(-v0, 0) };
      }
    } else {
      const cLs = nLs > 0 ? jd.mean(0, d.vDiodeCutInVolts) / nLs : 0;
      if (cSu > 0) {
        // The capacitor carries the node's charge straight into the base: the node rises only
        // by V_BE plus what the capacitor's own voltage gains, and the level-shift diodes are
        // bypassed.
        qNode = cOthers * Math.min(Math.max(0, vPOn - vPLow), vBE + (qBase + qMiller) / cSu);
      } else qNode = (cOthers + cLs) * Math.max(0, vPOn - vPLow);
      qBase += qNode;
    }
  } else {
    // Diode-OR input: the driver's pull-up raises the input from its 50 % level to where the
    // path conducts (just below the clamp), charging the input diode, the common node and wiring.
    const clamp = load.orClampVolts > 0 ? Math.min(vcc, 2 * d.vDiodeOnVolts + d.vBESatVolts) : vcc;
    const vIn50 = (t.drive.vLowMaxVolts + clamp) / 2;
    const vCond = clamp - 0.15;
    let cIn =
      t.fanin * jd.mean(t.drive.vLowMaxVolts - vPOn, 0) +
      nLs * jd.mean(0, d.vDiodeCutInVolts) +
      (t.inputWiringFarads ?? 0);
    if (cSu > 0) {
      // The rising input charges its capacitor, which delivers that charge into the base; the
      // other inputs' capacitors (their inputs low) hang on the base and take V_BE's worth.
      cIn += cSu;
      qBase += (t.fanin - 1) * cSu * vBE;
      qKick = cSu * Math.max(0, vCond - vBE - t.drive.vLowMaxVolts);
    }
    const rs = t.drive.orSourceOhms;
    if (vCond > vIn50 && Number.isFinite(rs) && vcc > vCond) tNode = rs * cIn * Math.log((vcc - vIn50) / (vcc - vCond));
    if (cSu > 0 && Number.isFinite(rs) && rs > 0 && vcc > vCond) {
      // The capacitor ties the rising input to the base, which the other inputs' capacitors and
      // the emitter junction hold to ground: a divider, so the base rises with the input long
      // before the diode path conducts, and the transistor turns on through the capacitor
      // (capacitorFedFall, which takes the place of the sequence above where it applies).
      const cHold = (t.fanin - 1) * cSu + je.mean(0, vBE);
      capFed = { cSu, cHold, cInOwn: cIn - cSu, vIn50, vCond, vLow: t.drive.vLowMaxVolts, rs };
    }
  }
  // The kick (the stepped input diode's stored and depletion charge) arrives as the diode
  // recovers: its storage time is τ_T·ln(1 + I_F/I_R) (junction-diode reverse recovery, Millman
  // & Halkias ch. 3), with I_F the input's low-state current and I_R what the driver's pull-up
  // can send back through it. A stiff step (ngspice's check benches) recovers it within the
  // edge; a DTL driver, whose R_C is of the order of the load's pull-up, takes about τ_T·ln 2.
  // What the kick brings beyond the turn-on charge (also a negative qBase: charge a speed-up
  // capacitor delivered early) is base charge the output's fall starts with.
  const tKick = andInput && qKick > 0 && iRecover !== undefined && ttd > 0 ? diodeStorageSeconds(ttd, op.inputLowAmps, iRecover) : 0;
  const tBase = Math.max(tKick, Math.max(0, qBase - qKick) / iB1);
  const qHead = Math.max(0, qKick - qBase);
  // Speed-up capacitors of diode-AND loads: their charge is sunk as the output falls.
  const qLoadSu = load.speedUpChargeCoulombs ?? 0;
  const sinkExcess = Math.max(betaOn * iB1 - iCs / 2, 1e-30);
  const tTurnOn = turnOnTimeSeconds(betaOn * tf, iB1, iCs, betaOn);
  // Diode-AND loads' input diodes, reverse-biased from V_OH − V_P down to V_50 − V_P (V_P: the
  // load's input node with its other inputs high, the larger capacitance).
  const cAndDiodes = load.andDiodeFarads ?? 0;
  const cAndDiodesFall = cAndDiodes > 0 && jd.cj0 > 0 ? (cAndDiodes / jd.cj0) * jd.mean(vPOn - vOH, vPOn - v50) : cAndDiodes;
  const cFall = load.capacitanceFarads - cAndDiodes + cAndDiodesFall + cTiedFall;
  const qFall = cFall * (vOH - v50) + qLoadSu;
  let tLoad = loadDischargeSeconds(qFall, cFall, cMiller, qMiller, tf, iB1, sinkExcess, qHead);
  // A follower's drive, short of its static value by V_CB(t)/R_X: the fall is worked out again
  // with the mean drive over its own duration (three rounds settle it).
  if (followerLag && followerLag.v0 > 0 && followerLag.rX > 0 && followerLag.tau > 0) {
    for (let k = 0; k < 3; k++) {
      const T = Math.max(tLoad, 1e-12);
      const deficit = (followerLag.v0 / followerLag.rX) * (followerLag.tau / T) * -Math.expm1(-T / followerLag.tau);
      const iB1Fall = Math.max(iB1 - deficit, iB1 * 0.1);
      tLoad = loadDischargeSeconds(qFall, cFall, cMiller, qMiller, tf, iB1Fall, Math.max(betaOn * iB1Fall - iCs / 2, 1e-30), qHead);
    }
  }
  let tPHL = tNode + tBase + tLoad;
  if (capFed) {
    const fed = capacitorFedFall(capFed, { vcc, vBE, tf, iRc50, rbOhms: values.rbOhms!, nF: npn.NF ?? 1, tempC: d.tempC, qLoad: qFall, cFall, cMiller, qMiller, iMaxOf: (ib) => Math.max(betaOn * ib - iCs / 2, 1e-30) });
    if (fed !== undefined) tPHL = fed.tTurnOn + fed.tFall;
  }

  // --- Output rising --------------------------------------------------------------------
  // Reverse base current through R_B while the transistor is still on.
  const iB2 = vBE / values.rbOhms!;
  // The level-shift diodes recover as the input node falls and pull some charge out of the base.
  let qOff = 0;
  if (nLs > 0 && (def.variant === "basic" || (su !== undefined && !def.timingHints?.follower))) {
    const cSeries = jd.mean(0, d.vDiodeCutInVolts) / nLs;
    qOff = ttd * op.i1Amps + cSeries * Math.max(0, vPOn - (andInput ? vPLow : d.vCESatVolts));
  }
  const tauS = storageTimeConstantSeconds(npn);
  // The speed-up capacitor's charge, pulled out of the base as the driving node falls.
  const qSu = cSu * suSwing;
  // Capacitance held on the base (the speed-up capacitors, to nodes that stay put).
  const cBaseHeld = cSu > 0 ? (andInput ? 1 : t.fanin) * cSu : 0;
  const qActive = tf * iCs;
  // The collector current's decay (charge control, τ = β·τ_F).
  const tauOff = betaOff * tf;
  // Output rising: Miller-limited first, then R_C charging the load and the collector junction
  // (and the clamp diode's junction).
  const cjcRise = jc.mean(vBE - vOL, vBE - v50) + (js ? js.mean(vBE - vOL, vBE - v50) : 0);
  // The diode-AND loads' input diodes conduct until the output nears their input node's on level
  // (every diode-AND cell here conducts at two diode drops and a V_BE) less a diode, so their
  // junctions change no charge below that; above it they are reverse-biased, from zero bias to the
  // node's level less the output's, and take that charge (the falling edge's split, reversed).
  const vLoadNode = 2 * d.vDiodeOnVolts + d.vBESatVolts;
  const loadOff = vLoadNode - d.vDiodeOnVolts;
  const andDiodeCount = cAndDiodes > 0 && jd.cj0 > 0 ? cAndDiodes / jd.cj0 : 0;
  const qAndDiodes = (v: number): number => andDiodeCount * jd.charge(0, Math.min(0, vLoadNode - v));
  // The output's own capacitance without those diodes (wiring, tied collectors), and with their
  // charge spread over a rise from vFrom to vTo.
  const cOutBare = load.capacitanceFarads - (andDiodeCount > 0 ? cAndDiodes : 0) + cTiedRise;
  const cOutOver = (vFrom: number, vTo: number): number => cOutBare + (andDiodeCount > 0 && vTo > vFrom ? (qAndDiodes(vTo) - qAndDiodes(vFrom)) / (vTo - vFrom) : 0);
  const cRise = cOutOver(vOL, v50) + cjcRise;
  // Below that level the loads' pull-ups send their input current into the output too: I_load at
  // V_OL, less as the output rises (each R_P from V_CC − V_D).
  const loadSource = vcc - d.vDiodeOnVolts;
  const loadPull: LoadPull | undefined =
    op.iLoadAmps > 0 && loadSource > vOL
      ? { conductance: op.iLoadAmps / (loadSource - vOL), sourceVolts: loadSource, offVolts: loadOff }
      : undefined;
  // As the output rises the collector current falls from I_C to R_C's current at the 50 % point,
  // and V_BE with it (by V_T·ln of their ratio): the capacitance held on the base (the speed-up
  // capacitors, to nodes that stay put) gives up that droop's charge to R_B, which then carries
  // off that much less Miller charge (ngspice: the base sinking some 50 mV through the rise, the
  // rise half as fast again as on R_B's current alone with 2 × 68 pF on the base). The emitter
  // junction's share of it, a few per cent of the Miller charge, is left out.
  const vtNpn = (npn.NF ?? 1) * BOLTZMANN_OVER_Q * (d.tempC + 273.15);
  const vDroop = cBaseHeld > 0 && iRc50 > 0 && iCs > iRc50 ? vtNpn * Math.log(iCs / iRc50) : 0;
  const cDroop = v50 > vOL ? (cBaseHeld * vDroop) / (v50 - vOL) : 0;
  // The transistor conducts again well before its base is back where it started: within
  // V_T·ln(I/I_C) of it, it takes half of R_C's current at the 50 % point and holds the rise back
  // (ngspice: the base stopping some 30–60 mV short, a slow rise). A shortfall inside that band is
  // not spare. The band is reckoned from V_BE at 1 mA for a saturated transistor, from its on
  // current for a clamped one (held active: ngspice shows it 58 mV below its starting level at
  // 4.5 mA on one development circuit).
  const band = iRc50 > 0 ? Math.max(0, vtNpn * Math.log((su?.clamp ? iCs : TYPICAL_TRANSISTOR_AMPS) / (iRc50 / 2))) : 0;
  // The base side the capacitor's charge is taken from: the capacitance held on the base and the
  // emitter junction.
  const cSide = cBaseHeld + je.mean(0, vBE);
  // The rising edge with the capacitor taking the charge qSuX.
  const rising = (qSuX: number): { ts: number; tDecay: number; tRise: number; total: number } => {
    let ts: number;
    let qSpare: number;
    // The droop, less the depth the base starts the rise below its on level: a base that comes
    // back from below (a clamped transistor's, or one whose stored charge ran out first) may
    // already be beneath the level at which the transistor carries R_C's current at the 50 %
    // point (ngspice: the base then rising, not sinking, through the rise).
    let shortfall = 0;
    if (su?.clamp) {
      // A clamped transistor holds no stored charge: the capacitor's charge is spare but for the
      // band.
      ts = 0;
      qSpare = Math.max(0, qOff + qSuX - cSide * band);
      shortfall = (qOff + qSuX) / cSide;
    } else if (qSuX > 0) {
      // The capacitor pulls the base down at once, and the collector with it: the saturated
      // collector junction's stored charge ties them together (ngspice shows base and output
      // dropping together, the output below ground). The output's pull-up then refills the base
      // side through that junction, against its forward direction, so its current (R_C's and the
      // diode-AND loads' input currents) drains the stored charge in R_B's place (with
      // recombination, τ_s, meanwhile) until either the base side is refilled (the charge the
      // capacitor and the level-shift diodes took) or the stored charge runs out, whichever
      // comes first (charge control: dQ/dt = −I − Q/τ_s).
      const qRefill = qOff + qSuX;
      // Base and output rise together meanwhile, so the pull-up's current splits between the base
      // side (through the junction) and the output's own capacitance, in proportion. The output
      // sits below its low level meanwhile, by half the dip on average (the dip: the capacitor's
      // charge over base side and output together), and the pull-up sends that much more.
      // (The loads' input diodes conduct meanwhile: only the bare output's capacitance.)
      const cOut = cOutBare;
      const vHoldMean = vOL - qRefill / (cSide + cOut) / 2;
      const loadHead = vcc - d.vDiodeOnVolts - vOL;
      const iHoldLow = Math.max(0, vcc - vHoldMean) / rc + (loadHead > 0 ? (op.iLoadAmps * (vcc - d.vDiodeOnVolts - vHoldMean)) / loadHead : op.iLoadAmps);
      const iJunction = Math.max(1e-9, iHoldLow * (cSide / (cSide + cOut)));
      const tRefill = qRefill / iJunction;
      const tDrained = storageTimeSeconds(tauS, iB1, iJunction, iCs, betaOff);
      if (tRefill < tDrained) {
        // Refilled first: the charge left then drains through R_B as usual.
        const qLeft = tauS * (iB1 + iJunction) * Math.exp(-tRefill / tauS) - tauS * iJunction;
        ts = tRefill + storageTimeSeconds(tauS, qLeft / tauS, iB2, iCs, betaOff);
        qSpare = 0;
      } else {
        // Drained first: the collector junction lets go and the output rises, the base still
        // below its level by what the pull-up has not returned yet (less the band).
        ts = tDrained;
        shortfall = Math.max(0, qRefill - iJunction * tDrained) / cSide;
        qSpare = Math.max(0, qRefill - iJunction * tDrained - cSide * band);
      }
    } else {
      // The level-shift diodes' recovery charge comes off the stored charge at once.
      const iB1Eff = Math.max(iCs / betaOff, iB1 - (tauS > 0 ? qOff / tauS : 0));
      ts = storageTimeSeconds(tauS, iB1Eff, iB2, iCs, betaOff);
      qSpare = 0;
    }
    // Charge beyond the stored charge removes the active charge τ_F·I_C first, then holds the base
    // below cut-in against the Miller charge.
    const droop = vDroop > shortfall ? cDroop * (1 - shortfall / vDroop) : 0;
    const decayShare = qSpare > 0 && qActive > 0 ? Math.max(0, 1 - qSpare / qActive) : 1;
    qSpare = Math.max(0, qSpare - qActive);
    // Collector current falling to half.
    const tDecay = decayShare * tauOff * Math.log((iCs + betaOff * iB2) / (0.5 * iCs + betaOff * iB2));
    let tRise = millerLimitedRiseSeconds(vOL, v50, vcc, rc, cRise, iB2, cjcRise + droop);
    if (qSpare > 0 && cjcRise > 0 && v50 > vOL) {
      // The capacitor's spare charge takes the Miller charge in R_B's place as far as it goes: the
      // output rises R_C-limited up to the level where that charge is used up (the knee: ngspice
      // shows the base climbing back from below cut-in meanwhile), then Miller-limited on R_B's
      // current as before, with the collector junction's (and clamp's) capacitance over that
      // upper part of the swing.
      const cjcOver = (a: number, b: number): number => jc.mean(vBE - a, vBE - b) + (js ? js.mean(vBE - a, vBE - b) : 0);
      // R_B's current takes Miller charge too meanwhile (rounds settle the knee and the time).
      // Below the loads' turn-off the diode-AND loads' pull-ups help R_C (loadAidedRiseSeconds).
      const lowerSeconds = (vTo: number): number => loadAidedRiseSeconds(vOL, vTo, vcc, rc, cOutBare + cjcRise, cOutOver(Math.max(vOL, loadOff), vTo) + cjcRise, loadPull);
      let vKnee = Math.min(v50, vOL + qSpare / cjcRise);
      for (let k = 0; k < 3 && vKnee < v50; k++) vKnee = Math.min(v50, vOL + (qSpare + iB2 * lowerSeconds(vKnee)) / cjcOver(vOL, vKnee));
      const tLower = lowerSeconds(vKnee);
      let tUpper = 0;
      if (vKnee < v50) {
        const cjcUp = cjcOver(vKnee, v50);
        tUpper = millerLimitedRiseSeconds(vKnee, v50, vcc, rc, cOutOver(vKnee, v50) + cjcUp, iB2, cjcUp + droop);
      }
      tRise = tLower + tUpper;
    }
    return { ts, tDecay, tRise, total: ts + tDecay + tRise };
  };
  let r = rising(qSu);
  // Where the capacitor takes about the stored charge (clamped: the Miller charge of the whole
  // swing), the estimate is steep (the delay falls by 2–7× over some 10–20 % of capacitance, and
  // ngspice puts that point up to 15 % either side of the estimate's): the engine takes the
  // slower of the estimates with the full charge and with the margin held back, so it does not
  // count on a capacitor just past it.
  const margin = t.capacitorChargeMargin ?? CAPACITOR_CHARGE_MARGIN;
  if (margin > 0 && qSu > 0) {
    const held = rising(qSu * (1 - margin));
    if (held.total > r.total) r = held;
  }
  const { ts, tDecay, tRise } = r;
  const tPLH = ts + tDecay + tRise;
  return {
    tPHLSeconds: tPHL,
    tPLHSeconds: tPLH,
    tStorageSeconds: ts,
    tTurnOnSeconds: Number.isFinite(tTurnOn) ? tTurnOn : Infinity,
    tRiseSeconds: tRise,
    loadCapacitanceFarads: load.capacitanceFarads + cTiedRise,
  };
}

/** The falling edge of a diode-OR cell with speed-up capacitors, fed through the capacitor of the
 *  rising input (charge control, worked from the circuit). The driver's pull-up R_S sends
 *  I_S = (V_CC − v_in)/R_S into the input. Until the transistor conducts, the input's own
 *  capacitance C_in and the series pair C_SU / C_hold (the other inputs' capacitors and the
 *  emitter junction, from base to ground) share it, the base taking C_SU/(C_SU + C_hold) of the
 *  input's rise; at the input's 50 % point the base is at that share of the rise from the low
 *  level, b_50. Turn-on: the base from b_50 to V_BE (at the collector current of the fall), the
 *  input rising by that and by the charge passed over C_SU, and the charge τ_F·I_RC behind R_C's
 *  current. The fall: Miller-limited (loadDischargeSeconds) with the base current the capacitor
 *  passes, I_S·C_SU/(C_SU + C_in), less R_B's (once the diode path conducts, it clamps the input
 *  and the base takes all of I_S: the figure errs slow). */
function capacitorFedFall(
  c: { cSu: number; cHold: number; cInOwn: number; vIn50: number; vCond: number; vLow: number; rs: number },
  k: { vcc: number; vBE: number; tf: number; iRc50: number; rbOhms: number; nF: number; tempC: number; qLoad: number; cFall: number; cMiller: number; qMiller: number; iMaxOf: (iB: number) => number },
): { tTurnOn: number; tFall: number } | undefined {
  if (c.vIn50 - c.vLow >= (c.vCond - c.vLow) * (1 - 1e-9)) return undefined;
  const share = c.cSu / (c.cSu + c.cHold);
  const b50 = Math.max(0, c.vIn50 - c.vLow) * share;
  const vt = BOLTZMANN_OVER_Q * (k.tempC + 273.15);
  let vBE = k.vBE;
  let iB = 0;
  let out: { tTurnOn: number; tFall: number } | undefined;
  // Two rounds: V_BE at the fall's collector current (I_B·C_L/C_μ), which sets the turn-on charge.
  for (let round = 0; round < 2; round++) {
    const rise = Math.max(0, vBE - b50);
    const qHold = c.cHold * rise + k.tf * k.iRc50;
    const dIn = rise + qHold / c.cSu;
    const vInOn = c.vIn50 + dIn;
    const iS = Math.max(0, k.vcc - (c.vIn50 + vInOn) / 2) / c.rs;
    if (!(iS > 0)) return undefined;
    const tTurnOn = (qHold + c.cInOwn * dIn) / iS;
    // The input level the fall leaves: raised by the Miller charge passed over C_SU, at most to
    // where the diode path conducts (it then clamps the input, and carries the current itself).
    const vInEnd = Math.min(vInOn + k.qMiller / c.cSu, vBE + c.vCond - k.vBE);
    const iSFall = Math.max(0, k.vcc - (vInOn + vInEnd) / 2) / c.rs;
    iB = (iSFall * c.cSu) / (c.cSu + c.cInOwn) - vBE / k.rbOhms;
    if (!(iB > 0)) return undefined;
    const tFall = loadDischargeSeconds(k.qLoad, k.cFall, k.cMiller, k.qMiller, k.tf, iB, k.iMaxOf(iB), 0);
    out = { tTurnOn, tFall };
    const iC = k.cMiller > 0 ? (iB * k.cFall) / k.cMiller : 1e-3;
    vBE = k.vBE + k.nF * vt * Math.log(Math.max(iC, 1e-6) / 1e-3);
  }
  return out;
}

/** Share of a stepped input diode's stored charge τ_T·I_F that reaches the input node. Behind a
 *  driver's pull-up R (InputDrive.andSourceOhms) the reverse current I_R = ΔV/R clears it in
 *  t_s = τ_T·ln(1 + I_F/I_R) while it recombines at q/τ_T, so I_R·t_s of it arrives: the share
 *  (I_R/I_F)·ln(1 + I_F/I_R) (charge control of reverse recovery, Millman & Halkias ch. 3). A
 *  stiff step with a rise time t_e holds the diode forward for about that long, leaving
 *  e^(−t_e/τ_T) of it; an ideal step, all of it. */
export function inputStoredShare(ttSeconds: number, iFAmps: number, iRAmps: number | undefined, edgeSeconds: number | undefined): number {
  if (!(ttSeconds > 0) || !(iFAmps > 0)) return 1;
  if (iRAmps !== undefined && iRAmps > 0) return (iRAmps / iFAmps) * Math.log1p(iFAmps / iRAmps);
  return edgeSeconds !== undefined && edgeSeconds > 0 ? Math.exp(-edgeSeconds / ttSeconds) : 1;
}

/** A junction diode's storage time when its forward current I_F is reversed to I_R: the stored
 *  charge τ_T·I_F is cleared in τ_T·ln(1 + I_F/I_R) (charge control of reverse recovery). */
export function diodeStorageSeconds(ttSeconds: number, iFAmps: number, iRAmps: number): number {
  if (!(ttSeconds > 0) || !(iFAmps > 0)) return 0;
  if (!(iRAmps > 0)) return Infinity;
  return ttSeconds * Math.log1p(iFAmps / iRAmps);
}

/**
 * Time for the output to fall to 50 % once the transistor conducts (charge control). Beyond the
 * current that holds the static load, the collector current i discharges the load C_L (charge
 * `qLoad`, with any charge the loads' own capacitors sink), while the base current I_B1 both
 * builds the charge τ_F·i behind it and feeds the Miller current C_μ·|dv/dt| = (C_μ/C_L)·i:
 *   τ_F·di/dt = I_B1 − (C_μ/C_L)·i,  i(0) = qHead/τ_F (base charge the input's edge delivered
 *   early),
 * so i moves towards i_∞ = I_B1·C_L/C_μ with the time constant τ = τ_F·C_L/C_μ, and no further
 * than the gain allows (iMax = β·I_B1 less the static load). The charge delivered by time t is
 *   Q(t) = i_∞·t + (i(0) − i_∞)·τ·(1 − e^(−t/τ)).
 * Slow base drive gives the Miller-limited slew C_μ·ΔV/I_B1 plus the build-up τ; fast drive
 * gives the ramp √(2·τ_F·Q/I_B1). Without a collector junction the current rises at I_B1/τ_F
 * to iMax. (Charge-control model after Beaufoy and Sparkes, 1957, as in Millman & Halkias ch. 15;
 * the Miller term is the collector junction's share of the base current.)
 */
export function loadDischargeSeconds(
  qLoad: number,
  cLoad: number,
  cMiller: number,
  qMiller: number,
  tf: number,
  iB1: number,
  iMax: number,
  qHead = 0,
): number {
  if (!(tf > 0)) return qLoad / iMax + Math.max(0, qMiller - qHead) / iB1;
  const i0 = Math.min(qHead / tf, iMax);
  if (!(qLoad > 0)) return 0;
  if (!(cMiller > 0) || !(cLoad > 0)) {
    // Linear ramp from i0 at I_B1/τ_F up to iMax.
    const slope = iB1 / tf;
    const tCap = (iMax - i0) / slope;
    const qCap = i0 * tCap + (slope * tCap * tCap) / 2;
    if (qLoad >= qCap) return tCap + (qLoad - qCap) / iMax;
    return (-i0 + Math.sqrt(i0 * i0 + 2 * slope * qLoad)) / slope;
  }
  const tau = (tf * cLoad) / cMiller;
  const iInf = (iB1 * cLoad) / cMiller;
  const charge = (t: number): number => iInf * t + (i0 - iInf) * tau * -Math.expm1(-t / tau);
  // Time at which the current reaches iMax, if it does.
  const tCap = iInf > iMax && i0 < iMax ? -tau * Math.log((iInf - iMax) / (iInf - i0)) : i0 >= iMax ? 0 : Infinity;
  if (Number.isFinite(tCap)) {
    const qCap = charge(tCap);
    if (qLoad >= qCap) return tCap + (qLoad - qCap) / iMax;
  }
  // Q(t) is increasing and, with i(0) ≥ 0, at least i_∞·(t − τ): bisect on [0, q/i_∞ + τ].
  let lo = 0;
  let hi = Math.min(tCap, qLoad / iInf + tau);
  for (let k = 0; k < 60 && hi - lo > 1e-6 * hi; k++) {
    const mid = (lo + hi) / 2;
    if (charge(mid) < qLoad) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}
