// Reading the characterization runs: the figures of each cell type at each corner, the checks
// against what the sizing claims, and the diagnostics. Pure: runs in, a view and diagnostics out.
//
// Criteria (also printed in the report, see CRITERIA):
// - Saturation: the low output with the worst-case load must not exceed the collector-emitter
//   saturation voltage the sizing assumes (V_CE(sat), 0.2 V by default). The sizing gives every
//   low output that level and rests its noise margins on it; an output above it has left
//   saturation (the Ebers–Moll saturation voltage passes 0.2 V only as the overdrive β·I_B/I_C
//   approaches 1).
// - Low-state noise margin of each cell type as a receiver: its V_IL (unity-gain point) less the
//   highest V_OL of the cell types driving its inputs in this design (a primary input's low
//   level is the input driver's, SizedDesign.inputDriver), at least the required noise margin.
// - High-state noise margin: for diode-AND inputs, the lowest V_OH of their drivers (clamped by
//   diode-OR loads on the same net, unclamped otherwise; a primary input high is the supply, or
//   the diode-OR loads' clamp) less the cell's V_IH, at least the required margin. For diode-OR
//   inputs, which are current-driven, the supply less the driver's open-circuit level at which the
//   output reaches its low unity-gain point (through the worst-case shared pull-up): the series
//   voltage the input tolerates, as the sizing defines it.
// - Delays: with a gate delay budget, measured t_PHL and t_PLH at most the budget. Without one,
//   the measured delays stand beside the estimate; a ratio outside the estimate's stated accuracy
//   (t_PLH ±30 %, t_PHL a factor of 2: src/electrical/STATUS.md) is a warning.
// A check that fails where the sizing said the constraint passes is GW7020 (the run fails); one
// the sizing itself reported failing (given values) is GW7021 (the run fails too); a figure that
// could not be measured is GW7022.
import { diag, type Diagnostic } from "../diagnostics/index.js";
import type { CellAnalysis, SizedDesign } from "../electrical/types.js";
import { eng } from "../emit/format.js";
import type { SimulationRun } from "../simulate/run.js";
import { levelsOver, propagationDelay, sampleAt, unityGainPoints } from "../simulate/waveform.js";
import { defOfType, type CellDrive, type CellLoad } from "./loads.js";
import type { CopySetup, RunSetup } from "./netlist.js";
import type { CellCharacterization, CellFigures, CharacterizationCheck, CheckId, CornerCharacterization } from "./types.js";

/** Stated accuracy of the analytic delays (src/electrical/STATUS.md, checked against ngspice). */
export const DELAY_ACCURACY = { rise: { low: 0.7, high: 1.3 }, fall: { low: 0.5, high: 2 } };

export function criteria(design: SizedDesign): string[] {
  const p = (n: string, d: number) => design.parameters.find((x) => x.name === n)?.value ?? d;
  const vce = p("vCESatVolts", 0.2);
  const nm = p("noiseMarginMinVolts", 0.4);
  const budget = design.parameters.find((x) => x.name === "gateDelayMaxSeconds")?.value;
  return [
    `Corners: every supply × temperature corner of the sizing, in each resistor-tolerance case the cell names (load cells with every resistor at its low end), the transistors at β_min (β_min and β_max for delays), scaled with temperature by the model's XTB as the sizing scales it. β is a least gain I_C/I_B at the operating point, so each output transistor's BF is β·(1 + I_C/IKF) at its worst-case collector current I_C (the model's high-injection knee IKF lowers its gain to about BF/(1 + I_C/IKF)); every other transistor has BF = β.`,
    `Saturation: V_OL with the worst-case load at most ${eng(vce, "V")}, the V_CE(sat) the sizing assumes for every low output.`,
    `Low-state noise margin: the cell's V_IL (unity-gain point of its transfer curve) less the highest V_OL of the cells driving it, at least ${eng(nm, "V")}.`,
    `High-state noise margin: diode-AND inputs: the lowest V_OH of their drivers (clamped where the net feeds diode-OR inputs) less the cell's V_IH, at least ${eng(nm, "V")}; diode-OR inputs: the supply less the driver's level, behind the worst-case shared pull-up, at which the output reaches its low unity-gain point, at least ${eng(nm, "V")}.`,
    budget !== undefined
      ? `Delays: t_PHL and t_PLH at 50 % of each swing with the worst-case load, at most the gate budget of ${eng(budget, "s")}.`
      : `Delays: t_PHL and t_PLH at 50 % of each swing with the worst-case load, beside the estimate (no budget given; a ratio outside t_PLH ±30 % or t_PHL ×2 is a warning).`,
    `A check the simulation fails where the sizing said it passes stops the run (GW7020); so does one the sizing itself reported failing (GW7021), or a figure that could not be measured (GW7022).`,
  ];
}

