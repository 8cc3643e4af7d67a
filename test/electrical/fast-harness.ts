// Shared by the ngspice checks of the electrical models: model cards and cell subcircuits as
// netlist text, and for the switching-time checks (basic and fast cells) one cell under test
// built from its own topology data, driven by a fast input edge (a voltage step for diode-AND inputs, a switched DTL pull-up for diode-OR
// inputs), with real NAND loads and 3 pF wiring each, run in the embedded ngspice
// (eecircuit-engine), and the analytic estimate at the same conditions.
import { Simulation } from "eecircuit-engine";
import { nandCell, nandInputLowAmps } from "../../src/cells/nand/index.js";
import { CAPACITOR_KEY } from "../../src/cells/fast-kit/index.js";
import type { CellDefinition, CellEnv, CellValues, InputDrive, OutputLoad } from "../../src/cells/types.js";
import { DEFAULT_DEVICES, DEFAULT_SCHOTTKY, devicesAt, schottkyAt, type ModelCard } from "../../src/electrical/devices.js";
import { cellTiming, typicalDrops } from "../../src/electrical/timing.js";
import type { CellTiming } from "../../src/electrical/types.js";

export const d = DEFAULT_DEVICES;
export const sch = DEFAULT_SCHOTTKY.card;
export const card = (m: ModelCard, name = m.name): string => `.model ${name} ${m.type}(${Object.entries(m.params).map(([k, v]) => `${k}=${v}`).join(" ")})`;

export function subckt(name: string, def: CellDefinition, fanin: number, values: CellValues, npnName = d.npn.name): string {
  const t = def.topology(fanin);
  const lines = [`.subckt ${name} ${t.pins.join(" ")}`];
  for (const c of t.components) {
    const tail =
      c.kind === "R" || c.kind === "C" ? String(values[c.valueKey!]) : c.model === "diode" ? d.diode.name : c.model === "schottky" ? sch.name : npnName;
    lines.push(`${c.name} ${c.nodes.join(" ")} ${tail}`);
  }
  lines.push(".ends");
  return lines.join("\n");
}

export class Ngspice {
  private sim?: Simulation;
  private readonly quiet = { info: console.info, error: console.error, log: console.log, warn: console.warn };
  async start(): Promise<void> {
    console.info = console.error = console.warn = console.log = () => {};
    this.sim = new Simulation();
    await this.sim.start();
  }
  stop(): void {
    Object.assign(console, this.quiet);
  }
  async measures(netlist: string): Promise<Record<string, number>> {
    this.sim!.setNetList(netlist);
    await this.sim!.runSim();
    // The engine runs in this thread and its promises settle as microtasks: without a turn of
    // the event loop, a file of simulations would hold timers and messages back for its whole
    // run (a test worker that does not answer its runner for a minute is dropped).
    await new Promise((resolve) => setImmediate(resolve));
    const out: Record<string, number> = {};
    for (const m of this.sim!.getInfo().matchAll(/^\s*(\w+)\s*=\s*([-+0-9.eE]+)/gm)) out[m[1]!.toLowerCase()] = Number(m[2]);
    return out;
  }
}

export const LOAD_RP = 18000;
/** Rise and fall time of the benches' input step (diode-AND inputs). */
export const INPUT_EDGE_SECONDS = 1e-9;
export const LOAD_VALUES = { rpOhms: LOAD_RP, rbOhms: 15000, rcOhms: 4300 };

export interface Case {
  def: CellDefinition;
  values: CellValues;
  vcc: number;
  loads: number;
  /** Extra capacitance on the output (beyond the loads and 3 pF wiring each). */
  extraFarads?: number;
  /** Diode-OR inputs: the driver's pull-up. */
  rs?: number;
  /** Diode-AND inputs, estimate only: a driver's pull-up behind the rising input (absent: the
   *  stiff step the benches use). */
  andSourceOhms?: number;
}

/** Transient of one case: levels and t_PHL/t_PLH at 50 % of each swing. The input is held
 *  high, then low, for `holdSeconds` each (at least 1 µs; at least three times the estimated
 *  t_PLH, so the output has settled where its levels are read: a slow cell read too early gives
 *  a high level short of its final value, and so a wrong 50 % point on both edges). */
