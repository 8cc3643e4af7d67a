// Device data: SPICE model cards for the generic parts, the piecewise-linear DC design assumptions
// used by the cell equations, their temperature dependence, and the parts-file override.
import { diag, type Diagnostic, type StageResult } from "../diagnostics/index.js";
import { parseQuantity, type Dimension } from "./quantity.js";

export interface ModelCard {
  name: string;
  type: "D" | "NPN";
  params: Record<string, number>;
  partNumber?: string;
  description: string;
}

/** Generic small-signal silicon switching diode, 100 V class. Parameter values are typical of
 *  public model libraries (chosen inside the ranges those libraries show). */
export const DEFAULT_DIODE_MODEL: ModelCard = {
  name: "D_GW_SW",
  type: "D",
  params: { IS: 3e-9, N: 1.8, RS: 0.7, CJO: 2e-12, M: 0.33, VJ: 0.75, TT: 4e-9, BV: 100, IBV: 1e-4, EG: 1.11, XTI: 3 },
  description: "small-signal silicon switching diode, 100 V",
};

/** Generic small-signal NPN switching transistor. Parameter values are typical of public model
 *  libraries for the general-purpose small-signal class; XTB 1.5 gives gain rising about 0.5 %/K. */
export const DEFAULT_NPN_MODEL: ModelCard = {
  name: "Q_GW_NPN",
  type: "NPN",
  params: {
    IS: 6.7e-15,
    BF: 300,
    NF: 1,
    BR: 0.74,
    NR: 1,
    VAF: 74,
    IKF: 0.067,
    RB: 10,
    CJE: 4.5e-12,
    CJC: 3.6e-12,
    TF: 0.3e-9,
    TR: 240e-9,
    EG: 1.11,
    XTI: 3,
    XTB: 1.5,
  },
  description: "small-signal NPN switching transistor, 40 V",
};

/** DC design assumptions at 25 °C and the ratings of the parts. */
export interface DeviceData {
  diode: ModelCard;
  npn: ModelCard;
  /** Diode forward drop when conducting (Millman & Halkias ch. 6: 0.7 V). */
  vDiodeOnVolts: number;
  /** Diode cut-in (0.6 V). */
  vDiodeCutInVolts: number;
  /** Base-emitter cut-in (0.5 V). */
  vBECutInVolts: number;
  /** Base-emitter drop in the active region (0.7 V). */
  vBEActiveVolts: number;
  /** Base-emitter drop in saturation (0.8 V). */
  vBESatVolts: number;
  /** Collector-emitter saturation voltage (0.2 V). */
  vCESatVolts: number;
  /** Change of every junction drop with temperature (−2 mV/°C, Sedra & Smith). */
  junctionTempCoVoltsPerC: number;
  /** Minimum current gain at 25 °C. */
  betaMin: number;
  /** Largest current gain at 25 °C (used where more gain costs power). */
  betaMax: number;
  /** Exponent of the gain's temperature dependence, β(T) = β(25 °C)·(T/298.15 K)^XTB. */
  betaTempExponent: number;
  diodePartNumber?: string;
  npnPartNumber?: string;
  diodeReverseMaxVolts: number;
  diodeForwardMaxAmps: number;
  npnVceMaxVolts: number;
  npnIcMaxAmps: number;
  npnPowerMaxWatts: number;
  /** The fast cells' clamp diode (absent: the defaults, DEFAULT_SCHOTTKY). */
  schottky?: SchottkyData;
}

export const DEFAULT_DEVICES: DeviceData = {
  diode: DEFAULT_DIODE_MODEL,
  npn: DEFAULT_NPN_MODEL,
  vDiodeOnVolts: 0.7,
  vDiodeCutInVolts: 0.6,
  vBECutInVolts: 0.5,
  vBEActiveVolts: 0.7,
  vBESatVolts: 0.8,
  vCESatVolts: 0.2,
  junctionTempCoVoltsPerC: -0.002,
  betaMin: 30,
  // Upper end of BF in public small-signal NPN models (REFERENCES: BF ≈ 200–420).
  betaMax: 400,
  betaTempExponent: 1.5,
  // Ratings of the 100 V switching-diode and 40 V small-signal NPN classes (from memory:
  // 100 V / 200 mA; 40 V / 200 mA / 625 mW).
  diodeReverseMaxVolts: 100,
  diodeForwardMaxAmps: 0.2,
  npnVceMaxVolts: 40,
  npnIcMaxAmps: 0.2,
  npnPowerMaxWatts: 0.625,
};