interface CopyFigures {
  copy: CopySetup;
  vOL: number;
  vOH: number;
  vIL: number;
  vIH: number;
  vIHSource?: number;
  clamp?: number;
  tPHL?: number;
  tPLH?: number;
}

const nan = Number.NaN;

/** Whether `candidate` is a worse (smaller) margin than `current`; a missing figure (NaN) is the
 *  worst of all and stays. */
function worse(candidate: number, current: number): boolean {
  if (Number.isNaN(current)) return false;
  return Number.isNaN(candidate) || candidate < current;
}

function dcFigures(run: SimulationRun, setup: RunSetup, vLow: number): CopyFigures[] {
  const v = setup.corner.supplyVolts;
  return setup.copies.map((copy) => {
    const sw = run.vectors.get(copy.sourceVector);
    const pin = run.vectors.get(copy.pinVector);
    const out = run.vectors.get(copy.outVector);
    if (!sw || !pin || !out || run.errors.length) return { copy, vOL: nan, vOH: nan, vIL: nan, vIH: nan };
    const f: CopyFigures = { copy, vOL: sampleAt(sw, out, v), vOH: sampleAt(sw, out, vLow), vIL: nan, vIH: nan };
    if (copy.pinVector === copy.sourceVector) {
      const pts = unityGainPoints(pin, out);
      f.vIL = pts?.vIlVolts ?? nan;
      f.vIH = pts?.vIhVolts ?? nan;
    } else {
      // A diode-OR input is current-driven: once it conducts, its pin hardly moves while the
      // output keeps falling, so the curve is taken against the driver's open-circuit level
      // (the sweep behind the shared pull-up) and the thresholds are the pin's levels there.
      const pts = unityGainPoints(sw, out);
      f.vIL = pts ? sampleAt(sw, pin, pts.vIlVolts) : nan;
      f.vIH = pts ? sampleAt(sw, pin, pts.vIhVolts) : nan;
      f.vIHSource = pts?.vIhVolts ?? nan;
      f.clamp = sampleAt(sw, pin, v);
    }
    return f;
  });
}

function tranFigures(run: SimulationRun, setup: RunSetup): Map<CopySetup, { tPHL: number; tPLH: number }> {
  const out = new Map<CopySetup, { tPHL: number; tPLH: number }>();
  const time = run.vectors.get("time");
  const rise = setup.riseAtSeconds!;
  const fall = setup.fallAtSeconds!;
  const stop = setup.stopSeconds!;
  for (const copy of setup.copies) {
    const vin = run.vectors.get(copy.sourceVector);
    const vout = run.vectors.get(copy.outVector);
    if (!time || !vin || !vout || run.errors.length) {
      out.set(copy, { tPHL: nan, tPLH: nan });
      continue;
    }
    // Settled levels just before each input edge: output high before the rise, low before the fall.
    const settle = (t: number) => levelsOver(time, vout, t - (fall - rise) * 0.05, t).mean;
    const settleIn = (t: number) => levelsOver(time, vin, t - (fall - rise) * 0.05, t).mean;
    const vOH = settle(rise);
    const vOL = settle(fall);
    const inLow = settleIn(rise);
    const inHigh = settleIn(fall);
    const levelOut = (vOH + vOL) / 2;
    const levelIn = (inLow + inHigh) / 2;
    const phl = propagationDelay(time, vin, vout, levelIn, levelOut, "fall", { inputEdge: "rise" }).find((d) => d.inputSeconds >= rise - 1e-12 && d.inputSeconds < fall);
    const plh = propagationDelay(time, vin, vout, levelIn, levelOut, "rise", { inputEdge: "fall" }).find((d) => d.inputSeconds >= fall - 1e-12 && d.inputSeconds < stop);
    out.set(copy, { tPHL: phl?.delaySeconds ?? nan, tPLH: plh?.delaySeconds ?? nan });
  }
  return out;
}

/** Per cell type at one corner: the worst over its copies, with where each worst value came from. */
interface TypeAtCorner {
  vOL: number;
  vOLWhere: string;
  vOH: number;
  vOHWhere: string;
  vOHUnclamped: number;
  vIL: number;
  vILWhere: string;
  vIH: number;
  vIHWhere: string;
  vIHSource?: number;
  vIHSourceWhere?: string;
  clamp?: number;
  tPHL?: number;
  tPHLWhere?: string;
  tPLH?: number;
  tPLHWhere?: string;
  unmeasured: string[];
}

