// sizeDesign: from a cell netlist to a sized design. Worst case over supply, temperature and
// resistor tolerance; standard values from an IEC 60063 series; the least worst-case power that
// meets every constraint; stable designators. Pure: no files, no console, never throws for the
// user's mistakes.
import { basicCellFor, cellById, CELLS, fastVariantsOf, variantsFor } from "../cells/registry.js";
import { CAPACITOR_KEY, CAPACITOR_TOLERANCE_KEY, CAPACITOR_VOLTAGE_RATINGS, capacitorVoltageRating, clampedLowVolts, inputNodeOnVolts } from "../cells/fast-kit/index.js";
import { DEFAULT_SCHOTTKY } from "./devices.js";
import { openCollectorTopology, shareFactor } from "../cells/output-stage.js";
import type { CellDefinition, CellEnv, CellTopology, CellValues, ComponentStress } from "../cells/types.js";
import { diag, type Diagnostic, type StageResult } from "../diagnostics/index.js";
import type { CellNetlist } from "../map/types.js";
import { formatFarads, formatOhms, seriesMantissas, valuesInRange } from "./eseries.js";
import {
  buildCorners,
  CI,
  CONSTRAINTS,
  evaluateSituation,
  evaluateType,
  mergeAnalyses,
  NC,
  type Corner,
  type EvalContext,
} from "./evaluate.js";
import { resolveOptions, DEFAULTS, type ResolvedOptions } from "./options.js";
import { baseHeldOff } from "./leakage.js";
import { chooseResistorRating, formatRating } from "./ratings.js";
import { chooseFree, closestOf, coarseStep, lowerBoundWatts, maxRcOhms, searchCell, type Closest, type SearchSpec } from "./search.js";
import { buildSituations, type Situation } from "./situations.js";
import type {
  CellAnalysis,
  Component,
  PathTiming,
  SizedCellType,
  SizedDesign,
  SizedInstance,
  SizingOptions,
} from "./types.js";

export type { SizedDesign, SizingOptions } from "./types.js";

interface Failure {
  def: CellDefinition;
  situation?: Situation;
  closest?: Closest;
  reason?: string;
}

interface Sized {
  /** Values per situation index. */
  valuesBySituation: CellValues[];
  situations: Situation[];
  byCell: number[];
  /** Context used to evaluate each situation in detail. */
  ctxFor: (s: Situation) => EvalContext;
  heaviestLoadAmps: (c: number) => number;
  /** Shared collector resistor of a uniform design. */
  sharedRcOhms?: number;
}

type Outcome = { ok: true; sized: Sized } | { ok: false; failure: Failure };

const RELAX: Record<string, string> = {
  saturation:
    "more transistor gain (--beta-min or a better part), a lower fan-out (buffer the heaviest nets), the high-fan-out variant, a narrower temperature range, or a smaller required saturation margin",
  "noise-margin-low":
    "a narrower temperature range (junction drops fall about 2 mV/°C when hot) or a smaller required noise margin",
  "noise-margin-high":
    "fewer diode-OR loads per net, more gain, or a smaller required noise margin",
  "collector-current": "a lower speed floor (least collector current) or a wider allowed resistor range",
  "turn-off-current": "a smaller turn-off ratio, more gain, or a delay budget instead of the speed floor",
  "power-ceiling": "a higher power ceiling, a lower supply, or a lower fan-out",
  "input-current": "the basic cell's pull-up allowing a heavier load, or fewer high-fan-out cells",
  "or-drive": "fewer diode-OR loads per net",
  "delay-fall": "a slower budget (longer delay or lower clock), less wiring capacitance, or a lower fan-out",
  "delay-rise": "a slower budget (longer delay or lower clock), less wiring capacitance, or a lower fan-out",
  "clamp-current": "a lower fan-out (buffer the heaviest nets), a higher least resistor value, or a transistor with a higher knee current (IKF)",
};

function labelOf(id: string): string {
  return CONSTRAINTS.find((c) => c.id === id)?.label ?? id;
}

function clampVoltsFor(env: CellEnv): number {
  const or = CELLS.find((d) => d.inputKind === "or" && d.inputClampVolts);
  return or?.inputClampVolts ? or.inputClampVolts(env) : env.vccVolts;
}

function uniqueDefs(situations: readonly Situation[]): CellDefinition[] {
  const out: CellDefinition[] = [];
  for (const s of situations) if (!out.includes(s.def)) out.push(s.def);
  // Basic diode-AND kinds first (others' loads), then diode-OR, then variants.
  const rank = (d: CellDefinition): number => (isFanoutVariant(d) ? 2 : d.inputKind === "and" ? 0 : 1);
  return out.sort((a, b) => rank(a) - rank(b) || CELLS.indexOf(a) - CELLS.indexOf(b));
}

// ---------------------------------------------------------------------------------------------
// Uniform sizing

interface UniformEnv {
  o: ResolvedOptions;
  corners: Corner[];
  nominal: Corner;
  grid: number[];
  gateDelayMaxSeconds?: number;
  disabled?: ReadonlySet<number>;
  /** False: size without the wired-AND terms (to tell whether they block; see explainFailure). */
  wired?: boolean;
  /** Fast variants in place of the basic cells, and the speed-up capacitor (absent: basic). */
  plan?: VariantPlan;
  /** SizingOptions.quickFailure: report a failure without searching for what blocks it. */
  quick?: boolean;
  /** SizingOptions.fullSearch: no blockedKind shortcut. */
  fullSearch?: boolean;
}

// ---------------------------------------------------------------------------------------------
// Fast variants (speed-up capacitor, Schottky clamp, both: src/cells/fast-kit). A plan says which
// variant replaces each base cell everywhere in the design, and the capacitor's one value (one
// value for the whole design: fewest distinct parts).

interface VariantPlan {
  /** Base cell id → the cell used in its place. */
  byBase: Map<string, CellDefinition>;
  capFarads?: number;
  capTolerance: number;
  /** Parts of the whole design under the plan (before any high-fan-out promotion). */
  parts: number;
}

/** The cell used in place of `def` under the plan of `u`. */
function planned(u: UniformEnv, def: CellDefinition): CellDefinition {
  return u.plan?.byBase.get(def.id) ?? def;
}

/** The high-fan-out family: sized after the primary cells, given their shared R_C. */
function isFanoutVariant(d: CellDefinition): boolean {
  return d.variant.startsWith("high-fanout");
}

/** Values a plan fixes for a cell kind: the speed-up capacitor and its tolerance. */
function capFixed(u: UniformEnv, d: CellDefinition): CellValues {
  if (!d.speedUp?.capacitorKey || u.plan?.capFarads === undefined) return {};
  return { [CAPACITOR_KEY]: u.plan.capFarads, [CAPACITOR_TOLERANCE_KEY]: u.plan.capTolerance };
}

/** What a plan's cells change for their neighbours: a clamped driver's higher low level (every
 *  driver is taken as possibly clamped: conservative), and the loads' speed-up capacitors. */
function applyPlanHooks(ctx: EvalContext, u: UniformEnv): void {
  const plan = u.plan;
  if (!plan) return;
  const used = [...plan.byBase.values()];
  if (used.some((d) => d.speedUp?.clamp)) ctx.driverLowVolts = clampedLowVolts;
  const c = plan.capFarads;
  if (c === undefined || !used.some((d) => d.speedUp?.capacitorKey)) return;
  const high = c * (1 + plan.capTolerance);
  const orCaps = used.some((d) => d.inputKind === "or" && d.speedUp?.capacitorKey);
  ctx.loadSpeedUp = (s, env) => {
    let q = 0;
    for (const [id, n] of s.andLoadsByType) {
      const d = cellById(id);
      if (d?.speedUp?.capacitorKey) q += n * high * Math.max(0, inputNodeOnVolts(d, env) - env.dev.vCESatVolts - env.dev.vDiodeOnVolts);
    }
    return { chargeCoulombs: q, farads: orCaps ? s.orLoads * high : 0 };
  };
}

function makeUniformCtx(
  u: UniformEnv,
  self: CellDefinition,
  chosen: Map<string, CellValues>,
  provisional: Map<string, CellValues>,
  opts: { sharedRcOhms?: number; cap?: boolean },
): EvalContext {
  const tol = u.o.resistorTolerance;
  const basicOf = (id: string): CellDefinition | undefined => {
    const d = cellById(id);
    return d ? planned(u, basicCellFor(d.fn)) : undefined;
  };
  const loadAmps = (id: string, selfNow: { def: CellDefinition; values: CellValues }, t: number, env: CellEnv): number => {
    if (id === selfNow.def.id) return selfNow.def.inputLowAmpsWorst(selfNow.values, t, env);
    const d = cellById(id)!;
    const v = chosen.get(id);
    if (v) return d.inputLowAmpsWorst(v, t, env);
    // Not sized yet: a variant is capped at its basic cell's input current.
    const b = basicOf(id);
    if (b && b.id !== id) {
      if (b.id === selfNow.def.id) return b.inputLowAmpsWorst(selfNow.values, t, env);
      const bv = chosen.get(b.id);
      if (bv) return b.inputLowAmpsWorst(bv, t, env);
    }
    const pv = provisional.get(id) ?? d.exampleValues;
    return d.inputLowAmpsWorst(pv, t, env);
  };
  const ctx: EvalContext = {
    opts: u.o,
    corners: u.corners,
    nominal: u.nominal,
    tol,
    andLoadAmps: (id, _c, s, t, env) => loadAmps(id, s, t, env),
    orClampVolts: clampVoltsFor,
    orSourceOhms: (s, values, t, env) => {
      const n = Math.max(1, s.orDriveLoads);
      const rc = opts.sharedRcOhms ?? values.rcOhms!;
      return (rc * (1 + t) * n) / shareFactor(env, n);
    },
    orSourceMinOhms: (values, t) => (opts.sharedRcOhms ?? values.rcOhms!) * (1 - t),
    heaviestLoadAmps: () => 0,
  };
  if (u.gateDelayMaxSeconds !== undefined) ctx.gateDelayMaxSeconds = u.gateDelayMaxSeconds;
  if (u.disabled) ctx.disabled = u.disabled;
  if (opts.sharedRcOhms !== undefined) ctx.wiredRcOhms = opts.sharedRcOhms;
  applyPlanHooks(ctx, u);
  if (opts.cap && self !== planned(u, basicCellFor(self.fn))) {
    const b = planned(u, basicCellFor(self.fn));
    const bv = chosen.get(b.id);
    if (bv) ctx.inputCurrentCap = (c) => b.inputLowAmpsWorst(bv, tol, u.corners[c]!.env);
  }
  return ctx;
}

/** The grouped load situations sizeUniform works on. */
function uniformSituations(netlist: CellNetlist, defs: readonly CellDefinition[], u: UniformEnv): { situations: Situation[]; byCell: number[] } {
  return buildSituations(netlist, defs, { group: true, ...(u.o.fanoutOverride !== undefined ? { fanoutOverride: u.o.fanoutOverride } : {}), ...(u.wired === false ? { wired: false } : {}) });
}

/** Candidates blockedKind judges with the other kinds sized (a search of each kind before it
 *  at each candidate's R_C). */
const BLOCKED_CANDIDATES_JUDGED = 8;

