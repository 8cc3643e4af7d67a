// Reverse leakage currents for the high level of a wired-AND net: every transistor on the net is
// off and every diode-AND load's input diode is reverse biased, and what they leak comes through
// the one collector resistor.
//
// - Transistor: collector-base leakage I_CBO. The off transistor's base is returned to ground
//   through R_B (and the level-shift diodes), so I_CBO flows out through R_B and lifts the base
//   by I_CBO·R_B, millivolts, below the base-emitter cut-in: the collector then leaks about
//   I_CBO, not the open-base I_CEO = (1 + β)·I_CBO (the textbook cutoff condition for a base
//   returned through a resistor, from memory). That holds while I_CBO·R_B stays below the cut-in
//   (with the default below, R_B up to about 360 kΩ at 70 °C and 120 kΩ at 85 °C);
//   baseHeldOff says whether it does. From the model card, the reverse-biased collector junction of the
//   Gummel-Poon model carries IS·(1 + 1/BR) + ISC at the collector with the base at the emitter
//   (ngspice BJT model: transport, ideal and leakage parts), moved to temperature like a diode; generic cards give femtoamperes
//   there, far below real parts, so the larger of that and a documented default is used: a
//   datasheet-class maximum I_CBO of 50 nA at 25 °C for small-signal NPN transistors (from
//   memory), doubling every 10 °C (common practice).
// - Diode: the reverse saturation current of the card at temperature, SPICE's temperature law
//   IS(T) = IS·(T/T_nom)^(XTI/N)·exp((T/T_nom − 1)·EG/(N·V_t)), T_nom = 27 °C (ngspice default).

/** I_CBO at 25 °C when the transistor card gives none (datasheet class maximum, from memory). */
export const DEFAULT_ICBO_25C_AMPS = 50e-9;
/** Leakage doubles about every this many degrees (common practice). */
export const LEAKAGE_DOUBLING_C = 10;

const BOLTZMANN_OVER_Q = 1.380649e-23 / 1.602176634e-19;
const TNOM_K = 27 + 273.15;

/** Collector leakage I_CBO of one off transistor at `tempC`: the larger of the card's figure and
 *  the documented default. */
export function collectorLeakageAmps(npn: Record<string, number>, tempC: number): number {
  return Math.max(cardCollectorLeakageAmps(npn, tempC), DEFAULT_ICBO_25C_AMPS * 2 ** ((tempC - 25) / LEAKAGE_DOUBLING_C));
}

/** Whether a base returned through `rbOhms` holds the transistor off against its own leakage:
 *  I_CBO·R_B below the base-emitter cut-in (the leakage then flows out through R_B, not into
 *  the emitter junction). */
export function baseHeldOff(npn: Record<string, number>, tempC: number, rbOhms: number, vBECutInVolts: number): boolean {
  return collectorLeakageAmps(npn, tempC) * rbOhms < vBECutInVolts;
}

/** Reverse collector current of the model card at `tempC` with the base at the emitter:
 *  IS·(1 + 1/BR) (emission NR) plus ISC (emission NC), each moved to temperature like a diode's
 *  saturation current. */
export function cardCollectorLeakageAmps(npn: Record<string, number>, tempC: number): number {
  const eg = npn.EG ?? 1.11;
  const xti = npn.XTI ?? 3;
  const ideal = (npn.IS ?? 1e-16) * (1 + 1 / (npn.BR ?? 1));
  const leak = npn.ISC ?? 0;
  return saturationAt(ideal, npn.NR ?? 1, eg, xti, tempC) + saturationAt(leak, npn.NC ?? 2, eg, xti, tempC);
}

/** A junction's saturation current at `tempC` (SPICE's law, T_nom 27 °C). */
function saturationAt(is: number, n: number, eg: number, xti: number, tempC: number): number {
  if (!(is > 0)) return 0;
  const t = tempC + 273.15;
  const ratio = t / TNOM_K;
  return is * ratio ** (xti / n) * Math.exp(((ratio - 1) * eg) / (n * BOLTZMANN_OVER_Q * t));
}

/** Reverse leakage of one diode at `tempC`: the card's IS moved to that temperature. */
export function diodeReverseLeakageAmps(diode: Record<string, number>, tempC: number): number {
  return saturationAt(diode.IS ?? 1e-14, diode.N ?? 1, diode.EG ?? 1.11, diode.XTI ?? 3, tempC);
}
