// The SPICE netlist (x.cir) and its testbench (x.tb.cir): view models for the templates, and
// the sections that grow with the design (instances, ties, input drivers, steps) written line
// by line to the output (see render.ts).
import type { SizedDesign } from "../electrical/types.js";
import { eachComponent } from "../electrical/size.js";
import { eng, parameterText, spiceNumber, spiceParam } from "./format.js";
import { renderTo } from "./render.js";
import { SpiceNamer } from "./spice-names.js";
import { cellById } from "../cells/registry.js";
import { generatedBy, type EmitContext } from "./context.js";
import type { TextSink } from "./output.js";

export interface SpiceNames {
  namer: SpiceNamer;
  /** SPICE node of each net of the cell netlist. */
  net: string[];
  inputs: string[];
  outputs: string[];
}

export function spiceNamesOf(design: SizedDesign): SpiceNames {
  const namer = new SpiceNamer();
  const n = design.netlist;
  // Ports first, in port order, so they get their plain names.
  const net: string[] = new Array(n.nets.length);
  for (const i of n.inputs) net[i] = namer.nameOf(n.nets[i]!.name);
  for (const o of n.outputs) net[o.net] = namer.nameOf(n.nets[o.net]!.name);
  for (const x of n.nets) if (net[x.index] === undefined) net[x.index] = namer.nameOf(x.name);
  return { namer, net, inputs: n.inputs.map((i) => net[i]!), outputs: n.outputs.map((o) => net[o.net]!) };
}

function elementLine(e: SizedDesign["cellTypes"][number]["elements"][number], design: SizedDesign): string {
  const nodes = e.nodes.join(" ");
  switch (e.kind) {
    case "R":
    case "C":
      return `${e.name} ${nodes} ${spiceNumber(e.value!)}`;
    case "D":
      return `${e.name} ${nodes} ${e.model ?? design.models.diode.name}`;
    case "Q":
      return `${e.name} ${nodes} ${e.model ?? design.models.npn.name}`;
  }
}

/** A wired-AND net: open-collector outputs of several cells tied together, with one collector
 *  resistor (the driver's). */
export interface WiredNet {
  net: number;
  name: string;
  /** Cell holding the collector resistor, then the tied cells. */
  driver: number;
  tied: number[];
  /** Designator of the one collector resistor. */
  pullUp: string;
  pullUpOhms: number;
}

const wiredMade = new WeakMap<SizedDesign, WiredNet[]>();

/** The design's wired-AND nets, found once a design (the netlist, the parts list, the report
 *  and the JSON all read them). */
export function wiredNetsOf(design: SizedDesign): WiredNet[] {
  let nets = wiredMade.get(design);
  if (!nets) wiredMade.set(design, (nets = findWiredNets(design)));
  return nets;
}

function findWiredNets(design: SizedDesign): WiredNet[] {
  const out: WiredNet[] = [];
  for (const n of design.netlist.nets) {
    if (n.driver.kind !== "cell" || !n.tiedCells?.length) continue;
    const inst = design.instances[n.driver.cell]!;
    const type = design.cellTypes[inst.cellType]!;
    const rc = type.elements.find((e) => e.kind === "R" && e.name === "RC");
    out.push({ net: n.index, name: n.name, driver: n.driver.cell, tied: [...n.tiedCells], pullUp: inst.designators["RC"] ?? "", pullUpOhms: rc?.value ?? type.values.rcOhms ?? 0 });
  }
  return out;
}

/** "R_P = 4.3 kΩ, R_B = ...", with the pull-up of an open-collector type named as the net's. */
function typeValuesText(t: SizedDesign["cellTypes"][number]): string {
  const label = (k: string) => `${k.replace(/Ohms$/, "").replace(/^r/, "R_").toUpperCase().replace("R_", "R_")}`;
  const own = Object.entries(t.values).filter(([k]) => !(t.openCollector && k === "rcOhms") && (k.endsWith("Ohms") || k.endsWith("Farads")));
  // A fast cell's speed-up capacitor: C_SU in farads.
  const text = own.map(([k, v]) => (k.endsWith("Farads") ? `${k.replace(/Farads$/, "").replace(/^c/, "C_").toUpperCase()} = ${eng(v, "F")}` : `${label(k)} = ${eng(v, "Ω")}`)).join(", ");
  return t.openCollector && t.values.rcOhms !== undefined ? `${text}; no R_C: pulled up by the ${eng(t.values.rcOhms, "Ω")} R_C of its net's driver` : text;
}

