// The verify stage's pure parts, without a simulator: the conditions it runs at, the text changes
// to the generated netlist and testbench, the waveform measurements (checked against values
// derived by hand from piecewise-linear waveforms), the choice of vectors, the bypass
// capacitors and their rows in the parts list (RFC 4180), the reading thresholds, and the hash
// that lets a run reuse earlier outputs.
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { synthesize, type Synthesis } from "../../src/pipeline/synthesize.js";
import { OR_READ_BAND_VOLTS, outputLevels } from "../../src/emit/spice.js";
import { verifyCorners } from "../../src/verify/corners.js";
import { cornerTexts, prepareTestbench, withModelGain, DUT_SUPPLY_VECTOR } from "../../src/verify/netlist-text.js";
import { measureDelays, measureLevels, measureSupply } from "../../src/verify/measure.js";
import { chooseVectors, defaultMaxSteps, prefixStimulus, vectorGiving } from "../../src/verify/vectors.js";
import { bomCsvWithBypass, bomMarkdownWithBypass, recommendDecoupling, switchedCells, CELLS_PER_GROUP } from "../../src/verify/decoupling.js";
import { netThresholds, netThresholdsAt } from "../../src/verify/levels.js";
import { inputHash, storedInputHash, synthesisHash } from "../../src/verify/reuse.js";
import { filesWithInputHash, withInputHash } from "../support/input-hash.js";
import { emitDesign } from "../../src/emit/index.js";
import { decimate } from "../../src/verify/plots.js";
import { seededRandom, StepSimulator } from "../../src/logic/evaluate.js";

function build(file: string, cells: "mixed" | "nand" = "mixed", supplyVolts = 5, extra: Record<string, unknown> = {}): Synthesis {
  const s = synthesize(readFileSync(file, "utf8"), file, { maxFanin: 8, cells, cellsGiven: cells !== "mixed", sizing: { supplyVolts }, commandLine: "test", ...extra });
  expect(s.diagnostics.filter((d) => d.severity === "error").map((d) => d.message)).toEqual([]);
  return s;
}

const TMP = mkdtempSync(join(tmpdir(), "gw-verify-units-"));

function file(s: Synthesis, suffix: string): string {
  return s.files!.find((f) => f.name.endsWith(suffix) && (suffix !== ".cir" || !f.name.endsWith(".tb.cir")))!.content;
}

describe("conditions", () => {
  it("nominal plus supply min/max × temperature extremes × gain limits, the engine's own corners among them", () => {
    const s = build("test/fixtures/logic/xor2.logic");
    const d = s.design!;
    const cs = verifyCorners(d, { corners: true });
    expect(cs).toHaveLength(1 + 2 * 2 * 2);
    expect(cs[0]!.id).toBe("nominal");
    expect(cs[0]!.bf).toBeUndefined();
    // Default sizing: 5 V ± 5 %, 0–70 °C, β 30 to 400 (the electrical engine's defaults).
    const supplies = new Set(cs.slice(1).map((c) => c.supplyVolts));
    expect([...supplies].sort()).toEqual([4.75, 5.25]);
    expect(new Set(cs.slice(1).map((c) => c.tempC))).toEqual(new Set([0, 70]));
    expect(new Set(cs.slice(1).map((c) => c.bf))).toEqual(new Set([30, 400]));
    // Every supply × temperature corner the electrical engine names is run, with both models.
    for (const label of d.corners) expect(cs.filter((c) => c.engineCorner === label)).toHaveLength(2);
    expect(verifyCorners(d, { corners: false })).toHaveLength(1);
  });
});

