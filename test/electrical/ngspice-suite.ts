// One embedded ngspice session per test file (fast-harness.ts's Ngspice), started before and
// stopped after its tests, with the ratios the file collects printed when GW_RATIOS is set.
// Kept apart from fast-harness.ts, which the development grid also runs outside vitest.
import { afterAll, beforeAll } from "vitest";
import { Ngspice } from "./fast-harness.js";

export function ngspiceSuite(): { ng: Ngspice; ratios: string[] } {
  const ng = new Ngspice();
  const ratios: string[] = [];
  beforeAll(() => ng.start(), 120_000);
  afterAll(() => {
    ng.stop();
    if (process.env.GW_RATIOS) process.stdout.write(`${ratios.join("\n")}\n`);
  });
  return { ng, ratios };
}