/** Device values at one temperature: the DC assumptions with every junction drop shifted and the
 *  gain scaled. */
export interface DeviceAtTemp {
  tempC: number;
  vDiodeOnVolts: number;
  vDiodeCutInVolts: number;
  vBECutInVolts: number;
  vBEActiveVolts: number;
  vBESatVolts: number;
  vCESatVolts: number;
  betaMin: number;
  betaMax: number;
  /** The SPICE model cards' parameters, for figures computed from the junction equations (the
   *  input thresholds, src/electrical/thresholds.ts). Absent: the book's piecewise-linear
   *  device only (hand calculations in the tests). */
  models?: { diode: Record<string, number>; npn: Record<string, number> };
}

export const REFERENCE_TEMP_C = 25;

/** Gain scale factor at `tempC` relative to 25 °C: (T/T_ref)^XTB, as in SPICE models. */
export function betaTempFactor(tempC: number, xtb: number): number {
  return ((tempC + 273.15) / (REFERENCE_TEMP_C + 273.15)) ** xtb;
}

/** Junction drop at `tempC` given its 25 °C value (linear, −2 mV/°C by default). */
export function junctionDropAt(v25Volts: number, tempC: number, tcVoltsPerC: number): number {
  return v25Volts + tcVoltsPerC * (tempC - REFERENCE_TEMP_C);
}

export function devicesAt(dev: DeviceData, tempC: number): DeviceAtTemp {
  const tc = dev.junctionTempCoVoltsPerC;
  const bf = betaTempFactor(tempC, dev.betaTempExponent);
  return {
    tempC,
    vDiodeOnVolts: junctionDropAt(dev.vDiodeOnVolts, tempC, tc),
    vDiodeCutInVolts: junctionDropAt(dev.vDiodeCutInVolts, tempC, tc),
    vBECutInVolts: junctionDropAt(dev.vBECutInVolts, tempC, tc),
    vBEActiveVolts: junctionDropAt(dev.vBEActiveVolts, tempC, tc),
    vBESatVolts: junctionDropAt(dev.vBESatVolts, tempC, tc),
    vCESatVolts: dev.vCESatVolts,
    betaMin: dev.betaMin * bf,
    betaMax: dev.betaMax * bf,
    models: { diode: dev.diode.params, npn: dev.npn.params },
  };
}

// ---------------------------------------------------------------------------------------------
// Parts file

export interface DiodePart {
  partNumber?: string;
  description?: string;
  model?: Record<string, number>;
  vForwardVolts?: number;
  vCutInVolts?: number;
  vReverseMaxVolts?: number;
  iForwardMaxAmps?: number;
}

export interface NpnPart {
  partNumber?: string;
  description?: string;
  model?: Record<string, number>;
  betaMin?: number;
  betaMax?: number;
  betaTempExponent?: number;
  vbeSatVolts?: number;
  vbeActiveVolts?: number;
  vbeCutInVolts?: number;
  vceSatVolts?: number;
  vceMaxVolts?: number;
  icMaxAmps?: number;
  pMaxWatts?: number;
}

export interface PartsFile {
  diode?: DiodePart;
  npn?: NpnPart;
  schottky?: SchottkyPart;
}

