// The analytic switching times against ngspice transients (eecircuit-engine runs ngspice
// in-process). The grid below was chosen after the model was written and was not used to tune
// it. Each cell under test is built from its own topology data; the input switches fast (a
// voltage step for diode-AND inputs, a switched DTL pull-up for diode-OR inputs) and the output
// carries real NAND loads plus 3 pF wiring each. Delays are measured at 50 % of each swing.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Simulation } from "eecircuit-engine";
import { nandCell, nandInputLowAmps } from "../../src/cells/nand/index.js";
import { norCell } from "../../src/cells/nor/index.js";
import { nandHifanCell } from "../../src/cells/nand-hifan/index.js";
import type { CellDefinition, CellEnv, CellValues, InputDrive, OutputLoad } from "../../src/cells/types.js";
import { DEFAULT_DEVICES, devicesAt, type ModelCard } from "../../src/electrical/devices.js";
import { cellTiming, typicalDrops } from "../../src/electrical/timing.js";

const d = DEFAULT_DEVICES;
const card = (m: ModelCard): string => `.model ${m.name} ${m.type}(${Object.entries(m.params).map(([k, v]) => `${k}=${v}`).join(" ")})`;

function subckt(name: string, def: CellDefinition, fanin: number, values: CellValues): string {
  const t = def.topology(fanin);
  const lines = [`.subckt ${name} ${t.pins.join(" ")}`];
  for (const c of t.components) {
    const tail = c.kind === "R" ? String(values[c.valueKey!]) : c.model === "diode" ? d.diode.name : d.npn.name;
    lines.push(`${c.name} ${c.nodes.join(" ")} ${tail}`);
  }
  lines.push(".ends");
  return lines.join("\n");
}

let sim: Simulation;
const quiet = { info: console.info, error: console.error, log: console.log, warn: console.warn };
beforeAll(async () => {
  console.info = console.error = console.warn = console.log = () => {};
  sim = new Simulation();
  await sim.start();
}, 120_000);
afterAll(() => Object.assign(console, quiet));

async function measures(netlist: string): Promise<Record<string, number>> {
  sim.setNetList(netlist);
  await sim.runSim();
  const out: Record<string, number> = {};
  for (const m of sim.getInfo().matchAll(/^\s*(\w+)\s*=\s*([-+0-9.eE]+)/gm)) out[m[1]!.toLowerCase()] = Number(m[2]);
  return out;
}

const LOAD_RP = 18000;
async function simulate(def: CellDefinition, values: CellValues, vcc: number, loads: number, rSourceOhms?: number) {
  const head = [
    "timing check",
    card(d.diode),
    card(d.npn),
    ".model GWSW SW(RON=5 ROFF=1e9 VT=2.5 VH=0.1)",
    subckt("dut", def, 2, values),
    subckt("load", nandCell, 2, { rpOhms: LOAD_RP, rbOhms: 15000, rcOhms: 4300 }),
    `VCC vcc 0 ${vcc}`,
  ];
  if (def.inputKind === "and") {
    head.push(`VIN in 0 PWL(0 0.2 200n 0.2 201n ${vcc} 1.2u ${vcc} 1.201u 0.2 3u 0.2)`, "XD in vcc out vcc dut");
  } else {
    head.push("VC ctl 0 PWL(0 5 200n 5 201n 0 1.2u 0 1.201u 5 3u 5)", `RS vcc in ${rSourceOhms}`, "S1 in 0 ctl 0 GWSW", "XD in 0 out vcc dut");
  }
  for (let i = 0; i < loads; i++) head.push(`XL${i} out vcc y${i} vcc load`, `CW${i} out 0 3p`);
  head.push(".tran 0.2n 3u", ".meas tran vol FIND v(out) AT=1.1u", ".meas tran voh FIND v(out) AT=2.9u", ".meas tran vil FIND v(in) AT=2.9u", ".meas tran vih FIND v(in) AT=1.1u");
  const base = head.join("\n");
  const levels = await measures(`${base}\n.end`);
  const mid = (levels.vol! + levels.voh!) / 2;
  const inMid = (levels.vil! + levels.vih!) / 2;
  const t = await measures(
    `${base}\n.meas tran tphl TRIG v(in) VAL=${inMid} RISE=1 TARG v(out) VAL=${mid} FALL=1\n.meas tran tplh TRIG v(in) VAL=${inMid} FALL=1 TARG v(out) VAL=${mid} RISE=1\n.end`,
  );
  return { tPHL: t.tphl!, tPLH: t.tplh! };
}

