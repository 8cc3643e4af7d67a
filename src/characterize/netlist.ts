// The SPICE text of the characterization runs: one DC sweep and one transient per corner, each
// holding every cell type in every resistor-tolerance case the cell names (the sizing's own
// worst-case directions), each copy with its worst-case load attached. Pure: text and a map of
// which vectors belong to which copy.
//
// - Resistors of the cell under test are scaled by the case's factors; load cells have every
//   resistor at its low end (the most current drawn from a low driver, the lowest clamp level).
// - N identical load cells are one cell with every resistance divided by N and every junction
//   area multiplied by N: the same circuit as N cells in parallel, at the cost of one.
// - Gain: the sizing's β_min is a least current gain I_C/I_B at the operating point (a datasheet
//   minimum h_FE), and the model's BF is its ideal gain, which the high-injection knee IKF lowers
//   to about BF/(1 + I_C/IKF) at collector current I_C (Gummel–Poon: q_b ≈ 1 + I_C/IKF). So the
//   output transistor of each copy gets BF = β_min·(1 + I_C/IKF), with I_C its saturated current
//   with the worst-case load by the sizing's equations: its gain there is β_min. Every other
//   transistor (load cells, the high-fan-out cell's level-shift stage) gets BF = β_min, a little
//   below β_min at its current. The second copy of the transient does the same with β_max. TNOM
//   is 25 °C so the model scales the gain with temperature (XTB) as the sizing does; the cards
//   are changed by src/verify/netlist-text.ts (withModelGain).
import type { SizedDesign } from "../electrical/types.js";
import { spiceNumber, spiceParam } from "../emit/format.js";
import type { VerifyCorner } from "../verify/corners.js";
import { withModelGain } from "../verify/netlist-text.js";
import { defOfType, sizingEnv, type CellDrive, type CellLoad, type LoadGroup } from "./loads.js";

/** One copy of a cell type under test in a run. */
export interface CopySetup {
  cellType: number;
  /** Index into the cell's tolerance cases, and its label. */
  caseIndex: number;
  caseLabel: string;
  /** "min" or "max": the gain case of its transistors. */
  gain: "min" | "max";
  /** Only the diode-AND part of the load (for the unclamped high level). */
  unclamped: boolean;
  /** Vector names: the swept or stepped source, the input pin, the output. */
  sourceVector: string;
  pinVector: string;
  outVector: string;
}

export interface RunSetup {
  kind: "dc" | "tran";
  /** Engine corner (supply × temperature) and the gain limits used. */
  corner: VerifyCorner;
  betaMin: number;
  betaMax: number;
  text: string;
  copies: CopySetup[];
  /** Transient only: when the input goes high and when it goes low again. */
  riseAtSeconds?: number;
  fallAtSeconds?: number;
  stopSeconds?: number;
}

export const FAST_MODEL_SUFFIX = "_BMAX";
const SWITCH_MODEL = "GW_CHAR_SW";
const SWITCH_CONTROL_VOLTS = 5;

function card(m: { name: string; type: string; params: Record<string, number> }, name = m.name): string {
  return `.model ${name} ${m.type}(${Object.entries(m.params).map(([k, v]) => `${k}=${spiceParam(v)}`).join(" ")})`;
}

/** An NPN card of the design's model under another name with BF set (and TNOM 25 °C). */
function npnCard(design: SizedDesign, name: string, bf: number): string {
  const r = withModelGain(card(design.models.npn, name), name, bf);
  if (r.problems.length) throw new Error(r.problems.join("; "));
  return r.text;
}

/** Model cards: the diode, and the NPN at β_min (and β_max) for every transistor but the copies'
 *  output transistors, which get cards of their own (see outputModel). */
function modelCards(design: SizedDesign, betaMin: number, betaMax: number | undefined): string {
  const npn = design.models.npn;
  const cards = [card(design.models.diode), npnCard(design, npn.name, betaMin)];
  // The fast cells' Schottky clamp diode.
  if (design.models.schottky) cards.push(card(design.models.schottky));
  if (betaMax !== undefined) cards.push(npnCard(design, npn.name + FAST_MODEL_SUFFIX, betaMax));
  return cards.join("\n");
}

/** Saturated collector current of a copy's output transistor with the worst-case load, by the
 *  sizing's equations at supply `vcc`: its own R_C current plus what the diode-AND loads sink. */
