// The fast variants' analytic switching times (src/electrical/timing.ts) against ngspice
// transients (eecircuit-engine runs ngspice in-process). The model was written against one
// circuit per kind (5 V, R_P = R_B = 5 kΩ, R_C = 2.2 kΩ, 33 pF, 20 pF on the output; the
// high-fan-out cells at 3.9k/8.2k/8.2k/3.3k with 12 loads, and the development grid of
// test/electrical/timing-dev-grid.ts). The grids below are different values, supplies, loads and
// capacitors, each chosen before its first run. Each was a check of the model as it then stood;
// once a later change was worked out with a grid's figures in view, that grid became regression
// cases: the rising edge's last rework (see the sixth grid) was worked out with the first five
// in view, so the sixth is the check of the model as it stands. Real NAND loads plus 3 pF wiring
// each on the output; delays at 50 % of each swing.
import { describe, expect, it } from "vitest";
import { CELLS } from "../../src/cells/registry.js";
import type { CellDefinition } from "../../src/cells/types.js";
import { CAPACITOR_CHARGE_MARGIN } from "../../src/electrical/timing.js";
import { analytic, simulate, type Case } from "./fast-harness.js";
import { ngspiceSuite } from "./ngspice-suite.js";

const byId = (id: string): CellDefinition => CELLS.find((c) => c.id === id)!;
const { ng, ratios } = ngspiceSuite();