/** A basic kind that no shared R_C lets be sized, found with one search instead of one search of
 *  every kind at each R_C (sizeUniform's stage A, which on a large mixed design that cannot be
 *  sized takes most of the failure's time).
 *
 *  The kind is searched over R_C as well, with the other kinds' diode-AND loads drawing no
 *  current. Their current only adds to what the kind's transistor sinks, and that makes each
 *  static constraint harder, never easier: the saturation margin β_min·I_B/(I_C + I_load), the
 *  low output level, the base drive a diode-OR input needs (src/cells/nand, src/cells/nor). So a
 *  kind that fails here fails at every R_C with any values of the other kinds. Applied only where
 *  that holds: not with a delay budget (a heavier sink shortens the storage time, so the rise
 *  can get faster), fast variants or wired-AND nets, which the full search handles.
 *
 *  The failure names a candidate the search weighed, as close as the full search's: each is
 *  judged with the other kinds' loads at their provisional values (as stage A takes a kind not
 *  sized yet), and the best one's margins are then worked out at its R_C with those kinds sized
 *  there as stage A sizes them, so the message's shortfall is that of a real candidate. */
function blockedKind(u: UniformEnv, kinds: readonly CellDefinition[], sitsOf: ReadonlyMap<string, Situation[]>, situations: readonly Situation[]): Failure | undefined {
  if (u.gateDelayMaxSeconds !== undefined || u.plan || situations.some((s) => s.tiedCollectors > 0 || !s.ownsPullUp || s.inputWiredCollectors > 1)) return undefined;
  const none = new Map<string, CellValues>();
  for (const [k, d] of kinds.entries()) {
    const ctx = makeUniformCtx(u, d, none, none, {});
    const exact = ctx.andLoadAmps;
    ctx.andLoadAmps = (id, c, self, tol, env) => (id === d.id ? exact(id, c, self, tol, env) : 0);
    const sits = sitsOf.get(d.id)!;
    const r = searchCell({ def: d, situations: sits, ctx, grid: u.grid, fixed: capFixed(u, d), keepCandidates: true });
    if (r.values) continue;
    const failure: Failure = { def: d };
    // Candidates: those the search weighed, and each R_C with the free parameter at either end
    // (where the full search's closest candidates usually lie: a constraint the free parameter
    // cannot mend fails there first). Ranked with the other kinds' loads at their provisional
    // values; the best few are then judged with those kinds sized at their R_C.
    const free = d.freeKey;
    const candidates = [...(r.candidates ?? [])];
    const firstAt = new Map<number, CellValues>();
    for (const v of candidates) if (!firstAt.has(v.rcOhms!)) firstAt.set(v.rcOhms!, v);
    for (const v of firstAt.values()) for (const end of [u.grid[0]!, u.grid[u.grid.length - 1]!]) candidates.push({ ...v, [free]: end });
    const marginAt = (values: CellValues, chosen: Map<string, CellValues>) => closestOf(values, evaluateType(sits, values, makeUniformCtx(u, d, chosen, none, { sharedRcOhms: values.rcOhms! })));
    const ranked = candidates.map((values) => ({ values, margin: marginAt(values, none).worstMargin })).sort((a, b) => b.margin - a.margin);
    const sizedAt = new Map<number, Map<string, CellValues>>();
    for (const { values } of ranked.slice(0, BLOCKED_CANDIDATES_JUDGED)) {
      const rc = values.rcOhms!;
      let chosen = sizedAt.get(rc);
      if (!chosen) {
        // The kinds before this one, sized at this R_C as stage A sizes them (stopping at the
        // first that does not fit, whose loads then count at their provisional values, as there).
        chosen = new Map<string, CellValues>();
        for (const before of kinds.slice(0, k)) {
          const at = searchCell({ def: before, situations: sitsOf.get(before.id)!, ctx: makeUniformCtx(u, before, chosen, none, { sharedRcOhms: rc }), grid: u.grid, fixed: { rcOhms: rc, ...capFixed(u, before) } });
          if (!at.values) break;
          chosen.set(before.id, at.values);
        }
        sizedAt.set(rc, chosen);
      }
      const c = marginAt(values, chosen);
      if (!failure.closest || c.worstMargin > failure.closest.worstMargin) failure.closest = c;
    }
    // No candidate to name (the search stopped before weighing one): the full search gives the
    // failure, with the closest candidate it finds.
    return failure.closest && failure.closest.failing.length > 0 ? failure : undefined;
  }
  return undefined;
}

/** `situated`: the situations of these cells under `u` (uniformSituations), when the caller has
 *  them already; they are read, never changed. */
function sizeUniform(netlist: CellNetlist, defs: CellDefinition[], u: UniformEnv, situated?: { situations: Situation[]; byCell: number[] }): Outcome {
  const { situations, byCell } = situated ?? uniformSituations(netlist, defs, u);
  const types = uniqueDefs(situations);
  const sitsOf = new Map<string, Situation[]>();
  for (const s of situations) {
    const list = sitsOf.get(s.def.id);
    if (list) list.push(s);
    else sitsOf.set(s.def.id, [s]);
  }
  const stageA = types.filter((d) => !isFanoutVariant(d));
  const stageB = types.filter((d) => isFanoutVariant(d));
  const grid = u.grid;
  let provisional = new Map<string, CellValues>();
  const blocked = stageA.length > 1 && !u.fullSearch ? blockedKind(u, stageA, sitsOf, situations) : undefined;
  if (blocked) return { ok: false, failure: blocked };

  for (let pass = 0; pass < 3; pass++) {
    // Stage A: shared R_C outermost (high values first), each basic kind searched given it.
    const feasible: { rc: number; chosen: Map<string, CellValues>; intervals: Map<string, [number, number]>; power: number }[] = [];
    let bestPower = Infinity;
    const closestByType = new Map<string, Closest>();
    const rcCap = maxRcOhms(makeUniformCtx(u, types[0]!, new Map(), provisional, {}));
    const tryRc = (rc: number | undefined): boolean => {
      const chosen = new Map<string, CellValues>();
      const intervals = new Map<string, [number, number]>();
      let power = 0;
      for (const d of stageA) {
        const ctx = makeUniformCtx(u, d, chosen, provisional, { sharedRcOhms: rc! });
        const r = searchCell({ def: d, situations: sitsOf.get(d.id)!, ctx, grid, fixed: { rcOhms: rc!, ...capFixed(u, d) } });
        if (!r.values) {
          const prev = closestByType.get(d.id);
          if (r.closest && (!prev || r.closest.worstMargin > prev.worstMargin)) closestByType.set(d.id, r.closest);
          return false;
        }
        chosen.set(d.id, r.values);
        intervals.set(d.id, r.freeInterval!);
        power += r.objectiveWatts!;
      }
      feasible.push({ rc: rc ?? NaN, chosen, intervals, power });
      if (power < bestPower) bestPower = power;
      return true;
    };
    const lbAt = (rc: number): number => {
      let lb = 0;
      for (const d of stageA) lb += lowerBoundWatts(sitsOf.get(d.id)!, rc, makeUniformCtx(u, d, new Map(), provisional, {}));
      return lb;
    };
    if (stageA.length === 0) tryRc(undefined);
    else {
      // Shared R_C from the top (least power): every 8th value first; at the first that fits,
      // the values just above it, then downward until the power bound cuts off.
      const list = [...grid].reverse().filter((rc) => rc <= rcCap);
      const tried = new Set<number>();
      const at = (i: number): boolean => {
        tried.add(i);
        return tryRc(list[i]!);
      };
      let first = -1;
      for (let i = 0; i < list.length; i += coarseStep(list.length)) {
        if (at(i)) {
          first = i;
          break;
        }
      }
      const rest = first < 0 ? list.map((_, i) => i) : [...Array.from({ length: first }, (_, k) => k).filter((i) => i > first - coarseStep(list.length)), ...list.map((_, i) => i).filter((i) => i > first)];
      for (const i of rest) {
        if (tried.has(i)) continue;
        if (i > first && first >= 0 && lbAt(list[i]!) >= bestPower) break;
        at(i);
      }
    }
    if (stageA.length > 0 && feasible.length === 0) {
      // Report the kind that came closest to fitting last (the one that blocked).
      const d = stageA.find((x) => closestByType.has(x.id)) ?? stageA[0]!;
      const f: Failure = { def: d };
      const cl = closestByType.get(d.id);
      if (cl) f.closest = cl;
      return { ok: false, failure: f };
    }
    feasible.sort((a, b) => a.power - b.power);

    // Stage B: variants given the shared R_C, capped at the basic cell's input current.
    let solution: { chosen: Map<string, CellValues>; intervals: Map<string, [number, number]>; rc?: number } | undefined;
    let stageBFailure: Failure | undefined;
    const candidates = stageA.length > 0 ? feasible.slice(0, 4) : [{ rc: NaN, chosen: new Map<string, CellValues>(), intervals: new Map<string, [number, number]>(), power: 0 }];
    for (const cand of candidates) {
      const chosen = new Map(cand.chosen);
      const intervals = new Map(cand.intervals);
      let ok = true;
      let rcShared = Number.isNaN(cand.rc) ? undefined : cand.rc;
      for (const d of stageB) {
        const ctx = makeUniformCtx(u, d, chosen, provisional, { cap: true, ...(rcShared !== undefined ? { sharedRcOhms: rcShared } : {}) });
        const fixed: CellValues = { ...(rcShared !== undefined ? { rcOhms: rcShared } : {}), ...capFixed(u, d) };
        const r = searchCell({ def: d, situations: sitsOf.get(d.id)!, ctx, grid, fixed });
        if (!r.values) {
          ok = false;
          if (!stageBFailure || (r.closest && (stageBFailure.closest?.worstMargin ?? -Infinity) < r.closest.worstMargin)) {
            stageBFailure = { def: d };
            if (r.closest) stageBFailure.closest = r.closest;
          }
          break;
        }
        chosen.set(d.id, r.values);
        intervals.set(d.id, r.freeInterval!);
        if (rcShared === undefined) rcShared = r.values.rcOhms;
      }
      if (ok) {
        solution = { chosen, intervals };
        if (rcShared !== undefined) solution.rc = rcShared;
        break;
      }
    }
    if (!solution) return { ok: false, failure: stageBFailure ?? { def: stageB[0] ?? types[0]! } };

    // Free parameters: best balanced margin inside each feasible interval.
    const final = new Map<string, CellValues>();
    for (const d of types) {
      const ctx = makeUniformCtx(u, d, solution.chosen, provisional, { cap: true, ...(solution.rc !== undefined ? { sharedRcOhms: solution.rc } : {}) });
      const spec: SearchSpec = { def: d, situations: sitsOf.get(d.id)!, ctx, grid, fixed: {} };
      const c = chooseFree(spec, solution.chosen.get(d.id)!, solution.intervals.get(d.id)!);
      final.set(d.id, c.values);
    }
    // Verify every situation with every final value (loads now exact).
    const verifyCtx = (s: Situation): EvalContext => {
      const others = new Map(final);
      const ctx = makeUniformCtx(u, s.def, others, provisional, { cap: true, ...(solution!.rc !== undefined ? { sharedRcOhms: solution!.rc } : {}) });
      return ctx;
    };
    let verified = true;
    for (const s of situations) {
      const m = new Float64Array(NC).fill(Infinity);
      evaluateSituation(s, final.get(s.def.id)!, verifyCtx(s), m, false);
      for (let i = 0; i < NC; i++) if (m[i]! < -1e-9) verified = false;
    }
    if (!verified && pass < 2) {
      provisional = new Map(final);
      continue;
    }
    const heaviest = (c: number): number => {
      let x = 0;
      for (const d of types) if (d.inputKind === "and") x = Math.max(x, d.inputLowAmpsWorst(final.get(d.id)!, u.o.resistorTolerance, u.corners[c]!.env));
      return x;
    };
    const sized: Sized = {
      valuesBySituation: situations.map((s) => final.get(s.def.id)!),
      situations,
      byCell,
      ctxFor: (s) => {
        const ctx = verifyCtx(s);
        ctx.heaviestLoadAmps = heaviest;
        return ctx;
      },
      heaviestLoadAmps: heaviest,
    };
    if (solution.rc !== undefined) sized.sharedRcOhms = solution.rc;
    if (!verified) {
      // Could not make the loads consistent: report as a failure of the first failing kind.
      const s = situations.find((x) => {
        const m = new Float64Array(NC).fill(Infinity);
        evaluateSituation(x, final.get(x.def.id)!, verifyCtx(x), m, false);
        return m.some((y) => y < -1e-9);
      })!;
      return { ok: false, failure: { def: s.def, situation: s, reason: "the loads between cell kinds could not be made consistent" } };
    }
    return { ok: true, sized };
  }
  return { ok: false, failure: { def: types[0]!, reason: "no consistent sizing found" } };
}