function worstOf(list: CopyFigures[], pick: (f: CopyFigures) => number | undefined, sense: "max" | "min"): { value: number; where: string; missing: boolean } {
  let best: { value: number; where: string } | undefined;
  let missing = false;
  for (const f of list) {
    const x = pick(f);
    if (x === undefined) continue;
    if (!Number.isFinite(x)) {
      missing = true;
      continue;
    }
    if (!best || (sense === "max" ? x > best.value : x < best.value)) best = { value: x, where: `${f.copy.caseLabel}, β_${f.copy.gain}` };
  }
  return best ? { ...best, missing } : { value: nan, where: "", missing: true };
}

function summarize(dc: CopyFigures[], tran: CopyFigures[] | undefined): TypeAtCorner {
  const clamped = dc.filter((f) => !f.copy.unclamped);
  const unclamped = dc.filter((f) => f.copy.unclamped);
  const unmeasured: string[] = [];
  const take = (name: string, list: CopyFigures[], pick: (f: CopyFigures) => number | undefined, sense: "max" | "min") => {
    const w = worstOf(list, pick, sense);
    if (w.missing) unmeasured.push(name);
    return w;
  };
  const vOL = take("V_OL", clamped, (f) => f.vOL, "max");
  const vOH = take("V_OH", clamped, (f) => f.vOH, "min");
  const vIL = take("V_IL", clamped, (f) => f.vIL, "min");
  const vIH = take("V_IH", clamped, (f) => f.vIH, "max");
  const vOHu = unclamped.length ? take("V_OH (diode-AND load only)", unclamped, (f) => f.vOH, "min") : vOH;
  const r: TypeAtCorner = {
    vOL: vOL.value,
    vOLWhere: vOL.where,
    vOH: vOH.value,
    vOHWhere: vOH.where,
    vOHUnclamped: vOHu.value,
    vIL: vIL.value,
    vILWhere: vIL.where,
    vIH: vIH.value,
    vIHWhere: vIH.where,
    unmeasured,
  };
  if (clamped.some((f) => f.vIHSource !== undefined)) {
    const s = take("V_IH at the driver", clamped, (f) => f.vIHSource, "max");
    r.vIHSource = s.value;
    r.vIHSourceWhere = s.where;
    r.clamp = worstOf(clamped, (f) => f.clamp, "min").value;
  }
  if (tran) {
    const phl = take("t_PHL", tran, (f) => f.tPHL, "max");
    const plh = take("t_PLH", tran, (f) => f.tPLH, "max");
    r.tPHL = phl.value;
    r.tPHLWhere = phl.where;
    r.tPLH = plh.value;
    r.tPLHWhere = plh.where;
  }
  return r;
}

/** Which cell types drive which, net by net: [driver type or −1 for a primary input, receiver
 *  type, the net feeds diode-OR inputs, the diode-OR receiver types on the net]. */
interface Pairing {
  driver: number;
  receiver: number;
  clamped: boolean;
  orTypes: number[];
}

function pairings(design: SizedDesign): Pairing[] {
  const nl = design.netlist;
  const forced = design.parameters.some((p) => p.name === "fanoutOverride");
  const hasOr = design.cellTypes.some((_, j) => defOfType(design, j).inputKind === "or");
  const seen = new Set<string>();
  const out: Pairing[] = [];
  for (const net of nl.nets) {
    if (net.loads.length === 0) continue;
    const driver = net.driver.kind === "cell" ? design.instances[net.driver.cell]!.cellType : net.driver.kind === "input" ? -1 : undefined;
    if (driver === undefined) continue;
    const receivers = [...new Set(net.loads.map((l) => design.instances[l.cell]!.cellType))];
    const orTypes = receivers.filter((j) => defOfType(design, j).inputKind === "or");
    const clamped = orTypes.length > 0 || (forced && hasOr && driver >= 0);
    for (const r of receivers) {
      const k = `${driver}|${r}|${clamped}`;
      if (seen.has(k)) continue;
      seen.add(k);
      out.push({ driver, receiver: r, clamped, orTypes });
    }
  }
  return out;
}

