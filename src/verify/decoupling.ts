// Bypass (decoupling) capacitors from the measured switching spikes, and the rows they add to
// the parts list. Common practice: a ceramic capacitor beside each group of gates supplies the
// charge of their switching transients locally, so the spikes do not travel along the supply
// wiring into neighbouring (analog) circuits. Pure.
import type { SizedDesign } from "../electrical/types.js";
import { designatorRanges, eng } from "../emit/format.js";
import type { CellNetlist } from "../map/types.js";
import { cellsToLogic } from "../map/to-logic.js";
import { StepSimulator, type Tri } from "../logic/evaluate.js";
import type { StepSpike } from "./measure.js";

/** Cells a bypass capacitor serves (common practice, from memory: one 100 nF ceramic per one
 *  or two packages of four gates in the TTL and DTL families). */
export const CELLS_PER_GROUP = 8;
/** The customary bypass value (common practice). */
export const CUSTOMARY_FARADS = 100e-9;
/** Supply droop a bypass capacitor may allow, as a fraction of the supply tolerance the design
 *  was sized for (gatewright's choice: a fifth, so droop uses little of that budget). */
export const DROOP_SHARE_OF_TOLERANCE = 0.2;
/** Margin on the computed capacitance for the ceramic's tolerance and its loss of capacitance
 *  under DC bias (common practice: about a factor of two for X7R). */
export const CAPACITANCE_MARGIN = 2;
/** Ceramic capacitor voltage ratings (common practice) and the working-voltage derating. */
export const VOLTAGE_RATINGS = [16, 25, 50, 100, 200];
export const VOLTAGE_DERATING = 2;
/** IEC 60063 E6 mantissas (capacitors are commonly stocked in E6). */
const E6 = [1.0, 1.5, 2.2, 3.3, 4.7, 6.8];

/** Cells whose output changes at each step (0 for the first), from the cells' own logic. */
export function switchedCells(netlist: CellNetlist, vectors: readonly (0 | 1)[][]): number[] {
  const g = cellsToLogic(netlist);
  const sim = new StepSimulator(g);
  const outs = netlist.cells.map((c) => netlist.nets[c.output]!.name);
  let prev: Tri[] | undefined;
  return vectors.map((v) => {
    sim.step(v);
    const now = outs.map((n) => sim.valueOf(n) ?? "X");
    const count = prev ? now.filter((x, k) => x !== "X" && prev![k] !== "X" && x !== prev![k]).length : 0;
    prev = now;
    return count;
  });
}

function e6AtLeast(farads: number): number {
  const p = 10 ** Math.floor(Math.log10(farads));
  for (const m of [...E6, 10]) if (m * p >= farads * (1 - 1e-9)) return m * p;
  return 10 * p;
}

export interface SpikeSource {
  corner: string;
  spikes: readonly StepSpike[];
}

export interface DecouplingAdvice {
  /** Largest switching charge per cell that switched, with where it was measured. */
  chargePerCellCoulombs: number;
  peakPerCellAmps: number;
  measuredAt?: { corner: string; step: number; switchedCells: number; chargeCoulombs: number; excessAmps: number };
  allowedDroopVolts: number;
  cellsPerGroup: number;
  /** C = cells per group × charge per cell / allowed droop. */
  neededFarads: number;
  valueFarads: number;
  valueText: string;
  voltageRatingVolts: number;
  count: number;
  /** Cells of each group, as designators ("U1–U8"). */
  groups: string[];
  /** Designators given to the capacitors (after any the design has). */
  designators: string[];
  /** How the numbers were derived, sentence by sentence. */
  derivation: string[];
}

