// Worst-case evaluation of one cell kind with candidate values over its load situations, every
// corner (supply × temperature) and every resistor-tolerance case the cell names.
import type { CellDefinition, CellEnv, CellOperatingPoint, CellValues, ComponentStress, InputDrive, OutputLoad } from "../cells/types.js";
import { clampBoundAmps } from "../cells/fast-kit/index.js";
import { onWiredNet, shareFactor } from "../cells/output-stage.js";
import { collectorLeakageAmps, diodeReverseLeakageAmps } from "./leakage.js";
import { DEFAULT_SCHOTTKY, devicesAt, schottkyAt } from "./devices.js";
import type { ResolvedOptions } from "./options.js";
import { reduceSituations, type Situation, type SituationSet } from "./situations.js";
import { cellTiming, typicalDrops, type TimingInputs } from "./timing.js";
import type { CellAnalysis, CellTiming, ConstraintResult, OperatingFigures } from "./types.js";

export const CONSTRAINTS = [
  { id: "saturation", label: "saturation margin β_min·I_B/(I_C + loads)", unit: "", sense: "min" },
  { id: "noise-margin-low", label: "low-state noise margin", unit: "V", sense: "min" },
  { id: "noise-margin-high", label: "high-state noise margin", unit: "V", sense: "min" },
  { id: "collector-current", label: "collector current (speed floor)", unit: "A", sense: "min" },
  { id: "turn-off-current", label: "turn-off current through R_B, in units of I_C/β_min", unit: "", sense: "min" },
  { id: "power-ceiling", label: "static power per gate", unit: "W", sense: "max" },
  { id: "input-current", label: "low-state input current (load on the driver)", unit: "A", sense: "max" },
  { id: "or-drive", label: "source resistance per diode-OR load", unit: "Ω", sense: "max" },
  { id: "delay-fall", label: "propagation delay, output falling (t_PHL)", unit: "s", sense: "max" },
  { id: "delay-rise", label: "propagation delay, output rising (t_PLH)", unit: "s", sense: "max" },
  { id: "clamp-current", label: "clamped output's sink current, I_C + loads, within the knee its loads' margins assume", unit: "A", sense: "max" },
] as const;

export type ConstraintId = (typeof CONSTRAINTS)[number]["id"];
export const NC = CONSTRAINTS.length;
export const CI: Record<ConstraintId, number> = Object.fromEntries(CONSTRAINTS.map((c, i) => [c.id, i])) as Record<ConstraintId, number>;

export interface Corner {
  label: string;
  env: CellEnv;
}

/** Supply min/max × temperature min/max (duplicates removed), plus the nominal point. */
export function buildCorners(o: ResolvedOptions): { corners: Corner[]; nominal: Corner } {
  const vs = [...new Set([o.supplyVolts * (1 - o.supplyTolerance), o.supplyVolts * (1 + o.supplyTolerance)])];
  const ts = [...new Set([o.tempMinC, o.tempMaxC])];
  const corners: Corner[] = [];
  for (const v of vs)
    for (const t of ts)
      corners.push({ label: `${round(v)} V, ${t} °C`, env: { vccVolts: v, dev: devicesAt(o.devices, t), orShareFactor: o.orShareFactor, schottky: schottkyAt(o.devices.schottky ?? DEFAULT_SCHOTTKY, t) } });
  const nominal: Corner = {
    label: `${round(o.supplyVolts)} V, 25 °C, nominal parts`,
    env: { vccVolts: o.supplyVolts, dev: devicesAt(o.devices, 25), orShareFactor: o.orShareFactor, schottky: schottkyAt(o.devices.schottky ?? DEFAULT_SCHOTTKY, 25) },
  };
  return { corners, nominal };
}

const timingEnvCache = new WeakMap<CellEnv, CellEnv>();

/** The environment with the models' typical junction drops, for switching times. */
export function timingEnv(env: CellEnv, o: ResolvedOptions): CellEnv {
  const hit = timingEnvCache.get(env);
  if (hit) return hit;
  const t = typicalDrops(o.devices.diode.params, o.devices.npn.params, env.dev.tempC, o.devices.junctionTempCoVoltsPerC);
  const out: CellEnv = { ...env, dev: { ...env.dev, ...t } };
  timingEnvCache.set(env, out);
  return out;
}

