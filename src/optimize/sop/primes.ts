// Prime implicants by the tabular method (Quine–McCluskey): implicants with k free variables are
// merged in pairs that differ in one given variable into implicants with k + 1, level by level;
// an implicant that takes part in no merge is prime. For several outputs at once each implicant
// carries the set of outputs it implies (a bit mask, "tag"); a merge keeps the outputs both
// halves imply, and an implicant is prime when no merge keeps all of its outputs (the usual
// multi-output primes, e.g. McCluskey, *Logic Design Principles*, ch. on multiple-output
// minimization; common practice).
//
// Work is bounded: the number of implicants generated (all levels) may not exceed `budget`;
// beyond it the functions are left to the heuristic (undefined is returned).
import { DC, fullMask, ON, type Cube, type Spec } from "./cube.js";

export interface TaggedCube {
  cube: Cube;
  /** Outputs (bit k: output k) the cube implies. */
  tag: number;
}

/** Prime implicants of ON ∪ DC of one function, or undefined above the budget. */
export function primeImplicants(spec: Spec, n: number, budget = 200_000): Cube[] | undefined {
  const tagged = multiOutputPrimes([spec], n, budget);
  return tagged?.map((t) => t.cube);
}

/**
 * Multi-output prime implicants of ON ∪ DC of up to 31 functions over the same n variables,
 * or undefined above the budget.
 */
export function multiOutputPrimes(specs: readonly Spec[], n: number, budget = 200_000): TaggedCube[] | undefined {
  if (specs.length > 31) throw new Error("multiOutputPrimes: at most 31 outputs");
  const size = 2 ** n;
  const full = fullMask(n);
  // Keys: freeMask * 2^n + value (value has zeros at the free variables). Exact below 2^53.
  let level = new Map<number, number>();
  for (let p = 0; p < size; p++) {
    let tag = 0;
    for (let k = 0; k < specs.length; k++) {
      const v = specs[k]![p]!;
      if (v === ON || v === DC) tag |= 1 << k;
    }
    if (tag) level.set(p, tag);
  }
  let generated = level.size;
  if (generated > budget) return undefined;
  const primes: TaggedCube[] = [];
  while (level.size) {
    const next = new Map<number, number>();
    const merged = new Set<number>();
    for (const [key, tag] of level) {
      const free = Math.floor(key / size);
      const value = key - free * size;
      let given = (full & ~free & ~value) >>> 0; // variables at 0 that may be freed
      while (given) {
        const bit = (given & -given) >>> 0;
        given = (given & ~bit) >>> 0;
        const partnerKey = key + bit;
        const ptag = level.get(partnerKey);
        if (ptag === undefined) continue;
        const both = tag & ptag;
        if (!both) continue;
        if (both === tag) merged.add(key);
        if (both === ptag) merged.add(partnerKey);
        const nk = (free | bit) * size + value;
        if (!next.has(nk)) {
          next.set(nk, both);
          if (++generated > budget) return undefined;
        }
      }
    }
    for (const [key, tag] of level) {
      if (merged.has(key)) continue;
      const free = Math.floor(key / size);
      const value = key - free * size;
      primes.push({ cube: { mask: (full & ~free) >>> 0, value }, tag });
    }
    level = next;
  }
  return primes;
}