// SPICE parameter names accepted in model overrides (ngspice diode and Gummel–Poon BJT).
const DIODE_PARAMS = new Set([
  "IS", "N", "RS", "CJO", "CJ0", "CJ", "VJ", "PB", "M", "MJ", "TT", "BV", "IBV", "EG", "XTI", "KF", "AF", "FC",
  "TNOM", "ISR", "NR", "IKF", "IKR", "NBV", "TRS", "TRS1", "TRS2", "TBV", "TBV1", "TBV2", "CJP", "CJSW", "PHP", "MJSW",
  "FCS", "AREA", "RSW", "XTI",
]);
const NPN_PARAMS = new Set([
  "IS", "BF", "NF", "VAF", "VA", "IKF", "IK", "ISE", "C2", "NE", "BR", "NR", "VAR", "VB", "IKR", "ISC", "C4", "NC",
  "RB", "IRB", "RBM", "RE", "RC", "CJE", "VJE", "PE", "MJE", "ME", "TF", "XTF", "VTF", "ITF", "PTF", "CJC", "VJC",
  "PC", "MJC", "MC", "XCJC", "TR", "CJS", "CCS", "VJS", "PS", "MJS", "MS", "XTB", "EG", "XTI", "KF", "AF", "FC",
  "TNOM", "NS", "ISS", "QUASIMOD", "RCO", "VO", "GAMMA", "QCO",
]);

type FieldKind = { dim: Dimension | "text" | "count"; positive: boolean };

const DIODE_FIELDS: Record<string, FieldKind> = {
  partNumber: { dim: "text", positive: false },
  description: { dim: "text", positive: false },
  vForwardVolts: { dim: "voltage", positive: true },
  vCutInVolts: { dim: "voltage", positive: true },
  vReverseMaxVolts: { dim: "voltage", positive: true },
  iForwardMaxAmps: { dim: "current", positive: true },
};
const NPN_FIELDS: Record<string, FieldKind> = {
  partNumber: { dim: "text", positive: false },
  description: { dim: "text", positive: false },
  betaMin: { dim: "count", positive: true },
  betaMax: { dim: "count", positive: true },
  betaTempExponent: { dim: "count", positive: false },
  vbeSatVolts: { dim: "voltage", positive: true },
  vbeActiveVolts: { dim: "voltage", positive: true },
  vbeCutInVolts: { dim: "voltage", positive: true },
  vceSatVolts: { dim: "voltage", positive: true },
  vceMaxVolts: { dim: "voltage", positive: true },
  icMaxAmps: { dim: "current", positive: true },
  pMaxWatts: { dim: "power", positive: true },
};

function isRecord(x: unknown): x is Record<string, unknown> {
  return typeof x === "object" && x !== null && !Array.isArray(x);
}

/** Reads a number or a quantity string ("100 V", "2.5n") for a parts-file field. */
function readNumber(
  raw: unknown,
  dim: Dimension | "count",
): { value: number } | { error: string } {
  if (typeof raw === "number") {
    return Number.isFinite(raw) ? { value: raw } : { error: "is not a finite number" };
  }
  if (typeof raw === "string") {
    const r = parseQuantity(raw, dim === "count" ? "ratio" : dim);
    if ("error" in r) {
      // Model parameters and counts may use SPICE multipliers ("2.5n").
      if (dim === "count") {
        const r2 = parseQuantity(raw, "resistance");
        if ("value" in r2) return r2;
      }
      return { error: r.error };
    }
    return r;
  }
  return { error: `must be a number or a quantity string, not ${raw === null ? "null" : typeof raw}` };
}

/** Checks a parsed parts file (JSON data) and returns it typed, or GW6005 diagnostics naming the
 *  JSON key path of each problem. */