// ---------------------------------------------------------------------------------------------
// Per-gate sizing: each situation sized for its own load under contracts taken from the uniform
// solution (no input may load a driver more than the uniform design's heaviest input; no driver
// may feed diode-OR loads through more than the uniform design's source resistance per load).
// Every per-gate problem therefore admits the uniform values, so per-gate is never worse.

function sizePerGate(netlist: CellNetlist, defs: CellDefinition[], u: UniformEnv, uniform: Sized): Sized {
  const tol = u.o.resistorTolerance;
  const corners = u.corners;
  const uSits = uniform.situations;
  const uValues = uniform.valuesBySituation;
  const lStar = (c: number): number => uniform.heaviestLoadAmps(c);
  // Contract on diode-OR drive: the largest per-load source resistance any uniform diode-OR input
  // met (the uniform NOR values were checked against it, and no uniform driver exceeds it).
  let rEqStar: number | undefined;
  for (let i = 0; i < uSits.length; i++) {
    const s = uSits[i]!;
    if (s.def.inputKind !== "or") continue;
    const n = Math.max(1, s.orDriveLoads);
    const rc = uniform.sharedRcOhms ?? uValues[i]!.rcOhms!;
    const r = (rc * (1 + tol) * n) / shareFactor(corners[0]!.env, n);
    rEqStar = rEqStar === undefined ? r : Math.max(rEqStar, r);
  }
  const makeCtx = (): EvalContext => {
    const ctx: EvalContext = {
      opts: u.o,
      corners,
      nominal: u.nominal,
      tol,
      andLoadAmps: (_id, c, _self, t, env) => (c >= 0 && t > 0 ? lStar(c) : nominalLoad(env, t)),
      orClampVolts: clampVoltsFor,
      orSourceOhms: (_s, _values, t) => (t > 0 ? rEqStar ?? Infinity : (rEqStar ?? Infinity) / (1 + tol)),
      orSourceMinOhms: () => (uniform.sharedRcOhms ?? 1000) * (1 - tol),
      inputCurrentCap: lStar,
      heaviestLoadAmps: lStar,
    };
    if (rEqStar !== undefined) ctx.orDriveCapOhms = rEqStar;
    if (u.gateDelayMaxSeconds !== undefined) ctx.gateDelayMaxSeconds = u.gateDelayMaxSeconds;
    if (u.disabled) ctx.disabled = u.disabled;
    if (uniform.sharedRcOhms !== undefined) ctx.wiredRcOhms = uniform.sharedRcOhms;
    applyPlanHooks(ctx, u);
    return ctx;
  };
  // Nominal load for the report's nominal point: the heaviest diode-AND input at nominal values.
  const nominalLoad = (env: CellEnv, t: number): number => {
    let x = 0;
    for (let i = 0; i < uSits.length; i++) {
      const d = uSits[i]!.def;
      if (d.inputKind === "and") x = Math.max(x, d.inputLowAmpsWorst(uValues[i]!, t, env));
    }
    return x;
  };
  const { situations, byCell } = buildSituations(netlist, defs, { group: true, ...(u.o.fanoutOverride !== undefined ? { fanoutOverride: u.o.fanoutOverride } : {}), ...(u.wired === false ? { wired: false } : {}) });
  const valuesBySituation: CellValues[] = [];
  const memo = new Map<string, CellValues>();
  for (const s of situations) {
    // Fan-in and load pins change only capacitances: they matter only under a delay budget.
    const timed = u.gateDelayMaxSeconds !== undefined;
    // Every cell on a wired-AND net keeps the uniform R_C: the net has one collector resistor,
    // and each of its transistors is sized against it (R_P, R_B chosen per gate).
    const onWiredNet = !s.ownsPullUp || s.tiedCollectors > 0;
    const key = [s.def.id, s.andLoads, s.orLoads, s.inputsSeeOrClamp ? 1 : 0, s.orDriveLoads, timed ? s.loadPins : "", timed ? s.fanin : "", onWiredNet ? `w${s.tiedCollectors}` : "", s.inputWiredCollectors, s.inputWiredAndLoads, s.ownsPullUp ? "" : "t"].join("|");
    const hit = memo.get(key);
    if (hit) {
      valuesBySituation.push(hit);
      continue;
    }
    const ctx = makeCtx();
    const ui = uSits.findIndex((x) => x.def.id === s.def.id);
    const fixed: CellValues = { ...(onWiredNet && uniform.sharedRcOhms !== undefined ? { rcOhms: uniform.sharedRcOhms } : {}), ...capFixed(u, s.def) };
    const spec: SearchSpec = { def: s.def, situations: [s], ctx, grid: u.grid, fixed, ...(ui >= 0 ? { initial: uValues[ui]! } : {}) };
    const r = searchCell(spec);
    let values: CellValues;
    if (r.values && r.freeInterval) values = chooseFree(spec, r.values, r.freeInterval).values;
    else {
      // Fall back to the uniform values of this kind (they meet the contracts).
      values = uValues[ui]!;
    }
    memo.set(key, values);
    valuesBySituation.push(values);
  }
  return { valuesBySituation, situations, byCell, ctxFor: () => makeCtx(), heaviestLoadAmps: lStar };
}

// ---------------------------------------------------------------------------------------------
// Forced values (checks against published examples, or a designer's own choice)

function sizeForced(netlist: CellNetlist, defs: CellDefinition[], u: UniformEnv, forced: Record<string, CellValues>): Sized {
  const { situations, byCell } = buildSituations(netlist, defs, { group: true, ...(u.o.fanoutOverride !== undefined ? { fanoutOverride: u.o.fanoutOverride } : {}) });
  const chosen = new Map<string, CellValues>();
  for (const s of situations) chosen.set(s.def.id, forced[s.def.id]!);
  // Drivers of diode-OR loads: the largest R_C given (conservative).
  let rcMax = 0;
  for (const v of chosen.values()) rcMax = Math.max(rcMax, v.rcOhms ?? 0);
  const heaviest = (c: number): number => {
    let x = 0;
    for (const [id, v] of chosen) {
      const d = cellById(id)!;
      if (d.inputKind === "and") x = Math.max(x, d.inputLowAmpsWorst(v, u.o.resistorTolerance, u.corners[c]!.env));
    }
    return x;
  };
  const ctxFor = (s: Situation): EvalContext => {
    const ctx = makeUniformCtx(u, s.def, chosen, new Map(), { sharedRcOhms: rcMax });
    ctx.heaviestLoadAmps = heaviest;
    return ctx;
  };
  // A tied cell's pull-up is its net driver's R_C (wired-AND): analysed with that value.
  const valuesOf = (s: Situation): CellValues => {
    const own = chosen.get(s.def.id)!;
    const pull = s.pullUpCellId !== undefined ? chosen.get(s.pullUpCellId)?.rcOhms : undefined;
    return pull !== undefined ? { ...own, rcOhms: pull } : own;
  };
  return { valuesBySituation: situations.map(valuesOf), situations, byCell, ctxFor, heaviestLoadAmps: heaviest };
}

// ---------------------------------------------------------------------------------------------
// Critical path

function criticalPath(netlist: CellNetlist, delays: { fall: number; rise: number }[], budget?: number): PathTiming | undefined {
  const nCells = netlist.cells.length;
  if (nCells === 0) return undefined;
  // The cell driving each net (−1: an input, a tie or a state net, where paths start).
  const driverOf = new Int32Array(netlist.nets.length).fill(-1);
  netlist.nets.forEach((net, i) => {
    if (net.driver.kind === "cell") driverOf[i] = net.driver.cell;
  });
  for (const n of netlist.stateNets) driverOf[n] = -1;
  // Each cell's users (one entry per input pin it drives), in cell and pin order.
  const indeg = new Int32Array(nCells);
  const userCount = new Int32Array(nCells + 1);
  for (const c of netlist.cells)
    for (const n of c.inputs) {
      const d = driverOf[n]!;
      if (d >= 0) {
        indeg[c.index]!++;
        userCount[d + 1]!++;
      }
    }
  for (let i = 0; i < nCells; i++) userCount[i + 1]! += userCount[i]!;
  const users = new Int32Array(userCount[nCells]!);
  const fill = userCount.slice(0, nCells);
  for (const c of netlist.cells)
    for (const n of c.inputs) {
      const d = driverOf[n]!;
      if (d >= 0) users[fill[d]!++] = c.index;
    }
  const order: number[] = [];
  for (let i = 0; i < nCells; i++) if (indeg[i] === 0) order.push(i);
  for (let head = 0; head < order.length; head++) {
    const c = order[head]!;
    for (let k = userCount[c]!; k < userCount[c + 1]!; k++) if (--indeg[users[k]!]! === 0) order.push(users[k]!);
  }
  // Arrival of each cell's output falling and rising; inverting cells: a fall follows a rise.
  const fall = new Float64Array(nCells);
  const rise = new Float64Array(nCells);
  const fallFrom = new Int32Array(nCells).fill(-1);
  const riseFrom = new Int32Array(nCells).fill(-1);
  const depth = new Int32Array(nCells).fill(1);
  for (const c of order) {
    const cell = netlist.cells[c]!;
    let inRise = 0;
    let inFall = 0;
    let rFrom = -1;
    let fFrom = -1;
    let dep = 0;
    for (const n of cell.inputs) {
      const d = driverOf[n]!;
      if (d < 0) continue;
      if (rise[d]! > inRise || rFrom < 0) {
        if (rise[d]! >= inRise) {
          inRise = rise[d]!;
          rFrom = d;
        }
      }
      if (fall[d]! >= inFall) {
        inFall = fall[d]!;
        fFrom = d;
      }
      dep = Math.max(dep, depth[d]!);
    }
    fall[c] = inRise + delays[c]!.fall;
    fallFrom[c] = rFrom;
    rise[c] = inFall + delays[c]!.rise;
    riseFrom[c] = fFrom;
    depth[c] = dep + 1;
  }
  let end = -1;
  let endRise = false;
  let worst = -1;
  for (const c of order) {
    if (fall[c]! > worst) {
      worst = fall[c]!;
      end = c;
      endRise = false;
    }
    if (rise[c]! > worst) {
      worst = rise[c]!;
      end = c;
      endRise = true;
    }
  }
  if (end < 0) return undefined;
  const cells: number[] = [];
  let c = end;
  let isRise = endRise;
  while (c >= 0) {
    cells.push(c);
    const prev = isRise ? riseFrom[c]! : fallFrom[c]!;
    isRise = !isRise;
    c = prev;
  }
  cells.reverse();
  const nets: string[] = [];
  const first = netlist.cells[cells[0]!]!;
  if (first.inputs.length > 0) nets.push(netlist.nets[first.inputs[0]!]!.name);
  for (const x of cells) nets.push(netlist.nets[netlist.cells[x]!.output]!.name);
  const out: PathTiming = { cells, nets, delaySeconds: worst, depth: depth.reduce((a, b) => Math.max(a, b), -Infinity) };
  if (budget !== undefined) out.budgetSeconds = budget;
  return out;
}