export function outputCollectorAmps(design: SizedDesign, typeIndex: number, factors: Record<string, number>, load: CellLoad, vcc: number): number {
  const env = sizingEnv(design, vcc);
  const t = design.cellTypes[typeIndex]!;
  const rc = (t.values.rcOhms ?? Infinity) * (factors.rcOhms ?? 1);
  let amps = Math.max(0, vcc - env.dev.vCESatVolts) / rc;
  for (const g of load.andGroups) amps += g.count * defOfType(design, g.cellType).inputLowAmpsWorst(design.cellTypes[g.cellType]!.values, design.resistorTolerance, env);
  return amps;
}

/** BF that gives gain `beta` at collector current `amps` under the model's IKF knee. */
export function gainAtCurrent(design: SizedDesign, beta: number, amps: number): number {
  const ikf = design.models.npn.params.IKF;
  return ikf !== undefined && ikf > 0 ? beta * (1 + amps / ikf) : beta;
}

/** A subcircuit of one cell type with its resistors scaled by `factors`, `count` cells in one;
 *  the output transistor uses `outputModel` (default the same as the others). */
function subckt(design: SizedDesign, typeIndex: number, name: string, factors: Record<string, number>, count: number, npnModel: string, outputModel = npnModel): string {
  const t = design.cellTypes[typeIndex]!;
  const def = defOfType(design, typeIndex);
  const topo = def.topology(t.fanin);
  const area = count === 1 ? "" : ` area=${count}`;
  const lines = [`.subckt ${name} ${topo.pins.join(" ")}`];
  for (const c of topo.components) {
    const nodes = c.nodes.join(" ");
    if (c.kind === "R" || c.kind === "C") {
      const v = t.values[c.valueKey!];
      if (v === undefined) throw new Error(`${t.key}: no value for ${c.valueKey}`);
      const scaled = c.kind === "R" ? (v * (factors[c.valueKey!] ?? 1)) / count : v * count;
      lines.push(`${c.name} ${nodes} ${spiceNumber(scaled, 8)}`);
    } else if (c.kind === "D") lines.push(`${c.name} ${nodes} ${c.model === "schottky" && design.models.schottky ? design.models.schottky.name : design.models.diode.name}${area}`);
    else lines.push(`${c.name} ${nodes} ${c.role === "Q" ? outputModel : npnModel}${area}`);
  }
  lines.push(".ends");
  return lines.join("\n");
}

interface Built {
  /** Model cards of the copies' output transistors. */
  cards: string[];
  subckts: string[];
  elements: string[];
  copies: CopySetup[];
  save: Set<string>;
}

const loadFactors = (design: SizedDesign, typeIndex: number): Record<string, number> => {
  const f: Record<string, number> = {};
  for (const p of defOfType(design, typeIndex).parameters) f[p.key] = 1 - design.resistorTolerance;
  return f;
};

/** Pins of a load cell: the ones on the driven net tied to it, the others at their
 *  non-controlling level (high for diode-AND, ground for diode-OR). */
function loadPins(design: SizedDesign, g: LoadGroup, net: string): string[] {
  const t = design.cellTypes[g.cellType]!;
  const inactive = defOfType(design, g.cellType).inputKind === "or" ? "0" : "vcc";
  return Array.from({ length: t.fanin }, (_, k) => (g.pins.includes(k) ? net : inactive));
}

interface CopyWiring {
  /** The node the cell's first input is tied to, and the source that drives it. */
  pin: string;
  source: string;
  extra: string[];
}