export function validatePartsFile(data: unknown, file?: string): StageResult<PartsFile> {
  const diagnostics: Diagnostic[] = [];
  const where = file !== undefined ? { file } : undefined;
  const bad = (path: string, what: string, hint?: string): void => {
    diagnostics.push(diag("GW6005", `parts file: ${path}: ${what}`, where, hint ? { hint } : undefined));
  };
  if (!isRecord(data)) {
    bad("(top level)", "must be a JSON object with \"diode\" and/or \"npn\" entries");
    return { diagnostics };
  }
  const out: PartsFile = {};
  for (const key of Object.keys(data)) {
    if (key !== "diode" && key !== "npn" && key !== "schottky") bad(key, "unknown entry", 'the known entries are "diode", "npn" and "schottky"');
  }
  const readPart = (
    key: "diode" | "npn" | "schottky",
    fields: Record<string, FieldKind>,
    params: Set<string>,
  ): Record<string, unknown> | undefined => {
    const raw = data[key];
    if (raw === undefined) return undefined;
    if (!isRecord(raw)) {
      bad(key, "must be an object");
      return undefined;
    }
    const part: Record<string, unknown> = {};
    for (const [f, v] of Object.entries(raw)) {
      const path = `${key}.${f}`;
      if (f === "model") {
        if (!isRecord(v)) {
          bad(path, "must be an object of SPICE model parameters, e.g. { \"IS\": 2.5e-9 }");
          continue;
        }
        const model: Record<string, number> = {};
        for (const [p, pv] of Object.entries(v)) {
          const name = p.toUpperCase();
          if (!params.has(name)) {
            bad(`${path}.${p}`, `unknown ${key === "npn" ? "NPN" : "diode"} model parameter`);
            continue;
          }
          const r = readNumber(pv, "count");
          if ("error" in r) bad(`${path}.${p}`, r.error);
          else if (r.value < 0 && !["VAF", "VAR", "VA", "VB", "XTB", "EG", "XTI", "TNOM"].includes(name))
            bad(`${path}.${p}`, "must not be negative");
          else model[name] = r.value;
        }
        part.model = model;
        continue;
      }
      const kind = fields[f];
      if (!kind) {
        bad(path, "unknown field", `known fields: model, ${Object.keys(fields).join(", ")}`);
        continue;
      }
      if (kind.dim === "text") {
        if (typeof v !== "string" || v.trim() === "") bad(path, "must be a non-empty string");
        else part[f] = v;
        continue;
      }
      const r = readNumber(v, kind.dim);
      if ("error" in r) bad(path, r.error);
      else if (kind.positive && !(r.value > 0)) bad(path, "must be greater than zero");
      else part[f] = r.value;
    }
    return part;
  };
  const diode = readPart("diode", DIODE_FIELDS, DIODE_PARAMS);
  const npn = readPart("npn", NPN_FIELDS, NPN_PARAMS);
  if (diode) out.diode = diode as DiodePart;
  if (npn) out.npn = npn as NpnPart;
  const schottky = readPart("schottky", SCHOTTKY_FIELDS, DIODE_PARAMS);
  if (schottky) out.schottky = schottky as SchottkyPart;
  // Cross-field sense checks.
  if (out.npn?.betaMin !== undefined && out.npn.betaMax !== undefined && out.npn.betaMax < out.npn.betaMin)
    bad("npn.betaMax", "must not be below npn.betaMin");
  if (out.diode?.vCutInVolts !== undefined && out.diode.vForwardVolts !== undefined &&
      out.diode.vCutInVolts > out.diode.vForwardVolts)
    bad("diode.vCutInVolts", "must not exceed diode.vForwardVolts");
  if (diagnostics.length > 0) return { diagnostics };
  return { value: out, diagnostics };
}

/** Parses parts-file text (JSON). Syntax errors point at the offending offset. */
export function parsePartsFile(text: string, file?: string): StageResult<PartsFile> {
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    const pos = /position (\d+)/.exec(msg);
    const at = pos ? Number(pos[1]) : jsonErrorOffset(text);
    const span = at !== undefined ? { start: Math.min(at, text.length), length: at < text.length ? 1 : 0 } : undefined;
    const where: { file?: string; span?: { start: number; length: number } } = {};
    if (file !== undefined) where.file = file;
    if (span) where.span = span;
    return { diagnostics: [diag("GW6005", `parts file is not valid JSON: ${msg}`, where)] };
  }
  return validatePartsFile(data, file);
}

/** Offset of the first JSON syntax error in `text` (a small recursive scanner; JSON.parse does
 *  not always say where). */