function round(x: number): string {
  return Number(x.toPrecision(4)).toString();
}

/** How loads and drives are found while one cell kind is being evaluated. */
export interface EvalContext {
  opts: ResolvedOptions;
  corners: Corner[];
  nominal: Corner;
  tol: number;
  /** Worst low-state current of one diode-AND load of kind `cellId` at corner `c`; `self` are the
   *  values of the kind being evaluated (for loads of the same kind). `tol` 0 gives nominal. */
  andLoadAmps(cellId: string, c: number, self: { def: CellDefinition; values: CellValues }, tol: number, env: CellEnv): number;
  /** Clamp level of diode-OR inputs at an environment. */
  orClampVolts(env: CellEnv): number;
  /** Source resistance per diode-OR load seen by an OR-input cell, tolerance included: from the
   *  shared R_C (uniform) or a contract (per gate). */
  orSourceOhms(s: Situation, values: CellValues, tol: number, env: CellEnv): number;
  /** Strongest single-load source (for stresses). */
  orSourceMinOhms(values: CellValues, tol: number): number;
  /** Cap on this kind's input current per corner (contract), if any. */
  inputCurrentCap?: (c: number) => number;
  /** Largest per-load source resistance this kind may present to diode-OR loads (contract). */
  orDriveCapOhms?: number;
  /** Heaviest diode-AND load current per corner (for the max fan-out figure). */
  heaviestLoadAmps(c: number): number;
  /** Delay budget per gate (from the gate or path budget). */
  gateDelayMaxSeconds?: number;
  /** Constraints left out (to find which one blocks an infeasible request). */
  disabled?: ReadonlySet<number>;
  /** Collector resistor of the wired-AND nets (nominal): the shared R_C of a uniform design, the
   *  one every wired net keeps in a per-gate design. Absent: the evaluated cell's own R_C. */
  wiredRcOhms?: number;
  /** Fast variants: the highest low level a driver gives when the drivers may be clamped cells
   *  (V_BE − V_F of the Schottky clamp; absent: V_CE(sat)). */
  driverLowVolts?: (env: CellEnv) => number;
  /** Fast variants: what the loads' speed-up capacitors add to a situation's output: charge
   *  sunk on the fall (diode-AND loads) and capacitance (diode-OR loads). */
  loadSpeedUp?: (s: Situation, env: CellEnv) => { chargeCoulombs: number; farads: number };
}

export interface TypeEval {
  /** Smallest relative margin per constraint (Infinity when not checked). */
  margins: Float64Array;
  /** Σ count × worst-case power over the situations. */
  objectiveWatts: number;
}

function loadFor(ctx: EvalContext, s: Situation, def: CellDefinition, values: CellValues, c: number, env: CellEnv, tol: number): OutputLoad {
  let sink = 0;
  for (const [id, n] of s.andLoadsByType) sink += n * ctx.andLoadAmps(id, c, { def, values }, tol, env);
  const cjo = ctx.opts.devices.diode.params.CJO ?? 0;
  const load: OutputLoad = {
    andLoads: s.andLoads,
    andSinkAmps: sink,
    orLoads: s.orLoads,
    orClampVolts: ctx.orClampVolts(env),
    capacitanceFarads: s.loadPins * (cjo + ctx.opts.wiringCapacitancePerLoadFarads) + Math.max(s.andLoads + s.orLoads - s.loadPins, 0) * ctx.opts.wiringCapacitancePerLoadFarads,
  };
  if (s.tiedCollectors > 0) load.tiedCollectors = s.tiedCollectors;
  // Diode-OR loads conduct while the output is high; only diode-AND loads' input diodes are
  // reverse-biased across the fall, so the split is made when the loads are all diode-AND.
  if (s.orLoads === 0 && cjo > 0) load.andDiodeFarads = s.loadPins * cjo;
  if (ctx.loadSpeedUp) {
    const su = ctx.loadSpeedUp(s, env);
    load.capacitanceFarads += su.farads;
    if (su.chargeCoulombs > 0) load.speedUpChargeCoulombs = su.chargeCoulombs;
  }
  return load;
}

/** Current a wired net's R_C carries when the net is high besides diode-OR loads: `collectors`
 *  off transistors leaking I_CBO (bases held off through R_B) and `andLoads` reverse-biased input
 *  diodes, at the corner's temperature (src/electrical/leakage.ts). */