describe("netlist and testbench text at a corner", () => {
  const s = build("test/fixtures/logic/xor2.logic");
  const cir = file(s, ".cir");
  const tb = file(s, ".tb.cir");

  it("sets BF and TNOM of the NPN card and leaves the rest of the card alone", () => {
    const m = withModelGain(cir, s.design!.models.npn.name, 30);
    expect(m.problems).toEqual([]);
    const card = m.text.split("\n").find((l) => l.startsWith(`.model ${s.design!.models.npn.name}`))!;
    expect(card).toMatch(/\bBF=30\b/);
    expect(card).toMatch(/\bTNOM=25\b/);
    expect(card).toMatch(/\bXTB=1\.5\b/);
    expect(card.match(/\bBF=/g)).toHaveLength(1);
    const diode = (t: string) => t.split("\n").find((l) => l.startsWith(`.model ${s.design!.models.diode.name}`));
    expect(diode(m.text)).toBe(diode(cir));
    expect(withModelGain(cir, "Q_NOT_THERE", 30).problems).toHaveLength(1);
  });

  it("changes the supply, adds the temperature, measures the circuit's own supply current, saves one list, drops .meas", () => {
    const t = prepareTestbench(tb, { supplyVolts: 4.75, tempC: 70, save: ["v(y)", DUT_SUPPLY_VECTOR] });
    expect(t.problems).toEqual([]);
    expect(t.text).toMatch(/^VCC vcc 0 DC 4\.75$/m);
    expect(t.text).toMatch(/^\.temp 70$/m);
    expect(t.text).toMatch(/^VDUT vcc_dut vcc DC 0$/m);
    expect(t.text).toMatch(/^XDUT .* vcc_dut xor2$/m);
    expect(t.text.match(/^\.save .*/gm)).toEqual([`.save v(y) ${DUT_SUPPLY_VECTOR}`]);
    expect(t.text).not.toMatch(/^\.meas/m);
    // The input drivers still hang on vcc, outside the measured lead.
    expect(t.text).toMatch(/^R_PU_a vcc a /m);
    expect(t.text.trimEnd().endsWith(".end")).toBe(true);
  });

  it("says what it could not find instead of guessing", () => {
    const t = prepareTestbench("* nothing here\n.end\n", { supplyVolts: 5, tempC: 25, save: [] });
    expect(t.problems.join(" ")).toMatch(/VCC/);
    expect(t.problems.join(" ")).toMatch(/XDUT/);
    const c = cornerTexts(cir, tb, verifyCorners(s.design!, { corners: true })[1]!, s.design!.models.npn.name, ["v(y)"]);
    expect(c.problems).toEqual([]);
  });
});

