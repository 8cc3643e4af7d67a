// Sizing options: defaults, checks and the provenance of every parameter (given by the user or
// a default), so the report can say which is which.
import { diag, type Diagnostic, type StageResult } from "../diagnostics/index.js";
import { resolveDevices, type DeviceData } from "./devices.js";
import { seriesMantissas, seriesTolerance, type SeriesName } from "./eseries.js";
import type { Provenance, SizingMode, SizingOptions, SizingParameter } from "./types.js";

export const DEFAULTS = {
  supplyTolerance: 0.05,
  tempMinC: 0,
  tempMaxC: 70,
  industrialTempMinC: -40,
  industrialTempMaxC: 85,
  series: "E24" as SeriesName,
  resistorMinOhms: 100,
  resistorMaxOhms: 1e6,
  saturationMarginMin: 1.2,
  noiseMarginMinVolts: 0.4,
  collectorCurrentMinAmps: 1e-3,
  turnOffRatioMin: 1,
  wiringCapacitancePerLoadFarads: 3e-12,
  orShareFactor: 0.8,
  /** Supplies above this get the high-voltage cautions (GW5003). */
  cautionSupplyVolts: 5.5,
};

export interface ResolvedOptions {
  supplyVolts: number;
  supplyTolerance: number;
  tempMinC: number;
  tempMaxC: number;
  series: SeriesName;
  resistorTolerance: number;
  resistorMinOhms: number;
  resistorMaxOhms: number;
  fanoutOverride?: number;
  mode: SizingMode;
  saturationMarginMin: number;
  noiseMarginMinVolts: number;
  collectorCurrentMinAmps: number;
  turnOffRatioMin: number;
  powerCeilingWatts?: number;
  gateDelayMaxSeconds?: number;
  pathDelayMaxSeconds?: number;
  wiringCapacitancePerLoadFarads: number;
  orShareFactor: number;
  variants: "auto" | "basic";
  /** Fast variants' speed-up capacitor: series, tolerance and allowed range. */
  capacitorSeries: SeriesName;
  capacitorTolerance: number;
  capacitorMinFarads: number;
  capacitorMaxFarads: number;
  forcedValues?: Record<string, Record<string, number>>;
  devices: DeviceData;
  parameters: SizingParameter[];
}

const SERIES_OK = ["E12", "E24", "E48", "E96"];

