// The raw-file reader against the format the ngspice manual describes ("Raw file format": text
// header, `Variables:`, then `Binary:` doubles or `Values:` text), with files built here from
// that description, and against files the real ngspice writes (when installed).
import { describe, expect, it } from "vitest";
import { parseRawFile } from "../../src/simulate/raw.js";
import { buildRun, normalizeVectorName } from "../../src/simulate/run.js";

function header(plotName: string, flags: string, vars: Array<[string, string]>, points: number, kind: "Binary" | "Values"): string {
  return (
    `Title: test circuit\nDate: Thu Jan  1 00:00:00  2026\nPlotname: ${plotName}\nFlags: ${flags}\n` +
    `No. Variables: ${vars.length}\nNo. Points: ${points}\nVariables:\n` +
    vars.map(([n, t], i) => `\t${i}\t${n}\t${t}\n`).join("") +
    `${kind}:\n`
  );
}

function binaryFile(head: string, rows: number[][]): Uint8Array {
  const h = new TextEncoder().encode(head);
  const count = rows.reduce((a, r) => a + r.length, 0);
  const out = new Uint8Array(h.length + count * 8);
  out.set(h);
  const view = new DataView(out.buffer, h.length);
  let k = 0;
  for (const r of rows) for (const v of r) view.setFloat64(8 * k++, v, true);
  return out;
}

const VARS: Array<[string, string]> = [
  ["time", "time"],
  ["v(out)", "voltage"],
  ["v1#branch", "current"],
];
const ROWS = [
  [0, 0, 0],
  [1e-9, 0.25, -1e-3],
  [2e-9, 0.5, -2e-3],
];

describe("parseRawFile", () => {
  it("reads a binary real plot", () => {
    const raw = parseRawFile(binaryFile(header("Transient Analysis", "real", VARS, 3, "Binary"), ROWS));
    expect(raw.problem).toBeUndefined();
    expect(raw.plots).toHaveLength(1);
    const p = raw.plots[0]!;
    expect(p.plotName).toBe("Transient Analysis");
    expect(p.title).toBe("test circuit");
    expect(p.points).toBe(3);
    expect(p.variables.map((v) => v.name)).toEqual(["time", "v(out)", "v1#branch"]);
    expect(Array.from(p.real[1]!)).toEqual([0, 0.25, 0.5]);
    expect(Array.from(p.real[2]!)).toEqual([0, -1e-3, -2e-3]);
  });

  it("reads an ascii real plot", () => {
    const text =
      header("DC transfer characteristic", "real", VARS, 3, "Values") +
      ROWS.map((r, i) => ` ${i}\t${r[0]!.toExponential(15)}\n\t${r[1]!.toExponential(15)}\n\t${r[2]!.toExponential(15)}\n\n`).join("");
    const p = parseRawFile(new TextEncoder().encode(text)).plots[0]!;
    expect(p.points).toBe(3);
    expect(Array.from(p.real[0]!)).toEqual([0, 1e-9, 2e-9]);
    expect(Array.from(p.real[2]!)).toEqual([0, -1e-3, -2e-3]);
  });

  it("reads complex values in both forms", () => {
    const vars: Array<[string, string]> = [
      ["frequency", "frequency"],
      ["v(out)", "voltage"],
    ];
    const bin = binaryFile(header("AC Analysis", "complex", vars, 1, "Binary"), [[1000, 0, 3, 4]]);
    const pb = parseRawFile(bin).plots[0]!;
    expect(pb.complex).toBe(true);
    expect(pb.real[1]![0]).toBe(3);
    expect(pb.imag![1]![0]).toBe(4);
    const asc = header("AC Analysis", "complex", vars, 1, "Values") + " 0\t1.0e3,0.0\n\t3.0,4.0\n";
    const pa = parseRawFile(new TextEncoder().encode(asc)).plots[0]!;
    expect(pa.real[1]![0]).toBe(3);
    expect(pa.imag![1]![0]).toBe(4);
  });

  it("reads several plots in one file", () => {
    const a = binaryFile(header("Operating Point", "real", [["v(a)", "voltage"]], 1, "Binary"), [[1.5]]);
    const b = binaryFile(header("Transient Analysis", "real", VARS, 3, "Binary"), ROWS);
    const both = new Uint8Array(a.length + b.length);
    both.set(a);
    both.set(b, a.length);
    const raw = parseRawFile(both);
    expect(raw.plots.map((p) => p.plotName)).toEqual(["Operating Point", "Transient Analysis"]);
    expect(raw.plots[1]!.real[1]![2]).toBe(0.5);
  });

  it("gives what is readable from a file cut short, and says so", () => {
    const full = binaryFile(header("Transient Analysis", "real", VARS, 3, "Binary"), ROWS);
    const raw = parseRawFile(full.subarray(0, full.length - 10));
    expect(raw.plots[0]!.points).toBe(2);
    expect(raw.problem).toMatch(/2 of 3 points/);
    expect(parseRawFile(new TextEncoder().encode("Title: x\nPlotname: y\n")).problem).toMatch(/header/);
  });
});

describe("vectors from raw files", () => {
  it("names vectors as the project uses them", () => {
    expect(normalizeVectorName("V1#branch", "current")).toBe("i(v1)");
    expect(normalizeVectorName("out", "voltage")).toBe("v(out)");
    expect(normalizeVectorName("V(X1.B)", "voltage")).toBe("v(x1.b)");
    expect(normalizeVectorName("time", "time")).toBe("time");
  });

  it("builds a run with the scale vector, and treats ngspice's constants plot as no result", () => {
    const run = buildRun({
      simulator: "test",
      rawBytes: binaryFile(header("Transient Analysis", "real", VARS, 3, "Binary"), ROWS),
      log: "",
      stderr: "",
      elapsedMs: 1,
    });
    expect(run.errors).toEqual([]);
    expect(run.scale).toBe("time");
    expect([...run.vectors.keys()]).toEqual(["time", "v(out)", "i(v1)"]);
    const constants = buildRun({
      simulator: "test",
      rawBytes: binaryFile(header("constants", "real", [["boltz", "notype"]], 1, "Binary"), [[1.38e-23]]),
      log: "",
      stderr: "Error: circuit not parsed.\n",
      elapsedMs: 1,
    });
    expect(constants.vectors.size).toBe(0);
    expect(constants.errors).toEqual(["Error: circuit not parsed."]);
  });
});
