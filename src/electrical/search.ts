// Search over standard values for one cell kind: enumerate the outer parameters (high values
// first: least power), find the largest feasible value of the bisected parameter (its power
// falls as it grows) and the feasible interval of the free parameter (the base resistor, which
// trades saturation against turn-off speed). Cuts every branch whose power already exceeds the
// best found. Each step keeps the least-violated candidate for the failure message.
import type { CellDefinition, CellValues } from "../cells/types.js";
import { CONSTRAINTS, NC, evaluateType, type EvalContext, type TypeEval } from "./evaluate.js";
import type { Situation } from "./situations.js";

export interface Closest {
  values: CellValues;
  /** Least margin and the constraint it belongs to. */
  worstMargin: number;
  failing: string[];
  margins: Float64Array;
}

export interface SearchResult {
  values?: CellValues;
  objectiveWatts?: number;
  eval?: TypeEval;
  /** Feasible interval of the free parameter, as indices into the grid. */
  freeInterval?: [number, number];
  closest?: Closest;
  /** With SearchSpec.keepCandidates and no fit: every failing candidate weighed, in order. */
  candidates?: CellValues[];
  evaluations: number;
}

/** Coarse steps scale with the number of standard values (E24 over four decades: 8). */
export function coarseStep(n: number): number {
  return Math.max(8, Math.round(n / 12));
}
const OUTER_STEP = 4;

function minMargin(m: Float64Array, only?: (i: number) => boolean): number {
  let x = Infinity;
  for (let i = 0; i < NC; i++) if ((!only || only(i)) && m[i]! < x) x = m[i]!;
  return x;
}

function failingIds(m: Float64Array): string[] {
  const out: { id: string; m: number }[] = [];
  for (let i = 0; i < NC; i++) if (m[i]! < -1e-12) out.push({ id: CONSTRAINTS[i]!.id, m: m[i]! });
  out.sort((a, b) => a.m - b.m);
  return out.map((x) => x.id);
}

/** A candidate as the failure message describes it: its values, its least margin and the
 *  constraints it fails, worst first. */
export function closestOf(values: CellValues, e: TypeEval): Closest {
  return { values: { ...values }, worstMargin: minMargin(e.margins), failing: failingIds(e.margins), margins: e.margins };
}

export interface SearchSpec {
  def: CellDefinition;
  situations: readonly Situation[];
  ctx: EvalContext;
  /** Standard values allowed, ascending. */
  grid: readonly number[];
  /** Parameters held fixed (e.g. the shared R_C). */
  fixed: CellValues;
  /** A known candidate to start from (its power prunes the search at once when it fits). */
  initial?: CellValues;
  /** Return every failing candidate the search weighed (SearchResult.candidates). */
  keepCandidates?: boolean;
}