export function wiredHighLeakageAmps(ctx: EvalContext, env: CellEnv, collectors: number, andLoads: number): number {
  const dev = ctx.opts.devices;
  return collectors * collectorLeakageAmps(dev.npn.params, env.dev.tempC) + andLoads * diodeReverseLeakageAmps(dev.diode.params, env.dev.tempC);
}

function driveFor(ctx: EvalContext, s: Situation, values: CellValues, env: CellEnv, tol: number): InputDrive {
  const clamp = ctx.orClampVolts(env);
  let vHigh = s.inputsSeeOrClamp ? Math.min(env.vccVolts, clamp) : env.vccVolts;
  // An input on a wired net: the net's high level droops by the leakage through its R_C (at
  // its high end), and a diode-OR input gets that much less of R_C's current.
  let leak = 0;
  if (s.inputWiredCollectors > 1) {
    const rc = (ctx.wiredRcOhms ?? values.rcOhms ?? 0) * (1 + tol);
    leak = wiredHighLeakageAmps(ctx, env, s.inputWiredCollectors, s.inputWiredAndLoads);
    vHigh = Math.min(vHigh, env.vccVolts - leak * rc);
  }
  if (s.def.inputKind !== "or") {
    // The driver's R_C at its high end: orSourceMinOhms gives it at its low end.
    const andSourceOhms = (ctx.orSourceMinOhms(values, tol) * (1 + tol)) / Math.max(1e-9, 1 - tol);
    return { vLowMaxVolts: ctx.driverLowVolts?.(env) ?? env.dev.vCESatVolts, vHighMinVolts: vHigh, orSourceAmps: 0, orSourceOhms: Infinity, orSourceMaxAmps: 0, andSourceOhms };
  }
  const rs = ctx.orSourceOhms(s, values, tol, env);
  const rsMin = ctx.orSourceMinOhms(values, tol);
  return {
    vLowMaxVolts: ctx.driverLowVolts?.(env) ?? env.dev.vCESatVolts,
    vHighMinVolts: vHigh,
    orSourceAmps: Math.max(0, Math.max(0, env.vccVolts - clamp) / rs - leak),
    orSourceOhms: rs,
    orSourceMaxAmps: Math.max(0, env.vccVolts - clamp) / rsMin,
  };
}

/** A cell's analysis at one point, corrected for its place on a wired net (if any). */
function analyzeAt(ctx: EvalContext, s: Situation, v: CellValues, env: CellEnv, load: OutputLoad, drive: InputDrive): CellOperatingPoint {
  const op = s.def.analyze(v, env, load, drive);
  if (s.tiedCollectors === 0 && s.ownsPullUp) return op;
  const collectors = s.tiedCollectors + 1;
  const leak = s.tiedCollectors > 0 ? wiredHighLeakageAmps(ctx, env, collectors, s.andLoads) : 0;
  return onWiredNet(op, env, load, v.rcOhms!, { ownsPullUp: s.ownsPullUp, collectors, highLeakageAmps: leak });
}

function scaled(values: CellValues, factors: Record<string, number>, out: CellValues): CellValues {
  for (const k in values) out[k] = values[k]! * (factors[k] ?? 1);
  return out;
}

type ToleranceCase = { label: string; factors: Record<string, number>; skipTiming?: boolean; scratch: CellValues };
const caseCache = new WeakMap<CellDefinition, Map<number, ToleranceCase[]>>();

/** The cell's tolerance cases, built once per cell and tolerance (each with a scratch record). */
function casesOf(def: CellDefinition, tol: number): ToleranceCase[] {
  let m = caseCache.get(def);
  if (!m) {
    m = new Map();
    caseCache.set(def, m);
  }
  let cs = m.get(tol);
  if (!cs) {
    cs = def.toleranceCases(tol).map((c) => ({ ...c, scratch: {} }));
    m.set(tol, cs);
  }
  return cs;
}

function margin(value: number, limit: number, sense: "min" | "max"): number {
  const d = Math.abs(limit) > 0 ? Math.abs(limit) : 1;
  return sense === "min" ? (value - limit) / d : (limit - value) / d;
}

interface Tracker {
  margin: Float64Array;
  value: Float64Array;
  limit: Float64Array;
  corner: string[];
}