function addCopies(
  design: SizedDesign,
  corner: { supplyVolts: number; betaMin: number; betaMax: number },
  loads: CellLoad[],
  gains: ("min" | "max")[],
  withCaps: boolean,
  wire: (typeIndex: number, prefix: string) => CopyWiring,
  b: Built,
  separateLoads = false,
): void {
  const npn = design.models.npn.name;
  const loadNames = new Map<string, string>();
  const loadSubckt = (g: LoadGroup): string => {
    const k = `${g.cellType}|${g.count}`;
    let n = loadNames.get(k);
    if (!n) {
      n = `gwc_load${loadNames.size}`;
      loadNames.set(k, n);
      b.subckts.push(subckt(design, g.cellType, n, loadFactors(design, g.cellType), g.count, npn));
    }
    return n;
  };
  design.cellTypes.forEach((t, j) => {
    const def = defOfType(design, j);
    const cases = def.toleranceCases(design.resistorTolerance);
    const load = loads[j]!;
    const inactive = def.inputKind === "or" ? "0" : "vcc";
    for (const gain of gains) {
      const model = gain === "min" ? npn : npn + FAST_MODEL_SUFFIX;
      cases.forEach((tc, k) => {
        if (withCaps && tc.skipTiming) return;
        const variants = [false, ...(load.alsoUnclamped && !withCaps && gain === "min" ? [true] : [])];
        for (const unclamped of variants) {
          const prefix = `c${j}_${k}${gain === "max" ? "f" : ""}${unclamped ? "u" : ""}`;
          const sub = `gwc_${prefix}`;
          const ic = outputCollectorAmps(design, j, tc.factors, load, corner.supplyVolts);
          const outModel = `${design.models.npn.name}_${prefix.toUpperCase()}`;
          b.cards.push(npnCard(design, outModel, gainAtCurrent(design, gain === "min" ? corner.betaMin : corner.betaMax, ic)));
          b.subckts.push(subckt(design, j, sub, tc.factors, 1, model, outModel));
          const w = wire(j, prefix);
          b.elements.push(`* ${t.key}, ${tc.label}, β ${gain}${unclamped ? ", diode-AND load only" : ""}`, ...w.extra);
          const out = `${prefix}_out`;
          const pins = Array.from({ length: t.fanin }, (_, i) => (i === 0 ? w.pin : inactive));
          b.elements.push(`X${prefix} ${pins.join(" ")} ${out} vcc ${sub}`);
          const groups = unclamped ? load.andGroups : [...load.andGroups, ...load.orGroups];
          groups.forEach((g, m) => {
            if (!separateLoads) b.elements.push(`XL${prefix}_${m} ${loadPins(design, g, out).join(" ")} ${prefix}_y${m} vcc ${loadSubckt(g)}`);
            else {
              const one = loadSubckt({ ...g, count: 1 });
              for (let i = 0; i < g.count; i++) b.elements.push(`XL${prefix}_${m}_${i} ${loadPins(design, g, out).join(" ")} ${prefix}_y${m}_${i} vcc ${one}`);
            }
          });
          if (withCaps && load.loadPins > 0 && load.wiringFarads > 0) {
            b.elements.push(`CW${prefix} ${out} 0 ${spiceNumber(load.loadPins * load.wiringFarads)}`);
          }
          b.copies.push({
            cellType: j,
            caseIndex: k,
            caseLabel: tc.label,
            gain,
            unclamped,
            sourceVector: `v(${w.source})`,
            pinVector: `v(${w.pin})`,
            outVector: `v(${out})`,
          });
          b.save.add(`v(${w.source})`).add(`v(${w.pin})`).add(`v(${out})`);
        }
      });
    }
  });
}

export interface NetlistOptions {
  /** Every load cell as a cell of its own instead of N alike as one scaled cell (to check the
   *  equivalence; slower). */
  separateLoads?: boolean;
}

/** Sweep step: 10 mV, coarser above 6 V so a sweep stays near 600 points. */
export function sweepStepVolts(supplyVolts: number): number {
  return Math.max(0.01, Number((supplyVolts / 600).toPrecision(2)));
}

/** The DC run at one corner: every copy's first input swept from 0 V to the supply. */
export function dcNetlist(design: SizedDesign, corner: VerifyCorner, loads: CellLoad[], drives: CellDrive[], betaMin: number, options: NetlistOptions = {}): RunSetup {
  const v = corner.supplyVolts;
  const models = modelCards(design, betaMin, undefined);
  const b: Built = { cards: [], subckts: [], elements: [], copies: [], save: new Set(["v(sw)"]) };
  addCopies(design, { supplyVolts: v, betaMin, betaMax: betaMin }, loads, ["min"], false, (j, prefix) => {
    const d = drives[j]!;
    if (d.inputKind === "or") {
      const pin = `${prefix}_in`;
      return { pin, source: "sw", extra: [`RS${prefix} sw ${pin} ${spiceNumber(d.orSourceOhms!, 8)}`] };
    }
    return { pin: "sw", source: "sw", extra: [] };
  }, b, options.separateLoads);
  const lines = [
    `* ${design.netlist.name}: DC transfer of each cell type with its worst-case load, ${corner.engineCorner ?? corner.label}, β_min ${betaMin}`,
    ".options reltol=1e-4 abstol=1e-12 vntol=1e-6",
    models,
    ...b.cards,
    ...b.subckts,
    `VCC vcc 0 DC ${spiceNumber(v, 8)}`,
    "VSW sw 0 DC 0",
    ...b.elements,
    `.dc VSW 0 ${spiceNumber(v, 8)} ${spiceNumber(sweepStepVolts(v))}`,
    `.temp ${corner.tempC}`,
    `.save ${[...b.save].join(" ")}`,
    ".end",
    "",
  ];
  return { kind: "dc", corner, betaMin, betaMax: betaMin, text: lines.join("\n"), copies: b.copies };
}

