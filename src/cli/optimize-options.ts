// Command-line options of the optimizer and the mapper: --opt, --cost, --cost-weights,
// --max-fanout, --wired-and, turned into SynthesisOptions fields with clear messages.
import type { Argv } from "yargs";
import { diag, type Diagnostic } from "../diagnostics/index.js";
import { shownValue, wholeNumberOption } from "./values.js";
import { DEFAULT_MAX_FANOUT, DEFAULT_PART_WEIGHTS, dtlCostModel, nand2CostModel, type CostModel, type PartWeights } from "../map/index.js";
import type { OptLevel } from "../optimize/index.js";

export interface RawOptimizeArgs {
  /** Whole numbers arrive as the text typed (defaults as numbers) and are read strictly here. */
  opt?: number | string;
  cost?: string;
  "cost-weights"?: string;
  "max-fanout"?: number | string;
  "wired-and"?: boolean;
}

export interface OptimizeArgs {
  opt: OptLevel;
  costModel: CostModel;
  maxFanout: number;
  wiredAnd: boolean;
}

export function optimizeFlags<T>(y: Argv<T>) {
  return y
    .option("opt", {
      type: "string",
      requiresArg: true,
      describe: "optimization: 0 the logic as written, 1 local clean-up, 2 two-level minimization with don't-cares, factoring and more",
      default: 2,
      group: "Logic:",
    })
    .option("cost", { type: "string", requiresArg: true, describe: "what the optimizer minimizes: dtl (weighted DTL parts) or nand2 (two-input-NAND count)", default: "dtl", group: "Logic:" })
    .option("cost-weights", {
      type: "string",
      requiresArg: true,
      describe: "weights of the dtl cost, e.g. transistor=4,diode=1,resistor=1",
      defaultDescription: `transistor=${DEFAULT_PART_WEIGHTS.transistor},diode=${DEFAULT_PART_WEIGHTS.diode},resistor=${DEFAULT_PART_WEIGHTS.resistor}`,
      group: "Logic:",
    })
    .option("max-fanout", { type: "string", requiresArg: true, describe: "most loads on one net; more are buffered or their driver duplicated (0: no limit)", default: DEFAULT_MAX_FANOUT, group: "Logic:" })
    .option("wired-and", { type: "boolean", describe: "tie open-collector outputs together (wired-AND) where it saves parts", default: false, group: "Logic:" });
}

/** Parses "transistor=4,diode=1,resistor=1" (any subset, names may be shortened to t, d, r). */
export function parseWeights(text: string): PartWeights | string {
  const w: PartWeights = { ...DEFAULT_PART_WEIGHTS };
  for (const item of text.split(",").map((s) => s.trim()).filter(Boolean)) {
    const m = /^([a-z]+)\s*=\s*([0-9]*\.?[0-9]+)$/i.exec(item);
    if (!m) return `'${item}' is not name=number`;
    const key = m[1]!.toLowerCase();
    const value = Number(m[2]);
    const name = "transistor".startsWith(key) ? "transistor" : "diode".startsWith(key) ? "diode" : "resistor".startsWith(key) ? "resistor" : undefined;
    if (!name || key.length === 0) return `'${m[1]}' is not transistor, diode or resistor`;
    if (!(value >= 0) || value > 1000) return `the weight of ${name} must be from 0 to 1000`;
    w[name] = value;
  }
  if (w.transistor + w.diode + w.resistor === 0) return "at least one weight must be above 0";
  return w;
}

export function optimizeOptionsFrom(a: RawOptimizeArgs, diagnostics: Diagnostic[]): OptimizeArgs {
  const opt = (wholeNumberOption(a.opt ?? 2, "opt", 0, 2, "give 0, 1 or 2", diagnostics) ?? 2) as OptLevel;
  let costModel = dtlCostModel();
  const cost = a.cost ?? "dtl";
  if (cost === "nand2") {
    costModel = nand2CostModel();
    if (a["cost-weights"] !== undefined) diagnostics.push(diag("GW6001", "--cost-weights applies to --cost dtl only"));
  } else if (cost === "dtl") {
    if (a["cost-weights"] !== undefined) {
      const w = parseWeights(a["cost-weights"]);
      if (typeof w === "string") diagnostics.push(diag("GW6001", `--cost-weights ${shownValue(a["cost-weights"])}: ${w}`, undefined, { hint: "for example --cost-weights transistor=4,diode=1,resistor=1" }));
      else costModel = dtlCostModel(w);
    }
  } else diagnostics.push(diag("GW6001", `--cost ${shownValue(cost)}: use 'dtl' (weighted DTL parts) or 'nand2' (two-input-NAND count)`));
  let maxFanout = DEFAULT_MAX_FANOUT;
  if (a["max-fanout"] !== undefined) {
    const message = "give a whole number from 2 to 1000, or 0 for no limit";
    const n = wholeNumberOption(a["max-fanout"], "max-fanout", 0, 1000, message, diagnostics);
    if (n === 1) diagnostics.push(diag("GW6003", `--max-fanout ${shownValue(a["max-fanout"])}: ${message}`));
    else if (n !== undefined) maxFanout = n;
  }
  return { opt, costModel, maxFanout, wiredAnd: !!a["wired-and"] };
}
