// The conditions a design is simulated at: the nominal point, and the corners the electrical
// engine sized it for (supply min/max × temperature extremes), each with a slow and a fast
// transistor model (the gain limits β_min and β_max of the sizing). Pure: a design in, a list out.
import type { SizedDesign } from "../electrical/types.js";
import { eng } from "../emit/format.js";

export type GainCase = "typical" | "min" | "max";

export interface VerifyCorner {
  /** Short id for file names and JSON: "nominal", "vlo-tlo-slow", … */
  id: string;
  /** For people: "4.75 V, 0 °C, slow (β 30)". */
  label: string;
  /** For legends: "4.75 V, 0 °C, slow". */
  shortLabel: string;
  supplyVolts: number;
  tempC: number;
  gain: GainCase;
  /** BF written into the NPN model card for this run (at 25 °C); undefined: the netlist's own. */
  bf?: number;
  /** The electrical engine's name of the supply × temperature corner ("4.75 V, 0 °C"), when it
   *  named this one. */
  engineCorner?: string;
}

/** Reference temperature of the engine's gain figures (β_min is "at 25 °C"). */
export const NOMINAL_TEMP_C = 25;

function parameter(design: SizedDesign, name: string): number | undefined {
  return design.parameters.find((p) => p.name === name)?.value;
}

/** The engine's corner label format ("4.75 V, 0 °C": supply to four significant digits). */
function engineLabel(volts: number, tempC: number): string {
  return `${Number(volts.toPrecision(4)).toString()} V, ${tempC} °C`;
}

export interface CornerSelection {
  /** Run the corners as well as the nominal point. */
  corners: boolean;
}

/**
 * The nominal point (nominal supply, 25 °C, the netlist's typical model) and, when asked, every
 * combination of supply min/max (nominal × (1 ± tolerance)), temperature min/max and transistor
 * gain at its limits. Duplicates (zero tolerance, one temperature, β_min = β_max) are removed.
 */
export function verifyCorners(design: SizedDesign, sel: CornerSelection): VerifyCorner[] {
  const vNom = parameter(design, "supplyVolts") ?? 5;
  const out: VerifyCorner[] = [
    {
      id: "nominal",
      label: `${eng(vNom, "V")}, ${NOMINAL_TEMP_C} °C, typical model (β ${design.models.npn.params.BF ?? 100})`,
      shortLabel: `${eng(vNom, "V")}, ${NOMINAL_TEMP_C} °C, typical`,
      supplyVolts: vNom,
      tempC: NOMINAL_TEMP_C,
      gain: "typical",
    },
  ];
  if (!sel.corners) return out;
  const tol = parameter(design, "supplyTolerance") ?? 0.05;
  const tMin = parameter(design, "tempMinC") ?? 0;
  const tMax = parameter(design, "tempMaxC") ?? 70;
  const bMin = parameter(design, "betaMin") ?? 30;
  const bMax = parameter(design, "betaMax") ?? Math.max(bMin, 400);
  const supplies: [string, number][] = tol > 0 ? [["vlo", vNom * (1 - tol)], ["vhi", vNom * (1 + tol)]] : [["vnom", vNom]];
  const temps: [string, number][] = tMax > tMin ? [["tlo", tMin], ["thi", tMax]] : [["t", tMin]];
  const gains: [string, GainCase, number][] = bMax > bMin ? [["slow", "min", bMin], ["fast", "max", bMax]] : [["slow", "min", bMin]];
  const named = new Set(design.corners);
  for (const [vi, v] of supplies)
    for (const [ti, t] of temps)
      for (const [gi, g, bf] of gains) {
        const engine = engineLabel(v, t);
        const c: VerifyCorner = {
          id: `${vi}-${ti}-${gi}`,
          label: `${engine}, ${gi} (β ${bf})`,
          shortLabel: `${engine}, ${gi}`,
          supplyVolts: v,
          tempC: t,
          gain: g,
          bf,
        };
        if (named.has(engine)) c.engineCorner = engine;
        out.push(c);
      }
  return out;
}