/** Searches one cell kind. Pure; deterministic. */
export function searchCell(spec: SearchSpec): SearchResult {
  const { def, situations, ctx, grid, fixed } = spec;
  const n = grid.length;
  const freeKey = def.freeKey;
  const bisectKey = def.bisectKey !== undefined && !(def.bisectKey in fixed) ? def.bisectKey : undefined;
  const outerKeys = def.parameters
    .map((p) => p.key)
    .filter((k) => !(k in fixed) && k !== bisectKey && k !== freeKey);
  const dirIdx = new Int8Array(NC); // 1 up, -1 down, 0 none
  for (let i = 0; i < NC; i++) {
    const d = def.freeDirection[CONSTRAINTS[i]!.id];
    dirIdx[i] = d === "up" ? 1 : d === "down" ? -1 : 0;
  }
  let evaluations = 0;
  let closest: Closest | undefined;
  const candidates: CellValues[] | undefined = spec.keepCandidates ? [] : undefined;
  const consider = (values: CellValues, e: TypeEval): void => {
    candidates?.push({ ...values });
    if (!closest || minMargin(e.margins) > closest.worstMargin) closest = closestOf(values, e);
  };
  // The search meets some value sets more than once (a quarter of its evaluations on a large
  // design: the free parameter's interval ends on a point its bisection has already
  // evaluated, for one): each is evaluated once. Situations and context do not change during a
  // search, and a TypeEval is never changed once made, so a remembered one is the same answer.
  const seen = new Map<string, TypeEval>();
  const evalAt = (values: CellValues): TypeEval => {
    evaluations++;
    let key = "";
    for (const k in values) key += `${k}=${values[k]!};`;
    const hit = seen.get(key);
    if (hit) return hit;
    const e = evaluateType(situations, values, ctx);
    seen.set(key, e);
    return e;
  };
  const ok = (e: TypeEval, dir: number): boolean => {
    for (let i = 0; i < NC; i++) if (dirIdx[i] === dir && e.margins[i]! < -1e-12) return false;
    return true;
  };
  const allOk = (e: TypeEval): boolean => minMargin(e.margins) >= -1e-12;

  /** Feasible interval of the free parameter for the other values, or undefined. Aborts early
   *  (returns "dearer") when the power alone is no better than `powerLimit`. */
  const freeFeasible = (
    base: CellValues,
    powerLimit: number,
  ): { lo: number; hi: number; e: TypeEval; power: number } | "dearer" | undefined => {
    const top = { ...base, [freeKey]: grid[n - 1]! };
    const eTop = evalAt(top);
    if (eTop.objectiveWatts >= powerLimit) return "dearer";
    // Constraints that do not depend on the free parameter decide at once.
    if (!ok(eTop, 0)) {
      consider(top, eTop);
      return undefined;
    }
    if (!ok(eTop, 1)) {
      consider(top, eTop);
      return undefined;
    }
    const bottom = { ...base, [freeKey]: grid[0]! };
    const eBottom = evalAt(bottom);
    if (!ok(eBottom, -1)) {
      consider(bottom, eBottom);
      return undefined;
    }
    // lo: smallest index where every "up" constraint holds.
    let a = 0;
    let b = n - 1;
    if (ok(eBottom, 1)) b = 0;
    while (a < b) {
      const mid = (a + b) >> 1;
      const e = evalAt({ ...base, [freeKey]: grid[mid]! });
      if (ok(e, 1)) b = mid;
      else a = mid + 1;
    }
    const lo = b;
    // hi: largest index where every "down" constraint holds.
    a = 0;
    b = n - 1;
    if (ok(eTop, -1)) a = n - 1;
    while (a < b) {
      const mid = (a + b + 1) >> 1;
      const e = evalAt({ ...base, [freeKey]: grid[mid]! });
      if (ok(e, -1)) a = mid;
      else b = mid - 1;
    }
    const hi = a;
    if (lo > hi) {
      // Conflict: the free parameter cannot satisfy both sides. Keep the closest call.
      const mid = (lo + hi) >> 1;
      const v = { ...base, [freeKey]: grid[mid]! };
      consider(v, evalAt(v));
      return undefined;
    }
    const v = { ...base, [freeKey]: grid[lo]! };
    const e = evalAt(v);
    if (!allOk(e)) {
      consider(v, e);
      return undefined;
    }
    return { lo, hi, e, power: e.objectiveWatts };
  };

  let best: { values: CellValues; power: number; e: TypeEval; lo: number; hi: number } | undefined;

  const bisectUp: number[] = [];
  const upActive = ctx.inputCurrentCap !== undefined || ctx.opts.powerCeilingWatts !== undefined || ctx.gateDelayMaxSeconds !== undefined;
  if (bisectKey !== undefined && def.bisectDirection && upActive) {
    for (let i = 0; i < NC; i++) if (def.bisectDirection[CONSTRAINTS[i]!.id] === "up") bisectUp.push(i);
  }
  const upOk = (e: TypeEval, free: "low" | "high"): boolean => {
    for (const i of bisectUp) {
      const fd = dirIdx[i];
      // Judge each constraint at the free value that suits it best.
      if ((fd === -1 && free !== "low") || (fd === 1 && free !== "high")) continue;
      if (e.margins[i]! < -1e-12) return false;
    }
    return true;
  };
  /** Smallest index of the bisected parameter meeting its "up" constraints; −1 when none does. */
  const bisectFloor = (base: CellValues): number => {
    if (bisectUp.length === 0 || bisectKey === undefined) return 0;
    const passes = (i: number): boolean => {
      const lowE = evalAt({ ...base, [bisectKey]: grid[i]!, [freeKey]: grid[0]! });
      if (!upOk(lowE, "low")) return false;
      const highE = evalAt({ ...base, [bisectKey]: grid[i]!, [freeKey]: grid[n - 1]! });
      return upOk(highE, "high");
    };
    if (!passes(n - 1)) return -1;
    if (passes(0)) return 0;
    let a = 0;
    let b = n - 1;
    while (b - a > 1) {
      const mid = (a + b) >> 1;
      if (passes(mid)) b = mid;
      else a = mid;
    }
    return b;
  };

  const tryBase = (base: CellValues): void => {
    const limit = best ? best.power * (1 - 1e-12) : Infinity;
    if (bisectKey === undefined) {
      const r = freeFeasible(base, limit);
      if (r && r !== "dearer") best = { values: { ...base, [freeKey]: grid[r.lo]! }, power: r.power, e: r.e, lo: r.lo, hi: r.hi };
      return;
    }
    // Smallest bisect value meeting the constraints that ease as it grows (they do not depend on
    // the free parameter, or are taken at its best for them).
    const floor = bisectFloor(base);
    if (floor < 0) return;
    // Coarse scan from the top (least power) down to the floor; stop once power exceeds the best.
    let found = -1;
    let foundR: Exclude<ReturnType<typeof freeFeasible>, undefined | "dearer"> | undefined;
    let dearerAt = -1;
    let prevTried = n; // index of the previous (higher) point tried and found infeasible
    for (let i = n - 1; ; i -= coarseStep(n)) {
      const at = Math.max(i, floor);
      const r = freeFeasible({ ...base, [bisectKey]: grid[at]! }, limit);
      if (r === "dearer") {
        dearerAt = at;
        break;
      }
      if (r) {
        found = at;
        foundR = r;
        break;
      }
      prevTried = at;
      if (at === floor) break;
    }
    // Refine between the last infeasible point above and the point where the scan stopped: a
    // feasible point found there, or one too dear (the values between are cheaper and may fit).
    let a = found >= 0 ? found : dearerAt;
    if (a < 0) return;
    let b = Math.min(prevTried, n) - 1;
    let bestR = foundR;
    while (a < b) {
      const mid = (a + b + 1) >> 1;
      const r = freeFeasible({ ...base, [bisectKey]: grid[mid]! }, limit);
      if (r && r !== "dearer") {
        a = mid;
        bestR = r;
      } else b = mid - 1;
    }
    if (!bestR) return;
    const values = { ...base, [bisectKey]: grid[a]!, [freeKey]: grid[bestR.lo]! };
    if (!best || bestR.power < best.power) best = { values, power: bestR.power, e: bestR.e, lo: bestR.lo, hi: bestR.hi };
  };

  if (spec.initial) {
    const grid0 = grid as number[];
    const fi = grid0.indexOf(spec.initial[freeKey]!);
    const e = evalAt({ ...spec.initial, ...fixed });
    if (fi >= 0 && minMargin(e.margins) >= -1e-12) best = { values: { ...spec.initial, ...fixed }, power: e.objectiveWatts, e, lo: fi, hi: fi };
  }

  // Enumerate outer parameters from the top. The collector resistor is scanned value by value
  // (its power bound prunes); other outer parameters coarsely, then finely around the best.
  const idx = outerKeys.map(() => n - 1);
  const tried = new Set<string>();
  const recurse = (k: number): void => {
    if (k === outerKeys.length) {
      const key = idx.join(",");
      if (tried.has(key)) return;
      tried.add(key);
      const base: CellValues = { ...fixed };
      outerKeys.forEach((name, j) => (base[name] = grid[idx[j]!]!));
      tryBase(base);
      return;
    }
    const name = outerKeys[k]!;
    if (name === "rcOhms") {
      // From the top (least power): every coarseStep-th value first; at the first that improves,
      // the values just above it, then downward until the power bound cuts off.
      const cap = maxRcOhms(ctx);
      const list: number[] = [];
      for (let i = n - 1; i >= 0; i--) if (grid[i]! <= cap) list.push(i);
      const done = new Set<number>();
      const visit = (j: number): void => {
        done.add(j);
        idx[k] = list[j]!;
        recurse(k + 1);
      };
      let first = -1;
      for (let j = 0; j < list.length; j += coarseStep(n)) {
        const prev = best;
        visit(j);
        if (best !== prev) {
          first = j;
          break;
        }
      }
      const order = first < 0 ? list.map((_, j) => j) : [...list.map((_, j) => j).filter((j) => j < first && j > first - coarseStep(n)), ...list.map((_, j) => j).filter((j) => j > first)];
      for (const j of order) {
        if (done.has(j)) continue;
        // Lower bound on power for the rest of this branch: the cell's own collector current.
        if (best && j > first && lowerBoundWatts(situations, grid[list[j]!]!, ctx) >= best.power) break;
        visit(j);
      }
      return;
    }
    const before = best;
    let bestAt = -1;
    for (let i = n - 1; i >= 0; i -= OUTER_STEP) {
      idx[k] = i;
      const prev = best;
      recurse(k + 1);
      if (best !== prev) bestAt = i;
    }
    if (bestAt < 0 && before === best) return;
    const centre = bestAt >= 0 ? bestAt : n - 1;
    for (let i = Math.min(n - 1, centre + OUTER_STEP - 1); i >= Math.max(0, centre - OUTER_STEP + 1); i--) {
      idx[k] = i;
      recurse(k + 1);
    }
  };
  recurse(0);

  if (!best) {
    const out: SearchResult = { evaluations };
    if (closest) out.closest = closest;
    if (candidates) out.candidates = candidates;
    return out;
  }
  return { values: best.values, objectiveWatts: best.power, eval: best.e, freeInterval: [best.lo, best.hi], evaluations };
}