const CASES: Case[] = [
  { def: byId("nand-cap"), values: { rpOhms: 8200, rbOhms: 10000, rcOhms: 3300, csuFarads: 47e-12 }, vcc: 5, loads: 6 },
  { def: byId("nand-cap"), values: { rpOhms: 22000, rbOhms: 15000, rcOhms: 6800, csuFarads: 22e-12 }, vcc: 12, loads: 3 },
  { def: byId("nand-clamp"), values: { rpOhms: 6800, rbOhms: 8200, rcOhms: 2700 }, vcc: 5, loads: 8 },
  { def: byId("nand-clamp"), values: { rpOhms: 27000, rbOhms: 12000, rcOhms: 8200 }, vcc: 12, loads: 4 },
  { def: byId("nand-fast"), values: { rpOhms: 3900, rbOhms: 4700, rcOhms: 1800, csuFarads: 68e-12 }, vcc: 5, loads: 8 },
  { def: byId("nand-fast"), values: { rpOhms: 33000, rbOhms: 22000, rcOhms: 10000, csuFarads: 33e-12 }, vcc: 15, loads: 4 },
  { def: byId("nor-cap"), values: { rbOhms: 11000, rcOhms: 5100, csuFarads: 22e-12 }, vcc: 6, loads: 2, rs: 4700 },
  { def: byId("nor-cap"), values: { rbOhms: 24000, rcOhms: 9100, csuFarads: 47e-12 }, vcc: 12, loads: 5, rs: 12000 },
  { def: byId("nor-clamp"), values: { rbOhms: 6800, rcOhms: 3900, }, vcc: 5, loads: 4, rs: 3300 },
  { def: byId("nor-clamp"), values: { rbOhms: 20000, rcOhms: 8200 }, vcc: 12, loads: 3, rs: 10000 },
  { def: byId("nor-fast"), values: { rbOhms: 8200, rcOhms: 3300, csuFarads: 33e-12 }, vcc: 5, loads: 6, rs: 2700 },
  { def: byId("nor-fast"), values: { rbOhms: 18000, rcOhms: 6800, csuFarads: 22e-12 }, vcc: 10, loads: 3, rs: 8200 },
  { def: byId("nand-hifan-clamp"), values: { rxOhms: 2700, rpOhms: 5600, rbOhms: 6800, rcOhms: 2200 }, vcc: 5, loads: 10 },
  { def: byId("nand-hifan-clamp"), values: { rxOhms: 6800, rpOhms: 22000, rbOhms: 15000, rcOhms: 8200 }, vcc: 12, loads: 9 },
  { def: byId("nand-hifan-fast"), values: { rxOhms: 3300, rpOhms: 6800, rbOhms: 6800, rcOhms: 2700, csuFarads: 22e-12 }, vcc: 5, loads: 10 },
  { def: byId("nand-hifan-fast"), values: { rxOhms: 5600, rpOhms: 15000, rbOhms: 12000, rcOhms: 6800, csuFarads: 47e-12 }, vcc: 12, loads: 6 },
  // A second grid, chosen before its first run, after the falling edge was reworked on the
  // development grid (test/electrical/timing-dev-grid.ts: the base charge behind R_C's current,
  // the input diode's stored charge less what recombines, and the diode-OR cells' turn-on
  // through the rising input's capacitor); neither grid was used to tune the model.
  { def: byId("nand-cap"), values: { rpOhms: 12000, rbOhms: 12000, rcOhms: 4700, csuFarads: 33e-12 }, vcc: 9, loads: 5 },
  { def: byId("nand-cap"), values: { rpOhms: 47000, rbOhms: 33000, rcOhms: 15000, csuFarads: 15e-12 }, vcc: 15, loads: 3 },
  { def: byId("nand-clamp"), values: { rpOhms: 18000, rbOhms: 15000, rcOhms: 6800 }, vcc: 15, loads: 3 },
  { def: byId("nand-fast"), values: { rpOhms: 15000, rbOhms: 12000, rcOhms: 5600, csuFarads: 22e-12 }, vcc: 9, loads: 6 },
  { def: byId("nor-cap"), values: { rbOhms: 18000, rcOhms: 6800, csuFarads: 33e-12 }, vcc: 9, loads: 3, rs: 6800 },
  { def: byId("nor-cap"), values: { rbOhms: 10000, rcOhms: 4300, csuFarads: 68e-12 }, vcc: 5, loads: 5, rs: 3900 },
  { def: byId("nor-clamp"), values: { rbOhms: 12000, rcOhms: 5600 }, vcc: 9, loads: 4, rs: 5600 },
  { def: byId("nor-fast"), values: { rbOhms: 27000, rcOhms: 10000, csuFarads: 33e-12 }, vcc: 15, loads: 3, rs: 12000 },
  { def: byId("nand-hifan-clamp"), values: { rxOhms: 4700, rpOhms: 12000, rbOhms: 10000, rcOhms: 4700 }, vcc: 9, loads: 10 },
  { def: byId("nand-hifan-fast"), values: { rxOhms: 8200, rpOhms: 27000, rbOhms: 18000, rcOhms: 10000, csuFarads: 33e-12 }, vcc: 15, loads: 5 },
  // A third grid, chosen before its first run, after the capacitor cells' rising edge was
  // reworked on the development grid (the stored charge drained by the output's pull-up through
  // the collector junction while the base side refills, and the base's droop through the rise):
  // each capacitor placed by the model alone where its estimate is steepest, where the capacitor
  // takes about the stored charge (the hardest place for the estimate), or just past it. First
  // run: t_PLH 0.79–1.34 (the NOR at 12 V, 120 pF, 1.34).
  { def: byId("nor-cap"), values: { rbOhms: 6800, rcOhms: 3300, csuFarads: 82e-12 }, vcc: 5, loads: 6, rs: 2700 },
  { def: byId("nor-cap"), values: { rbOhms: 15000, rcOhms: 6200, csuFarads: 100e-12 }, vcc: 9, loads: 4, rs: 5600 },
  { def: byId("nor-cap"), values: { rbOhms: 15000, rcOhms: 6200, csuFarads: 120e-12 }, vcc: 9, loads: 4, rs: 5600 },
  { def: byId("nor-cap"), values: { rbOhms: 22000, rcOhms: 8200, csuFarads: 120e-12 }, vcc: 12, loads: 3, rs: 6800 },
  { def: byId("nand-cap"), values: { rpOhms: 6800, rbOhms: 8200, rcOhms: 2700, csuFarads: 56e-12 }, vcc: 5, loads: 7 },
  { def: byId("nand-cap"), values: { rpOhms: 15000, rbOhms: 12000, rcOhms: 5100, csuFarads: 68e-12 }, vcc: 9, loads: 4 },
  { def: byId("nand-cap"), values: { rpOhms: 27000, rbOhms: 20000, rcOhms: 8200, csuFarads: 56e-12 }, vcc: 12, loads: 5 },
  { def: byId("nand-cap"), values: { rpOhms: 27000, rbOhms: 20000, rcOhms: 8200, csuFarads: 68e-12 }, vcc: 12, loads: 5 },
  // A fourth grid, placed the same way and chosen before its first run, after the third grid's
  // first run (t_PLH 0.79–1.34) had led to one more change worked out on the development
  // circuits: the pull-up's current during the hold split between the base side and the output's
  // own capacitance.
  { def: byId("nor-cap"), values: { rbOhms: 10000, rcOhms: 4700, csuFarads: 68e-12 }, vcc: 6, loads: 5, rs: 3900 },
  { def: byId("nor-cap"), values: { rbOhms: 10000, rcOhms: 4700, csuFarads: 82e-12 }, vcc: 6, loads: 5, rs: 3900 },
  { def: byId("nor-cap"), values: { rbOhms: 27000, rcOhms: 10000, csuFarads: 100e-12 }, vcc: 15, loads: 4, rs: 10000 },
  { def: byId("nor-cap"), values: { rbOhms: 27000, rcOhms: 10000, csuFarads: 120e-12 }, vcc: 15, loads: 4, rs: 10000 },
  { def: byId("nand-cap"), values: { rpOhms: 10000, rbOhms: 10000, rcOhms: 3900, csuFarads: 47e-12 }, vcc: 6, loads: 6 },
  { def: byId("nand-cap"), values: { rpOhms: 33000, rbOhms: 27000, rcOhms: 12000, csuFarads: 56e-12 }, vcc: 15, loads: 4 },
  { def: byId("nand-cap"), values: { rpOhms: 33000, rbOhms: 27000, rcOhms: 12000, csuFarads: 68e-12 }, vcc: 15, loads: 4 },
  // A fifth grid, placed the same way and chosen before its first run, after the fourth grid's
  // first run (t_PLH 0.53–1.17: one capacitor the estimate put just past the point, which ngspice
  // still shows storing) had led to two more changes worked out on the development circuits: the
  // transistor conducting again within a band below V_BE, and the pull-up's current at the
  // output's level during the hold.
  { def: byId("nor-cap"), values: { rbOhms: 12000, rcOhms: 5600, csuFarads: 82e-12 }, vcc: 7, loads: 4, rs: 4700 },
  { def: byId("nor-cap"), values: { rbOhms: 12000, rcOhms: 5600, csuFarads: 100e-12 }, vcc: 7, loads: 4, rs: 4700 },
  { def: byId("nor-cap"), values: { rbOhms: 18000, rcOhms: 7500, csuFarads: 100e-12 }, vcc: 12, loads: 5, rs: 8200 },
  { def: byId("nor-cap"), values: { rbOhms: 18000, rcOhms: 7500, csuFarads: 120e-12 }, vcc: 12, loads: 5, rs: 8200 },
  { def: byId("nand-cap"), values: { rpOhms: 12000, rbOhms: 15000, rcOhms: 4700, csuFarads: 56e-12 }, vcc: 7, loads: 5 },
  { def: byId("nand-cap"), values: { rpOhms: 12000, rbOhms: 15000, rcOhms: 4700, csuFarads: 68e-12 }, vcc: 7, loads: 5 },
  { def: byId("nand-cap"), values: { rpOhms: 22000, rbOhms: 15000, rcOhms: 6800, csuFarads: 68e-12 }, vcc: 12, loads: 6 },
  { def: byId("nand-cap"), values: { rpOhms: 22000, rbOhms: 15000, rcOhms: 6800, csuFarads: 82e-12 }, vcc: 12, loads: 6 },
  // A sixth grid, chosen before its first run, after four changes to the rising edge worked out
  // on the development circuits and the five grids above: the diode-AND loads' pull-ups helping
  // R_C below the loads' turn-off, their input diodes' junction charge counted only above it, the
  // band below V_BE for clamped cells reckoned from their on current, and the base's droop less
  // the depth it starts the rise below its on level. The capacitor cells placed as before (by
  // the model alone, either side of the estimate's steepest step, and well past it); the clamped
  // cells with capacitors either side of the point where the capacitor's charge takes the Miller
  // charge of the whole swing.
  { def: byId("nand-cap"), values: { rpOhms: 10000, rbOhms: 12000, rcOhms: 3900, csuFarads: 82e-12 }, vcc: 8, loads: 5 },
  { def: byId("nand-cap"), values: { rpOhms: 10000, rbOhms: 12000, rcOhms: 3900, csuFarads: 100e-12 }, vcc: 8, loads: 5 },
  { def: byId("nand-cap"), values: { rpOhms: 10000, rbOhms: 12000, rcOhms: 3900, csuFarads: 150e-12 }, vcc: 8, loads: 5 },
  { def: byId("nor-cap"), values: { rbOhms: 15000, rcOhms: 5600, csuFarads: 100e-12 }, vcc: 10, loads: 4, rs: 6200 },
  { def: byId("nor-cap"), values: { rbOhms: 15000, rcOhms: 5600, csuFarads: 120e-12 }, vcc: 10, loads: 4, rs: 6200 },
  { def: byId("nand-fast"), values: { rpOhms: 18000, rbOhms: 18000, rcOhms: 6800, csuFarads: 33e-12 }, vcc: 12, loads: 5 },
  { def: byId("nand-fast"), values: { rpOhms: 18000, rbOhms: 18000, rcOhms: 6800, csuFarads: 39e-12 }, vcc: 12, loads: 5 },
  { def: byId("nor-fast"), values: { rbOhms: 10000, rcOhms: 4300, csuFarads: 15e-12 }, vcc: 6, loads: 5, rs: 3900 },
  { def: byId("nand-hifan-fast"), values: { rxOhms: 4700, rpOhms: 10000, rbOhms: 10000, rcOhms: 3900, csuFarads: 22e-12 }, vcc: 8, loads: 10 },
  { def: byId("nand-hifan-fast"), values: { rxOhms: 4700, rpOhms: 10000, rbOhms: 10000, rcOhms: 3900, csuFarads: 27e-12 }, vcc: 8, loads: 10 },
  { def: byId("nand-clamp"), values: { rpOhms: 10000, rbOhms: 12000, rcOhms: 3900 }, vcc: 8, loads: 5 },
  { def: byId("nor-clamp"), values: { rbOhms: 15000, rcOhms: 5600 }, vcc: 10, loads: 4, rs: 6200 },
  { def: byId("nand-hifan-clamp"), values: { rxOhms: 5600, rpOhms: 15000, rbOhms: 12000, rcOhms: 5600 }, vcc: 12, loads: 8 },
];