describe("waveform measurements (values derived by hand from piecewise-linear waveforms)", () => {
  // One step of 1 µs: the input rises 0 → 5 V over 10–20 ns after the step starts; the output
  // falls 5 → 0.2 V between 60 and 80 ns. 50 % points: input 2.5 V at 15 ns; output 2.6 V at
  // 70 ns, so t_PHL = 55 ns.
  const T = 1e-6;
  const t = [0, 0.95e-6, 1e-6, 1.01e-6, 1.02e-6, 1.06e-6, 1.08e-6, 1.95e-6, 2e-6];
  const a = [0, 0, 0, 0, 5, 5, 5, 5, 5];
  const y = [5, 5, 5, 5, 5, 5, 0.2, 0.2, 0.2];
  const samples = [0.95e-6, 1.95e-6];

  it("levels and noise margins against given thresholds", () => {
    const lv = measureLevels(t, y, [1, 0], samples, { vilVolts: 0.8, vihVolts: 2 });
    expect(lv.lowMaxVolts).toBeCloseTo(0.2, 12);
    expect(lv.highMinVolts).toBeCloseTo(5, 12);
    expect(lv.noiseMarginLowVolts).toBeCloseTo(0.6, 12);
    expect(lv.noiseMarginHighVolts).toBeCloseTo(3, 12);
  });

  it("t_PHL between 50 % points, named by the input that changed", () => {
    const d = measureDelays({
      time: t,
      vectors: [[0], [1]],
      stepSeconds: T,
      sampleTimes: samples,
      inputs: [{ name: "a", values: a, level50Volts: 2.5 }],
      outputs: [{ name: "y", values: y, level50Volts: 2.6, expected: [1, 0] }],
    });
    expect(d).toHaveLength(1);
    expect(d[0]!.edge).toBe("fall");
    expect(d[0]!.fromInput).toBe("a");
    expect(d[0]!.delaySeconds).toBeCloseTo(55e-9, 15);
  });

  it("a glitch does not shorten the delay: the last crossing before the sample counts", () => {
    // The output dips through 2.6 V at 30–40 ns and comes back before falling for good.
    const t2 = [0, 0.95e-6, 1e-6, 1.01e-6, 1.02e-6, 1.03e-6, 1.035e-6, 1.04e-6, 1.06e-6, 1.08e-6, 1.95e-6, 2e-6];
    const a2 = [0, 0, 0, 0, 5, 5, 5, 5, 5, 5, 5, 5];
    const y2 = [5, 5, 5, 5, 5, 5, 1, 5, 5, 0.2, 0.2, 0.2];
    const d = measureDelays({ time: t2, vectors: [[0], [1]], stepSeconds: T, sampleTimes: samples, inputs: [{ name: "a", values: a2, level50Volts: 2.5 }], outputs: [{ name: "y", values: y2, level50Volts: 2.6, expected: [1, 0] }] });
    expect(d[0]!.delaySeconds).toBeCloseTo(55e-9, 15);
  });

  it("supply: the spike above the settled current, its charge (a triangle: ½·base·height), and the average", () => {
    // Delivered current (ns → mA): 2 settled before the step, then 1000 → 2, 1010 → 5,
    // 1020 → 3, and 3 settled after. The excess over max(2, 3) = 3 mA is taken per sample
    // (clipped at 0): 0, 2, 0 at 1000, 1010, 1020 ns; trapezoids give
    // ½·10 ns·(0 + 2 mA) + ½·10 ns·(2 mA + 0) = 20 pC (1 mA·ns = 1 pC).
    const ts = [0, 0.95e-6, 1e-6, 1.01e-6, 1.02e-6, 1.95e-6, 2e-6];
    const delivered = [2e-3, 2e-3, 2e-3, 5e-3, 3e-3, 3e-3, 3e-3];
    const branch = delivered.map((x) => -x);
    const m = measureSupply(ts, branch, 5, T, samples);
    expect(m.spikes).toHaveLength(1);
    expect(m.spikes[0]!.excessAmps).toBeCloseTo(2e-3, 12);
    expect(m.spikes[0]!.chargeCoulombs).toBeCloseTo(20e-12, 18);
    expect(m.spikes[0]!.timeSeconds).toBeCloseTo(1.01e-6, 15);
    expect(m.staticMinAmps).toBeCloseTo(2e-3, 12);
    expect(m.staticMaxAmps).toBeCloseTo(3e-3, 12);
    expect(m.peakAmps).toBeCloseTo(5e-3, 12);
    // Average after the first step (1–2 µs): 3 mA except the spike's triangle areas.
    // ∫ = (1010−1000)·(2+5)/2 + (1020−1010)·(5+3)/2 + (2000−1020)·3 = 35 + 40 + 2940 = 3015 mA·ns.
    expect(m.averageAmps).toBeCloseTo(3015e-12 / 1e-6, 9);
    expect(m.averageWatts).toBeCloseTo((5 * 3015e-12) / 1e-6, 9);
  });
});

