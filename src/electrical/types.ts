// The sized design: what sizing produces and the emitters (SPICE, parts list, report, JSON) consume.
import type { CellNetlist } from "../map/types.js";
import type { ModelCard, PartsFile } from "./devices.js";
import type { SeriesName } from "./eseries.js";

export type { ModelCard, PartsFile } from "./devices.js";

export type Provenance = "user" | "default";

export interface SizingParameter {
  name: string;
  label: string;
  value: number;
  unit: string;
  source: Provenance;
}

export type SizingMode = "uniform" | "per-gate";

export interface SizingOptions {
  /** Nominal supply. */
  supplyVolts: number;
  /** Supply tolerance as a fraction (default 0.05: ±5 %). */
  supplyTolerance?: number;
  /** Temperature range (default 0–70 °C; the "industrial" preset is −40–85 °C). */
  tempMinC?: number;
  tempMaxC?: number;
  temperaturePreset?: "commercial" | "industrial";
  /** Minimum transistor gain at 25 °C (default 30, or the parts file's). */
  betaMin?: number;
  /** Resistor series (default E24) and tolerance (default the series' usual one). */
  series?: "E12" | "E24" | "E48" | "E96";
  resistorTolerance?: number;
  /** Allowed resistor range (default 100 Ω – 1 MΩ). */
  resistorMinOhms?: number;
  resistorMaxOhms?: number;
  /** Size every output for this many loads instead of the largest the netlist has. */
  fanoutOverride?: number;
  parts?: PartsFile;
  /** `uniform` (default): one set of values per cell kind; `per-gate`: each gate for its own load. */
  mode?: SizingMode;
  /** Required β_min·I_B/(I_C + loads) at the worst corner (default 1.2). */
  saturationMarginMin?: number;
  /** Required low- and high-state noise margins at the worst corner (default 0.4 V). */
  noiseMarginMinVolts?: number;
  /** Speed floor when no delay budget is given: least collector current (default 1 mA; with a
   *  delay budget, none unless given; 0 turns it off). */
  collectorCurrentMinAmps?: number;
  /** Speed floor when no delay budget is given: R_B's turn-off current at least this many times
   *  I_C/β_min (default 1; with a delay budget, none unless given; 0 turns it off). */
  turnOffRatioMin?: number;
  /** Optional ceiling on each gate's worst-case static power. */
  powerCeilingWatts?: number;
  /** Speed budget: largest propagation delay of one gate, of the longest path, or a clock. */
  gateDelayMaxSeconds?: number;
  pathDelayMaxSeconds?: number;
  clockHz?: number;
  /** Wiring capacitance added per load (default 3 pF). */
  wiringCapacitancePerLoadFarads?: number;
  /** Fraction of an equal share the weakest of several diode-OR loads gets (default 0.8). */
  orShareFactor?: number;
  /** `auto` (default): use the high-fan-out variant where the basic cell cannot meet the fan-out,
   *  and, under a speed budget the basic cells miss, the cheapest fast variant (speed-up
   *  capacitor, Schottky clamp, both) that meets it. `basic`: the basic cells only. */
  variants?: "auto" | "basic";
  /** Fast variants: the speed-up capacitor's series (default E6), tolerance (default the series'
   *  usual one: E6 20 %, E12 10 %, E24 5 %) and allowed range (default 10 pF – 1 nF). */
  capacitorSeries?: "E6" | "E12" | "E24";
  capacitorTolerance?: number;
  capacitorMinFarads?: number;
  capacitorMaxFarads?: number;
  /** Skip the search and use these values (per cell id, e.g. { nand: { rpOhms: 5000, ... } }). */
  forcedValues?: Record<string, Record<string, number>>;
  /** When the request cannot be met, report the first failure without searching for the
   *  constraint that blocks it and the best value reachable (a dozen more sizings). For callers
   *  with a fallback (the pipeline's NAND-only mapping), which explain only if it fails too. */
  quickFailure?: boolean;
  /** Search every cell kind at each shared R_C even where one kind alone shows that none fits
   *  (see blockedKind in size.ts): the same verdict, found more slowly. For checking that
   *  shortcut. */
  fullSearch?: boolean;
}

/** One checked constraint at its worst corner. */
export interface ConstraintResult {
  id: string;
  label: string;
  value: number;
  limit: number;
  unit: string;
  sense: "min" | "max";
  /** Relative margin: (value − limit)/|limit| for "min", (limit − value)/|limit| for "max". */
  margin: number;
  ok: boolean;
  /** Where the worst value occurs: supply, temperature and resistor case. */
  corner: string;
}

/** Figures of one analysis point (see CellOperatingPoint in src/cells/types.ts). */
export interface OperatingFigures {
  vccVolts: number;
  tempC: number;
  i1Amps: number;
  i2Amps: number;
  iBAmps: number;
  iCAmps: number;
  iLoadAmps: number;
  betaNeeded: number;
  satMargin: number;
  vOLVolts: number;
  vOHVolts: number;
  vILVolts: number;
  vIHVolts: number;
  noiseMarginLowVolts: number;
  noiseMarginHighVolts: number;
  powerLowWatts: number;
  powerHighWatts: number;
  supplyCurrentLowAmps: number;
  supplyCurrentHighAmps: number;
  extra: Record<string, number>;
}