/** Resistors that tie a constant output to the supply or to ground. */
export interface Tie {
  net: number;
  value: 0 | 1;
  designator: string;
  ohms: number;
}

const tiesMade = new WeakMap<SizedDesign, Tie[]>();

/** The design's tie resistors, found once a design (the netlist and the parts list read them). */
export function tiesOf(design: SizedDesign): Tie[] {
  let ties = tiesMade.get(design);
  if (!ties) tiesMade.set(design, (ties = findTies(design)));
  return ties;
}

function findTies(design: SizedDesign): Tie[] {
  const tied: { net: number; value: 0 | 1 }[] = [];
  for (const net of design.netlist.nets) {
    if (net.driver.kind !== "tie") continue;
    if (net.loads.length === 0 && net.outputPort === undefined) continue;
    tied.push({ net: net.index, value: net.driver.value });
  }
  if (!tied.length) return [];
  // Tie resistors are numbered after the cells' resistors (counted only when there are ties).
  let next = 0;
  eachComponent(design, (c) => {
    if (c.kind === "R") next++;
  });
  return tied.map((t) => ({ ...t, designator: `R${++next}`, ohms: 1000 }));
}

export function writeNetlist(out: TextSink, ctx: EmitContext, names: SpiceNames): void {
  const d = ctx.design;
  const nl = d.netlist;
  const supply = d.parameters.find((p) => p.name === "supplyVolts");
  const topPorts = [...names.inputs, ...names.outputs, "vcc"].join(" ");
  // The fast cells' Schottky clamp diode has a card of its own when the design uses it.
  const models = [d.models.diode, d.models.npn, ...(d.models.schottky ? [d.models.schottky] : [])].map((m) => ({
    name: m.name,
    type: m.type,
    description: m.partNumber ? `${m.description} (part ${m.partNumber})` : m.description,
    params: Object.entries(m.params)
      .map(([k, v]) => `${k}=${spiceParam(v)}`)
      .join(" "),
  }));
  const cellTypes = d.cellTypes.map((t) => ({
    key: t.key,
    description: `${t.fn.toUpperCase()}-${t.fanin} (${t.variant} DTL cell${t.fanin === 1 ? ", inverter" : ""}${t.openCollector ? ", open collector for a wired-AND net" : ""}); ports: ${t.pins.join(" ")}`,
    valuesText: typeValuesText(t),
    pins: t.pins.join(" "),
    elements: t.elements.map((e) => ({ line: elementLine(e, d) })),
  }));
  const wiredNets = wiredNetsOf(d);
  const view = {
    designName: nl.name,
    generatedBy: generatedBy(ctx),
    commandLine: ctx.commandLine,
    sourceFile: ctx.sourceFile,
    inputs: nl.inputs.map((i) => nl.nets[i]!.name).join(" "),
    outputs: nl.outputs.map((o) => o.name).join(" "),
    supplyText: supply ? eng(supply.value, "V") : "",
    parameters: d.parameters.map((p) => ({
      label: p.label,
      valueText: parameterText(p.value, p.unit),
      sourceText: p.source === "user" ? "given" : "default",
    })),
    anyRenamed: names.namer.anyRenamed(),
    anyWiredNets: wiredNets.length > 0,
    topPorts,
    models,
    cellTypes,
  };
  renderTo(out, "netlist.cir", view, {
    renamed: (o) => names.namer.forEachRenamed((source, spice) => o(`*   ${source} -> ${spice}\n`)),
    wiredNets: (o) => {
      for (const w of wiredNets) {
        o(`*   ${w.name}${names.net[w.net] !== w.name ? ` (node ${names.net[w.net]})` : ""}: U${w.driver + 1} with ${w.pullUp} ${eng(w.pullUpOhms, "Ω")}, tied: ${w.tied.map((c) => `U${c + 1}`).join(", ")}\n`);
      }
    },
    instances: (o) => writeInstances(o, d, names, wiredNets),
    ties: (o) => {
      for (const t of tiesOf(d)) {
        o(`* ${nl.nets[t.net]!.name} is constant ${t.value}: tied to ${t.value ? "the supply" : "ground"} by ${t.designator}\n${t.designator} ${names.net[t.net]} ${t.value ? "vcc" : "0"} ${spiceNumber(t.ohms)}\n`);
      }
    },
  });
}