export function jsonErrorOffset(text: string): number | undefined {
  let i = 0;
  const ws = (): void => {
    while (i < text.length && " \t\r\n".includes(text[i]!)) i++;
  };
  const fail = (): never => {
    throw i;
  };
  const str = (): void => {
    if (text[i] !== '"') fail();
    i++;
    while (i < text.length && text[i] !== '"') {
      if (text[i] === "\\") i++;
      i++;
    }
    if (i >= text.length) fail();
    i++;
  };
  const value = (): void => {
    ws();
    const c = text[i];
    if (c === "{") {
      i++;
      ws();
      if (text[i] === "}") {
        i++;
        return;
      }
      for (;;) {
        ws();
        str();
        ws();
        if (text[i] !== ":") fail();
        i++;
        value();
        ws();
        if (text[i] === ",") {
          i++;
          continue;
        }
        if (text[i] === "}") {
          i++;
          return;
        }
        fail();
      }
    }
    if (c === "[") {
      i++;
      ws();
      if (text[i] === "]") {
        i++;
        return;
      }
      for (;;) {
        value();
        ws();
        if (text[i] === ",") {
          i++;
          continue;
        }
        if (text[i] === "]") {
          i++;
          return;
        }
        fail();
      }
    }
    if (c === '"') return str();
    const m = /^(-?(0|[1-9]\d*)(\.\d+)?([eE][-+]?\d+)?|true|false|null)/.exec(text.slice(i));
    if (!m) fail();
    i += m![0].length;
  };
  try {
    value();
    ws();
    if (i < text.length) return i;
    return undefined;
  } catch (at) {
    return typeof at === "number" ? at : undefined;
  }
}

/** Applies a parts file over the defaults; `betaMinUser` (an option) wins over the file. */
export function resolveDevices(parts: PartsFile | undefined): DeviceData {
  const d = DEFAULT_DEVICES;
  const dp = parts?.diode;
  const np = parts?.npn;
  const diode: ModelCard = {
    ...d.diode,
    params: { ...d.diode.params, ...(dp?.model ?? {}) },
    description: dp?.description ?? d.diode.description,
  };
  if (dp?.partNumber !== undefined) diode.partNumber = dp.partNumber;
  const npn: ModelCard = {
    ...d.npn,
    params: { ...d.npn.params, ...(np?.model ?? {}) },
    description: np?.description ?? d.npn.description,
  };
  if (np?.partNumber !== undefined) npn.partNumber = np.partNumber;
  const out: DeviceData = {
    ...d,
    diode,
    npn,
    vDiodeOnVolts: dp?.vForwardVolts ?? d.vDiodeOnVolts,
    vDiodeCutInVolts: dp?.vCutInVolts ?? Math.min(d.vDiodeCutInVolts, dp?.vForwardVolts ?? Infinity),
    diodeReverseMaxVolts: dp?.vReverseMaxVolts ?? (dp?.model?.BV !== undefined ? dp.model.BV : d.diodeReverseMaxVolts),
    diodeForwardMaxAmps: dp?.iForwardMaxAmps ?? d.diodeForwardMaxAmps,
    betaMin: np?.betaMin ?? d.betaMin,
    betaMax: np?.betaMax ?? Math.max(d.betaMax, np?.betaMin ?? 0),
    betaTempExponent: np?.betaTempExponent ?? npn.params.XTB ?? d.betaTempExponent,
    vBESatVolts: np?.vbeSatVolts ?? d.vBESatVolts,
    vBEActiveVolts: np?.vbeActiveVolts ?? d.vBEActiveVolts,
    vBECutInVolts: np?.vbeCutInVolts ?? d.vBECutInVolts,
    vCESatVolts: np?.vceSatVolts ?? d.vCESatVolts,
    npnVceMaxVolts: np?.vceMaxVolts ?? d.npnVceMaxVolts,
    npnIcMaxAmps: np?.icMaxAmps ?? d.npnIcMaxAmps,
    npnPowerMaxWatts: np?.pMaxWatts ?? d.npnPowerMaxWatts,
    schottky: resolveSchottky(parts?.schottky),
  };
  if (dp?.partNumber !== undefined) out.diodePartNumber = dp.partNumber;
  if (np?.partNumber !== undefined) out.npnPartNumber = np.partNumber;
  return out;
}

// ---------------------------------------------------------------------------------------------
// Schottky clamp diode: the anti-saturation clamp of the fast cells (base to collector, the
// Baker clamp idea, common practice). Overridable in the parts file under "schottky".

/** Generic small-signal Schottky diode, 30 V class. Parameter values are typical of public model
 *  libraries for that class (from memory; chosen inside the ranges those libraries show): about
 *  0.31 V at 1 mA, about 10 pF at zero bias, no stored charge (majority carriers, TT 0). */