/** Worst delay along the longest path of a sized design. */
function pathDelayOf(netlist: CellNetlist, sized: Sized): number {
  const bySit = sized.situations.map((s, i) => {
    const r = evaluateSituation(s, sized.valuesBySituation[i]!, sized.ctxFor(s), new Float64Array(NC).fill(Infinity), true);
    return { fall: r.analysis!.timing?.tPHLSeconds ?? 0, rise: r.analysis!.timing?.tPLHSeconds ?? 0 };
  });
  const delays = netlist.cells.map((c) => bySit[sized.byCell[c.index]!]!);
  return criticalPath(netlist, delays)?.delaySeconds ?? 0;
}

function logicDepth(netlist: CellNetlist): number {
  const dummy = netlist.cells.map(() => ({ fall: 1, rise: 1 }));
  return criticalPath(netlist, dummy)?.depth ?? 1;
}

// ---------------------------------------------------------------------------------------------
// Building the SizedDesign

function assemble(netlist: CellNetlist, u: UniformEnv, sized: Sized, diagnostics: Diagnostic[], notes: string[], forced: boolean): SizedDesign {
  const o = u.o;
  const tol = o.resistorTolerance;
  // Detail analysis per situation.
  const analyses: CellAnalysis[] = [];
  const stressesBySit: Map<string, ComponentStress>[] = [];
  sized.situations.forEach((s, i) => {
    const m = new Float64Array(NC).fill(Infinity);
    const r = evaluateSituation(s, sized.valuesBySituation[i]!, sized.ctxFor(s), m, true);
    analyses.push(r.analysis!);
    stressesBySit.push(r.stresses!);
  });
  // Cell types: (cell id, fan-in, values), in order of first use.
  const typeIndex = new Map<string, number>();
  const cellTypes: SizedCellType[] = [];
  const typeSits: number[][] = [];
  const typeOfCell: number[] = [];
  const valueSetsPerShape = new Map<string, string[]>();
  // The type each situation's cells take, found at its first cell (types are in order of first use).
  const typeOfSit: number[] = [];
  for (const cell of netlist.cells) {
    const si = sized.byCell[cell.index]!;
    const known = typeOfSit[si];
    if (known !== undefined) {
      cellTypes[known]!.cells.push(cell.index);
      typeOfCell.push(known);
      continue;
    }
    const s = sized.situations[si]!;
    const values = sized.valuesBySituation[si]!;
    const vkey = s.def.parameters.map((p) => `${p.key}=${values[p.key]}`).join(",");
    // A cell tied onto another's net (wired-AND) is the open-collector form of its kind: the same
    // parts without R_C, a subcircuit of its own.
    const shape = `${s.def.keyPrefix}${s.fanin}${s.ownsPullUp ? "" : "_oc"}`;
    const k = `${shape}|${vkey}`;
    let ti = typeIndex.get(k);
    if (ti === undefined) {
      const sets = valueSetsPerShape.get(shape) ?? [];
      sets.push(vkey);
      valueSetsPerShape.set(shape, sets);
      const key = sets.length === 1 ? shape : `${shape}_${sets.length}`;
      ti = cellTypes.length;
      typeIndex.set(k, ti);
      const topo = topologyOf(s);
      cellTypes.push({
        key,
        cellId: s.def.id,
        fn: s.def.fn,
        fanin: s.fanin,
        variant: s.def.variant,
        pins: topo.pins,
        elements: topo.components.map((c) => {
          const e: SizedCellType["elements"][number] = { name: c.name, kind: c.kind, nodes: c.nodes };
          if (c.valueKey) e.value = values[c.valueKey]!;
          if (c.model) e.model = c.model === "diode" ? o.devices.diode.name : c.model === "schottky" ? (o.devices.schottky ?? DEFAULT_SCHOTTKY).card.name : o.devices.npn.name;
          return e;
        }),
        values: { ...values },
        analysis: analyses[si]!,
        cells: [],
        ...(s.ownsPullUp ? {} : { openCollector: true }),
      });
      typeSits.push([]);
    }
    cellTypes[ti]!.cells.push(cell.index);
    if (!typeSits[ti]!.includes(si)) typeSits[ti]!.push(si);
    typeOfSit[si] = ti;
    typeOfCell.push(ti);
  }
  cellTypes.forEach((t, i) => (t.analysis = mergeAnalyses(typeSits[i]!.map((si) => analyses[si]!))));

  // Designators: a pure function of cell order and each cell's topology. Everything else about
  // a part (value, text, rating, warnings) depends only on its cell's situation: it is worked
  // out once per situation, at the situation's first cell (so warnings come in cell order), and
  // each cell copies it with its own designator.
  const instances: PlacedInstance[] = [];
  const ratingWarned = new Set<string>();
  const partsBySit: SituationParts[] = [];
  const partsOf = (si: number): (typeof partsBySit)[number] => {
    const known = partsBySit[si];
    if (known) return known;
    const s = sized.situations[si]!;
    const values = sized.valuesBySituation[si]!;
    const topo = topologyOf(s);
    const st = stressesBySit[si]!;
    const made: SituationParts = { kinds: [], names: [], parts: [], perKind: [0, 0, 0, 0] };
    for (const comp of topo.components) {
      const stress = st.get(comp.name);
      let part: Component;
      if (comp.kind === "R") {
        const ohms = values[comp.valueKey!]!;
        const watts = stress?.powerWatts ?? 0;
        const rating = chooseResistorRating(watts);
        const text = formatOhms(ohms);
        const c: Component = {
          designator: "",
          kind: "R",
          value: ohms,
          valueText: text,
          tolerance: tol,
          description: `resistor ${text} ${formatPercent(tol)}, ${rating !== undefined ? formatRating(rating) : "over 2 W"}`,
          instance: -1,
          role: comp.name,
          worstPowerWatts: watts,
        };
        if (rating !== undefined) c.powerRatingWatts = rating;
        else {
          c.powerRatingWatts = 2;
          const w = `${s.def.id}/${comp.name}`;
          if (!ratingWarned.has(w)) {
            ratingWarned.add(w);
            diagnostics.push(diag("GW5002", `${comp.name} of ${s.def.title} dissipates up to ${fmt(watts)} W, more than half of the largest standard rating (2 W)`, undefined, { hint: "use larger resistor values, a lower supply, or a power resistor rated for it" }));
          }
        }
        part = c;
      } else if (comp.kind === "C") {
        // Speed-up capacitor (fast variants): ceramic, the value the plan chose.
        const farads = values[comp.valueKey ?? CAPACITOR_KEY] ?? 0;
        const ctol = values[CAPACITOR_TOLERANCE_KEY] ?? o.capacitorTolerance;
        const vMax = Math.max(stress?.voltageVolts ?? 0, o.supplyVolts * (1 + o.supplyTolerance));
        const rated = capacitorVoltageRating(vMax);
        const c: Component = {
          designator: "",
          kind: "C",
          value: farads,
          valueText: `${formatFarads(farads)}F`,
          tolerance: ctol,
          description: `ceramic capacitor ${formatFarads(farads)}F ${formatPercent(ctol)}, ${rated !== undefined ? `${rated} V` : `over ${CAPACITOR_VOLTAGE_RATINGS[CAPACITOR_VOLTAGE_RATINGS.length - 1]} V`}, C0G/NP0 (speed-up)`,
          instance: -1,
          role: comp.name,
        };
        if (rated !== undefined) c.voltageRatingVolts = rated;
        part = c;
      } else {
        const isDiode = comp.kind === "D";
        const sch = comp.model === "schottky" ? (o.devices.schottky ?? DEFAULT_SCHOTTKY) : undefined;
        const card = sch ? sch.card : isDiode ? o.devices.diode : o.devices.npn;
        const dFwdMax = sch ? sch.iForwardMaxAmps : o.devices.diodeForwardMaxAmps;
        const dRevMax = sch ? sch.vReverseMaxVolts : o.devices.diodeReverseMaxVolts;
        const c: Component = {
          designator: "",
          kind: comp.kind,
          value: 0,
          valueText: card.partNumber ?? card.name,
          description: card.description,
          instance: -1,
          role: comp.name,
        };
        if (card.partNumber !== undefined) c.partNumber = card.partNumber;
        if (stress) c.worstPowerWatts = stress.powerWatts;
        part = c;
        // Ratings of the semiconductors.
        if (stress) {
          const w = `${s.def.id}/${comp.name}`;
          const problems: string[] = [];
          if (isDiode) {
            if ((stress.currentAmps ?? 0) > dFwdMax) problems.push(`forward current ${fmt((stress.currentAmps ?? 0) * 1e3)} mA > ${fmt(dFwdMax * 1e3)} mA`);
            if ((stress.voltageVolts ?? 0) > dRevMax) problems.push(`reverse voltage ${fmt(stress.voltageVolts ?? 0)} V > ${fmt(dRevMax)} V`);
          } else {
            if ((stress.currentAmps ?? 0) > o.devices.npnIcMaxAmps) problems.push(`collector current ${fmt((stress.currentAmps ?? 0) * 1e3)} mA > ${fmt(o.devices.npnIcMaxAmps * 1e3)} mA`);
            if ((stress.voltageVolts ?? 0) > o.devices.npnVceMaxVolts) problems.push(`collector-emitter voltage ${fmt(stress.voltageVolts ?? 0)} V > ${fmt(o.devices.npnVceMaxVolts)} V`);
            if (stress.powerWatts > o.devices.npnPowerMaxWatts) problems.push(`dissipation ${fmt(stress.powerWatts)} W > ${fmt(o.devices.npnPowerMaxWatts)} W`);
          }
          if (problems.length > 0 && !ratingWarned.has(w)) {
            ratingWarned.add(w);
            diagnostics.push(diag("GW5002", `${comp.name} (${card.partNumber ?? card.name}) of ${s.def.title}: ${problems.join("; ")}`, undefined, { hint: "choose a part with higher ratings in the parts file, or a lower supply" }));
          }
        }
      }
      made.kinds.push(comp.kind);
      made.perKind[KIND_SLOT[comp.kind]]!++;
      made.names.push(comp.name);
      made.parts.push(part);
    }
    partsBySit[si] = made;
    return made;
  };
  // Each cell's parts are numbered on from where the cells before it left off: a cell keeps the
  // first number of each kind, and its designators and parts are worked out when read, so a large
  // design holds four numbers a cell rather than a string and an object a part.
  const firsts = new Int32Array(netlist.cells.length * 4);
  const counters = [0, 0, 0, 0];
  let pWorst = 0;
  let iWorst = 0;
  let pNom = 0;
  let iNom = 0;
  const distinctOhms = new Set<number>();
  let schottkyUsed = false;
  for (const cell of netlist.cells) {
    const si = sized.byCell[cell.index]!;
    const made = partsOf(si);
    for (let k = 0; k < 4; k++) {
      firsts[cell.index * 4 + k] = counters[k]! + 1;
      counters[k]! += made.perKind[k]!;
    }
    if (!made.counted) {
      made.counted = true;
      for (const part of made.parts) {
        if (part.kind === "R") distinctOhms.add(part.value);
        if (part.kind === "D" && part.role === "DSC") schottkyUsed = true;
      }
    }
    const a = analyses[si]!;
    instances.push(new PlacedInstance(cell.index, typeOfCell[cell.index]!, a, made, firsts));
    // Totals.
    pWorst += Math.max(a.powerLowWatts, a.powerHighWatts);
    iWorst += a.supplyCurrentAmps;
    pNom += (a.nominal.powerLowWatts + a.nominal.powerHighWatts) / 2;
    iNom += (a.nominal.supplyCurrentLowAmps + a.nominal.supplyCurrentHighAmps) / 2;
  }

  // Timing and the critical path.
  const delays = instances.map((i) => ({ fall: i.analysis.timing?.tPHLSeconds ?? 0, rise: i.analysis.timing?.tPLHSeconds ?? 0 }));
  const path = criticalPath(netlist, delays, o.pathDelayMaxSeconds);
  if (path && o.pathDelayMaxSeconds !== undefined && path.delaySeconds > o.pathDelayMaxSeconds * (1 + 1e-9) && !forced) {
    notes.push(`The longest path takes ${fmt(path.delaySeconds * 1e9)} ns against a budget of ${fmt(o.pathDelayMaxSeconds * 1e9)} ns.`);
  }

  const wiredNets = netlist.nets.filter((n) => n.tiedCells?.length);
  // Every transistor on a wired net must stay off against its own collector leakage when hot
  // (the leakage figures assume it: src/electrical/leakage.ts).
  const hot = u.corners.reduce((a, c) => (c.env.dev.tempC > a.env.dev.tempC ? c : a), u.corners[0]!);
  const leakyTypes = new Set<string>();
  for (const n of wiredNets)
    for (const c of [n.driver.kind === "cell" ? n.driver.cell : -1, ...n.tiedCells!]) {
      const t = cellTypes[typeOfCell[c] ?? -1];
      const rb = t?.values.rbOhms;
      if (!t || rb === undefined || leakyTypes.has(t.key)) continue;
      if (!baseHeldOff(o.devices.npn.params, hot.env.dev.tempC, rb * (1 + tol), hot.env.dev.vBECutInVolts)) {
        leakyTypes.add(t.key);
        diagnostics.push(diag("GW5006", `${t.key} on a wired-AND net: its collector leakage through R_B ${formatOhms(rb)} lifts the base to the cut-in at ${hot.env.dev.tempC} °C, so the net's high level is not assured`, undefined, { hint: "a smaller base resistor (a lower resistor range), a transistor with less leakage, or build without --wired-and" }));
      }
    }
  if (wiredNets.length) {
    const tied = wiredNets.reduce((acc, n) => acc + n.tiedCells!.length, 0);
    notes.push(
      `Wired-AND: ${wiredNets.length} net${wiredNets.length === 1 ? " carries" : "s carry"} ${tied} tied open-collector output${tied === 1 ? "" : "s"} with one collector resistor each (in the net's driver cell); every transistor on such a net is sized to sink that resistor's current and all the net's loads alone, and the high level, the collector leakage and the rise time count every tied collector.`,
    );
  }
  for (const t of cellTypes) {
    const b = t.analysis.constraints.find((c) => c.id === t.analysis.binding);
    if (b) notes.push(`${t.key}: binding constraint ${b.label}, margin ${fmt(b.margin * 100)} % at ${b.corner}.`);
  }
  if (forced) {
    for (const t of cellTypes)
      for (const c of t.analysis.constraints)
        if (!c.ok) {
          diagnostics.push(
            diag(c.id === "saturation" ? "GW5004" : "GW5004", `${t.key} with the given values: ${c.label} is ${fmt(c.value)} ${c.unit} against ${fmt(c.limit)} ${c.unit} at ${c.corner}`, undefined, { severity: "warning" }),
          );
        }
  }

  const design: SizedDesign = {
    netlist,
    parameters: o.parameters,
    models: { diode: o.devices.diode, npn: o.devices.npn, ...(schottkyUsed ? { schottky: (o.devices.schottky ?? DEFAULT_SCHOTTKY).card } : {}) },
    cellTypes,
    instances,
    get components(): Component[] {
      return componentsOf(instances);
    },
    totals: {
      staticPowerWatts: pWorst,
      supplyCurrentAmps: iWorst,
      staticPowerNominalWatts: pNom,
      supplyCurrentNominalAmps: iNom,
      transistors: counters[KIND_SLOT.Q]!,
      diodes: counters[KIND_SLOT.D]!,
      resistors: counters[KIND_SLOT.R]!,
      capacitors: counters[KIND_SLOT.C]!,
      distinctResistorValues: distinctOhms.size,
    },
    mode: o.mode,
    series: o.series,
    resistorTolerance: tol,
    corners: u.corners.map((c) => c.label),
    inputDriver: { pullUpOhms: sized.sharedRcOhms ?? maxRc(cellTypes), vLowVolts: o.devices.vCESatVolts },
    notes,
  };
  if (path) design.criticalPath = path;
  return design;
}