/** One comment line (the cell's designator, the signal it drives, its parts) and one X line a
 *  cell instance. */
function writeInstances(out: TextSink, d: SizedDesign, names: SpiceNames, wiredNets: WiredNet[]): void {
  const nl = d.netlist;
  const net = names.net;
  const wiredByNet = wiredNets.length ? new Map(wiredNets.map((w) => [w.net, w])) : undefined;
  const typeKeys = d.cellTypes.map((t) => t.key);
  for (const inst of d.instances) {
    const cell = nl.cells[inst.cell]!;
    let nodes = "";
    for (const x of cell.inputs) nodes += `${net[x]!} `;
    let parts = "";
    const designators = inst.designators;
    for (const local in designators) parts += parts === "" ? `${local}=${designators[local]}` : ` ${local}=${designators[local]}`;
    const signal = nl.nets[cell.output]!.name;
    const wired = wiredByNet?.get(cell.output);
    const role = !wired ? "" : cell.tiedOutput ? " (tied on, wired-AND: no collector resistor of its own)" : ` (wired-AND: holds the net's collector resistor ${wired.pullUp})`;
    const u = inst.cell + 1;
    out(`* U${u} drives ${signal}${role}: ${parts}\nXU${u} ${nodes}${net[cell.output]!} vcc ${typeKeys[inst.cellType]!}\n`);
  }
}

export interface TestbenchLevels {
  /** A sampled output below this reads as 0 (the highest level a cell input still reads low). */
  vilVolts: number;
  /** A sampled output above this reads as 1 (the lowest level a cell input reads high). */
  vihVolts: number;
}

/**
 * Thresholds for reading one output in the testbench: those of the cell inputs the output
 * drives inside the design, worst case (a net that feeds diode-OR inputs is clamped high at
 * their input level, which they read as high). An output that drives no cell is read with the
 * strictest thresholds of any cell in the design, as if it fed the next board's gates.
 */
export function outputLevels(design: SizedDesign, output: number): TestbenchLevels {
  return netLevels(design, design.netlist.outputs[output]!.net);
}

/** Thresholds for reading any net of the design (see outputLevels). */
export function netLevels(design: SizedDesign, netIndex: number): TestbenchLevels {
  const net = design.netlist.nets[netIndex]!;
  const supply = design.parameters.find((p) => p.name === "supplyVolts")!.value;
  const types = net.loads.length
    ? net.loads.map((l) => design.cellTypes[design.instances[l.cell]!.cellType]!)
    : design.cellTypes;
  const andTypes = types.filter((t) => cellById(t.cellId)?.inputKind !== "or");
  const orTypes = types.filter((t) => cellById(t.cellId)?.inputKind === "or");
  const vil = Math.min(...types.map((t) => t.analysis.vILVolts));
  // A diode-AND input reads high above its V_IH. A diode-OR input clamps the net at its own
  // input level when the net is high, so for it "high" is any level that turns it on: above
  // its worst-case V_IL (by a small band, so a level on the threshold is not read as 1).
  const vihAnd = Math.max(...andTypes.map((t) => t.analysis.vIHVolts));
  const vihOr = Math.max(...orTypes.map((t) => t.analysis.vILVolts)) + OR_READ_BAND_VOLTS;
  const vih = andTypes.length ? (orTypes.length ? Math.max(vihAnd, vihOr) : vihAnd) : vihOr;
  return {
    vilVolts: Number.isFinite(vil) ? vil : supply * 0.2,
    vihVolts: Number.isFinite(vih) ? vih : supply * 0.5,
  };
}

