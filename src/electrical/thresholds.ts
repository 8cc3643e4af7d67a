// Input thresholds from the device model cards: the low-input threshold V_IL of a DTL cell as the
// first unity-gain point of its transfer curve (dV_out/dV_in = −1, common practice), computed
// from the same junction equations a SPICE simulator uses, at the operating temperature.
//
// Why not the book's cut-in sum (2·V_γ + V_γBE − V_D, Millman & Halkias ch. 6)? Its fixed drops
// miss two effects that matter at the corners:
// - The input diode of a diode-AND cell carries the whole pull-up current when its input is low.
//   Its drop grows by N·V_T·ln 10 per decade of current (about 0.1 V for N = 1.8), so a small
//   R_P (high fan-out, 12–15 V supplies) lowers V_IL = p_threshold − V_D(input).
// - At the threshold the level-shift diodes carry only the base-return current V_BE/R_B, tens of
//   microamperes, where a junction drifts faster than the −2 mV/°C of a diode at a milliampere.
//
// The model, parametric in the output transistor's base-emitter voltage x (so every step is
// explicit, no iteration of the circuit):
//   I_C = IS_Q(T)·e^(x/(NF·V_T))·(1 + V_CC/VAF),  I_B = I_C/β
//   the chain from the base up to the input node: I = x/R_B + I_B; each diode adds
//   V_D(I) = N·V_T·ln(1 + I/IS_D(T)) + RS·I; a follower's base-emitter junction (high-fan-out
//   cell) adds V_BE(I·β/(β+1)) and passes on only its base current I/(β+1)
//   diode-AND input: I_in = I_pull-up − I_chain, V_in = p − V_D(I_in)
//   diode-OR input: V_in = p, the pin itself; the unity gain is taken against the driver's
//   open-circuit level V_src = V_in + R_src·I_chain, as the characterization does
//   V_out = V_CC − R_C·I_C (loads on the output are left off: a diode-OR load clamps the
//   output and only moves the unity-gain point up, so leaving it off is the safe side).
// Temperature: IS(T) as ngspice's diode and Gummel–Poon models scale it (diode:
// IS·exp(((T/T_nom − 1)·EG/V_T + XTI·ln(T/T_nom))/N); transistor: the same without the /N),
// T_nom = TNOM or, when the card does not say, 27 °C for the diode (ngspice's default) and 25 °C
// for the transistor: verify and the characterization set TNOM 25 °C on the transistor cards, the
// temperature the sizing's gain is referenced to. That gives a V_IL about 10 mV lower at 70 °C
// than the emitted netlist's own cards (ngspice's 27 °C) do, so the claim holds for both.

import type { DeviceAtTemp } from "./devices.js";

/** Diode and NPN SPICE parameters (a model card's `params`). */
export type ModelParams = Record<string, number>;

export interface ThresholdCircuit {
  vccVolts: number;
  tempC: number;
  diode: ModelParams;
  npn: ModelParams;
  /** Least gain of the transistors at this temperature. */
  beta: number;
  /** Junctions from the input node down to the output transistor's base, top first. */
  chain: ("diode" | "follower")[];
  /** Diode-AND input: the input node is pulled up through `pullUpOhms`; `collectorSharedOhms` is
   *  the part of that pull-up that a follower's collector current also flows through (R_X of
   *  the high-fan-out cell). Diode-OR input: the pin is the top of the chain, driven through
   *  `sourceOhms`. */
  input: { kind: "and"; pullUpOhms: number; collectorSharedOhms?: number } | { kind: "or"; sourceOhms: number };
  rbOhms: number;
  rcOhms: number;
}

const K_OVER_Q = 1.380649e-23 / 1.602176634e-19;
const DEFAULT_TNOM_C = 27;
/** TNOM the checking simulations give the transistor cards (src/verify/netlist-text.ts). */
const CHECK_TNOM_NPN_C = 25;

function thermalVolts(tempC: number): number {
  return K_OVER_Q * (tempC + 273.15);
}

/** Saturation current at `tempC` as ngspice scales it; `n` is the emission coefficient (1 for
 *  a transistor's IS). */
function saturationCurrentAt(p: ModelParams, tempC: number, n: number, defaultIs: number, defaultTnomC: number): number {
  const tnom = (p.TNOM ?? defaultTnomC) + 273.15;
  const t = tempC + 273.15;
  const eg = p.EG ?? 1.11;
  const xti = p.XTI ?? 3;
  const vt = thermalVolts(tempC);
  return (p.IS ?? defaultIs) * Math.exp(((t / tnom - 1) * eg / vt + xti * Math.log(t / tnom)) / n);
}

interface Devices {
  vt: number;
  isD: number;
  nD: number;
  rsD: number;
  isQ: number;
  nF: number;
  early: number;
  beta: number;
}

// The sizing search evaluates thousands of value sets at one corner in a row: keep the last
// corner's device constants.
let lastKey: { diode: ModelParams; npn: ModelParams; tempC: number; vcc: number; beta: number } | undefined;
let lastDevices: Devices | undefined;