export function resolveOptions(o: SizingOptions): StageResult<ResolvedOptions> {
  const diagnostics: Diagnostic[] = [];
  const params: SizingParameter[] = [];
  // `about`: the options a problem is about, so the command line can name its own flags.
  const bad = (what: string, hint?: string, ...about: (keyof SizingOptions)[]): void => {
    diagnostics.push(diag("GW6003", what, undefined, { ...(hint ? { hint } : {}), about }));
  };
  const rec = (name: string, label: string, value: number, unit: string, source: Provenance): void => {
    params.push({ name, label, value, unit, source });
  };
  const src = (x: unknown): Provenance => (x === undefined ? "default" : "user");
  const finite = (x: number | undefined): boolean => x === undefined || Number.isFinite(x);

  if (!Number.isFinite(o.supplyVolts) || !(o.supplyVolts > 0)) bad(`supply must be a positive voltage, not ${o.supplyVolts}`, undefined, "supplyVolts");
  else if (o.supplyVolts < 2.5) bad(`supply ${o.supplyVolts} V is too low for DTL (at least about 3 V)`, "DTL needs the input node at 2·V_D + V_BE ≈ 2.2 V plus headroom", "supplyVolts");
  else if (o.supplyVolts > 60) bad(`supply ${o.supplyVolts} V is above what gatewright sizes (60 V)`, undefined, "supplyVolts");

  const supplyTolerance = o.supplyTolerance ?? DEFAULTS.supplyTolerance;
  if (!finite(o.supplyTolerance) || supplyTolerance < 0 || supplyTolerance >= 0.5) bad(`supply tolerance must be between 0 and 50 %, not ${supplyTolerance}`, undefined, "supplyTolerance");

  let tempMinC = o.tempMinC ?? DEFAULTS.tempMinC;
  let tempMaxC = o.tempMaxC ?? DEFAULTS.tempMaxC;
  const preset = o.temperaturePreset;
  if (preset === "industrial") {
    tempMinC = o.tempMinC ?? DEFAULTS.industrialTempMinC;
    tempMaxC = o.tempMaxC ?? DEFAULTS.industrialTempMaxC;
  }
  if (!finite(o.tempMinC) || !finite(o.tempMaxC) || tempMinC > tempMaxC) bad(`temperature range ${tempMinC}..${tempMaxC} °C is not a range`, undefined, "tempMinC", "tempMaxC", "temperaturePreset");
  if (tempMinC < -60 || tempMaxC > 150) bad(`temperature range ${tempMinC}..${tempMaxC} °C is outside −60..150 °C`, undefined, ...(tempMinC < -60 ? (["tempMinC"] as const) : []), ...(tempMaxC > 150 ? (["tempMaxC"] as const) : []));

  const series = (o.series ?? DEFAULTS.series) as SeriesName;
  if (!SERIES_OK.includes(series)) {
    diagnostics.push(diag("GW6006", `unknown resistor series "${String(o.series)}"`, undefined, { hint: "use E12, E24, E48 or E96" }));
  }
  const resistorTolerance = o.resistorTolerance ?? (SERIES_OK.includes(series) ? seriesTolerance(series) : 0.05);
  if (!finite(o.resistorTolerance) || resistorTolerance < 0 || resistorTolerance >= 0.5) bad(`resistor tolerance must be between 0 and 50 %, not ${resistorTolerance}`, undefined, "resistorTolerance");
  const resistorMinOhms = o.resistorMinOhms ?? DEFAULTS.resistorMinOhms;
  const resistorMaxOhms = o.resistorMaxOhms ?? DEFAULTS.resistorMaxOhms;
  if (!finite(o.resistorMinOhms) || !finite(o.resistorMaxOhms) || !(resistorMinOhms > 0) || !(resistorMaxOhms > resistorMinOhms))
    bad(`allowed resistor range ${resistorMinOhms}..${resistorMaxOhms} Ω is not a range`);

  if (o.fanoutOverride !== undefined && (!Number.isInteger(o.fanoutOverride) || o.fanoutOverride < 1 || o.fanoutOverride > 1000))
    bad(`fan-out must be a whole number from 1 to 1000, not ${o.fanoutOverride}`, undefined, "fanoutOverride");
  const mode = o.mode ?? "uniform";
  if (mode !== "uniform" && mode !== "per-gate") diagnostics.push(diag("GW6001", `unknown sizing mode "${String(mode)}"`, undefined, { hint: "use uniform or per-gate" }));
  const variants = o.variants ?? "auto";
  if (variants !== "auto" && variants !== "basic") diagnostics.push(diag("GW6001", `unknown variant policy "${String(variants)}"`, undefined, { hint: "use auto or basic" }));

  const positive = (x: number | undefined, what: string, about: keyof SizingOptions): void => {
    if (x !== undefined && (!Number.isFinite(x) || !(x > 0))) bad(`${what} must be greater than zero, not ${x}`, undefined, about);
  };
  positive(o.betaMin, "minimum gain", "betaMin");
  positive(o.saturationMarginMin, "saturation margin", "saturationMarginMin");
  if (o.collectorCurrentMinAmps !== undefined && !(Number.isFinite(o.collectorCurrentMinAmps) && o.collectorCurrentMinAmps >= 0)) bad(`collector-current floor must not be negative`);
  positive(o.powerCeilingWatts, "power ceiling", "powerCeilingWatts");
  positive(o.gateDelayMaxSeconds, "gate delay budget", "gateDelayMaxSeconds");
  positive(o.pathDelayMaxSeconds, "path delay budget", "pathDelayMaxSeconds");
  positive(o.clockHz, "clock frequency", "clockHz");
  if (o.noiseMarginMinVolts !== undefined && !(Number.isFinite(o.noiseMarginMinVolts) && o.noiseMarginMinVolts >= 0)) bad(`noise margin must not be negative`, undefined, "noiseMarginMinVolts");
  if (o.turnOffRatioMin !== undefined && !(Number.isFinite(o.turnOffRatioMin) && o.turnOffRatioMin >= 0)) bad(`turn-off ratio must not be negative`);
  if (o.wiringCapacitancePerLoadFarads !== undefined && !(Number.isFinite(o.wiringCapacitancePerLoadFarads) && o.wiringCapacitancePerLoadFarads >= 0)) bad(`wiring capacitance must not be negative`, undefined, "wiringCapacitancePerLoadFarads");
  if (o.orShareFactor !== undefined && !(o.orShareFactor > 0 && o.orShareFactor <= 1)) bad(`diode-OR share factor must be in (0, 1]`);

  const capacitorSeries = (o.capacitorSeries ?? "E6") as SeriesName;
  if (!["E6", "E12", "E24"].includes(capacitorSeries)) diagnostics.push(diag("GW6006", `unknown capacitor series "${String(o.capacitorSeries)}"`, undefined, { hint: "use E6, E12 or E24 (ceramic capacitors are usually E6 or E12)" }));
  const capacitorTolerance = o.capacitorTolerance ?? (["E6", "E12", "E24"].includes(capacitorSeries) ? seriesTolerance(capacitorSeries) : 0.2);
  if (!finite(o.capacitorTolerance) || capacitorTolerance < 0 || capacitorTolerance >= 0.5) bad(`capacitor tolerance must be between 0 and 50 %, not ${capacitorTolerance}`);
  const capacitorMinFarads = o.capacitorMinFarads ?? 10e-12;
  const capacitorMaxFarads = o.capacitorMaxFarads ?? 1e-9;
  if (!finite(o.capacitorMinFarads) || !finite(o.capacitorMaxFarads) || !(capacitorMinFarads > 0) || !(capacitorMaxFarads >= capacitorMinFarads))
    bad(`allowed capacitor range ${capacitorMinFarads}..${capacitorMaxFarads} F is not a range`);

  if (diagnostics.length > 0) return { diagnostics };

  const devices = resolveDevices(o.parts);
  if (o.betaMin !== undefined) devices.betaMin = o.betaMin;
  if (devices.betaMax < devices.betaMin) devices.betaMax = devices.betaMin;
  const fromParts = (x: unknown): Provenance => (x === undefined ? "default" : "user");

  // A clock gives a path budget of one period (the longest path must settle within it).
  let pathDelayMaxSeconds = o.pathDelayMaxSeconds;
  let pathSource: Provenance = src(o.pathDelayMaxSeconds);
  if (o.clockHz !== undefined) {
    const period = 1 / o.clockHz;
    pathDelayMaxSeconds = pathDelayMaxSeconds === undefined ? period : Math.min(pathDelayMaxSeconds, period);
    pathSource = "user";
  }

  rec("supplyVolts", "Supply, nominal", o.supplyVolts, "V", "user");
  rec("supplyTolerance", "Supply tolerance", supplyTolerance, "ratio", src(o.supplyTolerance));
  rec("tempMinC", "Lowest temperature", tempMinC, "°C", o.tempMinC !== undefined || preset !== undefined ? "user" : "default");
  rec("tempMaxC", "Highest temperature", tempMaxC, "°C", o.tempMaxC !== undefined || preset !== undefined ? "user" : "default");
  rec("seriesValuesPerDecade", `Resistor series ${series}`, seriesMantissas(series).length, "values/decade", src(o.series));
  rec("resistorTolerance", "Resistor tolerance", resistorTolerance, "ratio", src(o.resistorTolerance));
  rec("resistorMinOhms", "Smallest allowed resistor", resistorMinOhms, "Ω", src(o.resistorMinOhms));
  rec("resistorMaxOhms", "Largest allowed resistor", resistorMaxOhms, "Ω", src(o.resistorMaxOhms));
  if (o.fanoutOverride !== undefined) rec("fanoutOverride", "Fan-out sized for (forced)", o.fanoutOverride, "loads", "user");
  rec("betaMin", "Minimum transistor gain at 25 °C", devices.betaMin, "", o.betaMin !== undefined ? "user" : fromParts(o.parts?.npn?.betaMin));
  rec("betaMax", "Largest transistor gain at 25 °C", devices.betaMax, "", fromParts(o.parts?.npn?.betaMax));
  rec("betaTempExponent", "Gain temperature exponent (XTB)", devices.betaTempExponent, "", fromParts(o.parts?.npn?.betaTempExponent ?? o.parts?.npn?.model?.XTB));
  rec("vDiodeOnVolts", "Diode forward drop at 25 °C", devices.vDiodeOnVolts, "V", fromParts(o.parts?.diode?.vForwardVolts));
  rec("vDiodeCutInVolts", "Diode cut-in at 25 °C", devices.vDiodeCutInVolts, "V", fromParts(o.parts?.diode?.vCutInVolts));
  rec("vBECutInVolts", "Base-emitter cut-in at 25 °C", devices.vBECutInVolts, "V", fromParts(o.parts?.npn?.vbeCutInVolts));
  rec("vBEActiveVolts", "Base-emitter drop, active, at 25 °C", devices.vBEActiveVolts, "V", fromParts(o.parts?.npn?.vbeActiveVolts));
  rec("vBESatVolts", "Base-emitter drop, saturated, at 25 °C", devices.vBESatVolts, "V", fromParts(o.parts?.npn?.vbeSatVolts));
  rec("vCESatVolts", "Collector-emitter saturation voltage", devices.vCESatVolts, "V", fromParts(o.parts?.npn?.vceSatVolts));
  rec("junctionTempCoVoltsPerC", "Junction drop temperature coefficient", devices.junctionTempCoVoltsPerC, "V/°C", "default");
  const saturationMarginMin = o.saturationMarginMin ?? DEFAULTS.saturationMarginMin;
  rec("saturationMarginMin", "Required saturation margin β·I_B/(I_C + loads)", saturationMarginMin, "", src(o.saturationMarginMin));
  const noiseMarginMinVolts = o.noiseMarginMinVolts ?? DEFAULTS.noiseMarginMinVolts;
  rec("noiseMarginMinVolts", "Required noise margin, low and high", noiseMarginMinVolts, "V", src(o.noiseMarginMinVolts));
  // The speed floors stand in for a delay budget: with a budget they apply only if given.
  const budgeted = o.gateDelayMaxSeconds !== undefined || pathDelayMaxSeconds !== undefined;
  const collectorCurrentMinAmps = o.collectorCurrentMinAmps ?? (budgeted ? 0 : DEFAULTS.collectorCurrentMinAmps);
  if (collectorCurrentMinAmps > 0)
    rec("collectorCurrentMinAmps", "Least collector current (speed floor)", collectorCurrentMinAmps, "A", src(o.collectorCurrentMinAmps));
  const turnOffRatioMin = o.turnOffRatioMin ?? (budgeted ? 0 : DEFAULTS.turnOffRatioMin);
  if (turnOffRatioMin > 0) rec("turnOffRatioMin", "Turn-off current R_B at least × I_C/β_min", turnOffRatioMin, "", src(o.turnOffRatioMin));
  if (o.powerCeilingWatts !== undefined) rec("powerCeilingWatts", "Power ceiling per gate", o.powerCeilingWatts, "W", "user");
  if (o.gateDelayMaxSeconds !== undefined) rec("gateDelayMaxSeconds", "Largest gate delay", o.gateDelayMaxSeconds, "s", "user");
  if (pathDelayMaxSeconds !== undefined) rec("pathDelayMaxSeconds", "Largest delay of the longest path", pathDelayMaxSeconds, "s", pathSource);
  if (o.clockHz !== undefined) rec("clockHz", "Clock frequency", o.clockHz, "Hz", "user");
  const wiringCapacitancePerLoadFarads = o.wiringCapacitancePerLoadFarads ?? DEFAULTS.wiringCapacitancePerLoadFarads;
  rec("wiringCapacitancePerLoadFarads", "Wiring capacitance per load", wiringCapacitancePerLoadFarads, "F", src(o.wiringCapacitancePerLoadFarads));
  const orShareFactor = o.orShareFactor ?? DEFAULTS.orShareFactor;
  rec("orShareFactor", "Share of a driver's current the weakest diode-OR load gets", orShareFactor, "", src(o.orShareFactor));

  const out: ResolvedOptions = {
    supplyVolts: o.supplyVolts,
    supplyTolerance,
    tempMinC,
    tempMaxC,
    series,
    resistorTolerance,
    resistorMinOhms,
    resistorMaxOhms,
    mode,
    saturationMarginMin,
    noiseMarginMinVolts,
    collectorCurrentMinAmps,
    turnOffRatioMin,
    wiringCapacitancePerLoadFarads,
    orShareFactor,
    variants,
    capacitorSeries,
    capacitorTolerance,
    capacitorMinFarads,
    capacitorMaxFarads,
    devices,
    parameters: params,
  };
  if (o.fanoutOverride !== undefined) out.fanoutOverride = o.fanoutOverride;
  if (o.powerCeilingWatts !== undefined) out.powerCeilingWatts = o.powerCeilingWatts;
  if (o.gateDelayMaxSeconds !== undefined) out.gateDelayMaxSeconds = o.gateDelayMaxSeconds;
  if (pathDelayMaxSeconds !== undefined) out.pathDelayMaxSeconds = pathDelayMaxSeconds;
  if (o.forcedValues !== undefined) out.forcedValues = o.forcedValues;
  return { value: out, diagnostics };
}
