// The development grid of the switching models in src/electrical/timing.ts, both edges (not a
// test): the circuits the models are worked out against, kept apart from the check grids in
// timing.ngspice.test.ts and fast.ngspice.test.ts (see their headers for which grid checks the
// model as it stands and which are regression cases).
// Run: npx tsx test/electrical/timing-dev-grid.ts   (prints estimate/ngspice ratios;
// GW_ONLY=nor-cap,nand-fast runs those cells' cases)
import { CELLS } from "../../src/cells/registry.js";
import { analytic, Ngspice, simulate, type Case } from "./fast-harness.js";
const byId = (id: string) => CELLS.find((c) => c.id === id)!;
const CASES: Case[] = [
  { def: byId("nand"), values: { rpOhms: 4700, rbOhms: 6800, rcOhms: 2200 }, vcc: 5, loads: 8 },
  { def: byId("nand"), values: { rpOhms: 15000, rbOhms: 20000, rcOhms: 6200 }, vcc: 5, loads: 2 },
  { def: byId("nand"), values: { rpOhms: 27000, rbOhms: 33000, rcOhms: 10000 }, vcc: 12, loads: 6 },
  { def: byId("nand"), values: { rpOhms: 47000, rbOhms: 22000, rcOhms: 16000 }, vcc: 15, loads: 2, extraFarads: 20e-12 },
  { def: byId("nand"), values: { rpOhms: 12000, rbOhms: 10000, rcOhms: 5600 }, vcc: 8, loads: 4, extraFarads: 47e-12 },
  { def: byId("nand"), values: { rpOhms: 82000, rbOhms: 56000, rcOhms: 24000 }, vcc: 15, loads: 4 },
  { def: byId("nand"), values: { rpOhms: 47000, rbOhms: 39000, rcOhms: 18000 }, vcc: 12, loads: 6 },
  { def: byId("nand"), values: { rpOhms: 100000, rbOhms: 68000, rcOhms: 30000 }, vcc: 15, loads: 3 },
  { def: byId("nor"), values: { rbOhms: 8200, rcOhms: 3300 }, vcc: 5, loads: 4, rs: 3300 },
  { def: byId("nor"), values: { rbOhms: 30000, rcOhms: 12000 }, vcc: 15, loads: 3, rs: 15000 },
  { def: byId("nand-hifan"), values: { rxOhms: 2200, rpOhms: 4700, rbOhms: 5600, rcOhms: 2000 }, vcc: 5, loads: 16 },
  { def: byId("nand-hifan"), values: { rxOhms: 10000, rpOhms: 33000, rbOhms: 22000, rcOhms: 12000 }, vcc: 15, loads: 6 },
  { def: byId("nand-hifan"), values: { rxOhms: 4700, rpOhms: 12000, rbOhms: 10000, rcOhms: 4700 }, vcc: 9, loads: 10, extraFarads: 30e-12 },
  { def: byId("nand-cap"), values: { rpOhms: 5600, rbOhms: 6800, rcOhms: 2700, csuFarads: 33e-12 }, vcc: 5, loads: 8 },
  { def: byId("nand-clamp"), values: { rpOhms: 15000, rbOhms: 10000, rcOhms: 5100 }, vcc: 9, loads: 5 },
  { def: byId("nand-fast"), values: { rpOhms: 10000, rbOhms: 12000, rcOhms: 4700, csuFarads: 47e-12 }, vcc: 9, loads: 5, extraFarads: 20e-12 },
  { def: byId("nor-fast"), values: { rbOhms: 12000, rcOhms: 4700, csuFarads: 47e-12 }, vcc: 8, loads: 4, rs: 5600 },
  { def: byId("nor-cap"), values: { rbOhms: 8200, rcOhms: 3300, csuFarads: 22e-12 }, vcc: 5, loads: 4, rs: 3300 },
  { def: byId("nor-cap"), values: { rbOhms: 15000, rcOhms: 6800, csuFarads: 33e-12 }, vcc: 10, loads: 4, rs: 8200 },
  { def: byId("nor-cap"), values: { rbOhms: 30000, rcOhms: 12000, csuFarads: 47e-12 }, vcc: 15, loads: 3, rs: 15000 },
  { def: byId("nor-cap"), values: { rbOhms: 8200, rcOhms: 3900, csuFarads: 82e-12 }, vcc: 6, loads: 4, rs: 3300 },
  { def: byId("nor-cap"), values: { rbOhms: 12000, rcOhms: 4700, csuFarads: 100e-12 }, vcc: 5, loads: 3, rs: 4700 },
  { def: byId("nor-cap"), values: { rbOhms: 8200, rcOhms: 3900, csuFarads: 100e-12 }, vcc: 5, loads: 4, rs: 3300 },
  { def: byId("nor-cap"), values: { rbOhms: 12000, rcOhms: 4700, csuFarads: 56e-12 }, vcc: 5, loads: 4, rs: 4700 },
  { def: byId("nand-hifan-fast"), values: { rxOhms: 10000, rpOhms: 33000, rbOhms: 22000, rcOhms: 12000, csuFarads: 47e-12 }, vcc: 15, loads: 4 },
  { def: byId("nand-hifan-fast"), values: { rxOhms: 6800, rpOhms: 22000, rbOhms: 15000, rcOhms: 8200, csuFarads: 22e-12 }, vcc: 12, loads: 6 },
  { def: byId("nand-fast"), values: { rpOhms: 27000, rbOhms: 22000, rcOhms: 10000, csuFarads: 47e-12 }, vcc: 15, loads: 4 },
  { def: byId("nand-hifan-clamp"), values: { rxOhms: 3900, rpOhms: 10000, rbOhms: 8200, rcOhms: 3900 }, vcc: 9, loads: 12 },
  { def: byId("nand-hifan-fast"), values: { rxOhms: 2700, rpOhms: 5600, rbOhms: 5600, rcOhms: 2200, csuFarads: 33e-12 }, vcc: 5, loads: 14, extraFarads: 20e-12 },
];
const ng = new Ngspice();
await ng.start();
const lines: string[] = [];
// GW_ONLY=<cell id>: only that cell's cases.
for (const c of CASES.filter((x) => !process.env.GW_ONLY || process.env.GW_ONLY.split(",").includes(x.def.id))) {
  const s = await simulate(ng, c);
  const e = analytic(c);
  lines.push(`${c.def.id.padEnd(18)} ${String(c.vcc).padStart(3)} V, ${c.loads} loads${c.extraFarads ? ` + ${c.extraFarads * 1e12} pF` : ""}: t_PHL ${(s.tPHL * 1e9).toFixed(1)} ns (×${(e.tPHLSeconds / s.tPHL).toFixed(2)}), t_PLH ${(s.tPLH * 1e9).toFixed(1)} ns (×${(e.tPLHSeconds / s.tPLH).toFixed(2)})`);
}
ng.stop();
process.stdout.write(lines.join("\n") + "\n");
process.exit(0);
