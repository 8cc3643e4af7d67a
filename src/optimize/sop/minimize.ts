// Two-level minimization with documented switch points:
//   - up to EXACT_MAX_VARIABLES variables: exact (all primes, minimum cover), as long as the
//     implicants, the primes and the cover search stay within their budgets;
//   - beyond that, or when a budget runs out, up to HEURISTIC_MAX_VARIABLES: the expand / irredundant / reduce
//     heuristic (not for hazard-free covers, which are exact or not made at all);
//   - beyond that: no two-level form (the caller keeps the logic as written).
// Several outputs are minimized together (shared product terms) up to
// MULTI_OUTPUT_MAX_VARIABLES variables; beyond that each output alone.
import { coverMeetsSpec, type Cube, type Spec } from "./cube.js";
import { minimizeExact, minimizeExactMulti } from "./exact.js";
import { minimizeHeuristic } from "./heuristic.js";

export interface TwoLevelLimits {
  exactMaxVariables: number;
  heuristicMaxVariables: number;
  multiOutputMaxVariables: number;
  multiOutputMaxOutputs: number;
  implicantBudget: number;
  maxPrimes: number;
  coverBudget: number;
}

export const DEFAULT_TWO_LEVEL_LIMITS: TwoLevelLimits = {
  exactMaxVariables: 12,
  heuristicMaxVariables: 16,
  multiOutputMaxVariables: 10,
  multiOutputMaxOutputs: 16,
  implicantBudget: 200_000,
  maxPrimes: 1500,
  coverBudget: 1_000_000,
};

export type TwoLevelMethod = "exact" | "exact-bounded" | "heuristic";

export interface TwoLevelResult {
  cover: Cube[];
  /** exact: proven minimum; exact-bounded: from all primes, search stopped at its budget;
   *  heuristic: expand / irredundant / reduce. */
  method: TwoLevelMethod;
}

export function minimizeOne(spec: Spec, n: number, opts: { hazardFree?: boolean; limits?: TwoLevelLimits } = {}): TwoLevelResult | undefined {
  const L = opts.limits ?? DEFAULT_TWO_LEVEL_LIMITS;
  if (n <= L.exactMaxVariables) {
    const r = minimizeExact(spec, n, { hazardFree: !!opts.hazardFree, implicantBudget: L.implicantBudget, maxPrimes: L.maxPrimes, coverBudget: L.coverBudget });
    if (r) return { cover: r.cover, method: r.optimal ? "exact" : "exact-bounded" };
  }
  if (opts.hazardFree) return undefined;
  if (n > L.heuristicMaxVariables) return undefined;
  const h = minimizeHeuristic(spec, n);
  if (!coverMeetsSpec(h.cover, spec, n)) throw new Error("minimizeHeuristic produced a wrong cover");
  return { cover: h.cover, method: "heuristic" };
}

export interface MultiTwoLevelResult {
  covers: Cube[][];
  method: TwoLevelMethod;
  /** True when the outputs were minimized together (terms chosen for sharing). */
  shared: boolean;
}

export function minimizeMany(specs: readonly Spec[], n: number, opts: { limits?: TwoLevelLimits } = {}): MultiTwoLevelResult | undefined {
  const L = opts.limits ?? DEFAULT_TWO_LEVEL_LIMITS;
  if (specs.length > 1 && specs.length <= L.multiOutputMaxOutputs && n <= L.multiOutputMaxVariables) {
    const r = minimizeExactMulti(specs, n, { implicantBudget: L.implicantBudget, maxPrimes: L.maxPrimes, coverBudget: L.coverBudget });
    if (r) return { covers: r.covers, method: r.optimal ? "exact" : "exact-bounded", shared: true };
  }
  const covers: Cube[][] = [];
  let method: TwoLevelMethod = "exact";
  for (const s of specs) {
    const r = minimizeOne(s, n, { limits: L });
    if (!r) return undefined;
    covers.push(r.cover);
    if (r.method === "heuristic" || (r.method === "exact-bounded" && method === "exact")) method = r.method;
  }
  return { covers, method, shared: false };
}