type Note = (i: number, value: number, limit: number) => void;

/** The static checks of one operating point (one corner, one tolerance case), in a fixed order;
 *  returns its worst-case power. */
function checkPoint(op: CellOperatingPoint, env: CellEnv, o: ResolvedOptions, clampBound: number, note: Note): number {
  note(CI.saturation, op.satMargin, o.saturationMarginMin);
  note(CI["noise-margin-low"], op.noiseMarginLowVolts, o.noiseMarginMinVolts);
  note(CI["noise-margin-high"], op.noiseMarginHighVolts, o.noiseMarginMinVolts);
  if (o.collectorCurrentMinAmps > 0) note(CI["collector-current"], op.iCAmps, o.collectorCurrentMinAmps);
  // A clamped output's low level rises with its current (V_BE − V_F); its loads take their
  // low-state margins against the level at the bound current (clampedLowVolts), so the cell
  // keeps its sink current within that bound.
  if (clampBound > 0) note(CI["clamp-current"], op.iCAmps + op.iLoadAmps, clampBound);
  if (o.turnOffRatioMin > 0) {
    const ratio = op.iCAmps > 0 ? (op.iTurnOffAmps * env.dev.betaMin) / op.iCAmps : Infinity;
    note(CI["turn-off-current"], ratio, o.turnOffRatioMin);
  }
  const p = Math.max(op.powerLowWatts, op.powerHighWatts);
  if (o.powerCeilingWatts !== undefined) note(CI["power-ceiling"], p, o.powerCeilingWatts);
  return p;
}

/** Switching times of one situation at one corner with the scaled values `v`, at the typical
 *  junction drops of the models (see typicalDrops). */
function timingAt(ctx: EvalContext, s: Situation, def: CellDefinition, values: CellValues, v: CellValues, c: number, env: CellEnv): CellTiming {
  const o = ctx.opts;
  const tenv = timingEnv(env, o);
  const tload = loadFor(ctx, s, def, values, c, tenv, ctx.tol);
  const tdrive = driveFor(ctx, s, values, tenv, ctx.tol);
  const top = analyzeAt(ctx, s, v, tenv, tload, tdrive);
  const ti: TimingInputs = { def, values: v, env: tenv, load: tload, drive: tdrive, op: top, npn: o.devices.npn.params, diode: o.devices.diode.params, fanin: s.fanin, inputWiringFarads: o.wiringCapacitancePerLoadFarads, schottky: (o.devices.schottky ?? DEFAULT_SCHOTTKY).card.params };
  return cellTiming(ti);
}

/** Source resistance each diode-OR load of situation `s` sees from this cell's shared R_C (at its
 *  high end, shared among the loads). */
function orDriveOhms(ctx: EvalContext, s: Situation, values: CellValues): number {
  return (values.rcOhms! * (1 + ctx.tol) * s.orLoads) / shareFactor(ctx.corners[0]!.env, s.orLoads);
}