describe("vectors", () => {
  it("uses the testbench's own walk while it fits, and says it covered every combination", () => {
    const s = build("test/fixtures/logic/majority3.logic");
    const c = chooseVectors({ graph: s.graph!, stateNames: s.stateNames, synthesized: s.stimulus! }, { maxSteps: 1000 });
    expect(c.fromSynthesis).toBe(true);
    expect(c.coverage.kind).toBe("exhaustive");
    expect(c.coverage.steps).toBe(8);
    expect(c.coverage.missing).toEqual([]);
  });

  it("a wide AND: random vectors almost never make it 1, so a vector is found in its cone; both values are then covered", () => {
    // 16-input AND: a random vector gives 1 with probability 2^-16 (derived).
    const path = join(TMP, "and16.logic");
    const names = Array.from({ length: 16 }, (_, i) => `i${i}`);
    const text = `input ${names.join(", ")};\noutput y, z;\ny = ${names.join(" & ")};\nz = i0 ^ i1;\n`;
    writeFileSync(path, text);
    const s = build(path, "nand");
    const c = chooseVectors({ graph: s.graph!, stateNames: s.stateNames, synthesized: s.stimulus! }, { maxSteps: 40 });
    expect(c.fromSynthesis).toBe(false);
    expect(c.coverage.kind).toBe("sampled");
    expect(c.stimulus.vectors.length).toBeLessThanOrEqual(40);
    expect(c.coverage.missing).toEqual([]);
    expect(c.coverage.toggleVectors).toBeGreaterThanOrEqual(1);
    expect(c.coverage.text).toMatch(/seeded random vectors/);
    // The expected values are the logic's: replay them independently.
    const sim = new StepSimulator(s.graph!);
    c.stimulus.vectors.forEach((v, i) => expect(sim.step(v).outputs).toEqual(c.stimulus.expected[i]));
    expect(c.stimulus.vectors.some((v) => v.every((b) => b === 1))).toBe(true);
  });

  it("vectorGiving finds the one assignment of a 16-input AND that gives 1, and none for a constant", () => {
    const names = Array.from({ length: 16 }, (_, i) => `i${i}`);
    const path = join(TMP, "and16b.logic");
    writeFileSync(path, `input ${names.join(", ")};\noutput y;\ny = ${names.join(" & ")};\n`);
    const s = build(path, "nand");
    const v = vectorGiving(s.graph!, 0, 1, seededRandom(3));
    expect(v).toEqual(new Array(16).fill(1));
  });

  it("a design with state too long for the budget runs the first steps of its planned walk", () => {
    const s = build("examples/pump.logic");
    const st = s.stimulus!;
    const c = chooseVectors({ graph: s.graph!, stateNames: s.stateNames, synthesized: st }, { maxSteps: 20 });
    expect(c.fromSynthesis).toBe(false);
    expect(c.stimulus.vectors).toEqual(st.vectors.slice(0, 20));
    expect(c.stimulus.expected).toEqual(st.expected.slice(0, 20));
    expect(c.coverage.prefixOf).toBe(st.vectors.length);
    expect(c.coverage.text).toContain(`first 20 of the ${st.vectors.length} steps`);
    expect(prefixStimulus(st, 5).stateExpected?.length ?? 5).toBe(5);
  });

  it("the default budget shrinks with the design and the runs, within 32..4096 steps", () => {
    expect(defaultMaxSteps(10, 1, "embedded")).toBe(4000);
    expect(defaultMaxSteps(100, 9, "embedded")).toBe(44);
    expect(defaultMaxSteps(10_000, 9, "embedded")).toBe(32);
    expect(defaultMaxSteps(1, 1, "system")).toBe(4096);
  });
});

describe("reading thresholds", () => {
  it("are the emitter's own for the outputs (src/emit netLevels) without curves, and the curves' where measured", () => {
    const s = build("examples/pump.logic");
    const d = s.design!;
    d.netlist.outputs.forEach((o, k) => {
      const a = netThresholds(d, o.net);
      const b = outputLevels(d, k);
      expect(a.vilVolts).toBe(b.vilVolts);
      expect(a.vihVolts).toBe(b.vihVolts);
      expect(netThresholdsAt(d, o.net, undefined)).toEqual({ ...a, fromCurves: false });
    });
    // An output that drives nothing is read as any cell's input reads it: the lowest V_IL and
    // the highest V_IH (the emitter's rule), here with the measured figures.
    const free = d.netlist.outputs.find((o) => d.netlist.nets[o.net]!.loads.length === 0)!;
    const m = new Map(d.cellTypes.map((t, i) => [t.key, { vIlVolts: 0.9 + 0.01 * i, vIhVolts: 1.2 + 0.01 * i }]));
    const at = netThresholdsAt(d, free.net, m);
    expect(at.fromCurves).toBe(true);
    expect(at.vilVolts).toBeCloseTo(0.9, 12);
    const orTypes = d.cellTypes.map((t, i) => ({ t, i })).filter(({ t }) => t.cellId === "nor");
    const andTypes = d.cellTypes.map((t, i) => ({ t, i })).filter(({ t }) => t.cellId !== "nor");
    const expectVih = Math.max(...andTypes.map(({ i }) => 1.2 + 0.01 * i), ...orTypes.map(({ i }) => 0.9 + 0.01 * i + OR_READ_BAND_VOLTS));
    expect(at.vihVolts).toBeCloseTo(expectVih, 12);
  });
});

