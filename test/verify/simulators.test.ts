// The two simulator paths agree: the system ngspice (batch mode) and the embedded one
// (eecircuit-engine) give the same verdict at every corner and the same levels within 10 mV,
// for a shipped example. Skipped, with a note, when `ngspice` is not installed
// (`apt-get install ngspice`).
import { readFileSync } from "node:fs";
import { afterAll, describe, expect, it } from "vitest";
import { synthesize } from "../../src/pipeline/synthesize.js";
import { embeddedSimulator, systemSimulator, type Simulator } from "../../src/simulate/engine.js";
import { verifyDesign } from "../../src/verify/verify.js";

const system = await systemSimulator();
const NOTE = "(skipped: no `ngspice` on the PATH; install it with `apt-get install ngspice`)";
if (!system) console.warn(`verify: system ngspice comparison ${NOTE}`);

let embedded: Simulator | undefined;
afterAll(async () => {
  await embedded?.close?.();
});

describe("system and embedded ngspice agree", { timeout: 300_000 }, () => {
  it.skipIf(!system)(`same pass/fail at every corner and levels within 10 mV (examples/voter.v) ${system ? "" : NOTE}`, async () => {
    const f = "examples/voter.v";
    const s = synthesize(readFileSync(f, "utf8"), f, { maxFanin: 8, cells: "mixed", sizing: { supplyVolts: 5 }, commandLine: "test" });
    expect(s.files).toBeDefined();
    embedded = await embeddedSimulator();
    const a = await verifyDesign(s, system!, { corners: true, plots: false, concurrency: 2 });
    const b = await verifyDesign(s, embedded, { corners: true, plots: false });
    expect(a.simulator).not.toBe(b.simulator);
    expect(a.pass).toBe(b.pass);
    expect(a.corners.map((c) => c.corner.id)).toEqual(b.corners.map((c) => c.corner.id));
    const close = (x: number, y: number, what: string) => {
      if (!Number.isFinite(x) && !Number.isFinite(y)) return;
      expect(Math.abs(x - y), what).toBeLessThan(0.01);
    };
    a.corners.forEach((ca, i) => {
      const cb = b.corners[i]!;
      expect(ca.pass, ca.corner.label).toBe(cb.pass);
      expect(ca.comparison.compared).toBe(cb.comparison.compared);
      ca.signals.forEach((sa, k) => {
        const sb = cb.signals[k]!;
        expect(sa.name).toBe(sb.name);
        const at = `${sa.name} at ${ca.corner.label}`;
        close(sa.levels.lowMaxVolts, sb.levels.lowMaxVolts, `V_OL max of ${at}`);
        close(sa.levels.lowTypVolts, sb.levels.lowTypVolts, `V_OL typical of ${at}`);
        close(sa.levels.highMinVolts, sb.levels.highMinVolts, `V_OH min of ${at}`);
        close(sa.levels.highTypVolts, sb.levels.highTypVolts, `V_OH typical of ${at}`);
      });
    });
    a.transfer.forEach((ta, i) => {
      const tb = b.transfer[i]!;
      ta.curves.forEach((c, j) => {
        const d = tb.curves[j]!;
        close(c.points!.vOlVolts, d.points!.vOlVolts, `${ta.cellType} V_OL at ${c.corner}`);
        close(c.points!.vOhVolts, d.points!.vOhVolts, `${ta.cellType} V_OH at ${c.corner}`);
        close(c.points!.vIlVolts, d.points!.vIlVolts, `${ta.cellType} V_IL at ${c.corner}`);
      });
    });
  });
});
