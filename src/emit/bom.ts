// The parts list: one line per distinct part and value, in the order parts lists usually run
// (resistors, capacitors, diodes, transistors), with compressed designator ranges.
import type { SizedDesign } from "../electrical/types.js";
import { eachComponent } from "../electrical/size.js";
import { compareDesignators, designatorRanges, eng, numberRanges } from "./format.js";
import { csvField, renderTo } from "./render.js";
import type { TextSink } from "./output.js";
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
/** Part objects whose line makeBomRows remembers (placed cells share a few; hand-built lists
 *  may hold one a part). */
const PART_OBJECTS_KEPT = 4096;

/** The parts list's rows, made once a design (the parts list, the report and the JSON all read
 *  them). */
export function bomRows(design: SizedDesign): BomRow[] {
  let rows = rowsMade.get(design);
  if (!rows) rowsMade.set(design, (rows = makeBomRows(design)));
  return rows;
}

function makeBomRows(design: SizedDesign): BomRow[] {
  type Group = { kind: BomRow["kind"]; value: string; tolerance: string; rating: string; description: string; partNumber: string; sortValue: number; designators: string[] };
  // Parts alike on the list share one line: grouped by their texts as printed. Parts with the
  // same raw figures print alike, so each raw combination is formatted once: a part is looked
  // up first as itself (placed cells alike share their part entries, so most parts are one of a
  // few objects), then by value among the few raw combinations seen with that value.
  const groups = new Map<string, Group>();
  const groupOf = (p: Omit<Group, "designators">): Group => {
    const key = [p.kind, p.value, p.tolerance, p.rating, p.description, p.partNumber].join("\u0000");
    let g = groups.get(key);
    if (!g) groups.set(key, (g = { ...p, designators: [] }));
    return g;
  };
  type Part = SizedDesign["components"][number];
  type Seen = { c: Part; group: Group };
  const groupOfPart = new Map<Part, Group>();
  const seenByValue = new Map<number, Seen[]>();
  const alike = (a: Part, b: Part) =>
    a.kind === b.kind &&
    a.valueText === b.valueText &&
    a.partNumber === b.partNumber &&
    a.description === b.description &&
    Object.is(a.value, b.value) &&
    Object.is(a.tolerance, b.tolerance) &&
    Object.is(a.powerRatingWatts, b.powerRatingWatts) &&
    Object.is(a.voltageRatingVolts, b.voltageRatingVolts);
  const lineOf = (c: Part): Group => {
    let seen = seenByValue.get(c.value);
    if (!seen) seenByValue.set(c.value, (seen = []));
    for (const x of seen) if (alike(x.c, c)) return x.group;
    const group = groupOf({
      kind: c.kind,
      value: c.kind === "R" ? eng(c.value, "Ω") : c.kind === "C" ? eng(c.value, "F") : c.partNumber ?? c.valueText,
      tolerance: c.tolerance !== undefined ? `±${Math.round(c.tolerance * 1000) / 10} %` : "",
      rating: c.kind === "R" ? ratingText(c.powerRatingWatts) : c.kind === "C" ? (c.voltageRatingVolts !== undefined ? `${c.voltageRatingVolts} V` : "") : "",
      description: c.description,
      partNumber: c.partNumber ?? "",
      sortValue: c.value,
    });
    // Bounded: past a few raw combinations a value, each part is grouped by its texts alone.
    if (seen.length < 16) seen.push({ c, group });
    return group;
  };
  eachComponent(design, (c, designator) => {
    let group = groupOfPart.get(c);
    // Bounded too: a design whose every part is an object of its own is grouped by value.
    if (!group) {
      group = lineOf(c);
      if (groupOfPart.size < PART_OBJECTS_KEPT) groupOfPart.set(c, group);
    }
    group.designators.push(designator);
  });
  for (const t of tiesOf(design)) {
    groupOf({
      kind: "R",
      value: eng(t.ohms, "Ω"),
      tolerance: "±5 %",
      rating: "1/8 W",
      description: `tie resistor: constant output held ${t.value ? "high" : "low"}`,
      partNumber: "",
      sortValue: t.ohms,
    }).designators.push(t.designator);
  }
  const rows: BomRow[] = [...groups.values()].map((g) => {
    const { list, ranges } = sortedDesignators(g.designators);
    return {
      kind: g.kind,
      quantity: list.length,
      designators: ranges,
      designatorList: list,
      value: g.value,
      tolerance: g.tolerance,
      rating: g.rating,
      description: g.description,
      partNumber: g.partNumber,
      sortValue: g.sortValue,
    };
  });
  rows.sort((a, b) => KIND_ORDER[a.kind] - KIND_ORDER[b.kind] || a.sortValue - b.sortValue || a.description.localeCompare(b.description));
  return rows;
}

/**
 * Designators in natural order (compareDesignators) and as compressed ranges (designatorRanges).
 * A line's designators usually share one letter prefix and come nearly in order: they are then
 * read once into numbers and ordered by them, which is the order compareDesignators gives.
 */