describe("decoupling", () => {
  const s = build("examples/pump.logic");
  const d = s.design!;

  it("C = cells per group × charge per switching cell / allowed droop, rounded up in E6 after a factor of 2; at least 100 nF", () => {
    // A spike of 3 nC at a step where 2 cells switched: 1.5 nC a cell. Pump has 7 cells, one
    // group; droop allowed 5 V × 5 % / 5 = 50 mV. C ≥ 7 × 1.5 nC / 50 mV = 210 nF; × 2 = 420 nF
    // → 470 nF (E6, IEC 60063). Rated 16 V ≥ 2 × 5.25 V (common practice).
    const switched = new Array(s.stimulus!.vectors.length).fill(0);
    switched[5] = 2;
    const a = recommendDecoupling(d, [{ corner: "test", spikes: [{ step: 5, timeSeconds: 0, excessAmps: 4e-3, chargeCoulombs: 3e-9, beforeAmps: 0, afterAmps: 0 }] }], switched);
    expect(a.chargePerCellCoulombs).toBeCloseTo(1.5e-9, 18);
    expect(a.allowedDroopVolts).toBeCloseTo(0.05, 12);
    expect(a.neededFarads).toBeCloseTo(210e-9, 15);
    expect(a.valueFarads).toBeCloseTo(470e-9, 15);
    expect(a.voltageRatingVolts).toBe(16);
    expect(a.count).toBe(1);
    expect(a.designators).toEqual(["C1"]);
    expect(a.derivation.join(" ")).toMatch(/common practice/);
    // Small spikes: the customary 100 nF.
    const small = recommendDecoupling(d, [{ corner: "test", spikes: [{ step: 5, timeSeconds: 0, excessAmps: 1e-4, chargeCoulombs: 1e-12, beforeAmps: 0, afterAmps: 0 }] }], switched);
    expect(small.valueFarads).toBeCloseTo(100e-9, 15);
  });

  it("one capacitor per group of up to 8 cells", () => {
    expect(CELLS_PER_GROUP).toBe(8);
    const a = recommendDecoupling(d, [], []);
    expect(a.count).toBe(Math.ceil(d.netlist.cells.length / 8));
  });

  it("switchedCells counts the cell outputs the logic changes at each step", () => {
    const x = build("test/fixtures/logic/xor2.logic", "nand");
    const counts = switchedCells(x.design!.netlist, x.stimulus!.vectors);
    expect(counts[0]).toBe(0);
    // XOR of four NANDs in Gray order: every step changes one input, which always moves the
    // first NAND or one of the middle ones and the output (common practice: at least 2).
    for (const c of counts.slice(1)) expect(c).toBeGreaterThanOrEqual(2);
  });

  /** RFC 4180 records: fields separated by commas, quoted when they hold commas or quotes. */
  function parseCsv(text: string): string[][] {
    const rows: string[][] = [];
    for (const line of text.split("\r\n").filter((l) => l !== "")) {
      const out: string[] = [];
      let i = 0;
      while (i <= line.length) {
        if (line[i] === '"') {
          let v = "";
          i++;
          while (i < line.length) {
            if (line[i] === '"' && line[i + 1] === '"') {
              v += '"';
              i += 2;
            } else if (line[i] === '"') {
              i++;
              break;
            } else v += line[i++];
          }
          out.push(v);
          i++;
        } else {
          const j = line.indexOf(",", i);
          out.push(j < 0 ? line.slice(i) : line.slice(i, j));
          if (j < 0) break;
          i = j + 1;
        }
      }
      rows.push(out);
    }
    return rows;
  }

  it("adds one row after the resistors to both parts lists, keeps the CSV well formed, updates the totals, and replaces its own row when run again", () => {
    const a = recommendDecoupling(d, [], []);
    const csv0 = file(s, ".bom.csv");
    const md0 = file(s, ".bom.md");
    const csv1 = bomCsvWithBypass(csv0, a);
    const csv2 = bomCsvWithBypass(csv1, a);
    expect(csv2).toBe(csv1);
    const rows = parseCsv(csv1);
    expect(rows.every((r) => r.length === rows[0]!.length)).toBe(true);
    const kinds = rows.slice(1).map((r) => /^[A-Z]+/.exec(r[1]!)![0]);
    const c = kinds.indexOf("C");
    expect(c).toBeGreaterThan(kinds.lastIndexOf("R"));
    expect(c).toBeLessThan(kinds.indexOf("D"));
    expect(rows[c + 1]![2]).toBe("100nF");
    expect(rows[c + 1]![0]).toBe(String(a.count));
    expect(csv1.endsWith("\r\n")).toBe(true);
    const md1 = bomMarkdownWithBypass(md0, a);
    expect(bomMarkdownWithBypass(md1, a)).toBe(md1);
    const total = (md: string) => /Totals: (\d+) parts, (\d+) distinct/.exec(md)!.slice(1).map(Number);
    expect(total(md1)[0]).toBe(total(md0)[0]! + a.count);
    expect(total(md1)[1]).toBe(total(md0)[1]! + 1);
    expect(md1).toMatch(new RegExp(`${a.count} capacitor`));
  });
});