/** Part kinds in the order of a cell's four numbering counters. */
const KIND_SLOT = { R: 0, D: 1, Q: 2, C: 3 } as const satisfies Record<Component["kind"], number>;
const SLOT_KIND: Component["kind"][] = ["R", "D", "Q", "C"];

/** The parts of the cells of one situation, without designators: the kinds and local names in
 *  role order, each part as it goes on the list, and how many of each kind. */
interface SituationParts {
  kinds: Component["kind"][];
  names: string[];
  parts: Component[];
  /** Parts of each kind, in KIND_SLOT order. */
  perKind: [number, number, number, number];
  /** True once its resistor values and clamp diodes are counted in the design's figures. */
  counted?: boolean;
}

/** A placed cell. Its designators are a pure function of its situation's parts and the first
 *  number of each kind it was given, worked out when read. */
class PlacedInstance implements SizedInstance {
  readonly #parts: SituationParts;
  readonly #firsts: Int32Array;
  constructor(
    public cell: number,
    public cellType: number,
    public analysis: CellAnalysis,
    parts: SituationParts,
    firsts: Int32Array,
  ) {
    this.#parts = parts;
    this.#firsts = firsts;
  }
  get designators(): Record<string, string> {
    const out: Record<string, string> = {};
    this.eachPart((name, designator) => (out[name] = designator));
    return out;
  }
  /** Each part's local name, designator and list entry (shared between cells alike: copy it
   *  before changing it). */
  eachPart(f: (name: string, designator: string, part: Component) => void): void {
    const { kinds, names, parts } = this.#parts;
    const next = [0, 0, 0, 0];
    const base = this.cell * 4;
    for (let k = 0; k < kinds.length; k++) {
      const slot = KIND_SLOT[kinds[k]!];
      f(names[k]!, `${SLOT_KIND[slot]}${this.#firsts[base + slot]! + next[slot]!++}`, parts[k]!);
    }
  }
}

/** The parts list of placed cells, in cell order and each cell's role order. */
function componentsOf(instances: readonly PlacedInstance[]): Component[] {
  const out: Component[] = [];
  for (const inst of instances) inst.eachPart((_name, designator, part) => out.push({ ...part, designator, instance: inst.cell }));
  return out;
}

/**
 * Each part of a sized design in parts-list order (design.components) without building the
 * list: `part` is shared between the cells alike and carries no designator or cell of its own
 * (they are the arguments); it must not be changed.
 */
export function eachComponent(design: SizedDesign, f: (part: Component, designator: string, cell: number) => void): void {
  if (!design.instances.every((inst) => inst instanceof PlacedInstance)) {
    // Instances not placed by assemble (built by hand): the list as given.
    for (const c of design.components) f(c, c.designator, c.instance);
    return;
  }
  for (const inst of design.instances as PlacedInstance[]) inst.eachPart((_name, designator, part) => f(part, designator, inst.cell));
}

/** The parts a cell is built from: its kind's topology, without R_C for a tied cell. */
function topologyOf(s: Situation): CellTopology {
  const t = s.def.topology(s.fanin);
  return s.ownsPullUp ? t : openCollectorTopology(t);
}

function maxRc(types: SizedCellType[]): number {
  let x = 0;
  for (const t of types) x = Math.max(x, t.values.rcOhms ?? 0);
  return x;
}

function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return Number(x.toPrecision(3)).toString();
}

/** A figure with its unit, scaled the way engineers write it (ns, mA, mW). */
function fmtQuantity(x: number, unit: string): string {
  const scaled: Record<string, [number, string]> = { s: [1e9, "ns"], A: [1e3, "mA"], W: [1e3, "mW"], "Ω": [1e-3, "kΩ"] };
  const sc = scaled[unit];
  if (sc) return `${fmt(x * sc[0])} ${sc[1]}`;
  return unit ? `${fmt(x)} ${unit}` : fmt(x);
}

function formatPercent(f: number): string {
  return `${Number((f * 100).toPrecision(3))} %`;
}

interface Attempt {
  outcome: Outcome;
  defs: CellDefinition[];
  triedVariant: boolean;
  variantNote?: string;
  /** Fast variants: the plan used, whether plans were tried, and the note explaining the choice. */
  plan?: VariantPlan;
  triedFast?: boolean;
  fastNote?: string;
  /** The per-gate delay the fast plan was sized to (the budget less FAST_DELAY_GUARD). */
  gateDelayMaxSeconds?: number;
  /** Set when the delay screen (see screenPlan) dropped every plan: the delay alone blocks, and
   *  this is the fastest any plan reached with every other constraint left out. */
  delayOnly?: DelayReach;
}

/** The fastest a plan's cells were found to switch with every constraint but the delays left out:
 *  the worst-corner delay that misses the budget most, which one it is, and the cell it is in. */
interface DelayReach {
  id: "delay-fall" | "delay-rise";
  seconds: number;
  def: CellDefinition;
  margin: number;
}

/** Share of the delay budget kept back when sizing the fast variants (see attemptFast). */
const FAST_DELAY_GUARD = 0.2;

/** A plan whose cells, with every constraint but the delays left out, still miss the budget by
 *  more than this share of it on the screen's coarse series is not sized (see screenPlan). */
const SCREEN_SLACK = 1;
/** The screen's series: every this-many-th standard value (resistors and capacitors). */
const SCREEN_STEP = 4;

/** Uniform sizing with the basic cells; when that fails, the fewest heaviest-loaded NAND cells
 *  moved to the high-fan-out variant that make it fit. */
