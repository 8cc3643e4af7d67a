// What characterizing the sized cells in a simulator gives back: for each cell type the analytic
// worst-case figures of the sizing beside the figures measured in ngspice at each corner the
// sizing claims to meet, the checks made and whether they passed. Plain data (JSON as it is).

/** Figures of one cell type: levels, thresholds, noise margins, delays (volts, seconds). */
export interface CellFigures {
  /** Output low level with the worst-case load (all inputs high). */
  vOLVolts: number;
  /** Output high level with the worst-case load (an input at the driver's low level). */
  vOHVolts: number;
  /** Input thresholds: the unity-gain points of the transfer curve. */
  vILVolts: number;
  vIHVolts: number;
  /** Noise margins of the cell as a receiver: what its inputs leave against the drivers that
   *  feed them in this design (see the criteria). */
  noiseMarginLowVolts: number;
  noiseMarginHighVolts: number;
  /** Propagation delays with the worst-case load (absent without a transient). */
  tPHLSeconds?: number;
  tPLHSeconds?: number;
}

export type CheckId = "saturation" | "noise-margin-low" | "noise-margin-high" | "delay-fall" | "delay-rise";

/** One comparison of a measured figure with what the design must meet. */
export interface CharacterizationCheck {
  id: CheckId;
  label: string;
  /** Measured value and the limit it is held to. */
  value: number;
  limit: number;
  unit: "V" | "s";
  sense: "min" | "max";
  ok: boolean;
  /** What the sizing said about the same constraint: true passes, false fails, undefined: it
   *  did not check it. */
  analyticOk?: boolean;
  /** Where the worst value occurred: resistor case, gain, the driver it was read against. */
  where: string;
}

export interface CornerCharacterization extends CellFigures {
  /** The sizing's corner label ("4.75 V, 0 °C"). */
  corner: string;
  supplyVolts: number;
  tempC: number;
  /** BF written into the transistor model: the sizing's β_min and β_max at 25 °C (the model
   *  scales them with temperature as the sizing does, XTB). */
  betaMin: number;
  betaMax: number;
  /** For diode-OR inputs: the driver's open-circuit level at the unity-gain point where the
   *  output reaches low (the high-state margin is the supply minus this). */
  vIHSourceVolts?: number;
  checks: CharacterizationCheck[];
  pass: boolean;
}

export interface CellCharacterization {
  /** Subcircuit name of the cell type ("gw_nand2"). */
  key: string;
  cellId: string;
  /** The load attached, for people: "8 × gw_nand2 + 24 pF wiring (the load of U3)". */
  loadText: string;
  /** How the input was driven, for people. */
  driveText: string;
  /** The sizing's worst-case figures (over every corner, resistor case and load situation). */
  analytic: CellFigures;
  /** Measured at each corner, worst over the resistor cases. */
  corners: CornerCharacterization[];
  /** The worst measured figure of each kind over the corners. */
  worst: CellFigures;
  pass: boolean;
}

export interface Characterization {
  simulator: string;
  /** The criteria the checks apply, in words. */
  criteria: string[];
  cells: CellCharacterization[];
  /** Every check of every cell at every corner passed and every run succeeded. */
  pass: boolean;
  /** Simulator runs made and the time they took. */
  runs: number;
  elapsedMs: number;
  transient: boolean;
}