export const EDGE_FRACTION = 0.002;
/** A net clamped high by diode-OR loads must sit at least this far above their V_IL to read 1. */
export const OR_READ_BAND_VOLTS = 0.1;

/** `.meas` name of a sampled state net. */
export function stateMeasureName(step: number, node: string): string {
  return `s${step}_st_${node}`;
}
/** Base resistor of the testbench's input driver transistors (drive well into saturation). */
export const DRIVER_BASE_OHMS = 2200;
/** The input drivers' base current is at least this many times what saturation needs at the
 *  coldest corner with the least gain (common practice for a hard-saturated switch). */
export const DRIVER_OVERDRIVE = 2;

/**
 * Base resistor of the driver of primary input `net`: DRIVER_BASE_OHMS, or less when the driver
 * must sink more than that gives at the sizing's worst corner: the pull-up's current at the
 * highest supply and the low end of its tolerance, plus every diode-AND load's input current
 * (supply over the load's input pull-up, at its low end), with β_min at the coldest corner.
 */
export function driverBaseOhms(design: SizedDesign, net: number): number {
  const p = (name: string, d: number) => design.parameters.find((x) => x.name === name)?.value ?? d;
  const v = p("supplyVolts", 5);
  const tol = p("supplyTolerance", 0.05);
  const rTol = design.resistorTolerance;
  const vMax = v * (1 + tol);
  const vMin = v * (1 - tol);
  const betaCold = p("betaMin", 30) * ((p("tempMinC", 0) + 273.15) / 298.15) ** p("betaTempExponent", 1.5);
  let amps = vMax / (design.inputDriver.pullUpOhms * (1 - rTol));
  const seen = new Set<number>();
  for (const l of design.netlist.nets[net]!.loads) {
    if (seen.has(l.cell)) continue;
    seen.add(l.cell);
    const t = design.cellTypes[design.instances[l.cell]!.cellType]!;
    if (cellById(t.cellId)?.inputKind === "or") continue;
    const pull = (t.values.rpOhms ?? 0) + (t.values.rxOhms ?? 0);
    if (pull > 0) amps += vMax / (pull * (1 - rTol));
  }
  const base = (Math.max(0.1, vMin - 0.8) * betaCold) / (DRIVER_OVERDRIVE * amps);
  return base >= DRIVER_BASE_OHMS ? DRIVER_BASE_OHMS : Number(base.toPrecision(2));
}
export const SAMPLE_FRACTION = 0.05;

/** Sample time of step i: a little before the step ends. */
export function sampleTime(i: number, stepSeconds: number): number {
  return (i + 1 - SAMPLE_FRACTION) * stepSeconds;
}

/** A state net the testbench samples besides the outputs. */
export interface SampledStateNet {
  /** Source name of the signal. */
  name: string;
  net: number;
  /** SPICE node as the testbench sees it: `xdut.<node>` inside the design, the port's node for
   *  a port. */
  node: string;
  /** Position in Stimulus.stateSignals. */
  index: number;
}

function dutNode(design: SizedDesign, names: SpiceNames, net: number): string {
  const isPort = design.netlist.inputs.includes(net) || design.netlist.outputs.some((o) => o.net === net);
  return isPort ? names.net[net]! : `xdut.${names.net[net]!}`;
}

export function sampledStateNets(design: SizedDesign, names: SpiceNames, stimulus: { stateSignals?: string[] }): SampledStateNet[] {
  if (!stimulus.stateSignals?.length) return [];
  const byName = new Map(design.netlist.nets.map((n) => [n.name, n.index]));
  const out: SampledStateNet[] = [];
  (stimulus.stateSignals ?? []).forEach((name, index) => {
    const net = byName.get(name);
    if (net === undefined || design.netlist.nets[net]!.outputPort !== undefined) return;
    out.push({ name, net, node: dutNode(design, names, net), index });
  });
  return out;
}

/** `.ic` settings: every state net whose starting value the logic decides, at the typical
 *  low or high level of the cell driving it. */