function attemptAll(netlist: CellNetlist, u: UniformEnv): Attempt {
  const o = u.o;
  const basic = netlist.cells.map((c) => planned(u, basicCellFor(c.fn)));
  const basicSituations = uniformSituations(netlist, basic, u);
  const outcome = sizeUniform(netlist, basic, u, basicSituations);
  if (outcome.ok || o.variants !== "auto") return { outcome, defs: basic, triedVariant: false };
  const hifan = variantsFor("nand").find((d) => d.variant === "high-fanout");
  const variant = hifan ? planned(u, hifan) : undefined;
  const nandCells = netlist.cells.filter((c) => c.fn === "nand").map((c) => c.index);
  if (!variant || nandCells.length === 0) return { outcome, defs: basic, triedVariant: false };
  // The variant only adds drive: if the basic cells fail even without the saturation
  // constraint, no variant can help.
  const satIndex = CI.saturation;
  if (!u.disabled?.has(satIndex)) {
    // The same cells and loads: the same situations.
    const withoutSat = sizeUniform(netlist, basic, { ...u, disabled: new Set([...(u.disabled ?? []), satIndex]) }, basicSituations);
    if (!withoutSat.ok) return { outcome, defs: basic, triedVariant: false };
  }
  // Each cell's own loads (one situation a cell), needed only from here on.
  const loading = buildSituations(netlist, basic, { group: false, ...(o.fanoutOverride !== undefined ? { fanoutOverride: o.fanoutOverride } : {}) });
  const fanoutOf = (cell: number): number => loading.situations[loading.byCell[cell]!]!.andLoads;
  const levels = [...new Set(nandCells.map(fanoutOf))].sort((a, b) => a - b);
  // Threshold t: cells with fan-out above levels[t] get the variant; t = −1 moves them all.
  const defsAt = (t: number): CellDefinition[] => {
    const th = t < 0 ? -Infinity : levels[t]!;
    return netlist.cells.map((c) => (c.fn === "nand" && fanoutOf(c.index) > th ? variant : planned(u, basicCellFor(c.fn))));
  };
  // Largest threshold that fits (fewest cells moved); levels.length − 1 is the all-basic case,
  // which failed. Feasibility only grows as the threshold falls, so bisect, trying the largest
  // threshold first (usually enough). The bisection runs on every other standard value; the
  // threshold found is then sized on the full series.
  const coarse: UniformEnv = { ...u, grid: u.grid.filter((_, k) => k % 2 === 0) };
  let found: { t: number; out: Outcome } | undefined;
  let lo = -1;
  let hi = levels.length - 2;
  const full = (t: number): Outcome => sizeUniform(netlist, defsAt(t), u);
  const firstTry = full(hi);
  if (firstTry.ok) found = { t: hi, out: firstTry };
  else {
    hi--;
    let coarseT: number | undefined;
    while (lo <= hi) {
      const mid = (lo + hi + 1) >> 1;
      const out = sizeUniform(netlist, defsAt(mid), coarse);
      if (out.ok) {
        coarseT = mid;
        lo = mid + 1;
      } else hi = mid - 1;
    }
    if (coarseT !== undefined) {
      // Back on the full series; if the coarse answer does not hold, move more cells over.
      for (let t = coarseT; t >= -1 && !found; t--) {
        const out = full(t);
        if (out.ok) found = { t, out };
      }
    }
  }
  if (!found) return { outcome, defs: basic, triedVariant: true };
  const defs = defsAt(found.t);
  const promoted = nandCells.filter((c) => defs[c] === variant);
  const smallest = promoted.reduce((m, c) => Math.min(m, fanoutOf(c)), Infinity);
  const allNand = promoted.length === nandCells.length;
  const note =
    smallest === 0 && allNand
      ? `no design keeps the basic NAND even on its unloaded cells (fan-out 0) at every corner; all ${promoted.length} NAND cell${promoted.length === 1 ? "" : "s"} use the high-fan-out variant (${variant.source})`
      : `the basic NAND cannot drive a fan-out of ${smallest} at every corner; ` +
        `${promoted.length} cell${promoted.length === 1 ? " with that fan-out or more uses" : "s with that fan-out or more use"} the high-fan-out variant (${variant.source})`;
  return { outcome: found.out, defs, triedVariant: true, variantNote: note };
}

/** Why an infeasible request fails (explainBlockers), and whether the wired-AND nets are the
 *  reason: when the same cells fit once the tied collectors' leakage and capacitance are left
 *  out, the diagnostic says so and names building without --wired-and as what relaxes it. */
function explainFailure(netlist: CellNetlist, u: UniformEnv, first: Attempt): Diagnostic {
  if (first.delayOnly) return delayOnlyDiagnostic(netlist, u, first);
  if (u.quick && !first.outcome.ok) return failureDiagnostic(first.outcome.failure, u.o, first.triedVariant);
  // After fast variants were tried, explain the failure of the most capable plan.
  if (first.plan && !u.plan) u = { ...u, plan: first.plan };
  if (first.gateDelayMaxSeconds !== undefined) u = { ...u, gateDelayMaxSeconds: first.gateDelayMaxSeconds };
  const d = explainBlockers(netlist, u, first);
  const wiredNets = netlist.nets.filter((n) => n.tiedCells?.length);
  if (wiredNets.length === 0 || u.wired === false) return d;
  const coarse: UniformEnv = { ...u, grid: u.grid.filter((_, k) => k % 2 === 0), wired: false };
  if (!attemptAll(netlist, coarse).outcome.ok) return d;
  const tied = wiredNets.reduce((acc, n) => acc + n.tiedCells!.length, 0);
  const names = wiredNets.slice(0, 4).map((n) => `'${n.name}'`).join(", ") + (wiredNets.length > 4 ? ", ..." : "");
  const message = `${d.message}; the wired-AND nets make it infeasible: ${tied} tied open-collector output${tied === 1 ? "" : "s"} on ${wiredNets.length} net${wiredNets.length === 1 ? "" : "s"} (${names}) add their collector capacitance and leakage, and without them the same cells would fit`;
  const hint = `build without --wired-and (every output then has its own collector resistor), or ${d.hint?.replace(/^what would relax it: /, "") ?? "a looser requirement"}`;
  return { ...d, message, hint: `what would relax it: ${hint}` };
}

/** The plans of fast variants for a netlist, cheapest in parts first (the all-basic plan left
 *  out). Each base cell present (NAND, NOR) takes its basic form or one of its fast variants;
 *  the high-fan-out NAND follows the NAND's choice where a matching variant exists. */
function fastPlans(netlist: CellNetlist, o: ResolvedOptions): VariantPlan[] {
  const bases = [...new Set(netlist.cells.map((c) => basicCellFor(c.fn)))];
  const hifan = variantsFor("nand").find((d) => d.variant === "high-fanout");
  const hifanFast = hifan ? fastVariantsOf(hifan.id) : [];
  let combos: Map<string, CellDefinition>[] = [new Map()];
  for (const b of bases) {
    const next: Map<string, CellDefinition>[] = [];
    for (const m of combos) for (const v of [b, ...fastVariantsOf(b.id)]) next.push(new Map(m).set(b.id, v));
    combos = next;
  }
  const plans: VariantPlan[] = [];
  for (const m of combos) {
    if ([...m.entries()].every(([id, d]) => d.id === id)) continue;
    const nand = m.get("nand");
    if (hifan && nand?.speedUp) {
      const match = hifanFast.find((h) => h.speedUp!.clamp === nand.speedUp!.clamp && !!h.speedUp!.capacitorKey === !!nand.speedUp!.capacitorKey);
      if (match) m.set(hifan.id, match);
    }
    let parts = 0;
    for (const c of netlist.cells) parts += (m.get(basicCellFor(c.fn).id) ?? basicCellFor(c.fn)).topology(Math.max(1, c.inputs.length)).components.length;
    const withCap = [...m.values()].some((d) => d.speedUp?.capacitorKey);
    const plan: VariantPlan = { byBase: m, capTolerance: o.capacitorTolerance, parts };
    if (withCap) plan.capFarads = o.capacitorMaxFarads;
    plans.push(plan);
  }
  return plans.sort((a, b) => a.parts - b.parts);
}

function planLabel(plan: VariantPlan): string {
  const names = [...plan.byBase.entries()].filter(([id, d]) => d.id !== id && !isFanoutVariant(d)).map(([, d]) => d.title);
  return names.join(" and ");
}

/** Σ cells × worst-case static power of a sized design (the tie-break between plans). */
function sizedPowerWatts(sized: Sized): number {
  let p = 0;
  sized.situations.forEach((s, i) => {
    const r = evaluateSituation(s, sized.valuesBySituation[i]!, sized.ctxFor(s), new Float64Array(NC).fill(Infinity), false);
    p += r.worstWatts * s.cells.length;
  });
  return p;
}

/** The delay screen: how close a plan's cells come to the delay budget when nothing else is asked
 *  of them (every other constraint left out), on every SCREEN_STEP-th resistor and capacitor
 *  value, with the NAND cells in their basic and in their high-fan-out form. Leaving constraints
 *  out can only let a design switch faster, so a plan that misses by more than SCREEN_SLACK here
 *  cannot meet the budget on the full series unless its delays change by more than that factor
 *  between neighbouring screen values; the full sizing of such a plan is skipped. Feasible
 *  relaxed problems end the search early, so a plan that can meet the budget costs little. */
function screenPlan(netlist: CellNetlist, u: UniformEnv, plan: VariantPlan, caps: readonly number[]): DelayReach | "fits" {
  const others = CONSTRAINTS.map((_, i) => i).filter((i) => i !== CI["delay-fall"] && i !== CI["delay-rise"]);
  const grid = u.grid.filter((_, k) => k % SCREEN_STEP === 0 || k === u.grid.length - 1);
  const relaxed: UniformEnv = { ...u, grid, disabled: new Set([...(u.disabled ?? []), ...others]) };
  const capList = plan.capFarads === undefined || caps.length === 0 ? [undefined] : caps.filter((_, k) => k % SCREEN_STEP === 0 || k === caps.length - 1);
  const hifan = variantsFor("nand").find((d) => d.variant === "high-fanout");
  let best: DelayReach | undefined;
  for (const cap of capList) {
    const p: VariantPlan = cap === undefined ? plan : { ...plan, capFarads: cap };
    const env: UniformEnv = { ...relaxed, plan: p };
    const basic = netlist.cells.map((c) => planned(env, basicCellFor(c.fn)));
    const forms = [basic];
    if (hifan && netlist.cells.some((c) => c.fn === "nand")) forms.push(netlist.cells.map((c) => (c.fn === "nand" ? planned(env, hifan) : planned(env, basicCellFor(c.fn)))));
    for (const defs of forms) {
      const out = sizeUniform(netlist, defs, env);
      if (out.ok) return "fits";
      const cl = out.failure.closest;
      if (!cl) continue;
      const fall = cl.margins[CI["delay-fall"]]!;
      const rise = cl.margins[CI["delay-rise"]]!;
      const id = rise <= fall ? "delay-rise" : "delay-fall";
      const m = Math.min(fall, rise);
      if (!best || m > best.margin) best = { id, margin: m, seconds: u.gateDelayMaxSeconds! * (1 - m), def: out.failure.def };
    }
  }
  return best ?? { id: "delay-rise", margin: -Infinity, seconds: Infinity, def: planned({ ...u, plan }, basicCellFor(netlist.cells[0]!.fn)) };
}

/** Under a speed budget the basic cells miss: the cheapest plan of fast variants that meets it at
 *  every corner (parts first, then worst-case power), with the smallest allowed speed-up
 *  capacitor that does (least load on the drivers, least switching energy). Feasibility is tried
 *  on every other standard value first, then confirmed on the full series. When no plan fits,
 *  the attempt of the most capable plan (both techniques, the largest capacitor) is returned for
 *  the failure message. */