/** Share of capacitance either side of a case's capacitor over which the estimate is also read:
 *  ±10 %, the tolerance that goes with the E12 series (IEC 60063; the sizing's default E6 goes
 *  with ±20 %). */
const CAP_WINDOW = 0.1;
/** An estimate that changes by more than this factor across that window is steep: the case sits
 *  where the capacitor takes about the stored charge (or, clamped, the Miller charge of the whole
 *  swing). There ngspice's own t_PLH moves as much (one NOR at 12 V: 709, 475 and 229 ns at 115,
 *  120 and 125 pF), so a part within its tolerance decides the delay, and the check compares the
 *  two curves by capacitance instead: ngspice within ±30 % of the estimate somewhere in the window. */
const STEEP = 1.5;

describe("fast variants: analytic delays against ngspice (check grid and regression cases)", () => {
  for (const c of CASES) {
    it(`${c.def.id} ${JSON.stringify(c.values)} at ${c.vcc} V, ${c.loads} loads`, async () => {
      const sim = await simulate(ng, c);
      const est = analytic(c);
      const rise = est.tPLHSeconds / sim.tPLH;
      const fall = est.tPHLSeconds / sim.tPHL;
      const pd = (est.tPHLSeconds + est.tPLHSeconds) / (sim.tPHL + sim.tPLH);
      // The estimate with the capacitor at the window's ends (the larger capacitor the faster).
      const csu = c.values.csuFarads;
      const atCap = (f: number) => (csu ? analytic({ ...c, values: { ...c.values, csuFarads: csu * f } }) : est);
      const fast = atCap(1 + CAP_WINDOW);
      const slow = atCap(1 - CAP_WINDOW);
      const steep = slow.tPLHSeconds / fast.tPLHSeconds > STEEP;
      // The engine's own estimate, with its margin on a speed-up capacitor's charge.
      const engineRise = analytic(c, CAPACITOR_CHARGE_MARGIN).tPLHSeconds / sim.tPLH;
      ratios.push(`${c.def.id} ${c.vcc} V ${csu ? `${Math.round(csu * 1e12)} pF` : ""}: t_PHL ${(sim.tPHL * 1e9).toFixed(1)} ns (×${fall.toFixed(2)}), t_PLH ${(sim.tPLH * 1e9).toFixed(1)} ns (×${rise.toFixed(2)}${steep ? `, steep: ×${(fast.tPLHSeconds / sim.tPLH).toFixed(2)}–${(slow.tPLHSeconds / sim.tPLH).toFixed(2)} over ±10 %` : ""}; engine ×${engineRise.toFixed(2)})`);
      // ngspice transient (embedded): t_PLH, t_PHL and t_pd = (t_PHL + t_PLH)/2 (common
      // practice) each within ±30 % (issue 8's accuracy). Where the estimate is steep (STEEP),
      // t_PLH and t_pd are within ±30 % of the estimate at some capacitor in the window.
      if (steep) {
        expect(fast.tPLHSeconds / sim.tPLH, `t_PLH at +10 %: ${fast.tPLHSeconds} s against ${sim.tPLH} s`).toBeLessThan(1.3);
        expect(slow.tPLHSeconds / sim.tPLH, `t_PLH at −10 %: ${slow.tPLHSeconds} s against ${sim.tPLH} s`).toBeGreaterThan(0.7);
        expect((fast.tPHLSeconds + fast.tPLHSeconds) / (sim.tPHL + sim.tPLH), "t_pd at +10 %").toBeLessThan(1.3);
        expect((slow.tPHLSeconds + slow.tPLHSeconds) / (sim.tPHL + sim.tPLH), "t_pd at −10 %").toBeGreaterThan(0.7);
      } else {
        expect(rise, `t_PLH ${est.tPLHSeconds} s against ${sim.tPLH} s`).toBeGreaterThan(0.7);
        expect(rise, `t_PLH ${est.tPLHSeconds} s against ${sim.tPLH} s`).toBeLessThan(1.3);
        expect(pd, `t_pd ratio ${pd}`).toBeGreaterThan(0.7);
        expect(pd, `t_pd ratio ${pd}`).toBeLessThan(1.3);
      }
      // What the sizing counts on is never more than FAST_DELAY_GUARD (20 %) faster than ngspice.
      expect(engineRise, `engine t_PLH against ${sim.tPLH} s`).toBeGreaterThan(0.8);
      expect(fall, `t_PHL ${est.tPHLSeconds} s against ${sim.tPHL} s`).toBeGreaterThan(0.7);
      expect(fall, `t_PHL ${est.tPHLSeconds} s against ${sim.tPHL} s`).toBeLessThan(1.3);
    }, 60_000);
  }
});
