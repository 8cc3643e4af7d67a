// The cell netlist: what mapping produces and sizing consumes.
// Nets keep source signal names where the logic had them.

/** Logic function of a DTL cell family. NAND-k: diode-AND front end; NOR-k: diode-OR front end.
 *  k = 1 of either is an inverter. */
export type CellFunction = "nand" | "nor";

export interface CellInstance {
  /** Position in CellNetlist.cells; also the basis of the stable designator (U1, U2, ...). */
  index: number;
  fn: CellFunction;
  /** Net indices of the inputs, in pin order. */
  inputs: number[];
  /** Net index of the output. */
  output: number;
  /** Wired-AND (opt-in): this cell's open-collector output is tied onto a net whose driver
   *  cell (`Net.driver`) holds the one collector resistor; this cell has no R_C of its own. */
  tiedOutput?: boolean;
}

export type NetDriver =
  | { kind: "input"; port: number }
  | { kind: "cell"; cell: number }
  | { kind: "tie"; value: 0 | 1 };

export interface NetLoad {
  cell: number;
  pin: number;
}

export interface Net {
  index: number;
  /** Source signal name, or a generated name `n<k>` for nets the source did not name. */
  name: string;
  /** True when the name came from the source. */
  named: boolean;
  driver: NetDriver;
  loads: NetLoad[];
  /** Index in CellNetlist.outputs when this net is a primary output. */
  outputPort?: number;
  /** Wired-AND (opt-in): further cells whose outputs are tied onto this net (each with
   *  `tiedOutput`). The net is low when any of its cells pulls it low: its value is the AND of
   *  the driver's and these cells' outputs, and it has one collector resistor, the driver's. */
  tiedCells?: number[];
}

export interface CellNetlist {
  name: string;
  /** Net indices of the primary inputs in declaration order. */
  inputs: number[];
  /** Primary outputs in declaration order. */
  outputs: { name: string; net: number }[];
  nets: Net[];
  cells: CellInstance[];
  /** Nets that carry stored state (loop cut points kept exactly as written). */
  stateNets: number[];
  /** The fan-in limit the mapping honoured. */
  maxFanin: number;
  /** The fan-out limit the mapping honoured (loads per net; absent: none). */
  maxFanout?: number;
}
