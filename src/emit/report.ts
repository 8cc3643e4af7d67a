// The design report (x.report.md) and the same facts as JSON (x.json).
import type { CellAnalysis, OperatingFigures, SizedDesign } from "../electrical/types.js";
import { cellById } from "../cells/registry.js";
import { bomRows, bomTotals } from "./bom.js";
import { wiredNetsOf } from "./spice.js";
import { eng, num, parameterText } from "./format.js";
import { renderTo } from "./render.js";
import type { TextSink } from "./output.js";
import { generatedBy, INPUT_HASH_KEY, type EmitContext } from "./context.js";
import { stateJson, stateSummaryText, stateView } from "../sequential/report-view.js";
import { characterizationView } from "../characterize/view.js";

/** The cautions every report and the README carry. */
export function cautions(design: SizedDesign): string[] {
  const supply = design.parameters.find((p) => p.name === "supplyVolts")!.value;
  const list = [
    `Check every resistor's power rating and every diode's and transistor's voltage and current rating at the ${eng(supply, "V")} supply and your highest ambient temperature before you build.`,
    "Work on mains-powered equipment only with proper isolation and qualified practice, and follow your local electrical codes.",
    "These figures are design aids: confirm them by simulation and by measurement on the built circuit.",
  ];
  if (supply > 5.5) list.splice(1, 0, `At ${eng(supply, "V")} currents and dissipation are higher than in 5 V logic: check the parts list ratings and keep supply wiring fused.`);
  return list;
}

function fig(x: OperatingFigures) {
  return {
    i1: eng(x.i1Amps, "A"),
    i2: eng(x.i2Amps, "A"),
    iB: eng(x.iBAmps, "A"),
    iC: eng(x.iCAmps, "A"),
    vOL: eng(x.vOLVolts, "V"),
    vOH: eng(x.vOHVolts, "V"),
  };
}

function valuesText(values: Record<string, number>, openCollector = false): string {
  const own = Object.entries(values)
    .filter(([k]) => !(openCollector && k === "rcOhms") && (k.endsWith("Ohms") || k.endsWith("Farads")))
    // A fast cell's speed-up capacitor (csuFarads) in farads.
    .map(([k, v]) => (k.endsWith("Farads") ? `${k.replace(/Farads$/, "").replace(/^c/, "C_").toUpperCase()} ${eng(v, "F")}` : `${k.replace(/Ohms$/, "").replace(/^r/, "R_").toUpperCase()} ${eng(v, "Ω")}`))
    .join(", ");
  return openCollector && values.rcOhms !== undefined ? `${own}; no R_C (the net's ${eng(values.rcOhms, "Ω")})` : own;
}

/** The wired-AND nets for the report: how many, and the outputs tied. */
function wiredView(d: SizedDesign) {
  const nets = wiredNetsOf(d);
  if (!nets.length) return undefined;
  let tied = 0;
  for (const w of nets) tied += w.tied.length;
  return {
    summary: `${nets.length} net${nets.length === 1 ? "" : "s"}, ${tied} tied output${tied === 1 ? "" : "s"} (${tied} collector resistor${tied === 1 ? "" : "s"} saved)`,
  };
}

/** A table row a wired-AND net: cells on it, the one collector resistor, and the worst high
 *  level, leakage and rise time the sizing found for it. */
function writeWiredRows(out: TextSink, d: SizedDesign): void {
  for (const w of wiredNetsOf(d)) {
    const cells = [w.driver, ...w.tied];
    const analyses = cells.map((c) => d.instances[c]!.analysis);
    const worst = (f: (a: CellAnalysis) => number, pick: (a: number, b: number) => number) => analyses.map(f).reduce((a, b) => pick(a, b), pick === Math.min ? Infinity : -Infinity);
    out(
      `| ${w.name} | U${w.driver + 1} (holds R_C), ${w.tied.map((c) => `U${c + 1}`).join(", ")} | ${w.pullUp} ${eng(w.pullUpOhms, "Ω")} | ${cells.length} | ` +
        `${eng(worst((a) => a.vOHVolts, Math.min), "V")} | ${eng(worst((a) => a.wired?.highLeakageAmps ?? 0, Math.max), "A")} | ${num(worst((a) => a.satMargin, Math.min))} | ${eng(worst((a) => a.timing?.tPLHSeconds ?? 0, Math.max), "s")} |\n`,
    );
  }
}