/** Transient timing: the half period, long enough for the slowest analytic delay to settle. */
export function halfPeriodSeconds(design: SizedDesign): number {
  let slowest = 0;
  for (const t of design.cellTypes) {
    const tm = t.analysis.timing;
    if (tm) slowest = Math.max(slowest, tm.tPHLSeconds, tm.tPLHSeconds);
  }
  const h = Math.max(200e-9, 8 * slowest);
  // A 1-2-5 value at or above h.
  const p = 10 ** Math.floor(Math.log10(h));
  for (const m of [1, 2, 5, 10]) if (m * p >= h * (1 - 1e-9)) return m * p;
  return 10 * p;
}

/** The transient run at one corner: the input steps up at `riseAt` and back down at `fallAt`;
 *  each case is simulated with β_min and with β_max. */
export function tranNetlist(design: SizedDesign, corner: VerifyCorner, loads: CellLoad[], drives: CellDrive[], betaMin: number, betaMax: number, options: NetlistOptions = {}): RunSetup {
  const v = corner.supplyVolts;
  const half = halfPeriodSeconds(design);
  const edge = 1e-9;
  const riseAt = half / 10;
  const fallAt = riseAt + half;
  const stop = fallAt + half;
  const vLow = design.inputDriver.vLowVolts;
  const models = modelCards(design, betaMin, betaMax);
  const b: Built = { cards: [], subckts: [], elements: [], copies: [], save: new Set() };
  const anyOr = drives.some((d) => d.inputKind === "or");
  const anyAnd = drives.some((d) => d.inputKind === "and");
  addCopies(design, { supplyVolts: v, betaMin, betaMax }, loads, ["min", "max"], true, (j, prefix) => {
    const d = drives[j]!;
    if (d.inputKind === "or") {
      // Input low: a switch to ground (a saturated driver); high: the worst-case shared pull-up.
      const pin = `${prefix}_in`;
      return { pin, source: pin, extra: [`RS${prefix} vcc ${pin} ${spiceNumber(d.orSourceOhms!, 8)}`, `S${prefix} ${pin} 0 ctl 0 ${SWITCH_MODEL}`] };
    }
    return { pin: "vin", source: "vin", extra: [] };
  }, b, options.separateLoads);
  const t = (x: number) => spiceNumber(x, 8);
  const lines = [
    `* ${design.netlist.name}: switching of each cell type with its worst-case load, ${corner.engineCorner ?? corner.label}, β_min ${betaMin} and β_max ${betaMax}`,
    models,
    ...b.cards,
    ...(anyOr ? [`.model ${SWITCH_MODEL} SW(RON=5 ROFF=1e9 VT=${SWITCH_CONTROL_VOLTS / 2} VH=0.1)`] : []),
    ...b.subckts,
    `VCC vcc 0 DC ${spiceNumber(v, 8)}`,
    ...(anyAnd ? [`VIN vin 0 PWL(0 ${t(vLow)} ${t(riseAt)} ${t(vLow)} ${t(riseAt + edge)} ${t(v)} ${t(fallAt)} ${t(v)} ${t(fallAt + edge)} ${t(vLow)} ${t(stop)} ${t(vLow)})`] : []),
    ...(anyOr
      ? [`VCTL ctl 0 PWL(0 ${SWITCH_CONTROL_VOLTS} ${t(riseAt)} ${SWITCH_CONTROL_VOLTS} ${t(riseAt + edge)} 0 ${t(fallAt)} 0 ${t(fallAt + edge)} ${SWITCH_CONTROL_VOLTS} ${t(stop)} ${SWITCH_CONTROL_VOLTS})`]
      : []),
    ...b.elements,
    `.tran ${t(half / 500)} ${t(stop)} 0 ${t(half / 500)}`,
    `.temp ${corner.tempC}`,
    `.save ${[...b.save].join(" ")}`,
    ".end",
    "",
  ];
  return { kind: "tran", corner, betaMin, betaMax, text: lines.join("\n"), copies: b.copies, riseAtSeconds: riseAt + edge / 2, fallAtSeconds: fallAt + edge / 2, stopSeconds: stop };
}
