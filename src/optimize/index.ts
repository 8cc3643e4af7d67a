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
//      12 variables, expand / irredundant / reduce to 16, outputs together up to 10 so that they share terms;
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
import { mappedTally, type MappingTarget } from "./cost.js";
import type { PartTally } from "../map/cost.js";
import { DEFAULT_OPTIMIZE_LIMITS, structuralCost, type OptimizeLimits, type PassContext } from "./context.js";
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
  /** Nodes above which passes are priced by a structural estimate (default LARGE_DESIGN_NODES). */
  largeDesignNodes?: number;
  /** Work one pass may spend pricing candidates in the whole graph (default WORK_PER_PASS). */
  workPerPass?: number;
}

export interface OptimizeResult {
  graph: LogicGraph;
  report: OptimizationReport;
  diagnostics: Diagnostic[];
  /** Present when the passes did not depend on the cell families (level 0, or a large design
   *  priced by the structural estimate): the same optimization for other families, priced by
   *  mapping onto them without running the passes again. */
  forCells?: (cells: CellChoice) => OptimizeResult;
}

/** Most notes turned into diagnostics (the report keeps them all). */
const MAX_NOTE_DIAGNOSTICS = 12;

/** Work one pass may spend pricing candidates, in graph nodes mapped: a pass on a graph of
 *  n nodes may make about WORK_PER_PASS / n cost evaluations (never more than the limit
 *  maxEvaluations, never fewer than MIN_EVALUATIONS). Keeps large designs to seconds. */
export const WORK_PER_PASS = 150_000;
const MIN_EVALUATIONS = 4;
/** Above this many nodes the passes are priced by a structural estimate instead of by mapping,
 *  and the result is mapped once (see optimizeDesign). */
export const LARGE_DESIGN_NODES = 50_000;
/** Fewest whole-graph evaluations with which a searching pass is worth running. */
export const SEARCH_MIN_EVALUATIONS = 16;
/** Prices remembered per run (a candidate graph met twice is mapped once). */
const COST_CACHE_SIZE = 2000;

const OP_CODES: Record<string, number> = { input: 1, const0: 2, const1: 3, buf: 4, not: 5, and: 6, or: 7, xor: 8 };

/**
 * A short key of a graph's structure (operations, operands, output nodes): two independent
 * 32-bit hashes and the sizes, so the cache holds a few dozen characters a graph, not a copy of
 * it. Graphs with equal keys are taken as equal (the chance of two different graphs meeting on
 * 64 bits and the sizes is negligible).
 */
function structureKey(x: LogicGraph): string {
  let h1 = 0x811c9dc5;
  let h2 = 0x9747b28c;
  const mix = (v: number) => {
    h1 = Math.imul(h1 ^ v, 0x01000193);
    h2 = Math.imul(h2 ^ v, 0x5bd1e995);
    h2 ^= h2 >>> 15;
  };
  for (const n of x.nodes) {
    mix(OP_CODES[n.op] ?? 0);
    mix(n.fanins.length);
    for (const f of n.fanins) mix(f + 1);
  }
  mix(0xfffffff);
  for (const p of x.outputs) mix(p.node + 1);
  return `${x.nodes.length}:${x.outputs.length}:${(h1 >>> 0).toString(36)}:${(h2 >>> 0).toString(36)}`;
}

export function optimizeDesign(g: LogicGraph, opts: OptimizeOptions): OptimizeResult {
  const run = runPasses(g, opts);
  const finish = (cells: CellChoice): OptimizeResult => {
    const result = priceResult(g, opts, run, cells);
    // The passes did not look at the cell families (level 0, or a large design priced by the
    // structural estimate): a mapping onto other families needs only the pricing again.
    if (run.familyFree) result.forCells = finish;
    return result;
  };
  return finish(opts.cells ?? "mixed");
}

/** What the passes leave: the graph they reached, their records and notes, before the result is
 *  priced by mapping onto the chosen cell families. */
