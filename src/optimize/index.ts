// The optimization pipeline of a logic graph before mapping. Each pass: LogicGraph → LogicGraph,
// keeping the inputs, the outputs and the named state signals (one pass a file, each testable
// alone). The passes are priced by mapping: a graph costs what its cells cost in the chosen
// cost model, mapped with the options the pipeline will use, and a pass's result is kept only
// when it is cheaper (equal, for the clean-up passes), so no level is ever worse than mapping
// the logic as written.
//
// Levels (--opt):
//   0  the logic as written (the mapper still folds constants and shares equal gates)
//   1  local clean-up: constant propagation and structural hashing, inverter minimization,
//      merging AND and OR trees into wide gates
//   2  (default) also: functional merging, two-level minimization with don't-cares (exact up to
//      12 variables, espresso-style to 16, outputs together up to 10 so that they share terms;
//      hazard-free covers for logic that feeds a loop), minimization of fan-out-free regions in
//      large designs, XOR expansion, Boolean resubstitution, common-subexpression extraction
//      and algebraic factoring.
import { diag, type Diagnostic } from "../diagnostics/index.js";
import type { LogicGraph } from "../logic/graph.js";
import { dontCareUse } from "../logic/dontcares.js";
import { dtlCostModel, type CostModel } from "../map/cost.js";
import { DEFAULT_MAX_FANOUT, type CellChoice } from "../map/map.js";
import { simplifyLogic } from "./simplify.js";
import { flattenTrees } from "./flatten.js";
import { minimizeInverters } from "./inverters.js";
import { sweepEquivalent } from "./sweep.js";
import { collapseTwoLevel } from "./collapse.js";
import { expandXors } from "./xor-expand.js";
import { resubstitute } from "./resub.js";
import { extractCommon } from "./extract.js";
import { factorNodes } from "./factor.js";
import { mappedCost, mappedTally, type MappingTarget } from "./cost.js";
import { DEFAULT_OPTIMIZE_LIMITS, type OptimizeLimits, type PassContext } from "./context.js";
import { emptyTwoLevelCounts, type OptimizationNote, type OptimizationReport, type OptLevel, type PassRecord } from "./report.js";

export interface OptimizeOptions {
  stateNames: readonly string[];
  maxFanin: number;
  /** Optimization level (default 2). */
  level?: OptLevel;
  /** Cell families the pipeline maps onto (default mixed). */
  cells?: CellChoice;
  /** Cost model (default: DTL parts with the default weights). */
  costModel?: CostModel;
  /** Fan-out limit of the mapping (default DEFAULT_MAX_FANOUT; 0: none). */
  maxFanout?: number;
  /** Wired-AND outputs in the mapping (default off). */
  wiredAnd?: boolean;
  limits?: Partial<OptimizeLimits>;
}

export interface OptimizeResult {
  graph: LogicGraph;
  report: OptimizationReport;
  diagnostics: Diagnostic[];
}

/** Most notes turned into diagnostics (the report keeps them all). */
const MAX_NOTE_DIAGNOSTICS = 12;

/** Work one pass may spend pricing candidates, in graph nodes mapped: a pass on a graph of
 *  n nodes may make about WORK_PER_PASS / n cost evaluations (never more than the limit
 *  maxEvaluations, never fewer than MIN_EVALUATIONS). Keeps large designs to seconds. */
export const WORK_PER_PASS = 150_000;
const MIN_EVALUATIONS = 4;
/** Prices remembered per run (a candidate graph met twice is mapped once). */
const COST_CACHE_SIZE = 2000;