/** Evaluates one situation. With `detail`, also returns the analysis for the report. */
export function evaluateSituation(
  s: Situation,
  values: CellValues,
  ctx: EvalContext,
  margins: Float64Array,
  detail: boolean,
): { worstWatts: number; analysis?: CellAnalysis; stresses?: Map<string, ComponentStress> } {
  const def = s.def;
  const o = ctx.opts;
  const cases = casesOf(def, ctx.tol);
  let worstWatts = 0;
  // Worst value per constraint (for detail), starting at the best possible.
  const tr: Tracker | undefined = detail
    ? { margin: new Float64Array(NC).fill(Infinity), value: new Float64Array(NC), limit: new Float64Array(NC), corner: new Array<string>(NC).fill("") }
    : undefined;
  // Where the worst value of each constraint occurs: corner index and case index (−1: none).
  let cornerNow = 0;
  let caseNow = -1;
  const disabled = ctx.disabled;
  const note = (i: number, value: number, limit: number): void => {
    if (disabled !== undefined && disabled.has(i)) return;
    const m = margin(value, limit, CONSTRAINTS[i]!.sense);
    if (m < margins[i]!) margins[i] = m;
    if (tr && m < tr.margin[i]!) {
      tr.margin[i] = m;
      tr.value[i] = value;
      tr.limit[i] = limit;
      const cl = ctx.corners[cornerNow]!.label;
      tr.corner[i] = caseNow >= 0 ? `${cl}, ${cases[caseNow]!.label}` : `${cl}, resistors low`;
    }
  };
  // Worst figures for the analysis.
  const w = detail
    ? {
        iB: Infinity, iC: Infinity, iLoad: 0, sat: Infinity, betaNeeded: 0, vOL: 0, vOH: Infinity, vIL: Infinity, vIH: 0,
        nmL: Infinity, nmH: Infinity, pLow: 0, pHigh: 0, iSupply: 0, maxFanout: Infinity,
        tPHL: 0, tPLH: 0, ts: 0, ton: 0, tr: 0, cap: 0, leak: 0,
      }
    : undefined;
  const stresses = detail ? new Map<string, ComponentStress>() : undefined;
  const delayMax = ctx.gateDelayMaxSeconds;
  const needTiming = delayMax !== undefined || detail;
  const clampBound = def.speedUp?.clamp ? clampBoundAmps(ctx.corners[0]!.env) : 0;

  for (let c = 0; c < ctx.corners.length; c++) {
    const corner = ctx.corners[c]!;
    const env = corner.env;
    const load = loadFor(ctx, s, def, values, c, env, ctx.tol);
    const drive = driveFor(ctx, s, values, env, ctx.tol);
    cornerNow = c;
    caseNow = -1;
    const capCurrent = ctx.inputCurrentCap?.(c);
    if (capCurrent !== undefined) {
      note(CI["input-current"], def.inputLowAmpsWorst(values, ctx.tol, env), capCurrent);
    }
    for (let k = 0; k < cases.length; k++) {
      const tc = cases[k]!;
      caseNow = k;
      const v = scaled(values, tc.factors, detail ? {} : tc.scratch);
      const op = analyzeAt(ctx, s, v, env, load, drive);
      const p = checkPoint(op, env, o, clampBound, note);
      if (p > worstWatts) worstWatts = p;
      let timing: CellTiming | undefined;
      if (needTiming && !(tc.skipTiming && !detail)) {
        timing = timingAt(ctx, s, def, values, v, c, env);
        if (delayMax !== undefined) {
          note(CI["delay-fall"], timing.tPHLSeconds, delayMax);
          note(CI["delay-rise"], timing.tPLHSeconds, delayMax);
        }
      }
      if (w) {
        w.iB = Math.min(w.iB, op.iBAmps);
        w.iC = Math.min(w.iC, op.iCAmps);
        w.iLoad = Math.max(w.iLoad, op.iLoadAmps);
        w.sat = Math.min(w.sat, op.satMargin);
        w.betaNeeded = Math.max(w.betaNeeded, op.betaNeeded);
        w.vOL = Math.max(w.vOL, op.vOLVolts);
        w.vOH = Math.min(w.vOH, op.vOHVolts);
        w.vIL = Math.min(w.vIL, op.vILVolts);
        w.vIH = Math.max(w.vIH, op.vIHVolts);
        w.nmL = Math.min(w.nmL, op.noiseMarginLowVolts);
        w.nmH = Math.min(w.nmH, op.noiseMarginHighVolts);
        w.pLow = Math.max(w.pLow, op.powerLowWatts);
        w.pHigh = Math.max(w.pHigh, op.powerHighWatts);
        w.iSupply = Math.max(w.iSupply, op.supplyCurrentLowAmps, op.supplyCurrentHighAmps);
        w.leak = Math.max(w.leak, op.extra.wiredLeakageAmps ?? 0);
        const heavy = ctx.heaviestLoadAmps(c);
        if (heavy > 0 && op.iBAmps > 0) {
          const own = op.iCAmps;
          const cap = Math.floor(((env.dev.betaMin * op.iBAmps) / o.saturationMarginMin - own) / heavy + 1e-9);
          w.maxFanout = Math.min(w.maxFanout, Math.max(0, cap));
        }
        if (timing) {
          w.tPHL = Math.max(w.tPHL, timing.tPHLSeconds);
          w.tPLH = Math.max(w.tPLH, timing.tPLHSeconds);
          w.ts = Math.max(w.ts, timing.tStorageSeconds);
          w.ton = Math.max(w.ton, timing.tTurnOnSeconds);
          w.tr = Math.max(w.tr, timing.tRiseSeconds);
          w.cap = Math.max(w.cap, timing.loadCapacitanceFarads);
        }
        for (const st of def.stresses(v, env, load, drive, s.fanin)) {
          const prev = stresses!.get(st.name);
          if (!prev) stresses!.set(st.name, { ...st });
          else {
            prev.powerWatts = Math.max(prev.powerWatts, st.powerWatts);
            if (st.currentAmps !== undefined) prev.currentAmps = Math.max(prev.currentAmps ?? 0, st.currentAmps);
            if (st.voltageVolts !== undefined) prev.voltageVolts = Math.max(prev.voltageVolts ?? 0, st.voltageVolts);
          }
        }
      }
    }
  }
  if (ctx.orDriveCapOhms !== undefined && s.orLoads > 0) {
    const rs = orDriveOhms(ctx, s, values);
    cornerNow = 0;
    caseNow = -1;
    note(CI["or-drive"], rs, ctx.orDriveCapOhms);
  }
  if (!detail || !w || !tr) return { worstWatts };

  // Nominal point: nominal supply, 25 °C, nominal resistors, loads at nominal.
  const nenv = ctx.nominal.env;
  const nload = loadFor(ctx, s, def, values, -1, nenv, 0);
  const ndrive = driveFor(ctx, s, values, nenv, 0);
  const nop = analyzeAt(ctx, s, values, nenv, nload, ndrive);
  const nominal: OperatingFigures = {
    vccVolts: nop.vccVolts,
    tempC: nop.tempC,
    i1Amps: nop.i1Amps,
    i2Amps: nop.i2Amps,
    iBAmps: nop.iBAmps,
    iCAmps: nop.iCAmps,
    iLoadAmps: nop.iLoadAmps,
    betaNeeded: nop.betaNeeded,
    satMargin: nop.satMargin,
    vOLVolts: nop.vOLVolts,
    vOHVolts: nop.vOHVolts,
    vILVolts: nop.vILVolts,
    vIHVolts: nop.vIHVolts,
    noiseMarginLowVolts: nop.noiseMarginLowVolts,
    noiseMarginHighVolts: nop.noiseMarginHighVolts,
    powerLowWatts: nop.powerLowWatts,
    powerHighWatts: nop.powerHighWatts,
    supplyCurrentLowAmps: nop.supplyCurrentLowAmps,
    supplyCurrentHighAmps: nop.supplyCurrentHighAmps,
    extra: { ...nop.extra },
  };
  const constraints: ConstraintResult[] = [];
  for (let i = 0; i < NC; i++) {
    const spec = CONSTRAINTS[i]!;
    if (!Number.isFinite(tr.margin[i]!)) continue;
    const m = tr.margin[i]!;
    constraints.push({
      id: spec.id,
      label: spec.label,
      value: tr.value[i]!,
      limit: tr.limit[i]!,
      unit: spec.unit,
      sense: spec.sense,
      margin: m,
      ok: m >= -1e-12,
      corner: tr.corner[i]!,
    });
  }
  let binding = constraints[0];
  for (const c of constraints) if (!binding || c.margin < binding.margin) binding = c;
  const analysis: CellAnalysis = {
    iBAmps: w.iB,
    iCAmps: w.iC,
    iLoadAmps: w.iLoad,
    satMargin: w.sat,
    betaNeeded: w.betaNeeded,
    fanout: s.andLoads + s.orLoads,
    andLoads: s.andLoads,
    orLoads: s.orLoads,
    maxFanout: Number.isFinite(w.maxFanout) ? w.maxFanout : 0,
    vOLVolts: w.vOL,
    vOHVolts: w.vOH,
    vILVolts: w.vIL,
    vIHVolts: w.vIH,
    noiseMarginLowVolts: w.nmL,
    noiseMarginHighVolts: w.nmH,
    powerLowWatts: w.pLow,
    powerHighWatts: w.pHigh,
    supplyCurrentAmps: w.iSupply,
    timing: {
      tPHLSeconds: w.tPHL,
      tPLHSeconds: w.tPLH,
      tStorageSeconds: w.ts,
      tTurnOnSeconds: w.ton,
      tRiseSeconds: w.tr,
      loadCapacitanceFarads: w.cap,
    },
    nominal,
    constraints,
    binding: binding?.id ?? "",
    bindingMargin: binding?.margin ?? Infinity,
  };
  if (s.tiedCollectors > 0 || !s.ownsPullUp) analysis.wired = { collectors: s.tiedCollectors + 1, ownsPullUp: s.ownsPullUp, highLeakageAmps: w.leak };
  return { worstWatts, analysis, stresses };
}

