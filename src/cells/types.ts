// What a DTL cell is, as data: its parameters, its topology, its load and drive models and its
// design equations. Each cell folder exports one CellDefinition; src/cells/registry.ts lists them.
// Modelled on how circuit simulators organise a device: parameter table, setup of defaults,
// temperature/corner adjustment, evaluation.
import type { CellFunction } from "../map/types.js";
import type { DeviceAtTemp, SchottkyAtTemp } from "../electrical/devices.js";

export type ComponentKind = "R" | "D" | "Q" | "C";

/** One component of a cell, in local terms. Node order: R [a, b]; D [anode, cathode];
 *  Q [collector, base, emitter]; C [a, b]. Node "0" is ground; pin names are nodes too. */
export interface TopologyComponent {
  /** Local SPICE element name and role, e.g. "RP", "DIN2", "DLS1", "Q1". Unique in the cell. */
  name: string;
  /** Role without the index: "RP", "RB", "RC", "RX", "DIN", "DLS", "QLS", "Q". */
  role: string;
  kind: ComponentKind;
  nodes: string[];
  /** For input diodes: the 1-based input pin the component belongs to. */
  inputPin?: number;
  /** For resistors and capacitors: the key in the cell's value record ("rpOhms", "csuFarads"). */
  valueKey?: string;
  /** For diodes and transistors: which device model ("schottky": the fast cells' clamp diode). */
  model?: "diode" | "npn" | "schottky";
}

export interface CellTopology {
  /** Subcircuit port order: in1..ink, out, vcc (and vbb when a negative base return is used). */
  pins: string[];
  /** Components in role order: the order designators are given in. */
  components: TopologyComponent[];
}

/** A resistor the cell's design chooses. */
export interface CellParameterSpec {
  key: string;
  role: string;
  label: string;
  /** Shared by every cell of a uniform design (the collector resistor). */
  shared?: boolean;
}

/** Conditions of one analysis: supply and device values at a temperature. */
export interface CellEnv {
  vccVolts: number;
  dev: DeviceAtTemp;
  /** Fraction of an equal share of a driver's high-state current that the weakest of several
   *  diode-OR loads is sure to get. */
  orShareFactor: number;
  /** The clamp diode's forward drops at this temperature (fast cells; absent: the defaults). */
  schottky?: SchottkyAtTemp;
}

/** What hangs on a cell's output. */
export interface OutputLoad {
  /** Number of diode-AND loads (they draw current when the output is low). */
  andLoads: number;
  /** Total current the output must sink when low, from all diode-AND loads. */
  andSinkAmps: number;
  /** Number of diode-OR loads (they draw base current through R_C when the output is high). */
  orLoads: number;
  /** Level a diode-OR load clamps the output to when high. */
  orClampVolts: number;
  /** Load capacitance on the output node (inputs plus wiring). */
  capacitanceFarads: number;
  /** The part of capacitanceFarads that is diode-AND load inputs counted at their zero-bias
   *  junction capacitance (CJO). On the falling edge those diodes are reverse-biased by the
   *  output's swing above the loads' input node, where the timing takes their mean capacitance. */
  andDiodeFarads?: number;
  /** Charge the output must take from speed-up capacitors of diode-AND loads as it falls (the
   *  loads' input nodes swing down through their capacitors). */
  speedUpChargeCoulombs?: number;
  /** Wired-AND: other open-collector transistors tied onto this output's net (0 or absent: the
   *  output is the cell's own). Each adds its collector junction to the net's capacitance and
   *  its leakage to the current R_C carries when the net is high. */
  tiedCollectors?: number;
}

/** What drives a cell's inputs, at its weakest. */
export interface InputDrive {
  /** Highest low level a driver gives. */
  vLowMaxVolts: number;
  /** Lowest high level a driver gives (clamped when the driver also feeds diode-OR loads). */
  vHighMinVolts: number;
  /** For diode-OR inputs: least current the weakest driver delivers into one input when high. */
  orSourceAmps: number;
  /** For diode-OR inputs: the source resistance seen per load (R_C·N/share), for the
   *  current-based high-state noise margin. */
  orSourceOhms: number;
  /** For diode-OR inputs: most current the strongest driver can push into one input (stress). */
  orSourceMaxAmps: number;
  /** For diode-AND inputs: the pull-up behind a rising input (the driver's R_C at its high end),
   *  which limits the reverse current that clears the input diode's stored charge. Absent: a
   *  stiff source (a voltage step). */
  andSourceOhms?: number;
  /** For a stiff source: the step's rise time (a test bench's edge), over which the input
   *  diode's stored charge recombines before the step clears it. Absent: an ideal step. */
  edgeSeconds?: number;
}