interface PassRun {
  level: OptLevel;
  model: CostModel;
  /** The graph the passes reached (the large design's may still be dropped when priced). */
  reached: LogicGraph;
  large: boolean;
  largeAbove: number;
  passes: PassRecord[];
  notes: OptimizationNote[];
  counts: ReturnType<typeof emptyTwoLevelCounts>;
  diagnostics: Diagnostic[];
  /** True when nothing the passes did depended on the cell families. */
  familyFree: boolean;
  /** Prices by mapping onto the options' cell families, as the passes used them (absent when
   *  the passes priced structurally). */
  tallyOf?: (x: LogicGraph) => PartTally;
  before?: PartTally;
}

function mappingTarget(opts: OptimizeOptions, model: CostModel, cells: CellChoice): MappingTarget {
  return {
    stateNames: opts.stateNames,
    maxFanin: opts.maxFanin,
    cells,
    model,
    maxFanout: opts.maxFanout ?? DEFAULT_MAX_FANOUT,
    wiredAnd: !!opts.wiredAnd,
  };
}

/** Prices by graph structure, for one mapping target: passes often rebuild a graph they have
 *  seen before. */
function tallyCache(target: MappingTarget): (x: LogicGraph) => PartTally {
  const cache = new Map<string, PartTally>();
  return (x: LogicGraph): PartTally => {
    const key = structureKey(x);
    const hit = cache.get(key);
    if (hit !== undefined) return hit;
    const t = mappedTally(x, target);
    if (cache.size >= COST_CACHE_SIZE) cache.clear();
    cache.set(key, t);
    return t;
  };
}

