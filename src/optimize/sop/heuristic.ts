// Heuristic two-level minimization after the published expand / irredundant / reduce loop
// (Brayton, Hachtel, McMullen, Sangiovanni-Vincentelli, *Logic Minimization Algorithms for VLSI Synthesis*, 1984): EXPAND
// every term to a prime, drop the terms the others cover (IRREDUNDANT), REDUCE each term to the
// smallest one that still covers what only it covers, expand again in another direction, and
// repeat while the cover gets smaller. Our own formulation works on the point-by-point
// specification (n ≤ 20 variables) with a count of the terms covering each point, instead of
// the book's cube-list complements; it finds a prime and irredundant cover, not always a
// minimum one.
import { coverSize, DC, forEachPoint, everyPoint, fullMask, literalCount, OFF, ON, type Cube, type Spec } from "./cube.js";

export interface HeuristicResult {
  cover: Cube[];
  iterations: number;
}

export function minimizeHeuristic(spec: Spec, n: number, opts: { maxIterations?: number } = {}): HeuristicResult {
  const size = 2 ** n;
  const full = fullMask(n);
  const count = new Uint16Array(size); // terms covering each point
  let cover: Cube[] = [];
  const add = (c: Cube) => forEachPoint(c, n, (p) => void count[p]!++);
  const remove = (c: Cube) => forEachPoint(c, n, (p) => void count[p]!--);

  /** Raises literals of c while it stays inside ON ∪ DC, choosing each time the raise whose new
   *  half holds the most ON points that `weight` counts. */
  const expand = (c: Cube, weight: (p: number) => number): Cube => {
    let cur = c;
    for (;;) {
      let best = -1;
      let bestGain = -1;
      let given = cur.mask;
      while (given) {
        const bit = (given & -given) >>> 0;
        given = (given & ~bit) >>> 0;
        const half: Cube = { mask: cur.mask, value: (cur.value ^ bit) >>> 0 };
        let gain = 0;
        const ok = everyPoint(half, n, (p) => {
          const s = spec[p];
          if (s === OFF) return false;
          if (s === ON) gain += weight(p);
          return true;
        });
        if (ok && gain > bestGain) {
          bestGain = gain;
          best = bit;
        }
      }
      if (best < 0) return cur;
      cur = { mask: (cur.mask & ~best) >>> 0, value: (cur.value & ~best) >>> 0 };
    }
  };

  // First cover: every ON point not yet covered grows into a prime towards uncovered points.
  for (let p = 0; p < size; p++) {
    if (spec[p] !== ON || count[p]) continue;
    const c = expand({ mask: full, value: p }, (q) => (count[q] ? 0 : 1));
    cover.push(c);
    add(c);
  }

  const irredundant = () => {
    // Most literals first: the dearest terms go first when the others cover them.
    const order = [...cover].sort((x, y) => literalCount(y) - literalCount(x));
    const kept = new Set(cover);
    for (const c of order) {
      const redundant = everyPoint(c, n, (p) => spec[p] !== ON || count[p]! > 1);
      if (redundant) {
        kept.delete(c);
        remove(c);
      }
    }
    cover = cover.filter((c) => kept.has(c));
  };

  const reduce = () => {
    const next: Cube[] = [];
    // Largest terms first, as the book orders REDUCE.
    const order = [...cover].sort((x, y) => literalCount(x) - literalCount(y));
    for (const c of order) {
      let andAll = full;
      let orAll = 0;
      let any = false;
      forEachPoint(c, n, (p) => {
        if (spec[p] === ON && count[p] === 1) {
          andAll &= p;
          orAll |= p;
          any = true;
        }
      });
      remove(c);
      if (!any) continue; // covered by the others
      const mask = (full & ~(andAll ^ orAll)) >>> 0;
      const r: Cube = { mask, value: (andAll & mask) >>> 0 };
      next.push(r);
      add(r);
    }
    cover = next;
  };

  const reexpand = () => {
    const next: Cube[] = [];
    // Smallest terms first: they have the most room to grow over the others.
    const order = [...cover].sort((x, y) => literalCount(y) - literalCount(x));
    for (const c of order) {
      remove(c);
      // Prefer covering points that other terms cover once (those terms may then go).
      const e = expand(c, (q) => (count[q] === 0 ? 2 : count[q] === 1 ? 1 : 0));
      next.push(e);
      add(e);
    }
    cover = next;
  };

  irredundant();
  const costOf = () => {
    const s = coverSize(cover);
    return s.terms * 1_000_000 + s.literals;
  };
  let best = [...cover];
  let bestCost = costOf();
  let iterations = 0;
  const maxIterations = opts.maxIterations ?? 8;
  while (iterations < maxIterations) {
    iterations++;
    reduce();
    reexpand();
    irredundant();
    const c = costOf();
    if (c < bestCost) {
      bestCost = c;
      best = [...cover];
    } else break;
  }
  void DC;
  return { cover: best, iterations };
}