function analytic(def: CellDefinition, values: CellValues, vcc: number, loads: number, rSourceOhms?: number) {
  // Nominal parts at 27 °C (ngspice's default temperature), the model's own gain.
  const bf = d.npn.params.BF!;
  const env: CellEnv = {
    vccVolts: vcc,
    dev: { ...devicesAt(d, 27), ...typicalDrops(d.diode.params, d.npn.params, 27, d.junctionTempCoVoltsPerC), betaMin: bf, betaMax: bf },
    orShareFactor: 1,
  };
  const clamp = 2 * env.dev.vDiodeOnVolts + env.dev.vBESatVolts;
  const load: OutputLoad = {
    andLoads: loads,
    andSinkAmps: loads * nandInputLowAmps(env, LOAD_RP),
    orLoads: 0,
    orClampVolts: clamp,
    capacitanceFarads: loads * ((d.diode.params.CJO ?? 0) + 3e-12),
  };
  const drive: InputDrive =
    def.inputKind === "and"
      ? { vLowMaxVolts: 0.2, vHighMinVolts: vcc, orSourceAmps: 0, orSourceOhms: Infinity, orSourceMaxAmps: 0 }
      : { vLowMaxVolts: 0.05, vHighMinVolts: clamp, orSourceAmps: (vcc - clamp) / rSourceOhms!, orSourceOhms: rSourceOhms!, orSourceMaxAmps: (vcc - clamp) / rSourceOhms! };
  const op = def.analyze(values, env, load, drive);
  return cellTiming({ def, values, env, load, drive, op, npn: d.npn.params, diode: d.diode.params, fanin: 2, inputWiringFarads: 0 });
}

const CASES: { def: CellDefinition; values: CellValues; vcc: number; loads: number; rs?: number }[] = [
  { def: nandCell, values: { rpOhms: 9100, rbOhms: 12000, rcOhms: 3900 }, vcc: 5, loads: 5 },
  { def: nandCell, values: { rpOhms: 39000, rbOhms: 18000, rcOhms: 8200 }, vcc: 10, loads: 3 },
  { def: nandCell, values: { rpOhms: 56000, rbOhms: 27000, rcOhms: 13000 }, vcc: 15, loads: 4 },
  { def: norCell, values: { rbOhms: 11000, rcOhms: 5100 }, vcc: 6, loads: 2, rs: 4700 },
  { def: norCell, values: { rbOhms: 24000, rcOhms: 9100 }, vcc: 12, loads: 5, rs: 12000 },
  { def: nandHifanCell, values: { rxOhms: 3900, rpOhms: 8200, rbOhms: 8200, rcOhms: 3300 }, vcc: 5, loads: 12 },
  { def: nandHifanCell, values: { rxOhms: 6800, rpOhms: 22000, rbOhms: 15000, rcOhms: 8200 }, vcc: 12, loads: 9 },
];

describe("analytic delays against ngspice", () => {
  for (const c of CASES) {
    const name = `${c.def.id} ${JSON.stringify(c.values)} at ${c.vcc} V, ${c.loads} loads`;
    it(name, async () => {
      const sim = await simulate(c.def, c.values, c.vcc, c.loads, c.rs);
      const est = analytic(c.def, c.values, c.vcc, c.loads, c.rs);
      const rise = est.tPLHSeconds / sim.tPLH;
      const fall = est.tPHLSeconds / sim.tPHL;
      const pd = (est.tPHLSeconds + est.tPLHSeconds) / (sim.tPHL + sim.tPLH);
      // Rising output (storage, Miller-limited pull-up): within ±30 %.
      expect(rise, `t_PLH ratio ${rise}`).toBeGreaterThan(0.7);
      expect(rise, `t_PLH ratio ${rise}`).toBeLessThan(1.3);
      // Propagation delay t_pd = (t_PHL + t_PLH)/2 (common practice): within ±30 %.
      expect(pd, `t_pd ratio ${pd}`).toBeGreaterThan(0.7);
      expect(pd, `t_pd ratio ${pd}`).toBeLessThan(1.3);
      // Falling output: a few ns to tens of ns, dominated by charge handed over by the stepped
      // input diode; the estimate is rougher (within a factor of 2).
      expect(fall, `t_PHL ratio ${fall}`).toBeGreaterThan(0.5);
      expect(fall, `t_PHL ratio ${fall}`).toBeLessThan(2);
    });
  }
});