function runPasses(g: LogicGraph, opts: OptimizeOptions): PassRun {
  const level: OptLevel = opts.level ?? 2;
  const model = opts.costModel ?? dtlCostModel();
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
  // Pricing. A pass's result is priced by mapping the whole graph while that is cheap; above
  // largeDesignNodes nodes a mapping costs more than most passes, so the passes are priced by a
  // structural estimate instead and the result is mapped once at the end and kept only if it is
  // cheaper than the logic as written.
  //
  // Work. Every pass runs at every size; each bounds its own work in proportion to the graph (the
  // sweep's proofs, the regions' minimizations, the two-level points). The passes that search
  // candidates by pricing them in the whole graph (collapse of cones, resubstitution,
  // extraction) may make WORK_PER_PASS / nodes evaluations; when that is fewer than
  // SEARCH_MIN_EVALUATIONS they cannot do anything useful and are left out, with a note.
  const largeAbove = opts.largeDesignNodes ?? LARGE_DESIGN_NODES;
  const workPerPass = opts.workPerPass ?? WORK_PER_PASS;
  const large = level >= 1 && g.nodes.length > largeAbove;
  const familyFree = level === 0 || large;
  if (level === 0) return { level, model, reached: g, large, largeAbove, passes, notes, counts, diagnostics, familyFree };
  const tallyOf = large ? undefined : tallyCache(mappingTarget(opts, model, opts.cells ?? "mixed"));
  const before = tallyOf?.(g);
  const price = tallyOf ? (x: LogicGraph) => tallyOf(x).cost : (x: LogicGraph) => structuralCost(x, opts.stateNames);
  const ctx: PassContext = { stateNames: opts.stateNames, cost: price, notes, counts, dontCares: use.usable };
  const baseLimits = { ...DEFAULT_OPTIMIZE_LIMITS, ...(opts.limits ?? {}) };
  let budgetNoted = false;
  const leftOut: string[] = [];

  let cur = g;
  let curCost = before ? before.cost : price(g);
  const evaluationsFor = (x: LogicGraph) => Math.max(MIN_EVALUATIONS, Math.min(baseLimits.maxEvaluations, Math.floor(workPerPass / Math.max(1, x.nodes.length))));
  const step = (pass: string, run: (x: LogicGraph) => LogicGraph, acceptEqual = false) => {
    const evaluations = evaluationsFor(cur);
    if (evaluations < baseLimits.maxEvaluations && !budgetNoted && level === 2) {
      budgetNoted = true;
      notes.push({ kind: "limit", pass: "optimize", message: `a large design (${cur.nodes.length} nodes): each pass prices at most ${evaluations} candidates in the whole graph` });
    }
    ctx.limits = { ...baseLimits, maxEvaluations: evaluations };
    const next = run(cur);
    if (next === cur) {
      passes.push({ pass, costBefore: curCost, costAfter: curCost, accepted: false });
      return;
    }
    const c = price(next);
    const accepted = c < curCost || (acceptEqual && c === curCost);
    passes.push({ pass, costBefore: curCost, costAfter: c, accepted });
    if (accepted) {
      cur = next;
      curCost = c;
    }
  };
  /** A pass that searches by whole-graph pricing: run only when it can afford a useful search. */
  const search = (pass: string, run: (x: LogicGraph) => LogicGraph) => {
    if (evaluationsFor(cur) < Math.min(SEARCH_MIN_EVALUATIONS, baseLimits.maxEvaluations)) {
      leftOut.push(pass);
      return;
    }
    step(pass, run);
  };
  const sn = opts.stateNames;
  if (level >= 1) {
    step("simplify", (x) => simplifyLogic(x, sn), true);
    step("inverters", (x) => minimizeInverters(x, ctx));
    step("flatten", (x) => simplifyLogic(flattenTrees(x, sn, opts.maxFanin), sn), true);
  }
  if (level >= 2) {
    step("sweep", (x) => sweepEquivalent(x, ctx));
    search("collapse", (x) => collapseTwoLevel(x, ctx));
    step("collapse regions", (x) => collapseTwoLevel(x, { ...ctx, mode: "regions" }));
    step("xor-expand", (x) => expandXors(x, ctx), true);
    search("resubstitute", (x) => resubstitute(x, ctx));
    search("extract", (x) => extractCommon(x, ctx));
    step("factor", (x) => factorNodes(x, ctx));
    step("flatten", (x) => simplifyLogic(flattenTrees(x, sn, opts.maxFanin), sn), true);
  }
  if (leftOut.length) {
    notes.push({
      kind: "limit",
      pass: "optimize",
      message: `a large design (${cur.nodes.length} nodes): ${leftOut.join(", ")} left out (each could price fewer than ${SEARCH_MIN_EVALUATIONS} candidates in the whole graph); the local passes ran in full`,
    });
  }
  return { level, model, reached: cur, large, largeAbove, passes, notes, counts, diagnostics, familyFree, ...(tallyOf ? { tallyOf } : {}), ...(before ? { before } : {}) };
}

/** The passes' result priced by mapping onto `cells` (for the run's own families when the passes
 *  priced by mapping), the large design's keep-or-drop decision, the report. */
function priceResult(g: LogicGraph, opts: OptimizeOptions, run: PassRun, cells: CellChoice): OptimizeResult {
  const { level, model, large, largeAbove } = run;
  const target = mappingTarget(opts, model, cells);
  const tallyOf = run.tallyOf ?? tallyCache(target);
  const before = run.before ?? tallyOf(g);
  const notes = [...run.notes];
  const diagnostics = [...run.diagnostics];
  const file = g.file !== undefined ? { file: g.file } : {};
  let cur = run.reached;
  let after = level === 0 ? before : tallyOf(cur);
  if (large) {
    const kept = cur === g || after.cost <= before.cost;
    if (!kept) {
      cur = g;
      after = before;
    }
    notes.push({
      kind: "heuristic",
      pass: "optimize",
      message:
        `a large design (${g.nodes.length} nodes, more than ${largeAbove}): the passes were priced by a structural estimate of the parts instead of by mapping; ` +
        `the result was mapped once and ${kept ? "kept: it costs no more than the logic as written" : "dropped: it cost more than the logic as written"}`,
    });
  }
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
    passes: [...run.passes],
    notes,
    twoLevel: { ...run.counts },
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