/** What evaluateType works through for one list of situations: the reduced set, the situations
 *  to evaluate (the constraint set, then each power class's situation not in it), the power
 *  classes' places in that list, and the cell kind when every situation has the same one. */
interface TypePlan {
  set: SituationSet;
  list: Situation[];
  powerAt: number[];
  def: CellDefinition | undefined;
}

const planCache = new WeakMap<readonly Situation[], TypePlan>();

function planOf(situations: readonly Situation[]): TypePlan {
  let plan = planCache.get(situations);
  if (plan) return plan;
  const set = reduceSituations(situations);
  const list: Situation[] = [...set.constraint];
  const at = new Map<Situation, number>();
  list.forEach((s, i) => at.set(s, i));
  const powerAt: number[] = [];
  for (const g of set.power) {
    let i = at.get(g.situation);
    if (i === undefined) {
      // A power class's situation outside the constraint set is evaluated on its own, once for
      // each class it stands for (as many times as it is met).
      i = list.length;
      list.push(g.situation);
    }
    powerAt.push(i);
  }
  const def = list.length > 0 && list.every((s) => s.def === list[0]!.def) ? list[0]!.def : undefined;
  plan = { set, list, powerAt, def };
  planCache.set(situations, plan);
  return plan;
}

/** evaluateSituation without the detail, for several situations of one cell kind at once: the
 *  same checks, corner by corner and tolerance case by tolerance case, each case's values
 *  scaled once for all the situations. Margins are minima and powers maxima, so the order of the
 *  checks does not change them. `watts[j]` gets situation j's worst-case power. */