function constraintValue(v: number, unit: string): string {
  if (unit === "" || unit === "ratio" || unit === "×") return num(v);
  return eng(v, unit);
}

export function reportView(ctx: EmitContext, files: { name: string; what: string }[]) {
  const d = ctx.design;
  const nl = d.netlist;
  const rows = bomRows(d);
  const totals = bomTotals(rows);
  const cellCounts = d.cellTypes.map((t) => `${t.cells.length} × ${t.fn.toUpperCase()}-${t.fanin}${t.variant !== "basic" ? ` (${t.variant})` : ""}${t.openCollector ? " open collector (wired-AND)" : ""}`);
  const eq = ctx.equivalence;
  const partial = eq.cones.filter((c) => !c.exhaustive).length;
  const equivalenceText = eq.equivalent
    ? partial
      ? `the cells compute the source's logic on every vector tried; ${partial} of ${eq.cones.length} cones were checked with random vectors only (partial)`
      : `the cells compute exactly the source's logic (every cone checked exhaustively)`
    : `MISMATCH`;
  const analysisRow = (a: CellAnalysis) => ({
    iB: eng(a.iBAmps, "A"),
    iC: eng(a.iCAmps, "A"),
    iLoad: eng(a.iLoadAmps, "A"),
    satMargin: num(a.satMargin),
    betaNeeded: num(a.betaNeeded),
    fanout: `${a.fanout} (${a.maxFanout})`,
    vOL: eng(a.vOLVolts, "V"),
    vOH: eng(a.vOHVolts, "V"),
    nmL: eng(a.noiseMarginLowVolts, "V"),
    nmH: eng(a.noiseMarginHighVolts, "V"),
    power: `${eng(a.powerLowWatts, "W")} / ${eng(a.powerHighWatts, "W")}`,
  });
  return {
    designName: nl.name,
    generatedBy: generatedBy(ctx),
    commandLine: ctx.commandLine,
    sourceFile: ctx.sourceFile,
    cautions: cautions(d),
    inputs: nl.inputs.map((i) => nl.nets[i]!.name).join(", "),
    outputs: nl.outputs.map((o) => o.name).join(", "),
    stateText: ctx.state?.loops.length ? stateSummaryText(ctx.state) : ctx.stateNames.length ? `${ctx.stateNames.join(", ")} (feedback kept as written)` : "none (combinational)",
    cellsText: `${nl.cells.length}: ${cellCounts.join(", ")}`,
    partsText: `${totals.parts} (${totals.byKindText}); ${totals.lines} distinct part values`,
    powerText: eng(d.totals.staticPowerWatts, "W"),
    currentText: eng(d.totals.supplyCurrentAmps, "A"),
    powerNominalText: eng(d.totals.staticPowerNominalWatts, "W"),
    currentNominalText: eng(d.totals.supplyCurrentNominalAmps, "A"),
    equivalenceText,
    pathText: d.criticalPath
      ? `${d.criticalPath.depth} cells, ${eng(d.criticalPath.delaySeconds, "s")} (${d.criticalPath.nets.join(" → ")})${d.criticalPath.budgetSeconds !== undefined ? `, budget ${eng(d.criticalPath.budgetSeconds, "s")}` : ""}`
      : "",
    parameters: d.parameters.map((p) => ({
      label: p.label,
      valueText: parameterText(p.value, p.unit),
      sourceText: p.source === "user" ? "given" : "default",
    })),
    cornerCount: d.corners.length,
    cornersText: d.corners.join("; "),
    cellRows: d.cellTypes.map((t) => ({ key: t.key, count: t.cells.length, values: valuesText(t.values, t.openCollector), ...analysisRow(t.analysis) })),
    wired: wiredView(d),
    cellDetails: d.cellTypes.map((t) => {
      const def = cellById(t.cellId);
      const tm = t.analysis.timing;
      return {
        key: t.key,
        title: `${def?.title ?? t.cellId}${t.openCollector ? ", open collector: tied onto a wired-AND net, no R_C of its own" : ""}`,
        source: def?.source ?? "the cell's design equations",
        nominal: fig(t.analysis.nominal),
        timingText: tm
          ? `t_PHL ${eng(tm.tPHLSeconds, "s")}, t_PLH ${eng(tm.tPLHSeconds, "s")} (storage ${eng(tm.tStorageSeconds, "s")}, rise ${eng(tm.tRiseSeconds, "s")}) into ${eng(tm.loadCapacitanceFarads, "F")}`
          : "",
        constraints: t.analysis.constraints.map((c) => ({
          label: c.label,
          value: constraintValue(c.value, c.unit),
          limit: `${c.sense === "min" ? "≥" : "≤"} ${constraintValue(c.limit, c.unit)}`,
          margin: `${num(c.margin * 100)} %${c.ok ? "" : " FAILS"}`,
          corner: c.corner,
          binding: c.id === t.analysis.binding,
        })),
      };
    }),
    equivalenceDetail: eq.equivalent
      ? `Before any file was written, the mapped cells were compared with the source logic for every output${ctx.stateNames.length ? " and for the next value of every state signal (with the state signals as free variables)" : ""}.${partial ? " Cones with more than 20 free variables were checked with seeded random vectors: the check is partial for them." : ""}${eq.cones.some((c) => c.limitedBy === "work") ? " The exhaustive check's work budget ran out before some smaller cones; they too were checked with the random vectors only (method: random, work budget)." : ""}`
      : "The mapped cells do not compute the source logic.",
    testbenchFile: files.find((f) => f.name.endsWith(".tb.cir"))?.name ?? "",
    stimulusText: ctx.stimulus.clock
      ? `${ctx.stimulus.clock.cycles} cycles of a clock on ${ctx.stimulus.clock.input} (${ctx.stimulus.vectors.length} steps, four a cycle; ${ctx.stimulus.clock.complete ? "every combination of the other inputs in every state reached" : ctx.stimulus.seed !== undefined ? `seeded random data, seed ${ctx.stimulus.seed}` : "the cycle budget ran out before every state and input pair was tried"})`
      : ctx.stimulus.exhaustive
      ? `every input combination (${ctx.stimulus.vectors.length} steps)`
      : `${ctx.stimulus.vectors.length} seeded random vectors (seed ${ctx.stimulus.seed})`,
    stepText: eng(ctx.stepSeconds, "s"),
    state: stateView(ctx.state, ctx.timing, ctx.stimulus, ctx.stepSeconds),
    anyNotes: d.notes.length + ctx.notes.length > 0,
    optimization: optimizationView(ctx),
    characterization: ctx.characterization ? characterizationView(ctx.characterization) : undefined,
    files,
  };
}