/** Largest collector resistor that can meet the speed floor (least collector current) at the
 *  lowest supply with the resistor at its high end: (V_CC,min − V_CE(sat))/(I_C,min·(1 + tol)). */
export function maxRcOhms(ctx: EvalContext): number {
  if (!(ctx.opts.collectorCurrentMinAmps > 0)) return Infinity;
  let x = Infinity;
  for (const c of ctx.corners) {
    const r = (c.env.vccVolts - c.env.dev.vCESatVolts) / (ctx.opts.collectorCurrentMinAmps * (1 + ctx.tol));
    if (r < x) x = r;
  }
  return x * (1 + 1e-9);
}

/** Least possible worst-case power with collector resistor `rcOhms`: every cell draws at least
 *  its own collector current from the highest supply in the low state. */
export function lowerBoundWatts(situations: readonly Situation[], rcOhms: number, ctx: EvalContext): number {
  let vmax = 0;
  let vce = 0;
  for (const c of ctx.corners) {
    if (c.env.vccVolts > vmax) {
      vmax = c.env.vccVolts;
      vce = c.env.dev.vCESatVolts;
    }
  }
  const iC = (vmax - vce) / (rcOhms * (1 - ctx.tol));
  let cells = 0;
  for (const s of situations) cells += s.cells.length;
  return cells * vmax * iC;
}

/** Picks the free parameter inside its feasible interval: the value with the largest least margin
 *  among the constraints it moves. */
export function chooseFree(spec: SearchSpec, values: CellValues, interval: [number, number]): { values: CellValues; eval: TypeEval } {
  const { def, situations, ctx, grid } = spec;
  const dependent = (i: number): boolean => {
    const d = def.freeDirection[CONSTRAINTS[i]!.id];
    return d === "up" || d === "down";
  };
  let best: { values: CellValues; eval: TypeEval; score: number } | undefined;
  for (let i = interval[0]; i <= interval[1]; i++) {
    const v = { ...values, [def.freeKey]: grid[i]! };
    const e = evaluateType(situations, v, ctx);
    if (minMargin(e.margins) < -1e-12) continue;
    const score = minMargin(e.margins, dependent);
    if (!best || score > best.score) best = { values: v, eval: e, score };
  }
  if (!best) {
    const v = { ...values, [def.freeKey]: grid[interval[0]]! };
    return { values: v, eval: evaluateType(situations, v, ctx) };
  }
  return { values: best.values, eval: best.eval };
}