function attemptFast(netlist: CellNetlist, u0: UniformEnv): Attempt {
  if (u0.plan) return attemptAll(netlist, u0);
  const first = attemptAll(netlist, u0);
  const o = u0.o;
  if (first.outcome.ok || o.variants !== "auto" || u0.gateDelayMaxSeconds === undefined) return first;
  // The fast cells' delay estimates run up to about a fifth low against ngspice where they are
  // smallest (test/electrical/fast.ngspice.test.ts; 0.85 for the clamped NAND at fan-out 8):
  // they are held to the budget less FAST_DELAY_GUARD.
  const u: UniformEnv = { ...u0, gateDelayMaxSeconds: u0.gateDelayMaxSeconds * (1 - FAST_DELAY_GUARD) };
  const coarse: UniformEnv = { ...u, grid: u.grid.filter((_, k) => k % 2 === 0) };
  // The fast variants change only the switching: if the basic cells fail even without the delay
  // constraints, none of them can help.
  const delays = [CI["delay-fall"], CI["delay-rise"]];
  if (!attemptAll(netlist, { ...coarse, disabled: new Set([...(u.disabled ?? []), ...delays]) }).outcome.ok) return first;
  const caps = valuesInRange(o.capacitorSeries, o.capacitorMinFarads, o.capacitorMaxFarads);
  const plans = fastPlans(netlist, o);
  if (plans.length === 0) return first;
  const fits = (plan: VariantPlan, grid: UniformEnv): Attempt => {
    const a = attemptAll(netlist, { ...grid, plan });
    a.plan = plan;
    if (!a.outcome.ok) {
      const m = a.outcome.failure.closest?.worstMargin ?? -Infinity;
      if (!closest || m > closest.margin) closest = { plan, margin: m };
    }
    return a;
  };
  let closest: { plan: VariantPlan; margin: number } | undefined;
  const found: { plan: VariantPlan; attempt: Attempt; power: number }[] = [];
  const missed: VariantPlan[] = [];
  // Plans the delay screen drops, and the fastest any of them reached there.
  let screenedOut = 0;
  let reach: DelayReach | undefined;
  for (const plan of plans) {
    if (found.length > 0 && plan.parts > found[0]!.plan.parts) break;
    const screened = screenPlan(netlist, u, plan, caps);
    if (screened !== "fits" && screened.margin < -SCREEN_SLACK) {
      if (!reach || screened.margin > reach.margin) reach = screened;
      screenedOut++;
      missed.push(plan);
      continue;
    }
    let p = plan;
    if (plan.capFarads !== undefined && caps.length > 0) {
      // A larger capacitor removes more stored charge but loads the drivers more (diode-AND
      // loads hand their charge to the driver): not monotonic. Scan every other value upward,
      // stop at the first that fits, then try the value just below it.
      let at = -1;
      for (let i = 0; i < caps.length && at < 0; i += 2) if (fits({ ...plan, capFarads: caps[i]! }, coarse).outcome.ok) at = i;
      if (at < 0 && caps.length % 2 === 0 && fits({ ...plan, capFarads: caps[caps.length - 1]! }, coarse).outcome.ok) at = caps.length - 1;
      if (at < 0) {
        missed.push(plan);
        continue;
      }
      if (at > 0 && fits({ ...plan, capFarads: caps[at - 1]! }, coarse).outcome.ok) at--;
      p = { ...plan, capFarads: caps[at]! };
    } else if (!fits(plan, coarse).outcome.ok) {
      missed.push(plan);
      continue;
    }
    // Confirm on the full series (it can only do better than every other value).
    const a = fits(p, u);
    if (!a.outcome.ok) {
      missed.push(plan);
      continue;
    }
    found.push({ plan: p, attempt: a, power: sizedPowerWatts(a.outcome.sized) });
  }
  if (found.length === 0 && screenedOut === plans.length) {
    // The delays alone block: no plan comes near the budget even with nothing else asked of it.
    return { ...first, triedFast: true, gateDelayMaxSeconds: u.gateDelayMaxSeconds!, delayOnly: reach! };
  }
  if (found.length === 0) {
    // Explain with the plan (and capacitor) that came closest (at the budget as given).
    const best = closest?.plan ?? plans[plans.length - 1]!;
    const a = fits(best, u);
    if (!a.outcome.ok) {
      a.triedFast = true;
      a.gateDelayMaxSeconds = u.gateDelayMaxSeconds!;
      return a;
    }
    // The full series found what every other value did not.
    found.push({ plan: best, attempt: a, power: sizedPowerWatts(a.outcome.sized) });
  }
  found.sort((a, b) => a.power - b.power);
  const win = found[0]!;
  const budget = fmt(u0.gateDelayMaxSeconds * 1e9);
  const extra = win.plan.parts - partsOfBasic(netlist);
  let note = `the basic cells miss the speed budget of ${budget} ns per gate; ${planLabel(win.plan)} meet${planLabel(win.plan).includes(" and DTL") ? "" : "s"} it at every corner (+${extra} part${extra === 1 ? "" : "s"}`;
  if (win.plan.capFarads !== undefined) note += `, C_SU ${fmtFarads(win.plan.capFarads)} ${o.capacitorSeries} ±${fmt(o.capacitorTolerance * 100)} %, the smallest allowed value that does`;
  note += ")";
  const cheaper = missed.filter((m) => m.parts <= win.plan.parts).map(planLabel);
  if (cheaper.length) note += `; ${cheaper.join("; ")} ${cheaper.length === 1 ? "does" : "do"} not`;
  if (found.length > 1) note += `; chosen over ${found.slice(1).map((f) => planLabel(f.plan)).join(", ")} (same parts count) for less worst-case power`;
  note += `; chosen by parts count first, then worst-case power; their estimated delays are held to ${fmt(u.gateDelayMaxSeconds! * 1e9)} ns, ${fmt(FAST_DELAY_GUARD * 100)} % under the budget, for the estimate's accuracy`;
  win.attempt.fastNote = note;
  win.attempt.gateDelayMaxSeconds = u.gateDelayMaxSeconds!;
  win.attempt.triedFast = true;
  return win.attempt;
}

function partsOfBasic(netlist: CellNetlist): number {
  let parts = 0;
  for (const c of netlist.cells) parts += basicCellFor(c.fn).topology(Math.max(1, c.inputs.length)).components.length;
  return parts;
}

function fmtFarads(f: number): string {
  return `${formatFarads(f)}F`;
}

/** GW5001 when the delay screen dropped every plan of fast variants: the delay blocks on its own,
 *  so no search over the other constraints is needed to say so. */
function delayOnlyDiagnostic(netlist: CellNetlist, u: UniformEnv, first: Attempt): Diagnostic {
  const o = u.o;
  const r = first.delayOnly!;
  const limit = first.gateDelayMaxSeconds ?? u.gateDelayMaxSeconds!;
  const msg =
    `${r.def.title}, largest fan-out ${largestFanout(netlist, first.defs, o)}: no ${o.series} values meet every constraint at every corner; ${labelOf(r.id)} fails first: ` +
    `the best design reaches about ${fmtQuantity(r.seconds, "s")} against at most ${fmtQuantity(limit, "s")} required even with every other constraint left out ` +
    `(screened on one standard value in ${SCREEN_STEP}): no variant comes within a factor of ${fmt(1 + SCREEN_SLACK)} of the budget`;
  return diag("GW5001", msg, undefined, { hint: `what would relax it: ${RELAX[r.id]}; ${fastTriedText(o)}` });
}

/** The largest fan-out of the mapped design under `defs` (for GW5001). */
function largestFanout(netlist: CellNetlist, defs: readonly CellDefinition[], o: ResolvedOptions): number {
  const loading = buildSituations(netlist, defs, { group: true, ...(o.fanoutOverride !== undefined ? { fanoutOverride: o.fanoutOverride } : {}) });
  return loading.situations.reduce((m, s) => Math.max(m, s.andLoads + s.orLoads), 0);
}

/** What GW5001's hint says of the fast variants when they were tried against a delay. */
function fastTriedText(o: ResolvedOptions): string {
  return (
    `the fast variants were tried (speed-up capacitor up to ${fmtFarads(o.capacitorMaxFarads)} and Schottky clamp, their estimates held ${fmt(FAST_DELAY_GUARD * 100)} % under ` +
    `the budget for the estimate's accuracy), and the figure is for the one that came closest`
  );
}

/** Which constraint blocks an infeasible request: the ones whose removal alone lets the search
 *  succeed, with how far the relaxed design misses them. */
function explainBlockers(netlist: CellNetlist, u: UniformEnv, first: Attempt): Diagnostic {
  const o = u.o;
  if (first.outcome.ok) throw new Error("explainFailure on a success");
  const f = first.outcome.failure;
  const active = CONSTRAINTS.map((c, i) => ({ c, i })).filter(({ c }) => {
    if (c.id === "power-ceiling") return o.powerCeilingWatts !== undefined;
    if (c.id === "delay-fall" || c.id === "delay-rise") return u.gateDelayMaxSeconds !== undefined;
    if (c.id === "turn-off-current") return o.turnOffRatioMin > 0;
    if (c.id === "collector-current") return o.collectorCurrentMinAmps > 0;
    return c.id !== "input-current" && c.id !== "or-drive";
  });
  // Constraints the user set come first: they are the ones the user can most readily relax.
  const userSet = (id: string): boolean => id === "power-ceiling" || id === "delay-fall" || id === "delay-rise";
  active.sort((a, b) => Number(userSet(b.c.id)) - Number(userSet(a.c.id)) || a.i - b.i);
  // Which constraints block is found on every other standard value (much faster); the best
  // value reached is then bisected on the same coarser series (so it is "about").
  const coarse: UniformEnv = { ...u, grid: u.grid.filter((_, k) => k % 2 === 0) };
  const blockers: { id: string; i: number; reached: number }[] = [];
  for (const { c, i } of active) {
    const relaxed = attemptAll(netlist, { ...coarse, disabled: new Set([...(u.disabled ?? []), i]) });
    if (!relaxed.outcome.ok) continue;
    blockers.push({ id: c.id, i, reached: worstValue(relaxed.outcome.sized, i) });
  }
  // Both delays failing together (a budget far below any design): relax them as one.
  const iFall = CI["delay-fall"];
  const iRise = CI["delay-rise"];
  if (blockers.length === 0 && u.gateDelayMaxSeconds !== undefined) {
    const relaxed = attemptAll(netlist, { ...coarse, disabled: new Set([...(u.disabled ?? []), iFall, iRise]) });
    if (relaxed.outcome.ok) {
      const fall = worstValue(relaxed.outcome.sized, iFall);
      const rise = worstValue(relaxed.outcome.sized, iRise);
      blockers.push(rise >= fall ? { id: "delay-rise", i: iRise, reached: rise } : { id: "delay-fall", i: iFall, reached: fall });
    }
  }
  const where = `, largest fan-out ${largestFanout(netlist, first.defs, o)}`;
  if (blockers.length > 0) {
    const b0 = blockers[0]!;
    const spec = CONSTRAINTS[b0.i]!;
    const limit = limitOf(u, spec.id);
    // Best value any design reaches: bisect the requirement between what the relaxed design
    // reached and the limit.
    let best = b0.reached;
    if (limit !== undefined && Number.isFinite(best)) {
      let good = best;
      let bad = limit;
      // Times, powers and currents span decades: bisect those on a log scale.
      const logScale = spec.unit !== "V" && spec.unit !== "" && good > 0 && bad > 0;
      for (let k = 0; k < 6; k++) {
        const mid = logScale ? Math.sqrt(good * bad) : (good + bad) / 2;
        const tightened = withLimit(coarse, spec.id, mid);
        if (attemptAll(netlist, tightened).outcome.ok) good = mid;
        else bad = mid;
      }
      best = good;
    }
    const alt = blockers.slice(1).map((b) => labelOf(b.id));
    let msg = `${f.def.title}${where}: no ${o.series} values meet every constraint at every corner; ${labelOf(b0.id)} fails first`;
    if (limit !== undefined) msg += `: the best design reaches about ${fmtQuantity(best, spec.unit)} against ${spec.sense === "min" ? "at least" : "at most"} ${fmtQuantity(limit, spec.unit)} required`;
    if (alt.length) msg += ` (relaxing ${alt.length === 1 ? "" : "any one of "}${alt.join(", ")} instead would also let it fit)`;
    let hint = `what would relax it: ${RELAX[b0.id] ?? "a looser requirement"}`;
    if (first.triedVariant && b0.id === "saturation") hint += "; the high-fan-out variant was tried and does not fit either";
    if (first.triedFast && (b0.id === "delay-fall" || b0.id === "delay-rise")) hint += `; ${fastTriedText(o)}`;
    return diag("GW5001", msg, undefined, { hint });
  }
  return failureDiagnostic(f, o, first.triedVariant);
}

