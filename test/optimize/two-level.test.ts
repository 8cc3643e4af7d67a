// Two-level minimization (src/optimize/sop) against references written here, independently:
//   - exact minimization: the minimum sum of products (fewest product terms, then fewest
//     literals; the textbook definition, e.g. McCluskey 1956, common practice) found by brute
//     force: every one of the 3^n cubes is tried as an implicant, primes are the implicants no
//     other implicant contains, and a depth-first search over the uncovered minterms finds the
//     cheapest cover;
//   - the heuristic and the multi-output minimizer: their covers are checked against the
//     specification point by point, and for primality and irredundancy by definition.
import { describe, expect, it } from "vitest";
import { seededRandom } from "../../src/logic/index.js";
import { minimizeExact, minimizeExactMulti } from "../../src/optimize/sop/exact.js";
import { minimizeHeuristic } from "../../src/optimize/sop/heuristic.js";
import { solveCover } from "../../src/optimize/sop/cover.js";
import { DC, OFF, ON, type Cube, type Spec } from "../../src/optimize/sop/cube.js";

// ---- the independent reference ------------------------------------------------------------------

/** Cubes as strings over n variables: '0', '1', '-' (character i is variable i). */
function allCubes(n: number): string[] {
  let out = [""];
  for (let i = 0; i < n; i++) out = out.flatMap((s) => [s + "0", s + "1", s + "-"]);
  return out;
}

function pointsOf(cube: string): number[] {
  let pts = [0];
  for (let i = 0; i < cube.length; i++) {
    const c = cube[i];
    if (c === "1") pts = pts.map((p) => p | (1 << i));
    else if (c === "-") pts = pts.flatMap((p) => [p, p | (1 << i)]);
  }
  return pts;
}

function bruteForceMinimum(spec: number[], n: number): { terms: number; literals: number } {
  const implicants = allCubes(n).filter((c) => pointsOf(c).every((p) => spec[p] !== 0));
  const isPrime = (c: string) =>
    ![...c].some((ch, i) => ch !== "-" && implicants.includes(c.slice(0, i) + "-" + c.slice(i + 1)));
  const primes = implicants.filter(isPrime).map((c) => ({ pts: pointsOf(c), lits: [...c].filter((x) => x !== "-").length }));
  const on = spec.map((v, p) => (v === 1 ? p : -1)).filter((p) => p >= 0);
  let best = { terms: Infinity, literals: Infinity };
  const better = (t: number, l: number) => t < best.terms || (t === best.terms && l < best.literals);
  const search = (covered: Set<number>, terms: number, literals: number) => {
    if (!better(terms, literals)) return;
    const todo = on.find((p) => !covered.has(p));
    if (todo === undefined) {
      best = { terms, literals };
      return;
    }
    if (!better(terms + 1, literals)) return;
    for (const pr of primes) {
      if (!pr.pts.includes(todo)) continue;
      const next = new Set(covered);
      for (const p of pr.pts) next.add(p);
      search(next, terms + 1, literals + pr.lits);
    }
  };
  search(new Set(), 0, 0);
  return on.length === 0 ? { terms: 0, literals: 0 } : best;
}

/** Random specification: each point off, on or don't-care. */
function randomSpec(n: number, rand: () => number, dcShare: number): number[] {
  return Array.from({ length: 2 ** n }, () => {
    const r = (rand() % 1000) / 1000;
    return r < dcShare ? 2 : (rand() & 1);
  });
}

function toSpec(values: number[]): Spec {
  return Uint8Array.from(values, (v) => (v === 2 ? DC : v === 1 ? ON : OFF));
}

function coverValue(cover: Cube[], p: number): boolean {
  return cover.some((c) => ((p ^ c.value) & c.mask) === 0);
}

function meets(cover: Cube[], values: number[]): boolean {
  return values.every((v, p) => v === 2 || (v === 1) === coverValue(cover, p));
}

function literals(cover: Cube[]): number {
  return cover.reduce((s, c) => s + [...c.mask.toString(2)].filter((x) => x === "1").length, 0);
}