function devices(c: ThresholdCircuit): Devices {
  const k = lastKey;
  if (k && lastDevices && k.diode === c.diode && k.npn === c.npn && k.tempC === c.tempC && k.vcc === c.vccVolts && k.beta === c.beta) return lastDevices;
  const nD = c.diode.N ?? 1;
  const nF = c.npn.NF ?? 1;
  const vaf = c.npn.VAF ?? c.npn.VA;
  lastKey = { diode: c.diode, npn: c.npn, tempC: c.tempC, vcc: c.vccVolts, beta: c.beta };
  lastDevices = {
    vt: thermalVolts(c.tempC),
    isD: saturationCurrentAt(c.diode, c.tempC, nD, 1e-14, DEFAULT_TNOM_C),
    nD,
    rsD: c.diode.RS ?? 0,
    isQ: saturationCurrentAt(c.npn, c.tempC, 1, 1e-16, CHECK_TNOM_NPN_C),
    nF,
    early: vaf && vaf > 0 ? 1 + c.vccVolts / vaf : 1,
    beta: c.beta,
  };
  return lastDevices;
}

function diodeDrop(d: Devices, amps: number): number {
  const i = Math.max(amps, 1e-18);
  return d.nD * d.vt * Math.log1p(i / d.isD) + d.rsD * i;
}

function baseEmitterFor(d: Devices, collectorAmps: number): number {
  return d.nF * d.vt * Math.log1p(Math.max(collectorAmps, 1e-18) / (d.isQ * d.early));
}

/** The input level at base-emitter voltage `x` of the output transistor: the pin's level, or
 *  (`source`) for a diode-OR input the driver's open-circuit level behind its resistance. The
 *  output level is V_CC − R_C·I_C(x). */
function inputAt(c: ThresholdCircuit, d: Devices, x: number, source: boolean): number {
  const iC = d.isQ * d.early * Math.expm1(x / (d.nF * d.vt));
  let amps = x / c.rbOhms + iC / d.beta;
  let volts = x;
  let followerCollectorAmps = 0;
  for (let k = c.chain.length - 1; k >= 0; k--) {
    if (c.chain[k] === "diode") {
      volts += diodeDrop(d, amps);
    } else {
      const collector = (amps * d.beta) / (d.beta + 1);
      volts += baseEmitterFor(d, collector);
      followerCollectorAmps += collector;
      amps = amps / (d.beta + 1);
    }
  }
  const inp = c.input;
  if (inp.kind === "or") return source ? volts + inp.sourceOhms * amps : volts;
  const shared = inp.collectorSharedOhms ?? 0;
  const pullUp = (c.vccVolts - shared * followerCollectorAmps - volts) / inp.pullUpOhms;
  return volts - diodeDrop(d, pullUp - amps);
}

/** dV_source/dx at `x`, by a central difference (h: 1 µV). */
function inputSlopeAt(c: ThresholdCircuit, d: Devices, x: number): number {
  const h = 1e-6;
  return (inputAt(c, d, x + h, true) - inputAt(c, d, x - h, true)) / (2 * h);
}

/** V_IL: the input level at the first unity-gain point of the transfer curve.
 *
 *  With the output high, −dV_out/dx = R_C·I_C(x)/(NF·V_T) grows e-fold every NF·V_T, while
 *  dV_source/dx = s(x) (the chain's and the input diode's small-signal share) changes slowly.
 *  Unity gain is R_C·I_C(x)/(NF·V_T) = s(x), so x = NF·V_T·ln(s(x)·NF·V_T/(R_C·IS·(1 + V_CC/VAF)))
 *  is a fixed point that the iteration reaches in a few steps (its slope is NF·V_T·s'/s ≪ 1). */
export function inputLowThreshold(c: ThresholdCircuit): number {
  const d = devices(c);
  const scale = d.nF * d.vt;
  const k = scale / (c.rcOhms * d.isQ * d.early);
  let x = scale * Math.log(k);
  for (let it = 0; it < 30; it++) {
    const s = inputSlopeAt(c, d, x);
    if (!(s > 0) || !Number.isFinite(s)) return Number.NaN; // the input no longer controls the cell
    const next = scale * Math.log(s * k);
    if (Math.abs(next - x) < 1e-9) return inputAt(c, d, next, false);
    x = next;
  }
  return Number.NaN;
}

/** Allowance taken off the model's V_IL in what the sizing claims: the model's accuracy against
 *  ngspice's unity-gain point (within 3 mV on the check grid, test/electrical/thresholds.ngspice)
 *  plus the characterization's sweep resolution, so a design sized to the last millivolt of its
 *  required margin still shows that margin in the simulation. */
export const THRESHOLD_ALLOWANCE_VOLTS = 0.01;

/** V_IL of a cell at one operating point from the devices' model cards, less
 *  THRESHOLD_ALLOWANCE_VOLTS, or undefined when the devices carry no model cards (the book's
 *  piecewise-linear device: use its cut-in sum). */
