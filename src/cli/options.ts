// Turning command-line options into the pipeline's options, with clear messages for bad ones.
import { diag, type Diagnostic } from "../diagnostics/index.js";
import { parseQuantity, type Dimension } from "../electrical/quantity.js";
import { parseSeriesName } from "../electrical/eseries.js";
import type { SizingOptions } from "../electrical/types.js";

export interface RawSizingArgs {
  supply?: string;
  "supply-tolerance"?: string;
  "temp-min"?: string;
  "temp-max"?: string;
  industrial?: boolean;
  "beta-min"?: string;
  series?: string;
  "resistor-tolerance"?: string;
  fanout?: string;
  mode?: string;
  "gate-delay"?: string;
  "path-delay"?: string;
  clock?: string;
  "wiring-cap"?: string;
  "power-max"?: string;
}

export function sizingOptionsFrom(a: RawSizingArgs, diagnostics: Diagnostic[]): SizingOptions {
  const q = (flag: keyof RawSizingArgs, dim: Dimension): number | undefined => {
    const text = a[flag];
    if (text === undefined || typeof text === "boolean") return undefined;
    const r = parseQuantity(String(text), dim);
    if ("error" in r) {
      diagnostics.push(diag("GW6002", `--${flag} ${text}: ${r.error}`));
      return undefined;
    }
    return r.value;
  };
  const o: SizingOptions = { supplyVolts: q("supply", "voltage") ?? 5 };
  const set = <K extends keyof SizingOptions>(k: K, v: SizingOptions[K] | undefined) => {
    if (v !== undefined) o[k] = v;
  };
  set("supplyTolerance", q("supply-tolerance", "ratio"));
  set("tempMinC", q("temp-min", "temperature"));
  set("tempMaxC", q("temp-max", "temperature"));
  if (a.industrial) o.temperaturePreset = "industrial";
  const beta = q("beta-min", "ratio");
  set("betaMin", beta);
  if (a.series !== undefined) {
    const s = parseSeriesName(a.series);
    if (!s || !["E12", "E24", "E48", "E96"].includes(s)) diagnostics.push(diag("GW6006", `--series ${a.series}: not a resistor series gatewright knows`, undefined, { hint: "use E12, E24, E48 or E96 (IEC 60063)" }));
    else o.series = s as SizingOptions["series"];
  }
  set("resistorTolerance", q("resistor-tolerance", "ratio"));
  if (a.fanout !== undefined) {
    const n = Number(a.fanout);
    if (!Number.isInteger(n) || n < 1 || n > 1000) diagnostics.push(diag("GW6003", `--fanout ${a.fanout}: give a whole number of loads from 1 to 1000`));
    else o.fanoutOverride = n;
  }
  if (a.mode !== undefined) {
    if (a.mode !== "uniform" && a.mode !== "per-gate") diagnostics.push(diag("GW6001", `--mode ${a.mode}: use 'uniform' (one set of values, fewest distinct parts) or 'per-gate' (each gate for its own load, least power)`));
    else o.mode = a.mode;
  }
  set("gateDelayMaxSeconds", q("gate-delay", "time"));
  set("pathDelayMaxSeconds", q("path-delay", "time"));
  set("clockHz", q("clock", "frequency"));
  set("wiringCapacitancePerLoadFarads", q("wiring-cap", "capacitance"));
  set("powerCeilingWatts", q("power-max", "power"));
  return o;
}