function evaluateKind(list: readonly Situation[], def: CellDefinition, values: CellValues, ctx: EvalContext, margins: Float64Array, watts: Float64Array): void {
  const o = ctx.opts;
  const cases = casesOf(def, ctx.tol);
  const disabled = ctx.disabled;
  const note: Note = (i, value, limit) => {
    if (disabled !== undefined && disabled.has(i)) return;
    const m = margin(value, limit, CONSTRAINTS[i]!.sense);
    if (m < margins[i]!) margins[i] = m;
  };
  const delayMax = ctx.gateDelayMaxSeconds;
  const clampBound = def.speedUp?.clamp ? clampBoundAmps(ctx.corners[0]!.env) : 0;
  const ns = list.length;
  const loads: OutputLoad[] = new Array<OutputLoad>(ns);
  const drives: InputDrive[] = new Array<InputDrive>(ns);
  watts.fill(0);
  for (let c = 0; c < ctx.corners.length; c++) {
    const env = ctx.corners[c]!.env;
    for (let j = 0; j < ns; j++) {
      const s = list[j]!;
      loads[j] = loadFor(ctx, s, def, values, c, env, ctx.tol);
      drives[j] = driveFor(ctx, s, values, env, ctx.tol);
    }
    const capCurrent = ctx.inputCurrentCap?.(c);
    if (capCurrent !== undefined && ns > 0) note(CI["input-current"], def.inputLowAmpsWorst(values, ctx.tol, env), capCurrent);
    for (let k = 0; k < cases.length; k++) {
      const tc = cases[k]!;
      const v = scaled(values, tc.factors, tc.scratch);
      const timed = delayMax !== undefined && !tc.skipTiming;
      for (let j = 0; j < ns; j++) {
        const op = analyzeAt(ctx, list[j]!, v, env, loads[j]!, drives[j]!);
        const p = checkPoint(op, env, o, clampBound, note);
        if (p > watts[j]!) watts[j] = p;
        if (timed) {
          const timing = timingAt(ctx, list[j]!, def, values, v, c, env);
          note(CI["delay-fall"], timing.tPHLSeconds, delayMax);
          note(CI["delay-rise"], timing.tPLHSeconds, delayMax);
        }
      }
    }
  }
  if (ctx.orDriveCapOhms !== undefined) {
    for (const s of list) {
      if (s.orLoads === 0) continue;
      const rs = orDriveOhms(ctx, s, values);
      note(CI["or-drive"], rs, ctx.orDriveCapOhms);
    }
  }
}

