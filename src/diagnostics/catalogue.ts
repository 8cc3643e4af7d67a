// Every diagnostic code gatewright can print, in one place. Codes are stable: never reuse or
// renumber one; retire a code by leaving it here with `retired: true`.
// GW1xxx: reading input (lexing, syntax)   GW2xxx: names, declarations, structure
// GW3xxx: logic (loops, equivalence)       GW4xxx: mapping
// GW5xxx: electrical sizing and ratings    GW6xxx: options, parts and data files
// GW7xxx: simulation                       GW8xxx: output files
// GW9xxx: internal errors (a bug in gatewright)
import type { Severity } from "./diagnostic.js";

export interface CatalogueEntry {
  severity: Severity;
  title: string;
  retired?: boolean;
}

export const CATALOGUE = {
  GW1001: { severity: "error", title: "unexpected character" },
  GW1002: { severity: "error", title: "syntax error" },
  GW1003: { severity: "error", title: "unexpected end of file" },
  GW1004: { severity: "error", title: "unterminated comment" },
  GW1005: { severity: "error", title: "unsupported construct" },
  GW1006: { severity: "error", title: "input too deeply nested" },
  GW1007: { severity: "error", title: "bad number or constant" },
  GW1008: { severity: "error", title: "file is not text" },
  GW1009: { severity: "note", title: "too many errors; stopped reading" },
  // GW1010-GW1019: minterm functions and truth tables of equation files.
  GW1010: { severity: "error", title: "bad minterm number" },
  GW1011: { severity: "error", title: "minterm listed twice" },
  GW1012: { severity: "error", title: "minterm both given and don't-care" },
  GW1013: { severity: "error", title: "bad minterm list" },
  GW1014: { severity: "error", title: "truth-table row has the wrong number of values" },
  GW1015: { severity: "error", title: "bad truth-table value" },
  GW1016: { severity: "error", title: "truth-table rows disagree" },
  GW1017: { severity: "error", title: "function or table too large" },
  // GW1020-GW1029: state elements and state declarations of equation files.
  GW1020: { severity: "error", title: "unknown function" },
  GW1021: { severity: "error", title: "wrong number of arguments" },

  GW2001: { severity: "error", title: "undefined name" },
  GW2002: { severity: "error", title: "signal has more than one driver" },
  GW2003: { severity: "error", title: "output never assigned" },
  GW2004: { severity: "error", title: "assignment to an input" },
  GW2005: { severity: "error", title: "name declared twice" },
  GW2006: { severity: "warning", title: "input never used" },
  GW2007: { severity: "warning", title: "signal never used" },
  GW2008: { severity: "error", title: "no module to build" },
  GW2009: { severity: "error", title: "unknown module" },
  GW2010: { severity: "error", title: "module instantiates itself" },
  GW2011: { severity: "error", title: "port connection mismatch" },
  GW2012: { severity: "error", title: "bad gate primitive connection" },
  GW2013: { severity: "error", title: "no inputs or outputs" },
  GW2014: { severity: "error", title: "wire never driven" },
  GW2015: { severity: "error", title: "bit-vector range or index out of range" },
  GW2016: { severity: "error", title: "function variable is not a declared input" },
  GW2017: { severity: "error", title: "variable listed twice" },
  // GW2030-GW2033 (below): state elements and initial values (src/sequential).
  // GW2020-GW2029: structure of structural Verilog (src/parse/verilog*.ts).
  GW2020: { severity: "error", title: "port list and port declarations disagree" },
  GW2021: { severity: "error", title: "bit widths do not match" },
  GW2022: { severity: "error", title: "design too large after flattening" },

  GW2030: { severity: "error", title: "initial value for an input" },
  GW2031: { severity: "error", title: "initial value given twice" },
  GW2032: { severity: "error", title: "name taken by a state element's internal signal" },
  GW2033: { severity: "warning", title: "initial value for a signal that stores no state" },
  // GW2034-GW2039: limits of a stage's work and output (src/diagnostics/limit.ts, src/parse).
  GW2034: { severity: "note", title: "more diagnostics of this kind not shown" },
  GW2035: { severity: "error", title: "module hierarchy too deep" },

  GW3001: { severity: "note", title: "stored state found" },
  GW3002: { severity: "warning", title: "equivalence check was partial" },
  GW3003: { severity: "warning", title: "output is constant" },
  GW3004: { severity: "error", title: "combinational loop cannot hold state" },
  GW3005: { severity: "note", title: "don't-cares not used" },
  GW3006: { severity: "note", title: "optimization used a heuristic or reached a limit" },
  // GW3010-GW3019: feedback, hazards and clocking (src/logic/feedback.ts, src/sequential).
  GW3010: { severity: "warning", title: "loop has no stable point for some inputs" },
  GW3011: { severity: "warning", title: "static hazard in logic that feeds a loop" },
  GW3012: { severity: "note", title: "clocking of the state elements" },
  GW3013: { severity: "warning", title: "initial values contradict each other" },

  GW4001: { severity: "error", title: "fan-in limit too small" },
  GW4002: { severity: "error", title: "fan-out limit too small" },
  GW4003: { severity: "note", title: "fan-out limited by buffering or duplicating cells" },
  GW4004: { severity: "note", title: "wired-AND outputs used" },
  // Retired: wired-AND nets are sized since (src/electrical); the code is not reused.
  GW4005: { severity: "error", title: "wired-AND outputs cannot be sized yet", retired: true },

  GW5001: { severity: "error", title: "no standard resistor values meet the constraints" },
  GW5002: { severity: "warning", title: "part rating exceeded" },
  GW5003: { severity: "warning", title: "high supply voltage" },
  GW5004: { severity: "warning", title: "small saturation margin" },
  GW5005: { severity: "note", title: "high-fan-out cell variant chosen" },
  GW5006: { severity: "warning", title: "base resistor does not hold a wired-AND transistor off against its leakage" },
  // GW5010-GW5019: fast cell variants (speed-up capacitor, Schottky clamp).
  GW5010: { severity: "note", title: "fast cell variant chosen for the speed budget" },

  GW6001: { severity: "error", title: "bad option value" },
  GW6002: { severity: "error", title: "bad quantity or unit" },
  GW6003: { severity: "error", title: "value out of range" },
  GW6004: { severity: "error", title: "cannot read file" },
  GW6005: { severity: "error", title: "bad parts or options file" },
  GW6006: { severity: "error", title: "unknown resistor series" },
  GW6007: { severity: "error", title: "unsupported input file type" },

  GW7001: { severity: "error", title: "simulation failed" },
  GW7002: { severity: "error", title: "simulated output disagrees with the logic" },
  GW7003: { severity: "error", title: "simulator not available" },
  GW7004: { severity: "error", title: "simulated noise margin below the one the design was sized for" },
  GW7005: { severity: "note", title: "simulation covered part of the input combinations" },
  // GW7020-GW7029: characterization of the sized cells in a simulator (src/characterize).
  GW7020: { severity: "error", title: "simulated cell misses a constraint the sizing claims to meet" },
  GW7021: { severity: "error", title: "simulated cell misses a constraint the sizing reported failing" },
  GW7022: { severity: "error", title: "characterization could not measure a figure" },
  GW7023: { severity: "warning", title: "simulated delay outside the estimate's stated accuracy" },

  GW8001: { severity: "error", title: "cannot write output" },
  GW8002: { severity: "error", title: "refusing to overwrite a file gatewright did not write" },

  GW9001: { severity: "error", title: "internal error" },
  GW9002: { severity: "error", title: "internal error: mapped circuit differs from the logic" },
} as const satisfies Record<string, CatalogueEntry>;

export type DiagnosticCode = keyof typeof CATALOGUE;