export function initialConditions(design: SizedDesign, names: SpiceNames, initial: Record<string, 0 | 1 | "X"> | undefined): { node: string; name: string; value: 0 | 1; volts: number }[] {
  if (!initial) return [];
  const nl = design.netlist;
  const out: { node: string; name: string; value: 0 | 1; volts: number }[] = [];
  for (const net of nl.stateNets) {
    const x = nl.nets[net]!;
    const v = initial[x.name];
    if (v === undefined || v === "X" || x.driver.kind !== "cell") continue;
    const a = design.instances[x.driver.cell]!.analysis.nominal;
    out.push({ node: dutNode(design, names, net), name: x.name, value: v, volts: v ? a.vOHVolts : a.vOLVolts });
  }
  return out;
}

export function writeTestbench(out: TextSink, ctx: EmitContext, names: SpiceNames, files: { netlist: string; testbench: string }): void {
  const d = ctx.design;
  const nl = d.netlist;
  const st = ctx.stimulus;
  const T = ctx.stepSeconds;
  const edge = T * EDGE_FRACTION;
  const supply = d.parameters.find((p) => p.name === "supplyVolts")!.value;
  // Each input is driven the way a DTL output drives it: a pull-up resistor to the supply and a
  // saturating transistor to ground, whose base a PWL source switches.
  const drv = d.inputDriver;
  const baseDrive = supply;
  const writeSource = (o: TextSink, node: string, k: number) => {
    // The control source is high when the input must be low.
    const level = (bit: 0 | 1) => (bit ? 0 : baseDrive);
    const pts: string[] = [`0 ${spiceNumber(level(st.vectors[0]![k]!))}`];
    for (let i = 1; i < st.vectors.length; i++) {
      const prev = st.vectors[i - 1]![k]!;
      const cur = st.vectors[i]![k]!;
      if (prev === cur) continue;
      pts.push(`${spiceNumber(i * T)} ${spiceNumber(level(prev))}`);
      pts.push(`${spiceNumber(i * T + edge)} ${spiceNumber(level(cur))}`);
    }
    let text =
      `* input ${nl.nets[nl.inputs[k]!]!.name}: pull-up ${eng(drv.pullUpOhms, "Ω")}, transistor to ground\n` +
      `R_PU_${node} vcc ${node} ${spiceNumber(drv.pullUpOhms)}\n` +
      `Q_DRV_${node} ${node} drvb_${node} 0 ${d.models.npn.name}\n` +
      `R_DRV_${node} drvc_${node} drvb_${node} ${spiceNumber(driverBaseOhms(d, nl.inputs[k]!))}\n`;
    let line = `V_DRV_${node} drvc_${node} 0 PWL(`;
    pts.forEach((p, i) => {
      if (line.length + p.length > 100) {
        text += line + "\n";
        line = "+ ";
      }
      line += p + (i < pts.length - 1 ? " " : ")");
    });
    o(text + line + "\n");
  };
  const stateNets = sampledStateNets(d, names, st);
  const tri = (x: 0 | 1 | "X") => (x === "X" ? "x" : String(x));
  const phaseOf = (i: number) => (st.clock ? (i === 0 ? "start, clock low: the initial state released" : ["data change, clock low: the state just before the next rising edge", "clock rises", "clock high", "clock falls"][(i - 1) % 4]!) : "");
  // A step's .meas lines differ only in the step's number and time: the part of each line
  // between them is made once for all steps, and each line is its own piece (a design with
  // thousands of outputs makes steps of hundreds of kilobytes, which the writer batches).
  const outputMeas = names.outputs.map((o2) => `_${o2} FIND v(${o2}) AT=`);
  const writeSteps = (o: TextSink) => {
    for (let i = 0; i < st.vectors.length; i++) {
      const stateExpected = stateNets.length ? stateNets.map((s) => tri(st.stateExpected![i]![s.index]!)).join("") : "";
      const phase = phaseOf(i);
      const at = spiceNumber(sampleTime(i, T), 8);
      o(`* step ${i} at ${eng(sampleTime(i, T), "s", 4)}: inputs ${st.vectors[i]!.join("")} -> expect ${st.expected[i]!.map(tri).join("")}${stateExpected ? `, state ${stateExpected}` : ""}${phase ? ` (${phase})` : ""}\n`);
      const head = `.meas tran s${i}`;
      const tail = `${at}\n`;
      for (const m of outputMeas) o(head + m + tail);
      for (const s of stateNets) o(`.meas tran ${stateMeasureName(i, names.net[s.net]!)} FIND v(${s.node}) AT=${tail}`);
    }
  };
  const ics = initialConditions(d, names, st.initial);
  const clock = st.clock;
  const stop = st.vectors.length * T;
  const view = {
    designName: nl.name,
    generatedBy: generatedBy(ctx),
    testbenchFile: files.testbench,
    netlistFile: files.netlist,
    stimulusText: clock
      ? `${clock.cycles} clock cycles on ${clock.input} (${st.vectors.length} steps, four a cycle), ${clock.complete ? `every combination of the other inputs in every state reached (${clock.pairsCovered} state and input pairs)` : st.seed !== undefined ? `a seeded random sequence of the other inputs (seed ${st.seed})` : `${clock.pairsCovered} of the ${clock.pairsFound} state and input pairs found (cycle budget reached)`}`
      : st.exhaustive
        ? `every combination of its ${names.inputs.length} input${names.inputs.length === 1 ? "" : "s"} in Gray-code order${ctx.stateNames.length ? ", forward and back" : ""} (${st.vectors.length} steps)`
        : `${st.vectors.length} random vectors (seed ${st.seed})`,
    clockLines: clock
      ? [
          `Clock ${clock.input}: period ${eng(4 * T, "s")} (${eng(1 / (4 * T), "Hz")}), high for the middle two steps of each`,
          `cycle. The other inputs change one step (a quarter period) before each rising edge.`,
        ]
      : [],
    icComment: ics.length
      ? `Initial state (held while the operating point is found, released at t = 0): ${ics.map((ic) => `${ic.name} = ${ic.value}`).join(", ")}${st.defaults?.length ? `; ${st.defaults.join(", ")} start${st.defaults.length === 1 ? "s" : ""} at 0 because no init declaration sets ${st.defaults.length === 1 ? "it" : "them"}` : ""}.`
      : "",
    stateNodes: stateNets.map((s) => s.name).join(" "),
    stepText: eng(T, "s"),
    sampleText: eng(T * SAMPLE_FRACTION, "s"),
    pullUpText: eng(d.inputDriver.pullUpOhms, "Ω"),
    optionsLine: "reltol=1e-4 abstol=1e-12 vntol=1e-6 itl4=100",
    supplyValue: spiceNumber(supply),
    dutNodes: [...names.inputs, ...names.outputs, "vcc"].join(" "),
    tranStep: spiceNumber(T / 200),
    tranStop: spiceNumber(stop),
    tranMaxStep: spiceNumber(T / 50),
    saveList: [...names.inputs, ...names.outputs].map((x) => `v(${x})`).concat(stateNets.map((s) => `v(${s.node})`), ["i(vcc)"]).join(" "),
    outputs: nl.outputs.map((o) => o.name).join(" "),
  };
  const threshold = (o: TextSink, node: string, lv: TestbenchLevels) => o(`*   ${node}: 0 at or below ${eng(lv.vilVolts, "V")}, 1 at or above ${eng(lv.vihVolts, "V")}\n`);
  renderTo(out, "testbench.cir", view, {
    thresholds: (o) => {
      names.outputs.forEach((node, k) => threshold(o, node, outputLevels(d, k)));
      for (const sn of stateNets) threshold(o, sn.node, netLevels(d, sn.net));
    },
    sources: (o) => names.inputs.forEach((node, k) => writeSource(o, node, k)),
    icLines: (o) => {
      let line = "";
      for (const ic of ics) line += ` v(${ic.node})=${spiceNumber(ic.volts, 4)}`;
      o(line + "\n");
    },
    steps: writeSteps,
  });
}