export interface CellTiming {
  /** Output falling (transistor turning on). */
  tPHLSeconds: number;
  /** Output rising (storage plus the R_C pull-up). */
  tPLHSeconds: number;
  tStorageSeconds: number;
  tTurnOnSeconds: number;
  tRiseSeconds: number;
  loadCapacitanceFarads: number;
}

/** Analysis of a sized cell. The flat figures are worst case over every corner and every load
 *  situation of the cell; `nominal` is at the nominal supply, 25 °C and nominal resistors. */
export interface CellAnalysis {
  iBAmps: number;
  iCAmps: number;
  iLoadAmps: number;
  satMargin: number;
  betaNeeded: number;
  /** Loads on the output in the worst situation (diode-AND + diode-OR). */
  fanout: number;
  andLoads: number;
  orLoads: number;
  /** How many diode-AND loads like the design's heaviest the cell could drive at the worst
   *  corner with the required saturation margin. */
  maxFanout: number;
  vOLVolts: number;
  vOHVolts: number;
  vILVolts: number;
  vIHVolts: number;
  noiseMarginLowVolts: number;
  noiseMarginHighVolts: number;
  powerLowWatts: number;
  powerHighWatts: number;
  supplyCurrentAmps: number;
  timing?: CellTiming;
  /** Wired-AND: how the output sits on a wired net (absent: the output is the cell's own). */
  wired?: WiredFigures;
  nominal: OperatingFigures;
  constraints: ConstraintResult[];
  /** Id of the constraint with the least margin. */
  binding: string;
  bindingMargin: number;
}

export interface WiredFigures {
  /** Transistors on the net (driver and tied). */
  collectors: number;
  /** False for a tied cell (no R_C of its own). */
  ownsPullUp: boolean;
  /** Worst (hot-corner) current the net's R_C carries when high besides diode-OR loads: the
   *  collectors' leakage and the diode-AND loads' reverse leakage. */
  highLeakageAmps: number;
}

export interface SizedCellType {
  /** SPICE-safe subcircuit name, e.g. "gw_nand3". */
  key: string;
  cellId: string;
  fn: "nand" | "nor";
  fanin: number;
  variant: string;
  /** Subcircuit port order: in1..ink, out, vcc. */
  pins: string[];
  elements: { name: string; kind: "R" | "D" | "Q" | "C"; nodes: string[]; value?: number; model?: string }[];
  /** Resistor values, e.g. { rpOhms, rbOhms, rcOhms }. */
  values: Record<string, number>;
  analysis: CellAnalysis;
  /** Cell indices using this type. */
  cells: number[];
  /** Wired-AND: cells of this type are tied onto a net another cell drives; the subcircuit has no
   *  R_C (`values.rcOhms` is the pull-up on the net, a part of the net's driver). */
  openCollector?: boolean;
}

export interface Component {
  designator: string;
  kind: "R" | "D" | "Q" | "C";
  /** Ohms for resistors, farads for capacitors, 0 for semiconductors. */
  value: number;
  valueText: string;
  tolerance?: number;
  powerRatingWatts?: number;
  partNumber?: string;
  description: string;
  /** Cell index the part belongs to. */
  instance: number;
  /** Local element name in the cell ("RP", "DIN2"). */
  role: string;
  /** Worst-case dissipation found for this part. */
  worstPowerWatts?: number;
  /** Capacitors: rated voltage (the next standard rating at least twice the highest voltage
   *  across the part, common practice). */
  voltageRatingVolts?: number;
}

export interface SizedInstance {
  cell: number;
  cellType: number;
  /** Local element name → global designator, e.g. "RP" → "R7", "DIN2" → "D12". */
  designators: Record<string, string>;
  /** Analysis of this instance in its own load situation (shared between instances alike). */
  analysis: CellAnalysis;
}

export interface PathTiming {
  /** Cell indices along the longest path, from a primary input to an output. */
  cells: number[];
  /** Net names along the path (inputs, then each cell's output). */
  nets: string[];
  delaySeconds: number;
  budgetSeconds?: number;
  /** Logic depth (cells) of the deepest path. */
  depth: number;
}

export interface SizedDesign {
  netlist: CellNetlist;
  parameters: SizingParameter[];
  /** `schottky`: the clamp diode of the fast cells, when the design has any. */
  models: { diode: ModelCard; npn: ModelCard; schottky?: ModelCard };
  cellTypes: SizedCellType[];
  instances: SizedInstance[];
  components: Component[];
  totals: {
    /** Sum over cells of each cell's worst-case static power (worse state, worst corner). */
    staticPowerWatts: number;
    /** Worst-case supply current (sum of each cell's worse state at the worst corner). */
    supplyCurrentAmps: number;
    /** Typical figures: mean of the two output states at nominal supply, 25 °C, nominal parts. */
    staticPowerNominalWatts: number;
    supplyCurrentNominalAmps: number;
    transistors: number;
    diodes: number;
    resistors: number;
    capacitors: number;
    /** Distinct resistor values on the parts list. */
    distinctResistorValues: number;
  };
  mode: SizingMode;
  series: SeriesName;
  resistorTolerance: number;
  /** Corners checked, as labels ("4.75 V, 0 °C"). */
  corners: string[];
  /** How a primary input must be driven for the analysis to hold: pulled up to the supply
   *  through `pullUpOhms` when high, at most `vLowVolts` when low (a DTL output stage). */
  inputDriver: { pullUpOhms: number; vLowVolts: number };
  criticalPath?: PathTiming;
  /** Plain sentences for the report (variant choices, binding constraints). */
  notes: string[];
}
