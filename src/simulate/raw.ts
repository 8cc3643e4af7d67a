// Reader for ngspice raw files (the format of `write` and `-r`), binary and ascii.
//
// Layout (ngspice manual, "Raw file format"): text header lines `Key: value` — Title, Date,
// Plotname, Flags (real|complex …), No. Variables, No. Points — then `Variables:` with one line
// per vector (`<index> <name> <type> …`), then either `Binary:` followed by the points as
// little-endian 8-byte doubles (per point, every vector in order; complex values as two doubles),
// or `Values:` followed by text (`<point index> <v0>` then one value a line; complex as `re,im`).
// A file may hold several plots one after another.

export interface RawVariable {
  name: string;
  type: string;
}

export interface RawPlot {
  title: string;
  date?: string;
  plotName: string;
  flags: string[];
  complex: boolean;
  variables: RawVariable[];
  /** Points actually present (fewer than announced when the file was cut short). */
  points: number;
  /** One array per variable; for complex plots the real parts. */
  real: Float64Array[];
  /** For complex plots, the imaginary parts. */
  imag?: Float64Array[];
}

export interface RawFile {
  plots: RawPlot[];
  /** Why reading stopped early, if it did. */
  problem?: string;
}

interface Header {
  fields: Map<string, string>;
  variables: RawVariable[];
  dataKind: "binary" | "values";
  /** Offset of the first byte after the `Binary:` / `Values:` line. */
  dataStart: number;
}

const decoder = new TextDecoder("latin1");

function findLineEnd(bytes: Uint8Array, from: number): number {
  const i = bytes.indexOf(10, from);
  return i < 0 ? bytes.length : i;
}

function readHeader(bytes: Uint8Array, start: number): Header | string {
  const fields = new Map<string, string>();
  const variables: RawVariable[] = [];
  let pos = start;
  let inVariables = false;
  while (pos < bytes.length) {
    const end = findLineEnd(bytes, pos);
    const line = decoder.decode(bytes.subarray(pos, end)).replace(/\r$/, "");
    pos = end + 1;
    if (/^binary:\s*$/i.test(line)) return { fields, variables, dataKind: "binary", dataStart: pos };
    if (/^values:\s*$/i.test(line)) return { fields, variables, dataKind: "values", dataStart: pos };
    if (/^variables:\s*$/i.test(line)) {
      inVariables = true;
      continue;
    }
    if (inVariables && /^\s/.test(line)) {
      const parts = line.trim().split(/\s+/);
      if (parts.length >= 3) variables.push({ name: parts[1]!, type: parts[2]! });
      continue;
    }
    if (line.trim() === "") continue;
    inVariables = false;
    const colon = line.indexOf(":");
    if (colon > 0) fields.set(line.slice(0, colon).trim().toLowerCase(), line.slice(colon + 1).trim());
  }
  return "the file ends inside a header";
}

function plotFromHeader(h: Header, points: number, real: Float64Array[], imag?: Float64Array[]): RawPlot {
  const flags = (h.fields.get("flags") ?? "real").toLowerCase().split(/\s+/).filter(Boolean);
  const plot: RawPlot = {
    title: h.fields.get("title") ?? "",
    plotName: h.fields.get("plotname") ?? "",
    flags,
    complex: flags.includes("complex"),
    variables: h.variables,
    points,
    real,
  };
  const date = h.fields.get("date");
  if (date !== undefined) plot.date = date;
  if (imag) plot.imag = imag;
  return plot;
}

function readBinary(bytes: Uint8Array, h: Header, declared: number, complex: boolean): { plot: RawPlot; next: number; short: boolean } {
  const nv = h.variables.length;
  const width = complex ? 16 : 8;
  const stride = nv * width;
  const available = stride > 0 ? Math.floor((bytes.length - h.dataStart) / stride) : 0;
  const points = Math.max(0, Math.min(declared, available));
  const view = new DataView(bytes.buffer, bytes.byteOffset + h.dataStart, points * stride);
  const real = h.variables.map(() => new Float64Array(points));
  const imag = complex ? h.variables.map(() => new Float64Array(points)) : undefined;
  for (let p = 0; p < points; p++) {
    for (let v = 0; v < nv; v++) {
      const at = p * stride + v * width;
      real[v]![p] = view.getFloat64(at, true);
      if (imag) imag[v]![p] = view.getFloat64(at + 8, true);
    }
  }
  return { plot: plotFromHeader(h, points, real, imag), next: h.dataStart + points * stride, short: points < declared };
}

function readValues(bytes: Uint8Array, h: Header, declared: number, complex: boolean): { plot: RawPlot; next: number; short: boolean } {
  const nv = h.variables.length;
  const real = h.variables.map(() => new Float64Array(declared));
  const imag = complex ? h.variables.map(() => new Float64Array(declared)) : undefined;
  // Tokens are separated by white space; a following plot starts with a `Title:` line.
  let pos = h.dataStart;
  let points = 0;
  let v = -1; // -1: expecting the point index
  let next = bytes.length;
  while (pos < bytes.length && points < declared) {
    const end = findLineEnd(bytes, pos);
    const line = decoder.decode(bytes.subarray(pos, end)).replace(/\r$/, "");
    if (/^[A-Za-z][A-Za-z. ]*:/.test(line)) {
      next = pos;
      break;
    }
    pos = end + 1;
    for (const token of line.trim().split(/\s+/)) {
      if (token === "") continue;
      if (v < 0) {
        v = 0; // the point index itself is not stored
        continue;
      }
      if (complex) {
        const [re, im] = token.split(",");
        real[v]![points] = Number(re);
        imag![v]![points] = Number(im ?? "0");
      } else {
        real[v]![points] = Number(token);
      }
      v++;
      if (v === nv) {
        points++;
        v = -1;
        if (points === declared) break;
      }
    }
    if (points === declared) next = pos;
  }
  const trim = (a: Float64Array) => (points < declared ? a.slice(0, points) : a);
  return {
    plot: plotFromHeader(h, points, real.map(trim), imag?.map(trim)),
    next,
    short: points < declared,
  };
}

/** Reads every plot of an ngspice raw file. Never throws; a damaged file gives what was readable. */
export function parseRawFile(bytes: Uint8Array): RawFile {
  const plots: RawPlot[] = [];
  let pos = 0;
  while (pos < bytes.length) {
    // Skip blank space between plots.
    while (pos < bytes.length && (bytes[pos] === 10 || bytes[pos] === 13 || bytes[pos] === 32)) pos++;
    if (pos >= bytes.length) break;
    const h = readHeader(bytes, pos);
    if (typeof h === "string") return { plots, problem: h };
    const declared = Number.parseInt(h.fields.get("no. points") ?? "0", 10) || 0;
    const announced = Number.parseInt(h.fields.get("no. variables") ?? "", 10);
    if (Number.isFinite(announced) && announced !== h.variables.length) {
      return { plots, problem: `header announces ${announced} variables but lists ${h.variables.length}` };
    }
    const complex = (h.fields.get("flags") ?? "").toLowerCase().includes("complex");
    const read = h.dataKind === "binary" ? readBinary(bytes, h, declared, complex) : readValues(bytes, h, declared, complex);
    plots.push(read.plot);
    if (read.short) return { plots, problem: `plot "${read.plot.plotName}" has ${read.plot.points} of ${declared} points` };
    pos = read.next;
  }
  return { plots };
}