// ---- tests ------------------------------------------------------------------------------------

describe("exact two-level minimization against brute force (minimum sum of products: terms, then literals)", () => {
  for (const n of [1, 2, 3, 4, 5, 6]) {
    it(`random functions of ${n} variables with don't-cares`, () => {
      const rand = seededRandom(1000 + n);
      const runs = n <= 4 ? 60 : n === 5 ? 30 : 12;
      for (let k = 0; k < runs; k++) {
        const values = randomSpec(n, rand, k % 3 === 0 ? 0 : 0.2);
        const ref = bruteForceMinimum(values, n);
        const got = minimizeExact(toSpec(values), n)!;
        expect(got.optimal).toBe(true);
        expect(meets(got.cover, values)).toBe(true);
        expect({ terms: got.cover.length, literals: literals(got.cover) }).toEqual(ref);
      }
    });
  }

  it("textbook examples: Σm(0,2,5,7,8,10,13,15) = B'D' + BD; Σm(1,3,7,11,15) + d(0,2,5) = CD + A'B' (map-method exercises, e.g. Mano, Digital Design; from memory, checked by hand)", () => {
    // Our variable i is bit i of the minterm number; the textbook's A is the most significant.
    const table = (on: number[], dc: number[] = []) => Array.from({ length: 16 }, (_, p) => (on.includes(p) ? 1 : dc.includes(p) ? 2 : 0));
    const a = minimizeExact(toSpec(table([0, 2, 5, 7, 8, 10, 13, 15])), 4)!;
    expect(a.cover.length).toBe(2);
    expect(literals(a.cover)).toBe(4);
    // B'D' and BD: B is bit 2, D is bit 0.
    expect(a.cover.map((c) => `${c.mask}:${c.value}`).sort()).toEqual(["5:0", "5:5"]);
    const b = minimizeExact(toSpec(table([1, 3, 7, 11, 15], [0, 2, 5])), 4)!;
    expect(b.cover.length).toBe(2);
    // CD (bits 1 and 0) and A'B' (bits 3 and 2 at 0).
    expect(b.cover.map((c) => `${c.mask}:${c.value}`).sort()).toEqual(["12:0", "3:3"]);
  });

  it("a latch written as a multiplexer keeps its consensus term only when asked for a hazard-free cover (Huffman 1957; common practice)", () => {
    // q+ = d·en + q·en' (+ d·q): variables d = bit 0, en = bit 1, q = bit 2.
    const values = Array.from({ length: 8 }, (_, p) => {
      const d = p & 1, en = (p >> 1) & 1, q = (p >> 2) & 1;
      return (d & en) | (q & (1 - en));
    });
    const plain = minimizeExact(toSpec(values), 3)!;
    expect(plain.cover.length).toBe(2);
    const safe = minimizeExact(toSpec(values), 3, { hazardFree: true })!;
    expect(safe.cover.length).toBe(3);
    // The added term is d·q (bits 0 and 2 given, both 1).
    expect(safe.cover.some((c) => c.mask === 0b101 && c.value === 0b101)).toBe(true);
    // Every pair of adjacent ON points lies in one term.
    for (let p = 0; p < 8; p++) for (let i = 0; i < 3; i++) {
      const q = p ^ (1 << i);
      if (values[p] && values[q]) expect(safe.cover.some((c) => ((p ^ c.value) & c.mask) === 0 && ((q ^ c.value) & c.mask) === 0)).toBe(true);
    }
  });
});

