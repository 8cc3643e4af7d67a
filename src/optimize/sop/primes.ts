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

/** Up to this many variables the implicants are kept in flat arrays indexed by the cube's
 *  ternary code (3^n entries, reused from call to call); beyond, in a map. */
const DENSE_MAX_VARIABLES = 13;

/** Flat scratch arrays of the dense method: tag by ternary code, merged marks. */
let denseTags = new Int32Array(0);
let denseMerged = new Uint8Array(0);

/**
 * Multi-output prime implicants of ON ∪ DC of up to 31 functions over the same n variables,
 * or undefined above the budget.
 */
export function multiOutputPrimes(specs: readonly Spec[], n: number, budget = 200_000): TaggedCube[] | undefined {
  if (specs.length > 31) throw new Error("multiOutputPrimes: at most 31 outputs");
  return n <= DENSE_MAX_VARIABLES ? densePrimes(specs, n, budget) : mappedPrimes(specs, n, budget);
}

/**
 * The tabular method with a cube coded in base 3 (digit i: 0 or 1 for the literal of variable
 * i, 2 when the variable is free), so that a cube's partner (variable i from 0 to 1) is code +
 * 3^i and their merge code + 2·3^i: flat arrays instead of hashing. Same levels, same order and
 * same result as mappedPrimes.
 */
function densePrimes(specs: readonly Spec[], n: number, budget: number): TaggedCube[] | undefined {
  const size = 2 ** n;
  const full = fullMask(n);
  const codes = 3 ** n;
  if (denseTags.length < codes) {
    denseTags = new Int32Array(codes);
    denseMerged = new Uint8Array(codes);
  }
  const tags = denseTags;
  const merged = denseMerged;
  const pow3: number[] = [1];
  for (let i = 1; i <= n; i++) pow3.push(pow3[i - 1]! * 3);
  // A level: the cubes' codes, free masks and values in the order they were made.
  let code: number[] = [];
  let freeOf: number[] = [];
  let valueOf: number[] = [];
  const touched: number[] = [];
  const clear = () => {
    for (let k = 0; k < touched.length; k++) {
      tags[touched[k]!] = 0;
      merged[touched[k]!] = 0;
    }
  };
  const ternary = new Int32Array(size);
  for (let p = 1; p < size; p++) ternary[p] = 3 * ternary[p >>> 1]! + (p & 1);
  const outs = specs.length;
  for (let p = 0; p < size; p++) {
    let tag = 0;
    for (let k = 0; k < outs; k++) {
      const v = specs[k]![p]!;
      if (v === ON || v === DC) tag |= 1 << k;
    }
    if (tag) {
      const t = ternary[p]!;
      tags[t] = tag;
      touched.push(t);
      code.push(t);
      freeOf.push(0);
      valueOf.push(p);
    }
  }
  let generated = code.length;
  if (generated > budget) {
    clear();
    return undefined;
  }
  const primes: TaggedCube[] = [];
  while (code.length) {
    const nextCode: number[] = [];
    const nextFree: number[] = [];
    const nextValue: number[] = [];
    for (let j = 0; j < code.length; j++) {
      const t = code[j]!;
      const tag = tags[t]!;
      const free = freeOf[j]!;
      const value = valueOf[j]!;
      let given = (full & ~free & ~value) >>> 0; // variables at 0 that may be freed
      while (given) {
        const bit = (given & -given) >>> 0;
        given = (given & ~bit) >>> 0;
        const i = 31 - Math.clz32(bit);
        const partner = t + pow3[i]!;
        const ptag = tags[partner]!;
        if (ptag === 0) continue;
        const both = tag & ptag;
        if (!both) continue;
        if (both === tag) merged[t] = 1;
        if (both === ptag) merged[partner] = 1;
        const nt = partner + pow3[i]!;
        if (tags[nt] === 0) {
          tags[nt] = both;
          touched.push(nt);
          nextCode.push(nt);
          nextFree.push((free | bit) >>> 0);
          nextValue.push(value);
          if (++generated > budget) {
            clear();
            return undefined;
          }
        }
      }
    }
    for (let j = 0; j < code.length; j++) {
      const t = code[j]!;
      if (merged[t]) continue;
      primes.push({ cube: { mask: (full & ~freeOf[j]!) >>> 0, value: valueOf[j]! }, tag: tags[t]! });
    }
    code = nextCode;
    freeOf = nextFree;
    valueOf = nextValue;
  }
  clear();
  return primes;
}

/** The tabular method over maps keyed by freeMask · 2^n + value (any n up to 24). */
export function mappedPrimes(specs: readonly Spec[], n: number, budget: number): TaggedCube[] | undefined {
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