/** One analysis of a cell at given values, conditions, load and drive. Currents in A, volts in V. */
export interface CellOperatingPoint {
  vccVolts: number;
  tempC: number;
  /** Current into the input node (through R_P) when the output is low. */
  i1Amps: number;
  /** Current diverted to ground by R_B. */
  i2Amps: number;
  /** Base current of the output transistor when the output is low. */
  iBAmps: number;
  /** The cell's own collector current, through R_C. */
  iCAmps: number;
  /** Current sunk from diode-AND loads. */
  iLoadAmps: number;
  /** Gain needed to saturate with this load: (I_C + I_load)/I_B. */
  betaNeeded: number;
  /** β_min·I_B/(I_C + I_load). */
  satMargin: number;
  /** Level of the input node when all inputs are high (conducting). */
  vInputNodeVolts: number;
  vOLVolts: number;
  vOHVolts: number;
  /** Highest input level still read as low (transistor stays off). */
  vILVolts: number;
  /** Lowest input level read as high (for diode-OR inputs: the clamped input level). */
  vIHVolts: number;
  noiseMarginLowVolts: number;
  noiseMarginHighVolts: number;
  /** Reverse base current that removes stored charge at turn-off (through R_B). */
  iTurnOffAmps: number;
  /** Low-state current one input draws from its driver (zero for diode-OR inputs). */
  inputLowAmps: number;
  supplyCurrentLowAmps: number;
  supplyCurrentHighAmps: number;
  powerLowWatts: number;
  powerHighWatts: number;
  /** Cell-specific extra figures (e.g. iB1Amps of the high-fan-out stage). */
  extra: Record<string, number>;
}

/** Worst-case dissipation and stress of each component, for ratings. */
export interface ComponentStress {
  /** Local component name. */
  name: string;
  powerWatts: number;
  /** Largest forward/collector current. */
  currentAmps?: number;
  /** Largest reverse (diode) or collector-emitter (transistor) voltage. */
  voltageVolts?: number;
}

/** A set of resistor values, in ohms, keyed as in CellDefinition.parameters. */
export type CellValues = Record<string, number>;

/** Which way each constraint moves as the free parameter (the base resistor) grows, so a search
 *  can bisect it: "up" constraints get easier, "down" get harder. */
export type FreeDirection = "up" | "down" | "none";

export interface CellDefinition {
  /** Registry id and folder name: "nand", "nor", "nand-hifan". */
  id: string;
  fn: CellFunction;
  /** "basic" or the variant's name. */
  variant: string;
  title: string;
  /** Prefix of the subcircuit name: "gw_nand" → gw_nand3. */
  keyPrefix: string;
  /** Source of the design equations, for the report. */
  source: string;
  /** Inputs are diode-AND (draw current when low) or diode-OR (draw current when high). */
  inputKind: "and" | "or";
  minFanin: number;
  /** Resistors to choose, in search order. */
  parameters: CellParameterSpec[];
  /** Key of the parameter the search bisects (largest feasible value wins: less power). */
  bisectKey?: string;
  /** Keys of parameters enumerated outright (besides the shared collector resistor). */
  outerKeys: string[];
  /** Key of the free parameter chosen inside its feasible interval (the base resistor). */
  freeKey: string;
  /** How each of this cell's constraints moves as the free parameter grows. */
  freeDirection: Record<string, FreeDirection>;
  /** How constraints move as the bisected parameter grows ("up": easier). The search finds the
   *  smallest value meeting the "up" ones before scanning down from the top. */
  bisectDirection?: Record<string, FreeDirection>;
  /** For timing: the resistors (keys) that pull the input node up, and whether a follower
   *  transistor amplifies the drive once the input node is up (high-fan-out variant). */
  timingHints?: { nodePullUpKeys: string[]; follower: boolean };
  /** Default values for a quick start (also the published example the cell follows). */
  exampleValues: CellValues;
  /** Fast variants: the speed-up capacitor (its value key) and the Schottky clamp, and the cell
   *  they are built on. */
  speedUp?: { capacitorKey?: string; clamp: boolean; baseId: string };

  topology(fanin: number): CellTopology;

  /** DC analysis at one point: values are the actual resistances (tolerance already applied). */
  analyze(values: CellValues, env: CellEnv, load: OutputLoad, drive: InputDrive): CellOperatingPoint;

  /** Resistor assignments to evaluate for worst case: each is a factor per key (1 ± tolerance),
   *  chosen so every figure's worst direction is covered. `skipTiming` marks a case that can
   *  never be the slowest (all resistors low: most current everywhere). */
  toleranceCases(tolerance: number): { label: string; factors: Record<string, number>; skipTiming?: boolean }[];

  /** Largest low-state current one input draws from its driver (resistors at their low end). */
  inputLowAmpsWorst(values: CellValues, tolerance: number, env: CellEnv): number;

  /** For diode-OR inputs: the level the input clamps its driver to when conducting. */
  inputClampVolts?(env: CellEnv): number;

  /** Capacitance one input presents (junction capacitances of the input diode). */
  inputCapacitanceFarads(diodeCjoFarads: number): number;

  /** Worst-case stresses of each component at one analysis point (for ratings). */
  stresses(values: CellValues, env: CellEnv, load: OutputLoad, drive: InputDrive, fanin: number): ComponentStress[];
}