function optimizationView(ctx: EmitContext) {
  const o = ctx.optimization;
  if (!o) return undefined;
  const row = (label: string, t: typeof o.before) => ({ label, cells: t.cells, transistors: t.transistors, diodes: t.diodes, resistors: t.resistors, parts: t.parts, nand2: t.nand2, cost: num(t.cost, 4) });
  const wired = o.mapping.wiredAnd;
  const plain = o.afterWithoutWiredAnd;
  return {
    level: o.level,
    model: o.costModel.description,
    rows: [
      row(`as written, mapped directly${wired ? " (wired-AND allowed)" : ""}`, o.before),
      ...(plain ? [row(`after optimization (--opt ${o.level}), without wired-AND`, plain)] : []),
      row(`after optimization (--opt ${o.level})${plain ? ", with wired-AND" : ""}`, o.after),
    ],
    wiredSavingText: plain ? `Wired-AND saves ${plain.parts - o.after.parts} part${plain.parts - o.after.parts === 1 ? "" : "s"} (${plain.resistors - o.after.resistors} resistors, ${plain.transistors - o.after.transistors} transistors, ${plain.diodes - o.after.diodes} diodes) against the same logic without it.` : "",
    passes: o.passes.map((p) => ({ pass: p.pass, before: num(p.costBefore, 4), after: num(p.costAfter, 4), kept: p.accepted ? "kept" : "dropped (no cheaper)" })),
  };
}