export function recommendDecoupling(design: SizedDesign, sources: readonly SpikeSource[], switched: readonly number[]): DecouplingAdvice {
  const param = (n: string) => design.parameters.find((p) => p.name === n)?.value;
  const vNom = param("supplyVolts") ?? 5;
  const tol = param("supplyTolerance") ?? 0.05;
  const cells = design.netlist.cells.length;
  let q = 0;
  let ip = 0;
  let at: DecouplingAdvice["measuredAt"];
  for (const src of sources)
    for (const s of src.spikes) {
      const k = switched[s.step] ?? 0;
      if (k <= 0) continue;
      if (s.chargeCoulombs / k > q) {
        q = s.chargeCoulombs / k;
        at = { corner: src.corner, step: s.step, switchedCells: k, chargeCoulombs: s.chargeCoulombs, excessAmps: s.excessAmps };
      }
      ip = Math.max(ip, s.excessAmps / k);
    }
  const droop = vNom * (tol > 0 ? tol : 0.05) * DROOP_SHARE_OF_TOLERANCE;
  const perGroup = Math.max(1, Math.min(CELLS_PER_GROUP, cells));
  const needed = (perGroup * q) / droop;
  const computed = needed > 0 ? e6AtLeast(needed * CAPACITANCE_MARGIN) : 0;
  const value = Math.max(computed, CUSTOMARY_FARADS);
  const vMax = vNom * (1 + tol);
  const rating = VOLTAGE_RATINGS.find((r) => r >= VOLTAGE_DERATING * vMax) ?? VOLTAGE_RATINGS[VOLTAGE_RATINGS.length - 1]!;
  const count = Math.max(1, Math.ceil(cells / perGroup));
  const groups: string[] = [];
  for (let g = 0; g < count; g++) {
    const a = g * perGroup + 1;
    const b = Math.min(cells, (g + 1) * perGroup);
    groups.push(a === b ? `U${a}` : `U${a}–U${b}`);
  }
  const first = design.totals.capacitors + 1;
  const designators = Array.from({ length: count }, (_, k) => `C${first + k}`);
  const derivation: string[] = [];
  if (at) {
    derivation.push(
      `The largest switching charge per switching cell was ${eng(q, "C")} (${eng(at.chargeCoulombs, "C")} above the settled supply current at step ${at.step}, where ${at.switchedCells} cell${at.switchedCells === 1 ? "" : "s"} switched, ${at.corner}); the largest spike per cell was ${eng(ip, "A")}.`,
    );
  } else derivation.push("No switching spike was measured (no cell output changed), so the customary value is given.");
  derivation.push(
    `A capacitor serves a group of up to ${CELLS_PER_GROUP} cells (common practice)${perGroup < CELLS_PER_GROUP ? `, here all ${perGroup}` : ""}, all of which may switch together: it must supply ${perGroup} × ${eng(q, "C")} while the supply droops by at most ${eng(droop, "V")} (a fifth of the ±${Math.round((tol > 0 ? tol : 0.05) * 100)} % supply tolerance the design was sized for): C ≥ ${eng(needed, "F")}.`,
  );
  derivation.push(
    `With a factor of ${CAPACITANCE_MARGIN} for the ceramic's tolerance and loss under DC bias that is ${computed > 0 ? eng(computed, "F") : "nothing"} (E6); gatewright recommends ${eng(value, "F")}${value > computed ? ", the customary bypass value, which covers it" : ""}, rated ${rating} V (at least ${VOLTAGE_DERATING} × the highest supply, ${eng(vMax, "V")}).`,
  );
  derivation.push(`${count} capacitor${count === 1 ? "" : "s"} for ${cells} cell${cells === 1 ? "" : "s"}: one beside each group (${groups.join(", ")}), between the group's supply and ground, with short leads. Add the usual bulk capacitor (about 10 µF) where the supply enters the board (common practice).`);
  const a: DecouplingAdvice = {
    chargePerCellCoulombs: q,
    peakPerCellAmps: ip,
    allowedDroopVolts: droop,
    cellsPerGroup: perGroup,
    neededFarads: needed,
    valueFarads: value,
    valueText: eng(value, "F").replace(" ", ""),
    voltageRatingVolts: rating,
    count,
    groups,
    designators,
    derivation,
  };
  if (at) a.measuredAt = at;
  return a;
}

/** Marker in the description of the rows this adds, so running it again replaces them. */
const BYPASS_MARK = "ceramic bypass capacitor";

