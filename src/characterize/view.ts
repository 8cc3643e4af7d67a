// The report's view of a characterization: per cell type, a table of the analytic worst case
// beside the figures measured at each corner, and the checks that failed. Every number is
// formatted here; the template only places text.
import { eng } from "../emit/format.js";
import type { CellFigures, Characterization, CornerCharacterization } from "./types.js";

interface Row {
  label: string;
  analytic: string;
  measured: string[];
}

const ROWS: { label: string; key: keyof CellFigures; unit: string }[] = [
  { label: "V_OL (worst-case load)", key: "vOLVolts", unit: "V" },
  { label: "V_OH (worst-case load)", key: "vOHVolts", unit: "V" },
  { label: "V_IL (unity gain)", key: "vILVolts", unit: "V" },
  { label: "V_IH (unity gain)", key: "vIHVolts", unit: "V" },
  { label: "Noise margin low", key: "noiseMarginLowVolts", unit: "V" },
  { label: "Noise margin high", key: "noiseMarginHighVolts", unit: "V" },
  { label: "t_PHL", key: "tPHLSeconds", unit: "s" },
  { label: "t_PLH", key: "tPLHSeconds", unit: "s" },
];

function value(x: number | undefined, unit: string): string {
  if (x === undefined) return "–";
  if (Number.isNaN(x)) return "not measured";
  return eng(x, unit);
}

function failures(c: CornerCharacterization): string[] {
  return c.checks.filter((k) => !k.ok).map((k) => `${k.label} ${value(k.value, k.unit)} against ${k.sense === "min" ? "≥" : "≤"} ${value(k.limit, k.unit)}${k.analyticOk === false ? " (the sizing reported it failing)" : " (the sizing claims it passes)"}`);
}

export function characterizationView(ch: Characterization) {
  const failing = ch.cells.filter((c) => !c.pass);
  return {
    simulator: ch.simulator,
    summaryText: ch.pass
      ? `every cell type meets its logic levels${ch.transient ? " and delays" : ""} at every corner in ngspice`
      : `FAILS: ${failing.map((c) => c.key).join(", ")} miss${failing.length === 1 ? "es" : ""} a check at some corner (see below)`,
    runsText: `${ch.runs} simulator runs, ${eng(ch.elapsedMs / 1000, "s")}`,
    criteria: ch.criteria,
    cells: ch.cells.map((c) => {
      const rows: Row[] = ROWS.filter((r) => (r.key !== "tPHLSeconds" && r.key !== "tPLHSeconds") || ch.transient).map((r) => ({
        label: r.label,
        analytic: value(c.analytic[r.key], r.unit),
        measured: c.corners.map((k) => value(k[r.key], r.unit)),
      }));
      rows.push({ label: "Result", analytic: "", measured: c.corners.map((k) => (k.pass ? "pass" : "FAIL")) });
      return {
        key: c.key,
        loadText: c.loadText,
        driveText: c.driveText,
        passText: c.pass ? "pass" : "FAIL",
        corners: c.corners.map((k) => `${k.corner}, β ${ch.transient && k.betaMax !== k.betaMin ? `${k.betaMin}/${k.betaMax}` : k.betaMin}`),
        separator: c.corners.map(() => "---:"),
        rows,
        failures: c.corners.flatMap((k) => failures(k).map((f) => `${k.corner}: ${f}`)),
      };
    }),
  };
}