export function writeReport(out: TextSink, ctx: EmitContext, files: { name: string; what: string }[]): void {
  const d = ctx.design;
  renderTo(out, "report.md", reportView(ctx, files), {
    wiredRows: (o) => writeWiredRows(o, d),
    optimizationNotes: (o) => {
      for (const n of ctx.optimization?.notes ?? []) o(`- ${n.signal ? `${n.signal}: ${n.message}` : n.message}\n`);
    },
    cones: (o) => {
      for (const c of ctx.equivalence.cones) {
        const kind = c.kind === "state" ? "state (next value)" : "output";
        const method = c.exhaustive ? "exhaustive" : c.limitedBy === "work" ? "random (partial: work budget)" : "random (partial)";
        o(`| ${c.name} | ${kind} | ${c.support} | ${c.vectors} | ${method} |\n`);
      }
    },
    notes: (o) => {
      for (const n of d.notes) o(`- ${n}\n`);
      for (const n of ctx.notes) o(`- ${n}\n`);
    },
  });
}

/** A list in the JSON whose items are made one by one as they are written. */
class JsonList {
  constructor(
    readonly length: number,
    readonly item: (i: number) => unknown,
    /** Roughly how many lines item i takes (batches of items are kept to a size). */
    readonly weight: (i: number) => number = () => 1,
  ) {}
  toArray(): unknown[] {
    return Array.from({ length: this.length }, (_, i) => this.item(i));
  }
}

/** The JSON's top-level entries, with the lists that grow with the design as JsonLists. */
function jsonDocument(ctx: EmitContext, files: { name: string; what: string }[]): Record<string, unknown> {
  const d = ctx.design;
  const nl = d.netlist;
  const typeKeys = d.cellTypes.map((t) => t.key);
  const wired = wiredNetsOf(d);
  const rows = bomRows(d);
  return {
    generator: { name: ctx.tool.name, version: ctx.tool.version, note: generatedBy(ctx) },
    ...(ctx.inputHash !== undefined ? { [INPUT_HASH_KEY]: ctx.inputHash } : {}),
    design: nl.name,
    source: ctx.sourceFile,
    inputs: nl.inputs.map((i) => nl.nets[i]!.name),
    outputs: nl.outputs.map((o) => o.name),
    stateSignals: ctx.stateNames,
    parameters: d.parameters,
    mode: d.mode,
    series: d.series,
    resistorTolerance: d.resistorTolerance,
    corners: d.corners,
    models: d.models,
    cellTypes: d.cellTypes.map((t) => ({
      key: t.key,
      cell: t.cellId,
      function: t.fn,
      fanin: t.fanin,
      variant: t.variant,
      count: t.cells.length,
      values: t.values,
      openCollector: t.openCollector ?? false,
      analysis: t.analysis,
    })),
    cells: new JsonList(nl.cells.length, (i) => {
      const c = nl.cells[i]!;
      const inst = d.instances[c.index]!;
      return {
        designator: `U${c.index + 1}`,
        type: typeKeys[inst.cellType]!,
        inputs: c.inputs.map((x) => nl.nets[x]!.name),
        output: nl.nets[c.output]!.name,
        parts: inst.designators,
      };
    }),
    nets: new JsonList(nl.nets.length, (i) => {
      const n = nl.nets[i]!;
      return {
        name: n.name,
        fromSource: n.named,
        driver: n.driver.kind === "cell" ? `U${n.driver.cell + 1}` : n.driver.kind === "input" ? "input" : `constant ${n.driver.value}`,
        loads: n.loads.map((l) => ({ cell: `U${l.cell + 1}`, pin: l.pin + 1 })),
        ...(n.tiedCells?.length ? { tied: n.tiedCells.map((c) => `U${c + 1}`) } : {}),
      };
    }),
    wiredNets: new JsonList(wired.length, (i) => {
      const w = wired[i]!;
      return { net: w.name, driver: `U${w.driver + 1}`, tied: w.tied.map((c) => `U${c + 1}`), pullUp: w.pullUp, pullUpOhms: w.pullUpOhms };
    }),
    partsList: new JsonList(
      rows.length,
      (i) => {
        const r = rows[i]!;
        return {
          quantity: r.quantity,
          designators: r.designatorList,
          value: r.value,
          tolerance: r.tolerance,
          rating: r.rating,
          description: r.description,
          partNumber: r.partNumber,
        };
      },
      (i) => rows[i]!.designatorList.length,
    ),
    totals: d.totals,
    criticalPath: d.criticalPath ?? null,
    state: stateJson(ctx.state, ctx.timing),
    equivalence: ctx.equivalence,
    optimization: ctx.optimization ?? null,
    ...(ctx.characterization ? { characterization: ctx.characterization } : {}),
    testbench: {
      stepSeconds: ctx.stepSeconds,
      exhaustive: ctx.stimulus.exhaustive,
      seed: ctx.stimulus.seed ?? null,
      vectors: ctx.stimulus.vectors.map((v) => v.join("")),
      expected: ctx.stimulus.expected.map((e) => e.map((x) => (x === "X" ? "x" : String(x))).join("")),
    },
    notes: [...d.notes, ...ctx.notes],
    cautions: cautions(d),
    files,
  };
}

