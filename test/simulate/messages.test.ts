// ngspice console text, as captured from real runs (ngspice 39 binary, stderr and stdout), split
// into messages and `.meas` results.
import { describe, expect, it } from "vitest";
import { classifyMessages, parseMeasures } from "../../src/simulate/messages.js";

// Captured: `ngspice -b` on a netlist with a card missing its value and an unknown model.
const BAD_NETLIST_STDERR = `warning, can't find model 'nomodel' from line
    q1 a b c nomodel
Error on line 4 or its substitute:
  q1 a b c nomodel
could not find a valid modelname
    Simulation interrupted due to error!

Error: circuit not parsed.
Note: no resource usage information for 'time',
\tor no active circuit available
`;

// Captured (shortened): a behavioural source with no operating point.
const FAILED_ANALYSIS_STDERR = `Error: -1 out of range for sqrt
    in line b1

Note: Starting dynamic gmin stepping
Trying gmin =   1.0000E-03 Error: -1 out of range for sqrt
    in line b1

Warning: Further gmin increment
Trying gmin =   5.6234E-03 Error: -1 out of range for sqrt
    in line b1

Warning: Further gmin increment
Error: Transient op failed, timestep too small
doAnalyses: TRAN:  Timestep too small; initial timepoint: cause unrecorded.
run simulation(s) aborted
Warning from checkvalid: vector b1#branch is not available or has zero length.
`;

// Captured stdout of a .control run with measurements.
const MEASURE_STDOUT = `
Circuit: rc

Doing analysis at TEMP = 27.000000 and TNOM = 27.000000

No. of Data Rows : 529

  Measurements for Transient Analysis

vat1                =  6.321226e-01
trise               =  2.197202e-06 targ=  2.303575e-06 trig=  1.063727e-07
binary raw file "/tmp/sim/mc.raw"
ngspice-39 done
`;

describe("classifyMessages", () => {
  it("groups continuation lines with their heading and sorts errors from warnings and notes", () => {
    const m = classifyMessages(BAD_NETLIST_STDERR);
    expect(m.warnings).toEqual(["warning, can't find model 'nomodel' from line\n  q1 a b c nomodel"]);
    expect(m.errors).toEqual([
      "Error on line 4 or its substitute:\n  q1 a b c nomodel\n  could not find a valid modelname\n  Simulation interrupted due to error!",
      "Error: circuit not parsed.",
    ]);
    expect(m.notes).toHaveLength(1);
  });

  it("splits messages written mid-line and folds repeats into one with a count", () => {
    const m = classifyMessages(FAILED_ANALYSIS_STDERR);
    expect(m.errors).toEqual([
      "Error: -1 out of range for sqrt\n  in line b1 (3 times)",
      "Error: Transient op failed, timestep too small",
      "doAnalyses: TRAN:  Timestep too small; initial timepoint: cause unrecorded.",
      "run simulation(s) aborted",
    ]);
    expect(m.warnings).toContain("Warning: Further gmin increment (2 times)");
    expect(m.notes.some((n) => n.startsWith("Trying gmin"))).toBe(true);
  });

  it("accepts the line list the embedded engine collects", () => {
    const m = classifyMessages(["Error: no such vector as v(nonexist).", " .meas tran bad find v(nonexist) at=1u failed!", ""]);
    expect(m.errors).toEqual(["Error: no such vector as v(nonexist).\n  .meas tran bad find v(nonexist) at=1u failed!"]);
  });
});

describe("parseMeasures", () => {
  it("reads name = value lines after the measurement heading", () => {
    const m = parseMeasures(MEASURE_STDOUT);
    expect([...m.keys()]).toEqual(["vat1", "trise"]);
    expect(m.get("vat1")).toBe(0.6321226);
    expect(m.get("trise")).toBe(2.197202e-6);
  });

  it("reads nothing without a heading", () => {
    expect(parseMeasures("x = 1\nTotal analysis time (seconds) = 0.005\n").size).toBe(0);
  });
});