function csvField(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Splits one CSV record (RFC 4180, no line breaks inside fields). */
function csvFields(line: string): string[] {
  const out: string[] = [];
  let i = 0;
  while (i <= line.length) {
    if (line[i] === '"') {
      let s = "";
      i++;
      for (;;) {
        const j = line.indexOf('"', i);
        if (j < 0) {
          s += line.slice(i);
          i = line.length;
          break;
        }
        s += line.slice(i, j);
        if (line[j + 1] === '"') {
          s += '"';
          i = j + 2;
        } else {
          i = j + 1;
          break;
        }
      }
      out.push(s);
      i++; // the comma
    } else {
      const j = line.indexOf(",", i);
      if (j < 0) {
        out.push(line.slice(i));
        break;
      }
      out.push(line.slice(i, j));
      i = j + 1;
    }
  }
  return out;
}

function rowKindOf(designators: string): string {
  return /^([A-Z]+)/.exec(designators.trim())?.[1] ?? "";
}

export interface BypassRow {
  quantity: number;
  designators: string;
  value: string;
  tolerance: string;
  rating: string;
  description: string;
}

export function bypassRow(a: DecouplingAdvice): BypassRow {
  return {
    quantity: a.count,
    designators: designatorRanges(a.designators),
    value: a.valueText,
    tolerance: "±10 %",
    rating: `${a.voltageRatingVolts} V`,
    description: `${BYPASS_MARK}, X7R, one beside each group of up to ${CELLS_PER_GROUP} cells (${a.groups.join(", ")})`,
  };
}

/**
 * The parts list (CSV, as src/emit writes it: header, then rows in the order R, C, D, Q) with
 * the bypass capacitors as one row after the resistors and any other capacitors. Rows this
 * function added before are replaced.
 */
export function bomCsvWithBypass(csv: string, a: DecouplingAdvice): string {
  const eol = csv.includes("\r\n") ? "\r\n" : "\n";
  const lines = csv.split(/\r?\n/);
  const trailing = lines.length > 0 && lines[lines.length - 1] === "";
  if (trailing) lines.pop();
  const kept = lines.filter((l, i) => i === 0 || !l.includes(BYPASS_MARK));
  const r = bypassRow(a);
  const row = [String(r.quantity), r.designators, r.value, r.tolerance, r.rating, r.description, ""].map(csvField).join(",");
  let at = kept.length;
  for (let i = 1; i < kept.length; i++) {
    const k = rowKindOf(csvFields(kept[i]!)[1] ?? "");
    if (k === "D" || k === "Q") {
      at = i;
      break;
    }
  }
  kept.splice(at, 0, row);
  return kept.join(eol) + (trailing ? eol : "");
}

/** The parts list for people (Markdown table as src/emit writes it) with the same row, and its
 *  totals line brought up to date. */
export function bomMarkdownWithBypass(md: string, a: DecouplingAdvice): string {
  const lines = md.split("\n");
  const r = bypassRow(a);
  const row = `| ${r.quantity} | ${r.designators} | ${r.value} | ${r.tolerance} | ${r.rating} | ${r.description} |  |`;
  const previous = lines.filter((l) => l.startsWith("|") && l.includes(BYPASS_MARK));
  const previousQty = previous.reduce((s, l) => s + (Number(l.split("|")[1]!.trim()) || 0), 0);
  const kept = lines.filter((l) => !(l.startsWith("|") && l.includes(BYPASS_MARK)));
  const tableRows = kept.map((l, i) => ({ l, i })).filter(({ l }) => /^\|\s*\d+\s*\|/.test(l));
  if (tableRows.length === 0) return md + `\n\nBypass capacitors (gatewright verify --decoupling):\n\n${row}\n`;
  let at = tableRows[tableRows.length - 1]!.i + 1;
  for (const { l, i } of tableRows) {
    const k = rowKindOf(l.split("|")[2] ?? "");
    if (k === "D" || k === "Q") {
      at = i;
      break;
    }
  }
  kept.splice(at, 0, row);
  const hadRow = previous.length > 0;
  return kept
    .map((l) => {
      const m = /^Totals: (\d+) parts, (\d+) distinct part values \((.*)\)\.$/.exec(l);
      if (!m) return l;
      const parts = Number(m[1]) - previousQty + a.count;
      const values = Number(m[2]) + (hadRow ? 0 : 1);
      const order = ["resistor", "capacitor", "diode", "transistor"];
      const counts = new Map<string, number>();
      for (const e of m[3]!.split(/,\s*/)) {
        const x = /^(\d+) (\w+?)s?$/.exec(e.trim());
        if (x) counts.set(x[2]!, Number(x[1]));
      }
      counts.set("capacitor", (counts.get("capacitor") ?? 0) - previousQty + a.count);
      const kinds = order
        .filter((k) => (counts.get(k) ?? 0) > 0)
        .map((k) => `${counts.get(k)} ${k}${counts.get(k) === 1 ? "" : "s"}`)
        .join(", ");
      return `Totals: ${parts} parts, ${values} distinct part values (${kinds}).`;
    })
    .join("\n");
}