/** The facts of the report for other programs. Numbers in SI units, names as in the source. */
export function designJson(ctx: EmitContext, files: { name: string; what: string }[]): object {
  const doc = jsonDocument(ctx, files);
  for (const k of Object.keys(doc)) {
    const v = doc[k];
    if (v instanceof JsonList) doc[k] = v.toArray();
  }
  return doc;
}

/** Items of a list stringified together: at most this many, or this many lines' weight. */
const JSON_BATCH_ITEMS = 256;
const JSON_BATCH_WEIGHT = 4096;

/**
 * designJson as `JSON.stringify(json, null, 2) + "\n"` writes it, written entry by entry and,
 * in the lists that grow with the design, a batch of items at a time. Each value is stringified
 * by JSON.stringify itself, nested in arrays as deep as it stands in the document, so it comes
 * out with the document's own indentation; the wrapping brackets are cut off again.
 */
export function writeDesignJson(out: TextSink, ctx: EmitContext, files: { name: string; what: string }[]): void {
  const doc = jsonDocument(ctx, files);
  let first = true;
  out("{");
  for (const key of Object.keys(doc)) {
    const v = doc[key];
    // JSON.stringify leaves out entries it has no text for.
    if (v === undefined || typeof v === "function" || typeof v === "symbol") continue;
    out(`${first ? "" : ","}\n  ${JSON.stringify(key)}: `);
    first = false;
    if (!(v instanceof JsonList)) {
      // "[\n  <value>\n]"
      const text = JSON.stringify([v], null, 2);
      out(text.slice(4, text.length - 2));
      continue;
    }
    if (v.length === 0) {
      out("[]");
      continue;
    }
    out("[\n");
    let batch: unknown[] = [];
    let weight = 0;
    let written = false;
    const flush = () => {
      // "[\n  [\n    <item>,\n    <item>\n  ]\n]"
      const text = JSON.stringify([batch], null, 2);
      if (written) out(",\n");
      out(text.slice(6, text.length - 6));
      written = true;
      batch = [];
      weight = 0;
    };
    for (let i = 0; i < v.length; i++) {
      batch.push(v.item(i));
      weight += v.weight(i);
      if (batch.length >= JSON_BATCH_ITEMS || weight >= JSON_BATCH_WEIGHT) flush();
    }
    if (batch.length) flush();
    out("\n  ]");
  }
  out(first ? "}\n" : "\n}\n");
}
