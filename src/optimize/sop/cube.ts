// Cubes and truth-function specifications for two-level minimization.
//
// A function of n variables (n ≤ 24) is specified point by point: `spec[p]` is OFF, ON or DC
// (don't-care) for the point whose bit i is the value of variable i. A cube (product term) is
// two masks: `mask` has bit i set when variable i appears as a literal, `value` gives the
// literal's polarity (a subset of `mask`). The cube with mask 0 is the constant 1.

export const OFF = 0;
export const ON = 1;
export const DC = 2;

/** Point-by-point specification: OFF, ON or DC, indexed by point. */
export type Spec = Uint8Array;

export interface Cube {
  mask: number;
  value: number;
}

export function popcount(x: number): number {
  x = x - ((x >>> 1) & 0x55555555);
  x = (x & 0x33333333) + ((x >>> 2) & 0x33333333);
  return (((x + (x >>> 4)) & 0x0f0f0f0f) * 0x01010101) >>> 24;
}

/** Number of literals of a cube. */
export function literalCount(c: Cube): number {
  return popcount(c.mask);
}

/** Number of product terms and of literals of a cover. */
export function coverSize(cover: readonly Cube[]): { terms: number; literals: number } {
  let literals = 0;
  for (const c of cover) literals += popcount(c.mask);
  return { terms: cover.length, literals };
}

export function fullMask(n: number): number {
  return n >= 32 ? 0xffffffff : (2 ** n - 1) >>> 0;
}

/** Does cube `a` contain point `p`? */
export function hasPoint(a: Cube, p: number): boolean {
  return ((p ^ a.value) & a.mask) === 0;
}

/** Does cube `a` contain cube `b`? */
export function containsCube(a: Cube, b: Cube): boolean {
  return (a.mask & ~b.mask) === 0 && ((a.value ^ b.value) & a.mask) === 0;
}

/** Calls `visit` for every point of the cube (2^(n − literals) of them). */
export function forEachPoint(c: Cube, n: number, visit: (p: number) => void): void {
  const free = (fullMask(n) & ~c.mask) >>> 0;
  let s = 0;
  for (;;) {
    visit((c.value | s) >>> 0);
    if (s === free) break;
    s = ((s - free) & free) >>> 0;
  }
}

/** Like forEachPoint, stopping (and returning false) as soon as `visit` returns false. */
export function everyPoint(c: Cube, n: number, visit: (p: number) => boolean): boolean {
  const free = (fullMask(n) & ~c.mask) >>> 0;
  let s = 0;
  for (;;) {
    if (!visit((c.value | s) >>> 0)) return false;
    if (s === free) return true;
    s = ((s - free) & free) >>> 0;
  }
}

/** The cover's value at every point (1 where some cube holds). */
export function coverTable(cover: readonly Cube[], n: number): Uint8Array {
  const t = new Uint8Array(2 ** n);
  for (const c of cover) forEachPoint(c, n, (p) => (t[p] = 1));
  return t;
}

/** Does the cover implement the specification (1 on every ON point, 0 on every OFF point)? */
export function coverMeetsSpec(cover: readonly Cube[], spec: Spec, n: number): boolean {
  const t = coverTable(cover, n);
  for (let p = 0; p < spec.length; p++) {
    if (spec[p] === ON && !t[p]) return false;
    if (spec[p] === OFF && t[p]) return false;
  }
  return true;
}

/** The complement specification: ON and OFF exchanged, DC kept. */
export function complementSpec(spec: Spec): Spec {
  const out = new Uint8Array(spec.length);
  for (let p = 0; p < spec.length; p++) out[p] = spec[p] === DC ? DC : spec[p] === ON ? OFF : ON;
  return out;
}

/** A cube as text over variables 0..n-1 ('1', '0' or '-' each). */
export function cubeText(c: Cube, n: number): string {
  let t = "";
  for (let i = 0; i < n; i++) t += (c.mask >>> i) & 1 ? ((c.value >>> i) & 1 ? "1" : "0") : "-";
  return t;
}
