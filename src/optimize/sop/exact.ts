// Exact two-level minimization: all prime implicants (primes.ts), then a minimum-cost cover of
// the ON points (cover.ts). Cost of a product term: TERM_WEIGHT + its literals, so a cover has
// the fewest product terms first and the fewest literals among those (the textbook minimum
// sum of products).
//
// Hazard-free covers (for logic that feeds a loop): besides every ON point, every pair of
// adjacent ON points (points that differ in one variable) must lie in one product term, so a
// single input change between them never passes through a moment where no term holds — the
// classical condition for a sum of products free of static-1 hazards for single input changes
// (Huffman 1957; Unger, *Asynchronous Sequential Switching Circuits*; common practice). The
// consensus terms that a plain minimum drops are kept this way.
import { forEachPoint, literalCount, ON, type Cube, type Spec } from "./cube.js";
import { multiOutputPrimes, primeImplicants } from "./primes.js";
import { solveCover } from "./cover.js";

/** Weight of one product term against one literal: terms first, then literals. */
export const TERM_WEIGHT = 1 << 20;

export interface ExactOptions {
  /** Cover every pair of adjacent ON points by one term (static-hazard-free). */
  hazardFree?: boolean;
  /** Most implicants generated (primes.ts). */
  implicantBudget?: number;
  /** Work of the cover search (cover.ts). */
  coverBudget?: number;
  /** Most prime implicants the cover search takes on. */
  maxPrimes?: number;
}

export interface ExactResult {
  cover: Cube[];
  /** True when the cover is proven minimum (the search finished). */
  optimal: boolean;
  primes: number;
}

/** A minimum cover of one function, or undefined when the limits are exceeded. */
export function minimizeExact(spec: Spec, n: number, opts: ExactOptions = {}): ExactResult | undefined {
  const primes = primeImplicants(spec, n, opts.implicantBudget);
  if (!primes) return undefined;
  if (primes.length > (opts.maxPrimes ?? 4000)) return undefined;
  const size = 2 ** n;
  const rowOf = new Int32Array(size).fill(-1);
  let rows = 0;
  for (let p = 0; p < size; p++) if (spec[p] === ON) rowOf[p] = rows++;
  if (rows === 0) return { cover: [], optimal: true, primes: primes.length };
  // Adjacent ON pairs (hazard-free covers): row index per (lower point, variable).
  const pairRow = new Map<number, number>();
  if (opts.hazardFree) {
    for (let p = 0; p < size; p++) {
      if (spec[p] !== ON) continue;
      for (let i = 0; i < n; i++) {
        const bit = 2 ** i;
        if (p & bit) continue;
        if (spec[p + bit] === ON) pairRow.set(p * 32 + i, rows++);
      }
    }
  }
  const columns: { cost: number; rows: number[] }[] = [];
  const cubes: Cube[] = [];
  for (const c of primes) {
    const covered: number[] = [];
    forEachPoint(c, n, (p) => {
      const r = rowOf[p]!;
      if (r >= 0) covered.push(r);
      if (opts.hazardFree && spec[p] === ON) {
        for (let i = 0; i < n; i++) {
          const bit = 2 ** i;
          if (p & bit || c.mask & bit) continue; // the pair must lie inside the cube
          const pr = pairRow.get(p * 32 + i);
          if (pr !== undefined) covered.push(pr);
        }
      }
    });
    if (covered.length === 0) continue;
    columns.push({ cost: TERM_WEIGHT + literalCount(c), rows: covered });
    cubes.push(c);
  }
  const sol = solveCover({ rowCount: rows, columns }, opts.coverBudget !== undefined ? { workBudget: opts.coverBudget } : {});
  if (!sol) throw new Error("minimizeExact: the primes do not cover the function");
  return { cover: sol.chosen.map((j) => cubes[j]!), optimal: sol.optimal, primes: primes.length };
}

export interface MultiResult {
  /** One cover per output; the same cube in several covers is one shared product term. */
  covers: Cube[][];
  /** Distinct product terms over all outputs. */
  terms: number;
  optimal: boolean;
}

/**
 * A cover of several functions together with the fewest distinct product terms (then the
 * fewest literals), each term shared by the outputs it implies; then each output keeps only
 * the shared terms it needs. Undefined when the limits are exceeded.
 */
export function minimizeExactMulti(specs: readonly Spec[], n: number, opts: ExactOptions = {}): MultiResult | undefined {
  const primes = multiOutputPrimes(specs, n, opts.implicantBudget);
  if (!primes) return undefined;
  if (primes.length > (opts.maxPrimes ?? 4000)) return undefined;
  const size = 2 ** n;
  const k = specs.length;
  const rowOf = new Int32Array(size * k).fill(-1);
  let rows = 0;
  for (let o = 0; o < k; o++) for (let p = 0; p < size; p++) if (specs[o]![p] === ON) rowOf[o * size + p] = rows++;
  if (rows === 0) return { covers: specs.map(() => []), terms: 0, optimal: true };
  const columns: { cost: number; rows: number[] }[] = [];
  const cols: { cube: Cube; tag: number }[] = [];
  for (const t of primes) {
    const covered: number[] = [];
    forEachPoint(t.cube, n, (p) => {
      for (let o = 0; o < k; o++) {
        if (!((t.tag >>> o) & 1)) continue;
        const r = rowOf[o * size + p]!;
        if (r >= 0) covered.push(r);
      }
    });
    if (covered.length === 0) continue;
    columns.push({ cost: TERM_WEIGHT + literalCount(t.cube), rows: covered });
    cols.push(t);
  }
  const sol = solveCover({ rowCount: rows, columns }, opts.coverBudget !== undefined ? { workBudget: opts.coverBudget } : {});
  if (!sol) throw new Error("minimizeExactMulti: the primes do not cover the functions");
  const chosen = sol.chosen.map((j) => cols[j]!);
  const covers: Cube[][] = [];
  for (let o = 0; o < k; o++) {
    const spec = specs[o]!;
    // Terms of output o, most literals first: dropped while the others still cover its points.
    const mine = chosen
      .filter((t) => (t.tag >>> o) & 1)
      .map((t) => t.cube)
      .sort((x, y) => literalCount(y) - literalCount(x));
    const count = new Int32Array(size);
    for (const c of mine) forEachPoint(c, n, (p) => void (spec[p] === ON && count[p]!++));
    const kept: Cube[] = [];
    for (const c of mine) {
      let needed = false;
      forEachPoint(c, n, (p) => {
        if (spec[p] === ON && count[p] === 1) needed = true;
      });
      if (needed) kept.push(c);
      else forEachPoint(c, n, (p) => void (spec[p] === ON && count[p]!--));
    }
    covers.push(kept);
  }
  const distinct = new Set(covers.flat().map((c) => `${c.mask}:${c.value}`));
  return { covers, terms: distinct.size, optimal: sol.optimal };
}