export function optimizeDesign(g: LogicGraph, opts: OptimizeOptions): OptimizeResult {
  const level: OptLevel = opts.level ?? 2;
  const model = opts.costModel ?? dtlCostModel();
  const target: MappingTarget = {
    stateNames: opts.stateNames,
    maxFanin: opts.maxFanin,
    cells: opts.cells ?? "mixed",
    model,
    maxFanout: opts.maxFanout ?? DEFAULT_MAX_FANOUT,
    wiredAnd: !!opts.wiredAnd,
  };
  // Prices by graph structure: passes often rebuild a graph they have seen before.
  const cache = new Map<string, number>();
  const cost = (x: LogicGraph) => {
    const key = x.nodes.map((n) => `${n.op}${n.fanins.join(",")}`).join(";") + "|" + x.outputs.map((p) => p.node).join(",");
    const hit = cache.get(key);
    if (hit !== undefined) return hit;
    const c = mappedCost(x, target);
    if (cache.size >= COST_CACHE_SIZE) cache.clear();
    cache.set(key, c);
    return c;
  };
  const before = mappedTally(g, target);
  const notes: OptimizationNote[] = [];
  const counts = emptyTwoLevelCounts();
  const passes: PassRecord[] = [];
  const diagnostics: Diagnostic[] = [];
  const file = g.file !== undefined ? { file: g.file } : {};

  const use = dontCareUse(g, opts.stateNames);
  if (level === 2) {
    for (const { set, reason } of use.ignored) {
      notes.push({ kind: "dont-cares", pass: "collapse", signal: set.signal, message: `the don't-cares of '${set.signal}' are not used: ${reason}` });
      diagnostics.push(diag("GW3005", `the don't-cares of '${set.signal}' are not used: ${reason}; its value there stays as written`, file));
    }
  }
  const ctx: PassContext = { stateNames: opts.stateNames, cost, notes, counts, dontCares: use.usable };
  const baseLimits = { ...DEFAULT_OPTIMIZE_LIMITS, ...(opts.limits ?? {}) };
  let budgetNoted = false;

  let cur = g;
  let curCost = before.cost;
  const step = (pass: string, run: (x: LogicGraph) => LogicGraph, acceptEqual = false) => {
    const evaluations = Math.max(MIN_EVALUATIONS, Math.min(baseLimits.maxEvaluations, Math.floor(WORK_PER_PASS / Math.max(1, cur.nodes.length))));
    if (evaluations < baseLimits.maxEvaluations && !budgetNoted && level === 2) {
      budgetNoted = true;
      notes.push({ kind: "limit", pass: "optimize", message: `a large design (${cur.nodes.length} nodes): each pass prices at most ${evaluations} candidates` });
    }
    ctx.limits = { ...baseLimits, maxEvaluations: evaluations };
    const next = run(cur);
    if (next === cur) {
      passes.push({ pass, costBefore: curCost, costAfter: curCost, accepted: false });
      return;
    }
    const c = cost(next);
    const accepted = c < curCost || (acceptEqual && c === curCost);
    passes.push({ pass, costBefore: curCost, costAfter: c, accepted });
    if (accepted) {
      cur = next;
      curCost = c;
    }
  };
  const sn = opts.stateNames;
  if (level >= 1) {
    step("simplify", (x) => simplifyLogic(x, sn), true);
    step("inverters", (x) => minimizeInverters(x, ctx));
    step("flatten", (x) => simplifyLogic(flattenTrees(x, sn, opts.maxFanin), sn), true);
  }
  if (level >= 2) {
    step("sweep", (x) => sweepEquivalent(x, ctx));
    step("collapse", (x) => collapseTwoLevel(x, ctx));
    step("collapse regions", (x) => collapseTwoLevel(x, { ...ctx, mode: "regions" }));
    step("xor-expand", (x) => expandXors(x, ctx), true);
    step("resubstitute", (x) => resubstitute(x, ctx));
    step("extract", (x) => extractCommon(x, ctx));
    step("factor", (x) => factorNodes(x, ctx));
    step("flatten", (x) => simplifyLogic(flattenTrees(x, sn, opts.maxFanin), sn), true);
  }
  const after = level === 0 ? before : mappedTally(cur, target);
  const shown = notes.filter((n) => n.kind === "heuristic" || n.kind === "limit" || n.kind === "hazard");
  for (const n of shown.slice(0, MAX_NOTE_DIAGNOSTICS)) diagnostics.push(diag("GW3006", n.message, file));
  if (shown.length > MAX_NOTE_DIAGNOSTICS) diagnostics.push(diag("GW3006", `${shown.length - MAX_NOTE_DIAGNOSTICS} more optimization notes in the report`, file));
  const costModel: OptimizationReport["costModel"] = { name: model.name, description: model.description };
  if (model.weights) costModel.weights = { ...model.weights };
  const report: OptimizationReport = {
    level,
    costModel,
    mapping: { cells: target.cells, maxFanin: target.maxFanin, maxFanout: target.maxFanout, wiredAnd: target.wiredAnd },
    before,
    after,
    passes,
    notes,
    twoLevel: counts,
  };
  return { graph: cur, report, diagnostics };
}

/** The optimized graph alone (see optimizeDesign). */
export function optimizeLogic(g: LogicGraph, opts: OptimizeOptions): LogicGraph {
  return optimizeDesign(g, opts).graph;
}

export { simplifyLogic, flattenTrees, minimizeInverters, sweepEquivalent, collapseTwoLevel, expandXors, resubstitute, extractCommon, factorNodes };
export type { OptimizationReport, OptimizationNote, OptLevel, PassRecord } from "./report.js";
export type { OptimizeLimits, PassContext } from "./context.js";
export { DEFAULT_OPTIMIZE_LIMITS };
export { mappedCost, mappedTally, type MappingTarget } from "./cost.js";