describe("unate covering against exhaustive search", () => {
  it("finds the cheapest cover of random small charts", () => {
    const rand = seededRandom(77);
    for (let k = 0; k < 200; k++) {
      const rows = 1 + (rand() % 9);
      const cols = 1 + (rand() % 9);
      const columns = Array.from({ length: cols }, () => ({
        cost: 1 + (rand() % 5),
        rows: Array.from({ length: rows }, (_, r) => r).filter(() => rand() % 3 === 0),
      }));
      // Make it feasible: every row in some column.
      for (let r = 0; r < rows; r++) if (!columns.some((c) => c.rows.includes(r))) columns[rand() % cols]!.rows.push(r);
      let best = Infinity;
      for (let m = 0; m < 1 << cols; m++) {
        const covered = new Set<number>();
        let cost = 0;
        for (let j = 0; j < cols; j++) if (m & (1 << j)) {
          cost += columns[j]!.cost;
          for (const r of columns[j]!.rows) covered.add(r);
        }
        if (covered.size === rows) best = Math.min(best, cost);
      }
      const sol = solveCover({ rowCount: rows, columns })!;
      expect(sol.optimal).toBe(true);
      expect(sol.cost).toBe(best);
      const covered = new Set(sol.chosen.flatMap((j) => columns[j]!.rows));
      expect(covered.size).toBe(rows);
    }
  });
});

describe("heuristic minimization (expand / irredundant / reduce): valid, prime and irredundant covers", () => {
  for (const n of [4, 7, 10]) {
    it(`random functions of ${n} variables`, () => {
      const rand = seededRandom(500 + n);
      for (let k = 0; k < 10; k++) {
        const values = randomSpec(n, rand, 0.15);
        const { cover } = minimizeHeuristic(toSpec(values), n);
        expect(meets(cover, values)).toBe(true);
        for (const c of cover) {
          // Prime: freeing any literal reaches an OFF point.
          for (let i = 0; i < n; i++) {
            if (!((c.mask >> i) & 1)) continue;
            const bigger = { mask: c.mask & ~(1 << i), value: c.value & ~(1 << i) };
            const reachesOff = values.some((v, p) => v === 0 && ((p ^ bigger.value) & bigger.mask) === 0);
            expect(reachesOff).toBe(true);
          }
          // Irredundant: some ON point only this term covers.
          const others = cover.filter((x) => x !== c);
          const needed = values.some((v, p) => v === 1 && ((p ^ c.value) & c.mask) === 0 && !coverValue(others, p));
          expect(needed).toBe(true);
        }
      }
    });
  }

  it("is never far from the exact minimum on 6-variable functions (within 25 % more terms)", () => {
    const rand = seededRandom(9);
    for (let k = 0; k < 20; k++) {
      const values = randomSpec(6, rand, 0.1);
      const h = minimizeHeuristic(toSpec(values), 6).cover.length;
      const e = bruteForceMinimum(values, 6).terms;
      expect(h).toBeLessThanOrEqual(Math.ceil(e * 1.25));
    }
  });
});

describe("multi-output minimization shares product terms", () => {
  it("covers every output and never needs more distinct terms than the outputs minimized apart", () => {
    const rand = seededRandom(31);
    for (let k = 0; k < 25; k++) {
      const n = 3 + (k % 3);
      const outs = Array.from({ length: 2 + (k % 3) }, () => randomSpec(n, rand, 0.15));
      const m = minimizeExactMulti(outs.map(toSpec), n)!;
      outs.forEach((v, o) => expect(meets(m.covers[o]!, v)).toBe(true));
      const apart = new Set(outs.flatMap((v) => minimizeExact(toSpec(v), n)!.cover.map((c) => `${c.mask}:${c.value}`)));
      expect(m.terms).toBeLessThanOrEqual(apart.size);
    }
  });

  it("shares the term two functions have in common (f1 = Σm(3,5,7), f2 = Σm(3,6,7); worked by hand)", () => {
    // With a = bit 0, b = bit 1, c = bit 2: f1 = a·b + a·c and f2 = a·b + b·c, each minimum
    // apart; together a·b is one shared term: three distinct terms instead of four.
    const f1 = Array.from({ length: 8 }, (_, p) => ([3, 5, 7].includes(p) ? 1 : 0));
    const f2 = Array.from({ length: 8 }, (_, p) => ([3, 6, 7].includes(p) ? 1 : 0));
    const m = minimizeExactMulti([toSpec(f1), toSpec(f2)], 3)!;
    expect(m.terms).toBe(3);
  });
});