export const DEFAULT_SCHOTTKY_MODEL: ModelCard = {
  name: "D_GW_SCH",
  type: "D",
  params: { IS: 1e-8, N: 1.05, RS: 2, CJO: 10e-12, M: 0.35, VJ: 0.35, TT: 0, BV: 30, IBV: 1e-5, EG: 0.69, XTI: 2 },
  description: "small-signal Schottky diode, 30 V",
};

export interface SchottkyData {
  card: ModelCard;
  /** Forward drop while clamping at a typical current (0.35 V at 25 °C). */
  vForwardVolts: number;
  /** Least forward drop while clamping (0.24 V at 25 °C, about 0.07 mA): the low output level of
   *  a clamped cell is at most V_BE − this. */
  vForwardMinVolts: number;
  /** Change of the forward drop with temperature (−1.5 mV/°C: the SPICE diode equation,
   *  dV/dT = (V − EG − XTI·n·V_T)/T, with EG 0.69 eV, XTI 2 at 0.3 V gives −1.5 mV/K). */
  tempCoVoltsPerC: number;
  vReverseMaxVolts: number;
  iForwardMaxAmps: number;
  partNumber?: string;
}

export interface SchottkyPart {
  partNumber?: string;
  description?: string;
  model?: Record<string, number>;
  vForwardVolts?: number;
  vForwardMinVolts?: number;
  vReverseMaxVolts?: number;
  iForwardMaxAmps?: number;
}

const SCHOTTKY_FIELDS: Record<string, FieldKind> = {
  partNumber: { dim: "text", positive: false },
  description: { dim: "text", positive: false },
  vForwardVolts: { dim: "voltage", positive: true },
  vForwardMinVolts: { dim: "voltage", positive: true },
  vReverseMaxVolts: { dim: "voltage", positive: true },
  iForwardMaxAmps: { dim: "current", positive: true },
};

/** The default Schottky data (ratings of the 30 V / 200 mA small-signal class, from memory). */
export const DEFAULT_SCHOTTKY: SchottkyData = {
  card: DEFAULT_SCHOTTKY_MODEL,
  vForwardVolts: 0.35,
  vForwardMinVolts: 0.24,
  tempCoVoltsPerC: -0.0015,
  vReverseMaxVolts: 30,
  iForwardMaxAmps: 0.2,
};

/** Applies a parts file's "schottky" entry over the defaults. */
export function resolveSchottky(part: SchottkyPart | undefined): SchottkyData {
  const d = DEFAULT_SCHOTTKY;
  const card: ModelCard = {
    ...d.card,
    params: { ...d.card.params, ...(part?.model ?? {}) },
    description: part?.description ?? d.card.description,
  };
  if (part?.partNumber !== undefined) card.partNumber = part.partNumber;
  const out: SchottkyData = {
    card,
    vForwardVolts: part?.vForwardVolts ?? d.vForwardVolts,
    vForwardMinVolts: part?.vForwardMinVolts ?? Math.min(d.vForwardMinVolts, part?.vForwardVolts ?? Infinity),
    tempCoVoltsPerC: d.tempCoVoltsPerC,
    vReverseMaxVolts: part?.vReverseMaxVolts ?? (part?.model?.BV !== undefined ? part.model.BV : d.vReverseMaxVolts),
    iForwardMaxAmps: part?.iForwardMaxAmps ?? d.iForwardMaxAmps,
  };
  if (part?.partNumber !== undefined) out.partNumber = part.partNumber;
  return out;
}

/** The Schottky's forward drops at one temperature. */
export interface SchottkyAtTemp {
  vForwardVolts: number;
  vForwardMinVolts: number;
  /** The model card's parameters and the temperature (for drops at a given current). */
  params: Record<string, number>;
  tempC: number;
  tempCoVoltsPerC: number;
}

export function schottkyAt(s: SchottkyData, tempC: number): SchottkyAtTemp {
  return {
    vForwardVolts: junctionDropAt(s.vForwardVolts, tempC, s.tempCoVoltsPerC),
    vForwardMinVolts: junctionDropAt(s.vForwardMinVolts, tempC, s.tempCoVoltsPerC),
    params: s.card.params,
    tempC,
    tempCoVoltsPerC: s.tempCoVoltsPerC,
  };
}