function analyticFigures(a: CellAnalysis): CellFigures {
  const f: CellFigures = {
    vOLVolts: a.vOLVolts,
    vOHVolts: a.vOHVolts,
    vILVolts: a.vILVolts,
    vIHVolts: a.vIHVolts,
    noiseMarginLowVolts: a.noiseMarginLowVolts,
    noiseMarginHighVolts: a.noiseMarginHighVolts,
  };
  if (a.timing) {
    f.tPHLSeconds = a.timing.tPHLSeconds;
    f.tPLHSeconds = a.timing.tPLHSeconds;
  }
  return f;
}

const LABELS: Record<CheckId, string> = {
  saturation: "saturation (V_OL at most V_CE(sat))",
  "noise-margin-low": "low-state noise margin",
  "noise-margin-high": "high-state noise margin",
  "delay-fall": "propagation delay t_PHL",
  "delay-rise": "propagation delay t_PLH",
};

export interface MeasuredRuns {
  dc: { setup: RunSetup; run: SimulationRun }[];
  tran: { setup: RunSetup; run: SimulationRun }[];
}

/** The characterization view and its diagnostics from the runs of every corner. */
export function readCharacterization(
  design: SizedDesign,
  loads: CellLoad[],
  drives: CellDrive[],
  runs: MeasuredRuns,
): { cells: CellCharacterization[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const p = (n: string) => design.parameters.find((x) => x.name === n)?.value;
  const vce = p("vCESatVolts") ?? 0.2;
  const nmReq = p("noiseMarginMinVolts") ?? 0.4;
  const budget = p("gateDelayMaxSeconds");
  const vLow = design.inputDriver.vLowVolts;
  const pairs = pairings(design);
  const nTypes = design.cellTypes.length;

  for (const r of [...runs.dc, ...runs.tran]) {
    for (const e of r.run.errors) diagnostics.push(diag("GW7001", `characterization (${r.setup.kind === "dc" ? "DC sweep" : "transient"}, ${r.setup.corner.engineCorner ?? r.setup.corner.label}): ${e}`));
  }

  // Figures per corner and type.
  const perCorner = runs.dc.map(({ setup, run }) => {
    const dc = dcFigures(run, setup, vLow);
    const tranRun = runs.tran.find((t) => t.setup.corner.engineCorner === setup.corner.engineCorner && t.setup.corner.supplyVolts === setup.corner.supplyVolts && t.setup.corner.tempC === setup.corner.tempC);
    const tranMap = tranRun ? tranFigures(tranRun.run, tranRun.setup) : undefined;
    const tranCopies: CopyFigures[] | undefined = tranRun
      ? tranRun.setup.copies.map((copy) => ({ copy, vOL: nan, vOH: nan, vIL: nan, vIH: nan, tPHL: tranMap!.get(copy)!.tPHL, tPLH: tranMap!.get(copy)!.tPLH }))
      : undefined;
    const types: TypeAtCorner[] = [];
    for (let j = 0; j < nTypes; j++) {
      types.push(summarize(dc.filter((f) => f.copy.cellType === j), tranCopies?.filter((f) => f.copy.cellType === j)));
    }
    return { setup, types };
  });

  const cells: CellCharacterization[] = design.cellTypes.map((t, j) => {
    const def = defOfType(design, j);
    const a = t.analysis;
    const analyticOk = (id: string): boolean | undefined => a.constraints.find((c) => c.id === id)?.ok;
    const unmeasured: { corner: string; what: string[] }[] = [];
    const failed: { corner: string; check: CharacterizationCheck }[] = [];
    const corners: CornerCharacterization[] = perCorner.map(({ setup, types }) => {
      const me = types[j]!;
      const v = setup.corner.supplyVolts;
      const checks: CharacterizationCheck[] = [];
      const check = (id: CheckId, value: number, limit: number, unit: "V" | "s", sense: "min" | "max", where: string, analytic?: boolean) => {
        const ok = Number.isFinite(value) && (sense === "min" ? value >= limit - 1e-12 : value <= limit + 1e-12);
        const c: CharacterizationCheck = { id, label: LABELS[id], value, limit, unit, sense, ok, where };
        if (analytic !== undefined) c.analyticOk = analytic;
        checks.push(c);
      };
      // A clamped fast cell (Schottky base–collector) never saturates by design: its claim is a
      // low level of at most V_BE − V_F (the sizing's worst case), not V_CE(sat).
      const vOLClaim = def.speedUp?.clamp ? Math.max(vce, a.vOLVolts) : vce;
      check("saturation", me.vOL, vOLClaim, "V", "max", me.vOLWhere, analyticOk("saturation"));
      // Receiver view: the drivers feeding this type.
      let nmL = Infinity;
      let nmLWhere = "";
      let nmH = Infinity;
      let nmHWhere = "";
      for (const pr of pairs.filter((x) => x.receiver === j)) {
        const d = pr.driver >= 0 ? types[pr.driver]! : undefined;
        const dKey = pr.driver >= 0 ? design.cellTypes[pr.driver]!.key : "a primary input";
        const low = d ? d.vOL : vLow;
        const ml = me.vIL - low;
        if (worse(ml, nmL)) {
          nmL = ml;
          nmLWhere = `V_IL ${eng(me.vIL, "V")} (${me.vILWhere}) against V_OL ${eng(low, "V")} of ${dKey}${d ? ` (${d.vOLWhere})` : ", the input driver's low level"}`;
        }
        if (def.inputKind === "and") {
          let high: number;
          let from: string;
          if (d) {
            high = pr.clamped ? d.vOH : d.vOHUnclamped;
            from = `V_OH ${eng(high, "V")} of ${dKey}${pr.clamped ? ", clamped by diode-OR inputs" : ""}`;
          } else if (pr.clamped) {
            const cl = Math.min(...pr.orTypes.map((k) => types[k]!.clamp ?? nan));
            high = cl;
            from = `the diode-OR inputs' clamp ${eng(high, "V")} on a primary input`;
          } else {
            high = v;
            from = `a primary input at the supply`;
          }
          const mh = high - me.vIH;
          if (worse(mh, nmH)) {
            nmH = mh;
            nmHWhere = `${from} against V_IH ${eng(me.vIH, "V")} (${me.vIHWhere})`;
          }
        }
      }
      if (def.inputKind === "or") {
        nmH = v - (me.vIHSource ?? nan);
        nmHWhere = `driver level ${eng(me.vIHSource ?? nan, "V")} at the unity-gain point (${me.vIHSourceWhere ?? ""}) against the supply, through ${eng(drives[j]!.orSourceOhms ?? nan, "Ω")}`;
      }
      if (nmL === Infinity) nmL = nan;
      if (nmH === Infinity) nmH = nan;
      check("noise-margin-low", nmL, nmReq, "V", "min", nmLWhere, analyticOk("noise-margin-low"));
      check("noise-margin-high", nmH, nmReq, "V", "min", nmHWhere, analyticOk("noise-margin-high"));
      if (budget !== undefined && me.tPHL !== undefined) {
        check("delay-fall", me.tPHL, budget, "s", "max", me.tPHLWhere ?? "", analyticOk("delay-fall"));
        check("delay-rise", me.tPLH ?? nan, budget, "s", "max", me.tPLHWhere ?? "", analyticOk("delay-rise"));
      }
      const cc: CornerCharacterization = {
        corner: setup.corner.engineCorner ?? setup.corner.label,
        supplyVolts: v,
        tempC: setup.corner.tempC,
        betaMin: setup.betaMin,
        betaMax: runs.tran.find((x) => x.setup.corner.engineCorner === setup.corner.engineCorner)?.setup.betaMax ?? setup.betaMax,
        vOLVolts: me.vOL,
        vOHVolts: me.vOH,
        vILVolts: me.vIL,
        vIHVolts: me.vIH,
        noiseMarginLowVolts: nmL,
        noiseMarginHighVolts: nmH,
        checks,
        pass: checks.every((c) => c.ok) && me.unmeasured.length === 0,
      };
      if (me.vIHSource !== undefined) cc.vIHSourceVolts = me.vIHSource;
      if (me.tPHL !== undefined) cc.tPHLSeconds = me.tPHL;
      if (me.tPLH !== undefined) cc.tPLHSeconds = me.tPLH;

      if (me.unmeasured.length) unmeasured.push({ corner: cc.corner, what: me.unmeasured });
      for (const c of checks) {
        if (c.ok) continue;
        if (!Number.isFinite(c.value)) {
          if (me.unmeasured.length === 0) unmeasured.push({ corner: cc.corner, what: [`the ${c.label} (${c.where || "a figure it needs is missing"})`] });
          continue;
        }
        failed.push({ corner: cc.corner, check: c });
      }
      return cc;
    });
    // One diagnostic per cell type and check: its worst corner, and how many corners fail.
    if (unmeasured.length) {
      diagnostics.push(
        diag("GW7022", `${t.key}: ${unmeasured.map((u) => `${u.what.join(", ")} at ${u.corner}`).join("; ")} could not be measured`, undefined, {
          hint: "a run failed or a transfer curve never reached a slope of −1: the sizing's claims for this cell are unconfirmed",
        }),
      );
    }
    for (const id of [...new Set(failed.map((f) => f.check.id))]) {
      const list = failed.filter((f) => f.check.id === id);
      const badness = (c: CharacterizationCheck) => (c.sense === "min" ? c.limit - c.value : c.value - c.limit);
      const w = list.reduce((x, y) => (badness(y.check) > badness(x.check) ? y : x));
      const c = w.check;
      const fmt = (x: number) => eng(x, c.unit);
      const count = list.length === corners.length ? `at every corner` : `at ${list.length} of ${corners.length} corners`;
      const text = `${t.key}: ${c.label} is ${fmt(c.value)} in ngspice at ${w.corner} (${c.where}), against ${c.sense === "min" ? "at least" : "at most"} ${fmt(c.limit)}; it fails ${count} (load: ${loads[j]!.text})`;
      if (list.every((f) => f.check.analyticOk === false)) {
        diagnostics.push(diag("GW7021", `${text}; the sizing reported this constraint failing too`, undefined, { hint: "choose values that meet the constraint, or let gatewright size the cell" }));
      } else {
        const claimed = a.constraints.find((x) => x.id === id);
        const claim = claimed ? `${claimed.label} ${eng(claimed.value, claimed.unit)} at its worst corner (${claimed.corner})` : "that it passes";
        diagnostics.push(
          diag("GW7020", `${text}, where the sizing claims ${claim}`, undefined, {
            hint: "the analytic worst case did not hold in simulation: size with more margin (a larger required noise or saturation margin, a narrower temperature range, a lower fan-out), check that a parts file's models match its declared drops and V_CE(sat), and treat the simulated figures as the design's",
          }),
        );
      }
    }
    const worst: CellFigures = {
      vOLVolts: Math.max(...corners.map((c) => c.vOLVolts)),
      vOHVolts: Math.min(...corners.map((c) => c.vOHVolts)),
      vILVolts: Math.min(...corners.map((c) => c.vILVolts)),
      vIHVolts: Math.max(...corners.map((c) => c.vIHVolts)),
      noiseMarginLowVolts: Math.min(...corners.map((c) => c.noiseMarginLowVolts)),
      noiseMarginHighVolts: Math.min(...corners.map((c) => c.noiseMarginHighVolts)),
    };
    if (corners.some((c) => c.tPHLSeconds !== undefined)) {
      worst.tPHLSeconds = Math.max(...corners.map((c) => c.tPHLSeconds ?? nan));
      worst.tPLHSeconds = Math.max(...corners.map((c) => c.tPLHSeconds ?? nan));
    }
    const analytic = analyticFigures(a);
    // Delays without a budget: the estimate's stated accuracy.
    if (budget === undefined && analytic.tPHLSeconds !== undefined && worst.tPHLSeconds !== undefined) {
      const rFall = analytic.tPHLSeconds / worst.tPHLSeconds;
      const rRise = analytic.tPLHSeconds! / worst.tPLHSeconds!;
      const off: string[] = [];
      if (Number.isFinite(rFall) && (rFall < DELAY_ACCURACY.fall.low || rFall > DELAY_ACCURACY.fall.high)) off.push(`t_PHL estimate ${eng(analytic.tPHLSeconds, "s")} against ${eng(worst.tPHLSeconds, "s")} simulated`);
      if (Number.isFinite(rRise) && (rRise < DELAY_ACCURACY.rise.low || rRise > DELAY_ACCURACY.rise.high)) off.push(`t_PLH estimate ${eng(analytic.tPLHSeconds!, "s")} against ${eng(worst.tPLHSeconds!, "s")} simulated`);
      if (off.length) diagnostics.push(diag("GW7023", `${t.key}: ${off.join("; ")} (worst over the corners)`, undefined, { hint: "the delay estimate is outside its stated accuracy for this cell; rely on the simulated figures" }));
    }
    return {
      key: t.key,
      cellId: t.cellId,
      loadText: `${loads[j]!.text}${loads[j]!.loadPins > 0 ? `, ${eng(loads[j]!.loadPins * loads[j]!.wiringFarads, "F")} wiring in the transient` : ""}`,
      driveText: drives[j]!.text,
      analytic,
      corners,
      worst,
      pass: corners.every((c) => c.pass),
    };
  });
  return { cells, diagnostics };
}
