// The parts list: one line per distinct part and value, in the order parts lists usually run
// (resistors, capacitors, diodes, transistors), with compressed designator ranges.
import type { SizedDesign } from "../electrical/types.js";
import { compareDesignators, designatorRanges, eng } from "./format.js";
import { render } from "./render.js";
import { tiesOf, wiredNetsOf } from "./spice.js";
import { generatedBy, type EmitContext } from "./context.js";

export interface BomRow {
  kind: "R" | "C" | "D" | "Q";
  quantity: number;
  designators: string;
  designatorList: string[];
  value: string;
  tolerance: string;
  rating: string;
  description: string;
  partNumber: string;
  /** For ordering only. */
  sortValue: number;
}

const KIND_ORDER = { R: 0, C: 1, D: 2, Q: 3 } as const;

function ratingText(watts: number | undefined): string {
  if (watts === undefined) return "";
  const fractions: [number, string][] = [
    [0.125, "1/8 W"],
    [0.25, "1/4 W"],
    [0.5, "1/2 W"],
  ];
  for (const [w, t] of fractions) if (Math.abs(watts - w) < 1e-9) return t;
  return eng(watts, "W");
}

const rowsMade = new WeakMap<SizedDesign, BomRow[]>();

/** The parts list's rows, made once a design (the parts list, the report and the JSON all read
 *  them). */
export function bomRows(design: SizedDesign): BomRow[] {
  let rows = rowsMade.get(design);
  if (!rows) rowsMade.set(design, (rows = makeBomRows(design)));
  return rows;
}

function makeBomRows(design: SizedDesign): BomRow[] {
  type Part = { designator: string; kind: BomRow["kind"]; value: string; tolerance: string; rating: string; description: string; partNumber: string; sortValue: number };
  const parts: Part[] = design.components.map((c) => ({
    designator: c.designator,
    kind: c.kind,
    value: c.kind === "R" ? eng(c.value, "Ω") : c.kind === "C" ? eng(c.value, "F") : c.partNumber ?? c.valueText,
    tolerance: c.tolerance !== undefined ? `±${Math.round(c.tolerance * 1000) / 10} %` : "",
    rating: c.kind === "R" ? ratingText(c.powerRatingWatts) : c.kind === "C" ? (c.voltageRatingVolts !== undefined ? `${c.voltageRatingVolts} V` : "") : "",
    description: c.description,
    partNumber: c.partNumber ?? "",
    sortValue: c.value,
  }));
  for (const t of tiesOf(design)) {
    parts.push({
      designator: t.designator,
      kind: "R",
      value: eng(t.ohms, "Ω"),
      tolerance: "±5 %",
      rating: "1/8 W",
      description: `tie resistor: constant output held ${t.value ? "high" : "low"}`,
      partNumber: "",
      sortValue: t.ohms,
    });
  }
  const groups = new Map<string, Part[]>();
  for (const p of parts) {
    const key = [p.kind, p.value, p.tolerance, p.rating, p.description, p.partNumber].join("\u0000");
    if (!groups.has(key)) groups.set(key, []);
    groups.get(key)!.push(p);
  }
  const rows: BomRow[] = [...groups.values()].map((ps) => {
    const list = ps.map((p) => p.designator).sort(compareDesignators);
    const p = ps[0]!;
    return {
      kind: p.kind,
      quantity: ps.length,
      designators: designatorRanges(list),
      designatorList: list,
      value: p.value,
      tolerance: p.tolerance,
      rating: p.rating,
      description: p.description,
      partNumber: p.partNumber,
      sortValue: p.sortValue,
    };
  });
  rows.sort((a, b) => KIND_ORDER[a.kind] - KIND_ORDER[b.kind] || a.sortValue - b.sortValue || a.description.localeCompare(b.description));
  return rows;
}

export function bomTotals(rows: BomRow[]) {
  const count = (k: BomRow["kind"]) => rows.filter((r) => r.kind === k).reduce((s, r) => s + r.quantity, 0);
  const names = { R: ["resistor", "resistors"], C: ["capacitor", "capacitors"], D: ["diode", "diodes"], Q: ["transistor", "transistors"] } as const;
  const byKind = (["R", "C", "D", "Q"] as const)
    .filter((k) => count(k) > 0)
    .map((k) => `${count(k)} ${names[k][count(k) === 1 ? 0 : 1]}`);
  return { parts: rows.reduce((s, r) => s + r.quantity, 0), lines: rows.length, byKindText: byKind.join(", ") };
}

export function renderBom(ctx: EmitContext, files: { netlist: string }): { markdown: string; csv: string } {
  const rows = bomRows(ctx.design);
  const supply = ctx.design.parameters.find((p) => p.name === "supplyVolts")!;
  const view = {
    designName: ctx.design.netlist.name,
    generatedBy: generatedBy(ctx),
    netlistFile: files.netlist,
    supplyText: eng(supply.value, "V"),
    rows,
    totals: bomTotals(rows),
    notes: [
      "Resistor ratings include 50 % derating at the worst-case dissipation (common practice); check them against your parts' datasheets at your highest ambient temperature.",
      "Diode and transistor values are the generic models of the netlist unless a parts file named your own part numbers.",
      ...(rows.some((r) => r.kind === "C")
        ? ["Speed-up capacitors: ceramic, C0G/NP0 for a value that holds over temperature, rated at the next standard voltage at least twice the highest supply (common practice)."]
        : []),
      ...(ctx.design.models.schottky
        ? [`Clamp diodes (DSC in each fast cell): small-signal Schottky, model ${ctx.design.models.schottky.partNumber ?? ctx.design.models.schottky.name}; a parts file's "schottky" entry names your own part.`]
        : []),
      ...wiredNetsOf(ctx.design).map(
        (w) => `Wired-AND net ${w.name}: one collector resistor, ${w.pullUp}, for the tied outputs of U${w.driver + 1}, ${w.tied.map((c) => `U${c + 1}`).join(", ")} (the tied cells have none).`,
      ),
    ],
  };
  const csv = render("bom.csv", view).replace(/\r?\n/g, "\r\n"); // RFC 4180 line breaks
  return { markdown: render("bom.md", view), csv };
}