export async function simulate(ng: Ngspice, c: Case, tempC = 27): Promise<{ tPHL: number; tPLH: number; vOL: number; vOH: number }> {
  const { def, values, vcc, loads } = c;
  const hold = Math.max(1e-6, Math.ceil((3 * analytic(c).tPLHSeconds) / 1e-7) * 1e-7);
  const us = (s: number): string => `${(s * 1e6).toFixed(3)}u`;
  const tDown = 200e-9 + hold;
  const tEnd = tDown + 1.8 * hold;
  const head = [
    "fast cell timing check",
    card(d.diode),
    card(d.npn),
    card(sch),
    ".model GWSW SW(RON=5 ROFF=1e9 VT=2.5 VH=0.1)",
    subckt("dut", def, 2, values),
    subckt("load", nandCell, 2, LOAD_VALUES),
    `VCC vcc 0 ${vcc}`,
    `.options TEMP=${tempC} TNOM=27`,
  ];
  if (def.inputKind === "and") {
    head.push(`VIN in 0 PWL(0 0.2 200n 0.2 ${us(200e-9 + INPUT_EDGE_SECONDS)} ${vcc} ${us(tDown)} ${vcc} ${us(tDown + INPUT_EDGE_SECONDS)} 0.2 ${us(tEnd)} 0.2)`, "XD in vcc out vcc dut");
  } else {
    head.push(`VC ctl 0 PWL(0 5 200n 5 201n 0 ${us(tDown)} 0 ${us(tDown + 1e-9)} 5 ${us(tEnd)} 5)`, `RS vcc in ${c.rs}`, "S1 in 0 ctl 0 GWSW", "XD in 0 out vcc dut");
  }
  for (let i = 0; i < loads; i++) head.push(`XL${i} out vcc y${i} vcc load`, `CW${i} out 0 3p`);
  if (c.extraFarads) head.push(`CX out 0 ${c.extraFarads}`);
  const tLow = us(tDown - 100e-9);
  const tHigh = us(tEnd - 100e-9);
  head.push(`.tran 0.2n ${us(tEnd)}`, `.meas tran vol FIND v(out) AT=${tLow}`, `.meas tran voh FIND v(out) AT=${tHigh}`, `.meas tran vil FIND v(in) AT=${tHigh}`, `.meas tran vih FIND v(in) AT=${tLow}`);
  const base = head.join("\n");
  const levels = await ng.measures(`${base}\n.end`);
  const mid = (levels.vol! + levels.voh!) / 2;
  const inMid = (levels.vil! + levels.vih!) / 2;
  const t = await ng.measures(
    `${base}\n.meas tran tphl TRIG v(in) VAL=${inMid} RISE=1 TARG v(out) VAL=${mid} FALL=1\n.meas tran tplh TRIG v(in) VAL=${inMid} FALL=1 TARG v(out) VAL=${mid} RISE=1\n.end`,
  );
  return { tPHL: t.tphl!, tPLH: t.tplh!, vOL: levels.vol!, vOH: levels.voh! };
}

/** The analytic estimate at nominal parts and 27 °C (ngspice's default), the model's own gain. */
export function analytic(c: Case, capacitorChargeMargin = 0): CellTiming {
  const { def, values, vcc, loads } = c;
  const bf = d.npn.params.BF!;
  const env: CellEnv = {
    vccVolts: vcc,
    dev: { ...devicesAt(d, 27), ...typicalDrops(d.diode.params, d.npn.params, 27, d.junctionTempCoVoltsPerC), betaMin: bf, betaMax: bf },
    orShareFactor: 1,
    schottky: schottkyAt(DEFAULT_SCHOTTKY, 27),
  };
  const clamp = 2 * env.dev.vDiodeOnVolts + env.dev.vBESatVolts;
  const load: OutputLoad = {
    andLoads: loads,
    andSinkAmps: loads * nandInputLowAmps(env, LOAD_RP),
    orLoads: 0,
    orClampVolts: clamp,
    // As the engine counts them (src/electrical/evaluate.ts): the loads' input diodes at CJO.
    andDiodeFarads: loads * (d.diode.params.CJO ?? 0),
    capacitanceFarads: loads * ((d.diode.params.CJO ?? 0) + 3e-12) + (c.extraFarads ?? 0),
  };
  const drive: InputDrive =
    def.inputKind === "and"
      ? { vLowMaxVolts: 0.2, vHighMinVolts: vcc, orSourceAmps: 0, orSourceOhms: Infinity, orSourceMaxAmps: 0, ...(c.andSourceOhms ? { andSourceOhms: c.andSourceOhms } : { edgeSeconds: INPUT_EDGE_SECONDS }) }
      : { vLowMaxVolts: 0.05, vHighMinVolts: clamp, orSourceAmps: (vcc - clamp) / c.rs!, orSourceOhms: c.rs!, orSourceMaxAmps: (vcc - clamp) / c.rs! };
  const op = def.analyze(values, env, load, drive);
  // The plain estimate unless a margin on a speed-up capacitor's charge is asked for (the engine's:
  // CAPACITOR_CHARGE_MARGIN).
  return cellTiming({ def, values, env, load, drive, op, npn: d.npn.params, diode: d.diode.params, fanin: 2, inputWiringFarads: 0, schottky: sch.params, capacitorChargeMargin });
}

export { CAPACITOR_KEY };