function sortedDesignators(list: string[]): { list: string[]; ranges: string } {
  const n = list.length;
  const first = list[0];
  const prefixLength = first === undefined ? 0 : letterPrefixLength(first);
  const prefix = first?.slice(0, prefixLength) ?? "";
  const nums = new Float64Array(n);
  let same = prefixLength > 0;
  let ascending = true;
  for (let i = 0; i < n && same; i++) {
    const d = list[i]!;
    const num = designatorNumber(d, prefix);
    if (num < 0) same = false;
    else {
      nums[i] = num;
      if (i > 0 && num < nums[i - 1]!) ascending = false;
    }
  }
  if (!same) {
    const sorted = [...list].sort(compareDesignators);
    return { list: sorted, ranges: designatorRanges(sorted) };
  }
  if (ascending) return { list, ranges: numberRanges(prefix, nums) };
  // A stable order by number, as Array.prototype.sort with compareDesignators gives.
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => nums[a]! - nums[b]! || a - b);
  const sorted = order.map((i) => list[i]!);
  const sortedNums = Float64Array.from(order, (i) => nums[i]!);
  return { list: sorted, ranges: numberRanges(prefix, sortedNums) };
}

/** Length of the capital letters a designator starts with. */
function letterPrefixLength(d: string): number {
  let i = 0;
  while (i < d.length && d.charCodeAt(i) >= 65 && d.charCodeAt(i) <= 90) i++;
  return i;
}

/** The number after `prefix` when `d` is exactly `prefix` and digits (/^[A-Z]+\d+$/ with that
 *  prefix), else -1. */
function designatorNumber(d: string, prefix: string): number {
  const p = prefix.length;
  if (d.length <= p || !d.startsWith(prefix)) return -1;
  let n = 0;
  for (let i = p; i < d.length; i++) {
    const c = d.charCodeAt(i);
    if (c < 48 || c > 57) return -1;
    n = n * 10 + (c - 48);
  }
  // Read digit by digit, the number is exact up to 15 digits; longer ones are read as Number
  // reads them.
  return d.length - p <= 15 ? n : Number(d.slice(p));
}

export function bomTotals(rows: BomRow[]) {
  const count = (k: BomRow["kind"]) => rows.filter((r) => r.kind === k).reduce((s, r) => s + r.quantity, 0);
  const names = { R: ["resistor", "resistors"], C: ["capacitor", "capacitors"], D: ["diode", "diodes"], Q: ["transistor", "transistors"] } as const;
  const byKind = (["R", "C", "D", "Q"] as const)
    .filter((k) => count(k) > 0)
    .map((k) => `${count(k)} ${names[k][count(k) === 1 ? 0 : 1]}`);
  return { parts: rows.reduce((s, r) => s + r.quantity, 0), lines: rows.length, byKindText: byKind.join(", ") };
}

function bomView(ctx: EmitContext, files: { netlist: string }) {
  const rows = bomRows(ctx.design);
  const supply = ctx.design.parameters.find((p) => p.name === "supplyVolts")!;
  return {
    designName: ctx.design.netlist.name,
    generatedBy: generatedBy(ctx),
    netlistFile: files.netlist,
    supplyText: eng(supply.value, "V"),
    rows,
    totals: bomTotals(rows),
  };
}

/** The parts list's closing notes, then one a wired-AND net. */
function writeBomNotes(out: TextSink, ctx: EmitContext, rows: BomRow[]): void {
  const notes = [
    "Resistor ratings include 50 % derating at the worst-case dissipation (common practice); check them against your parts' datasheets at your highest ambient temperature.",
    "Diode and transistor values are the generic models of the netlist unless a parts file named your own part numbers.",
    ...(rows.some((r) => r.kind === "C")
      ? ["Speed-up capacitors: ceramic, C0G/NP0 for a value that holds over temperature, rated at the next standard voltage at least twice the highest supply (common practice)."]
      : []),
    ...(ctx.design.models.schottky
      ? [`Clamp diodes (DSC in each fast cell): small-signal Schottky, model ${ctx.design.models.schottky.partNumber ?? ctx.design.models.schottky.name}; a parts file's "schottky" entry names your own part.`]
      : []),
  ];
  for (const n of notes) out(`- ${n}\n`);
  for (const w of wiredNetsOf(ctx.design)) {
    out(`- Wired-AND net ${w.name}: one collector resistor, ${w.pullUp}, for the tied outputs of U${w.driver + 1}, ${w.tied.map((c) => `U${c + 1}`).join(", ")} (the tied cells have none).\n`);
  }
}

export function writeBomMarkdown(out: TextSink, ctx: EmitContext, files: { netlist: string }): void {
  const view = bomView(ctx, files);
  renderTo(out, "bom.md", view, {
    rows: (o) => {
      for (const r of view.rows) o(`| ${r.quantity} | ${r.designators} | ${r.value} | ${r.tolerance} | ${r.rating} | ${r.description} | ${r.partNumber} |\n`);
    },
    notes: (o) => writeBomNotes(o, ctx, view.rows),
  });
}

/** RFC 4180 line breaks (CR LF), in every piece (a piece never ends inside one). */
const crlf = (s: string) => s.replace(/\r?\n/g, "\r\n");

export function writeBomCsv(out: TextSink, ctx: EmitContext, files: { netlist: string }): void {
  const view = bomView(ctx, files);
  renderTo((piece) => out(crlf(piece)), "bom.csv", view, {
    rows: (o) => {
      for (const r of view.rows) o(`${csvField(r.quantity)},${csvField(r.designators)},${csvField(r.value)},${csvField(r.tolerance)},${csvField(r.rating)},${csvField(r.description)},${csvField(r.partNumber)}\n`);
    },
  });
}