/** Worst value of constraint `i` over a sized design, evaluated with every constraint on. */
function worstValue(sized: Sized, i: number): number {
  const spec = CONSTRAINTS[i]!;
  let worst = spec.sense === "min" ? Infinity : -Infinity;
  sized.situations.forEach((s, k) => {
    const ctx = { ...sized.ctxFor(s) };
    delete ctx.disabled;
    const r = evaluateSituation(s, sized.valuesBySituation[k]!, ctx, new Float64Array(NC).fill(Infinity), true);
    const c = r.analysis!.constraints.find((x) => x.id === spec.id);
    if (c) worst = spec.sense === "min" ? Math.min(worst, c.value) : Math.max(worst, c.value);
  });
  return worst;
}

function limitOf(u: UniformEnv, id: string): number | undefined {
  const o = u.o;
  switch (id) {
    case "saturation":
      return o.saturationMarginMin;
    case "noise-margin-low":
    case "noise-margin-high":
      return o.noiseMarginMinVolts;
    case "collector-current":
      return o.collectorCurrentMinAmps;
    case "turn-off-current":
      return o.turnOffRatioMin;
    case "power-ceiling":
      return o.powerCeilingWatts;
    case "delay-fall":
    case "delay-rise":
      return u.gateDelayMaxSeconds;
    default:
      return undefined;
  }
}

function withLimit(u: UniformEnv, id: string, v: number): UniformEnv {
  const o = { ...u.o };
  switch (id) {
    case "saturation":
      o.saturationMarginMin = v;
      break;
    case "noise-margin-low":
    case "noise-margin-high":
      o.noiseMarginMinVolts = v;
      break;
    case "collector-current":
      o.collectorCurrentMinAmps = v;
      break;
    case "turn-off-current":
      o.turnOffRatioMin = v;
      break;
    case "power-ceiling":
      o.powerCeilingWatts = v;
      break;
    case "delay-fall":
    case "delay-rise":
      return { ...u, o, gateDelayMaxSeconds: v };
  }
  return { ...u, o };
}

function failureDiagnostic(f: Failure, o: ResolvedOptions, triedVariant: boolean): Diagnostic {
  const where = f.situation ? ` (fan-out ${f.situation.andLoads + f.situation.orLoads})` : "";
  if (f.closest && f.closest.failing.length > 0) {
    const first = f.closest.failing[0]!;
    const i = CONSTRAINTS.findIndex((c) => c.id === first);
    const m = f.closest.margins[i]!;
    const others = f.closest.failing.slice(1).map(labelOf);
    const vals = f.def.parameters.map((p) => `${p.role} ${formatOhms(f.closest!.values[p.key]!)}`).join(", ");
    let msg = `${f.def.title}${where}: no ${o.series} values meet every constraint at every corner; ${labelOf(first)} fails first (closest candidate ${vals} misses it by ${fmt(-m * 100)} %)`;
    if (others.length) msg += `; also failing there: ${others.join(", ")}`;
    let hint = `what would relax it: ${RELAX[first] ?? "a looser requirement"}`;
    if (triedVariant && first === "saturation") hint += " (the high-fan-out variant was tried and did not fit either)";
    return diag("GW5001", msg, undefined, { hint });
  }
  return diag("GW5001", `${f.def.title}${where}: no ${o.series} values meet the constraints${f.reason ? `: ${f.reason}` : ""}`, undefined, {
    hint: "widen the allowed resistor range, allow more gain or a lower fan-out",
  });
}

/** Sizes every cell of the netlist. */
export function sizeDesign(netlist: CellNetlist, options: SizingOptions): StageResult<SizedDesign> {
  const r = resolveOptions(options);
  if (!r.value) return { diagnostics: r.diagnostics };
  const o = r.value;
  const diagnostics: Diagnostic[] = [...r.diagnostics];
  const notes: string[] = [];
  if (netlist.cells.length === 0) {
    diagnostics.push(diag("GW5001", "the design has no cells to size", undefined, { hint: "every output is a constant or an input" }));
    return { diagnostics };
  }
  const grid = valuesInRange(o.series, o.resistorMinOhms, o.resistorMaxOhms);
  if (grid.length < 2) {
    diagnostics.push(diag("GW6003", `the allowed resistor range holds fewer than two ${o.series} values`));
    return { diagnostics };
  }
  const { corners, nominal } = buildCorners(o);
  const u: UniformEnv = { o, corners, nominal, grid, ...(options.quickFailure ? { quick: true } : {}), ...(options.fullSearch ? { fullSearch: true } : {}) };
  if (o.gateDelayMaxSeconds !== undefined) u.gateDelayMaxSeconds = o.gateDelayMaxSeconds;

  if (o.supplyVolts * (1 + o.supplyTolerance) > DEFAULTS.cautionSupplyVolts) {
    diagnostics.push(
      diag("GW5003", `supply up to ${fmt(o.supplyVolts * (1 + o.supplyTolerance))} V: check every resistor's power rating and every part's voltage rating at this supply`, undefined, {
        hint: "work on mains-powered equipment only with proper isolation and qualified practice, follow local codes, and confirm the design by simulation and measurement",
      }),
    );
  }

  let defs: CellDefinition[] = netlist.cells.map((c) => basicCellFor(c.fn));

  if (o.forcedValues) {
    const missing = [...new Set(defs.map((d) => d.id))].filter((id) => {
      const v = o.forcedValues![id];
      return !v || cellById(id)!.parameters.some((p) => !(v[p.key]! > 0));
    });
    if (missing.length) {
      diagnostics.push(diag("GW6001", `given values are incomplete for: ${missing.join(", ")}`, undefined, { hint: `give ${missing.map((id) => cellById(id)!.parameters.map((p) => p.key).join(", ")).join("; ")}` }));
      return { diagnostics };
    }
    const sized = sizeForced(netlist, defs, u, o.forcedValues);
    return { value: assemble(netlist, u, sized, diagnostics, notes, true), diagnostics };
  }

  // A path budget becomes a per-gate budget: the largest one whose design still meets the path
  // budget (bisected between budget/depth and the whole budget), since slower gates cost less.
  const runWith = (u0: UniformEnv): { attempt: Attempt; sized?: Sized; u: UniformEnv } => {
    const attempt = attemptFast(netlist, u0);
    const uu = attempt.plan && attempt.outcome.ok ? { ...u0, plan: attempt.plan, ...(attempt.gateDelayMaxSeconds !== undefined ? { gateDelayMaxSeconds: attempt.gateDelayMaxSeconds } : {}) } : u0;
    if (!attempt.outcome.ok) return { attempt, u: uu };
    let sized = attempt.outcome.sized;
    if (o.mode === "per-gate") sized = sizePerGate(netlist, attempt.defs, uu, sized);
    return { attempt, sized, u: uu };
  };
  let chosen: { attempt: Attempt; sized?: Sized; u: UniformEnv } | undefined;
  if (o.pathDelayMaxSeconds === undefined) {
    chosen = runWith(u);
  } else {
    const budget = o.pathDelayMaxSeconds;
    const cap = o.gateDelayMaxSeconds ?? Infinity;
    let lo = budget / logicDepth(netlist);
    let hi = Math.min(budget, cap);
    let lastFailure: { attempt: Attempt; u: UniformEnv } | undefined;
    let fastest = Infinity;
    const tryBudget = (g: number): "ok" | "slow" | "infeasible" => {
      const uu = { ...u, gateDelayMaxSeconds: g };
      const r = runWith(uu);
      if (!r.sized) {
        lastFailure = { attempt: r.attempt, u: uu };
        return "infeasible";
      }
      const delay = pathDelayOf(netlist, r.sized);
      fastest = Math.min(fastest, delay);
      if (delay <= budget * (1 + 1e-9)) {
        if (!chosen || g > (chosen.u.gateDelayMaxSeconds ?? 0)) chosen = r;
        return "ok";
      }
      return "slow";
    };
    if (tryBudget(hi) !== "ok") {
      for (let k = 0; k < 5; k++) {
        const mid = Math.sqrt(lo * hi);
        const r = tryBudget(mid);
        if (r === "ok") lo = mid;
        else if (r === "slow") hi = mid;
        else lo = mid; // too tight to build at all: the answer lies above
      }
      if (!chosen) {
        // Try the tightest per-gate budget as a last resort.
        tryBudget(budget / logicDepth(netlist));
      }
    }
    if (!chosen) {
      if (lastFailure && !Number.isFinite(fastest)) {
        diagnostics.push(explainFailure(netlist, lastFailure.u, lastFailure.attempt));
      } else {
        // Wired-AND: would the same cells meet the budget without the tied collectors' capacitance
        // and leakage (at the loosest and the tightest per-gate budget tried)?
        const wiredBlocks =
          netlist.nets.some((n) => n.tiedCells?.length) &&
          [Math.min(budget, cap), budget / logicDepth(netlist)].some((g) => {
            const r = runWith({ ...u, wired: false, gateDelayMaxSeconds: g });
            return r.sized !== undefined && pathDelayOf(netlist, r.sized) <= budget * (1 + 1e-9);
          });
        diagnostics.push(
          diag("GW5001", `no ${o.series} values meet the path delay budget of ${fmt(budget * 1e9)} ns: the fastest design found takes ${fmt(fastest * 1e9)} ns along its longest path${wiredBlocks ? "; the wired-AND nets make it infeasible: their tied collectors' capacitance slows the nets, and without it the same cells would meet the budget" : ""}`, undefined, {
            hint: `what would relax it: ${wiredBlocks ? "build without --wired-and (every output then has its own collector resistor), or " : ""}${RELAX["delay-rise"]}, or fewer logic levels on the longest path`,
          }),
        );
      }
      return { diagnostics };
    }
  }
  const first = chosen.attempt;
  if (!first.outcome.ok || !chosen.sized) {
    diagnostics.push(explainFailure(netlist, chosen.u, first));
    return { diagnostics };
  }
  if (first.variantNote) {
    diagnostics.push(diag("GW5005", first.variantNote));
    notes.push(`High-fan-out variant: ${first.variantNote}.`);
  }
  if (first.fastNote) {
    diagnostics.push(diag("GW5010", first.fastNote));
    notes.push(`Fast variants: ${first.fastNote}.`);
  }
  const sized = chosen.sized;
  const uFinal = chosen.u;
  if (uFinal.gateDelayMaxSeconds !== undefined && o.pathDelayMaxSeconds !== undefined) {
    notes.push(`Each gate was held to ${fmt(uFinal.gateDelayMaxSeconds * 1e9)} ns so that the longest path meets ${fmt(o.pathDelayMaxSeconds * 1e9)} ns.`);
  }
  const design = assemble(netlist, uFinal, sized, diagnostics, notes, false);
  if (uFinal.plan?.capFarads !== undefined && design.totals.capacitors > 0) {
    design.parameters = [
      ...design.parameters,
      { name: "capacitorSeries", label: `Capacitor series ${o.capacitorSeries}`, value: seriesMantissas(o.capacitorSeries).length, unit: "values/decade", source: options.capacitorSeries !== undefined ? "user" : "default" },
      { name: "capacitorTolerance", label: "Capacitor tolerance", value: o.capacitorTolerance, unit: "ratio", source: options.capacitorTolerance !== undefined ? "user" : "default" },
      { name: "speedUpCapacitorFarads", label: "Speed-up capacitor chosen", value: uFinal.plan.capFarads, unit: "F", source: "default" },
    ];
  }
  return { value: design, diagnostics };
}