/** Evaluates a cell kind with `values` over its situations: the least margin per constraint and
 *  the count-weighted worst-case power. Dominated situations are skipped (see reduceSituations). */
export function evaluateType(situations: readonly Situation[], values: CellValues, ctx: EvalContext): TypeEval {
  const plan = planOf(situations);
  const set = plan.set;
  const margins = new Float64Array(NC).fill(Infinity);
  let objective = 0;
  if (plan.def) {
    const watts = new Float64Array(plan.list.length);
    evaluateKind(plan.list, plan.def, values, ctx, margins, watts);
    for (let g = 0; g < set.power.length; g++) objective += watts[plan.powerAt[g]!]! * set.power[g]!.cells;
    return { margins, objectiveWatts: objective };
  }
  const watts = new Map<Situation, number>();
  for (const s of set.constraint) watts.set(s, evaluateSituation(s, values, ctx, margins, false).worstWatts);
  for (const g of set.power) {
    const w = watts.get(g.situation) ?? evaluateSituation(g.situation, values, ctx, margins, false).worstWatts;
    objective += w * g.cells;
  }
  return { margins, objectiveWatts: objective };
}

/** Merges analyses of several situations of one cell type into the worst of each figure. */
export function mergeAnalyses(list: CellAnalysis[]): CellAnalysis {
  if (list.length === 1) return list[0]!;
  const first = list[0]!;
  let worstSat = first;
  for (const a of list) if (a.satMargin < worstSat.satMargin) worstSat = a;
  const constraints = new Map<string, ConstraintResult>();
  for (const a of list)
    for (const c of a.constraints) {
      const prev = constraints.get(c.id);
      if (!prev || c.margin < prev.margin) constraints.set(c.id, c);
    }
  const cs = [...constraints.values()];
  let binding = cs[0];
  for (const c of cs) if (!binding || c.margin < binding.margin) binding = c;
  const max = (f: (a: CellAnalysis) => number): number => Math.max(...list.map(f));
  const min = (f: (a: CellAnalysis) => number): number => Math.min(...list.map(f));
  const timing = first.timing
    ? {
        tPHLSeconds: max((a) => a.timing!.tPHLSeconds),
        tPLHSeconds: max((a) => a.timing!.tPLHSeconds),
        tStorageSeconds: max((a) => a.timing!.tStorageSeconds),
        tTurnOnSeconds: max((a) => a.timing!.tTurnOnSeconds),
        tRiseSeconds: max((a) => a.timing!.tRiseSeconds),
        loadCapacitanceFarads: max((a) => a.timing!.loadCapacitanceFarads),
      }
    : undefined;
  const out: CellAnalysis = {
    iBAmps: min((a) => a.iBAmps),
    iCAmps: min((a) => a.iCAmps),
    iLoadAmps: max((a) => a.iLoadAmps),
    satMargin: min((a) => a.satMargin),
    betaNeeded: max((a) => a.betaNeeded),
    fanout: max((a) => a.fanout),
    andLoads: max((a) => a.andLoads),
    orLoads: max((a) => a.orLoads),
    maxFanout: min((a) => a.maxFanout),
    vOLVolts: max((a) => a.vOLVolts),
    vOHVolts: min((a) => a.vOHVolts),
    vILVolts: min((a) => a.vILVolts),
    vIHVolts: max((a) => a.vIHVolts),
    noiseMarginLowVolts: min((a) => a.noiseMarginLowVolts),
    noiseMarginHighVolts: min((a) => a.noiseMarginHighVolts),
    powerLowWatts: max((a) => a.powerLowWatts),
    powerHighWatts: max((a) => a.powerHighWatts),
    supplyCurrentAmps: max((a) => a.supplyCurrentAmps),
    nominal: worstSat.nominal,
    constraints: cs,
    binding: binding?.id ?? "",
    bindingMargin: binding?.margin ?? Infinity,
  };
  if (timing) out.timing = timing;
  const wired = list.filter((a) => a.wired).map((a) => a.wired!);
  if (wired.length) out.wired = { collectors: Math.max(...wired.map((x) => x.collectors)), ownsPullUp: wired.every((x) => x.ownsPullUp), highLeakageAmps: Math.max(...wired.map((x) => x.highLeakageAmps)) };
  return out;
}