describe("reusing outputs", () => {
  it("the hash depends on source and options, not on their key order or the command line", () => {
    const base = { maxFanin: 8, cells: "mixed", sizing: { supplyVolts: 5, betaMin: 30 }, commandLine: "a" };
    const h = synthesisHash("0.1.0", "input a;", base);
    expect(h).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(synthesisHash("0.1.0", "input a;", { commandLine: "b", sizing: { betaMin: 30, supplyVolts: 5 }, cells: "mixed", maxFanin: 8 })).toBe(h);
    expect(synthesisHash("0.1.0", "input a;", { ...base, sizing: { supplyVolts: 12, betaMin: 30 } })).not.toBe(h);
    expect(synthesisHash("0.1.0", "input b;", base)).not.toBe(h);
    expect(synthesisHash("0.2.0", "input a;", base)).not.toBe(h);
    expect(inputHash({ toolVersion: "x", sourceText: "", options: { a: 1, b: undefined } })).toBe(inputHash({ toolVersion: "x", sourceText: "", options: { a: 1 } }));
  });

  it("is stored in the generated JSON after its generator entry and read back", () => {
    const s = build("test/fixtures/logic/xor2.logic");
    const files = filesWithInputHash(s.files!, "xor2.json", "sha256:abc");
    const json = files.find((f) => f.name === "xor2.json")!.content;
    expect(storedInputHash(json)).toBe("sha256:abc");
    expect(Object.keys(JSON.parse(json)).slice(0, 2)).toEqual(["generator", "inputHash"]);
    expect(storedInputHash(withInputHash(json, "sha256:def"))).toBe("sha256:def");
    expect(storedInputHash("not json")).toBeUndefined();
    expect(files.find((f) => f.name === "xor2.cir")!.content).toBe(file(s, ".cir"));
  });

  it("written by the JSON writer from the emit context gives the text that reading the JSON back gave", () => {
    // Reference: the previous behaviour, withInputHash (the emitted JSON parsed, the hash put in
    // after "generator", printed again), byte for byte, for every file of two designs.
    for (const f of ["test/fixtures/logic/xor2.logic", "test/fixtures/verilog/c17.v"]) {
      const s = build(f);
      const json = `${s.netlist!.name}.json`;
      const before = filesWithInputHash(s.files!, json, "sha256:abc");
      const after = emitDesign({ ...s.emitContext!, inputHash: "sha256:abc" });
      expect(after.map((x) => x.name)).toEqual(before.map((x) => x.name));
      for (let i = 0; i < after.length; i++) expect(after[i]!.content).toBe(before[i]!.content);
    }
  });
});

describe("plot data", () => {
  it("decimation keeps each span's extremes (a 1-sample spike survives)", () => {
    const n = 100_000;
    const x = Float64Array.from({ length: n }, (_, i) => i);
    const y = new Float64Array(n);
    y[54_321] = 7;
    y[12_345] = -3;
    const d = decimate(x, y, 500);
    expect(d.x.length).toBeLessThanOrEqual(4 * 500);
    expect(Math.max(...d.y)).toBe(7);
    expect(Math.min(...d.y)).toBe(-3);
    expect(d.x[0]).toBe(0);
    expect(d.x[d.x.length - 1]).toBe(n - 1);
  });
});