export function modelInputLowThreshold(
  dev: DeviceAtTemp,
  vccVolts: number,
  /** A fresh object (it is completed in place rather than copied: sizing calls this in its
   *  innermost loop). */
  circuit: Pick<ThresholdCircuit, "chain" | "input" | "rbOhms" | "rcOhms">,
): number | undefined {
  if (!dev.models) return undefined;
  const c = circuit as ThresholdCircuit;
  // The threshold does not depend on the load, so the sizing asks for the same one once per
  // load situation: remembered per pair of model cards, keyed by everything else it reads (a
  // hash of the numbers' bits, each entry checked field by field: no strings in the inner loop).
  const inp = c.input;
  const isAnd = inp.kind === "and";
  const a = isAnd ? inp.pullUpOhms : inp.sourceOhms;
  const b = isAnd ? (inp.collectorSharedOhms ?? -1) : -2;
  const chainCode = chainCodeOf(c.chain);
  // The sizing asks for one operating point's threshold for every load situation in a row
  // (src/electrical/evaluate.ts): the last answer is checked first, without hashing.
  const last = lastEntry;
  if (
    last !== undefined && lastDiode === dev.models.diode && lastNpn === dev.models.npn &&
    last.chain === chainCode && last.a === a && last.b === b && last.rb === c.rbOhms && last.rc === c.rcOhms && last.vcc === vccVolts && last.t === dev.tempC && last.beta === dev.betaMin
  ) {
    return Number.isNaN(last.v) ? undefined : last.v;
  }
  let h = mixBits(chainCode, a);
  h = mixBits(h, b);
  h = mixBits(h, c.rbOhms);
  h = mixBits(h, c.rcOhms);
  h = mixBits(h, vccVolts);
  h = mixBits(h, dev.tempC);
  h = mixBits(h, dev.betaMin);
  let byCards = thresholdMemo.get(dev.models.diode)?.get(dev.models.npn);
  if (!byCards) {
    let inner = thresholdMemo.get(dev.models.diode);
    if (!inner) thresholdMemo.set(dev.models.diode, (inner = new WeakMap()));
    inner.set(dev.models.npn, (byCards = { size: 0, buckets: new Map() }));
  }
  const bucket = byCards.buckets.get(h);
  if (bucket) {
    for (const e of bucket) {
      if (e.chain === chainCode && e.a === a && e.b === b && e.rb === c.rbOhms && e.rc === c.rcOhms && e.vcc === vccVolts && e.t === dev.tempC && e.beta === dev.betaMin) {
        remember(dev.models.diode, dev.models.npn, e);
        return Number.isNaN(e.v) ? undefined : e.v;
      }
    }
  }
  c.vccVolts = vccVolts;
  c.tempC = dev.tempC;
  c.diode = dev.models.diode;
  c.npn = dev.models.npn;
  c.beta = dev.betaMin;
  const v = inputLowThreshold(c);
  const out = Number.isFinite(v) ? v - THRESHOLD_ALLOWANCE_VOLTS : undefined;
  if (byCards.size >= THRESHOLD_MEMO_LIMIT) {
    byCards.buckets.clear();
    byCards.size = 0;
  }
  const entry: MemoEntry = { chain: chainCode, a, b, rb: c.rbOhms, rc: c.rcOhms, vcc: vccVolts, t: dev.tempC, beta: dev.betaMin, v: out ?? Number.NaN };
  const list = byCards.buckets.get(h);
  if (list) list.push(entry);
  else byCards.buckets.set(h, [entry]);
  byCards.size++;
  remember(dev.models.diode, dev.models.npn, entry);
  return out;
}

interface MemoEntry {
  chain: number;
  a: number;
  b: number;
  rb: number;
  rc: number;
  vcc: number;
  t: number;
  beta: number;
  /** The threshold, or NaN for none. */
  v: number;
}

const THRESHOLD_MEMO_LIMIT = 200_000;
/** The last threshold answered, with the model cards it was for. */
let lastEntry: MemoEntry | undefined;
let lastDiode: ModelParams | undefined;
let lastNpn: ModelParams | undefined;

function remember(diode: ModelParams, npn: ModelParams, e: MemoEntry): void {
  lastEntry = e;
  lastDiode = diode;
  lastNpn = npn;
}
const thresholdMemo = new WeakMap<ModelParams, WeakMap<ModelParams, { size: number; buckets: Map<number, MemoEntry[]> }>>();

/** The junction chain as a number: one bit per junction (follower 1), above a leading 1. */
function chainCodeOf(chain: readonly ("diode" | "follower")[]): number {
  let x = 1;
  for (const j of chain) x = x * 2 + (j === "follower" ? 1 : 0);
  return x;
}

const bitsF64 = new Float64Array(1);
const bitsU32 = new Uint32Array(bitsF64.buffer);

/** One step of a 32-bit hash over the bits of a double. */
function mixBits(h: number, x: number): number {
  bitsF64[0] = x;
  h = Math.imul(h ^ bitsU32[0]!, 0x9e3779b1);
  h = Math.imul(h ^ bitsU32[1]!, 0x85ebca77);
  return h ^ (h >>> 15);
}
