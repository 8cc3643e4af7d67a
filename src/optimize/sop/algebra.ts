// Algebraic operations on sums of products (Brayton and McMullen, "The decomposition and
// factorization of Boolean expressions", 1982; common practice): a product term is a set of
// literals, a sum a set of terms, and x and x' are unrelated symbols. Weak division, kernels
// and co-kernels, and factoring by the best kernel ("good factor"). Only algebraic identities
// are used, so the factored form has the same terms multiplied out, and the same static-hazard
// behaviour, as the sum it came from.
//
// Literals are numbers: 2·v for variable v, 2·v + 1 for its complement. A term is a sorted
// array of literals; a sum is an array of terms.
import { and, constant, lit, or, type Form } from "../form.js";
import type { Cube } from "./cube.js";

export type Term = number[];
export type Sum = Term[];

export function termsOfCover(cover: readonly Cube[], n: number): Sum {
  return cover.map((c) => {
    const t: number[] = [];
    for (let i = 0; i < n; i++) if ((c.mask >>> i) & 1) t.push(2 * i + ((c.value >>> i) & 1 ? 0 : 1));
    return t;
  });
}

function contains(big: Term, small: Term): boolean {
  let i = 0;
  for (const x of small) {
    while (i < big.length && big[i]! < x) i++;
    if (i >= big.length || big[i] !== x) return false;
    i++;
  }
  return true;
}

function minus(t: Term, d: Term): Term {
  const s = new Set(d);
  return t.filter((x) => !s.has(x));
}

function termKey(t: Term): string {
  return t.join(",");
}

/** Literals every term has. */
export function commonTerm(f: Sum): Term {
  if (f.length === 0) return [];
  let c = f[0]!;
  for (let k = 1; k < f.length && c.length; k++) {
    const s = new Set(f[k]!);
    c = c.filter((x) => s.has(x));
  }
  return c;
}

export function literalsOf(f: Sum): number {
  let k = 0;
  for (const t of f) k += t.length;
  return k;
}

/** Weak (algebraic) division: f = q·d + r with q as large as possible. */
export function weakDivide(f: Sum, d: Sum): { q: Sum; r: Sum } {
  if (d.length === 0) return { q: [], r: f };
  let q: Map<string, Term> | undefined;
  for (const dt of d) {
    const part = new Map<string, Term>();
    for (const t of f) if (contains(t, dt)) {
      const x = minus(t, dt);
      part.set(termKey(x), x);
    }
    if (!q) q = part;
    else for (const k of [...q.keys()]) if (!part.has(k)) q.delete(k);
    if (q.size === 0) break;
  }
  const quotient = q ? [...q.values()] : [];
  if (quotient.length === 0) return { q: [], r: f };
  const product = new Set<string>();
  for (const a of quotient) for (const b of d) product.add(termKey([...new Set([...a, ...b])].sort((x, y) => x - y)));
  const r = f.filter((t) => !product.has(termKey(t)));
  return { q: quotient, r };
}

/** Kernels (cube-free quotients by a term) with their co-kernels, at most `limit` of them. */
export function kernels(f: Sum, limit = 64): { kernel: Sum; coKernel: Term }[] {
  const out: { kernel: Sum; coKernel: Term }[] = [];
  const seen = new Set<string>();
  const record = (k: Sum, co: Term) => {
    const key = k.map(termKey).sort().join("|");
    if (seen.has(key)) return;
    seen.add(key);
    out.push({ kernel: k, coKernel: co });
  };
  const walk = (g: Sum, co: Term, from: number) => {
    if (out.length >= limit) return;
    const counts = new Map<number, number>();
    for (const t of g) for (const x of t) counts.set(x, (counts.get(x) ?? 0) + 1);
    const lits = [...counts].filter(([, k]) => k >= 2).map(([x]) => x).sort((a, b) => a - b);
    for (const l of lits) {
      if (l < from) continue;
      const s = g.filter((t) => t.includes(l));
      const c = commonTerm(s);
      // Skip if the common term holds a smaller repeated literal: that kernel was found before.
      if (c.some((x) => x < l && (counts.get(x) ?? 0) >= 2)) continue;
      walk(
        s.map((t) => minus(t, c)),
        [...new Set([...co, ...c])].sort((a, b) => a - b),
        l + 1,
      );
      if (out.length >= limit) return;
    }
    if (g.length >= 2 && commonTerm(g).length === 0) record(g, co);
  };
  walk(f, [], 0);
  return out;
}

function termForm(t: Term): Form {
  return and(t.map((x) => lit(x >> 1, (x & 1) === 1)));
}

/** A factored form of a sum of products (algebraic factoring by the best kernel). */
export function factorSum(f: Sum, depth = 0): Form {
  if (f.length === 0) return constant(0);
  if (f.some((t) => t.length === 0)) return constant(1);
  if (f.length === 1) return termForm(f[0]!);
  const c = commonTerm(f);
  if (c.length) {
    const rest = f.map((t) => minus(t, c));
    return and([termForm(c), factorSum(rest, depth + 1)]);
  }
  if (depth > 40) return or(f.map(termForm));
  // Best divisor: the kernel that saves the most literals; a repeated literal if none does.
  const total = literalsOf(f);
  let best: { q: Sum; d: Sum; r: Sum; saving: number } | undefined;
  for (const { kernel } of kernels(f, 32)) {
    if (kernel.length === f.length) continue; // f itself
    const { q, r } = weakDivide(f, kernel);
    if (q.length === 0) continue;
    const saving = total - (literalsOf(q) + literalsOf(kernel) + literalsOf(r));
    if (!best || saving > best.saving) best = { q, d: kernel, r, saving };
  }
  if (!best || best.saving <= 0) {
    const counts = new Map<number, number>();
    for (const t of f) for (const x of t) counts.set(x, (counts.get(x) ?? 0) + 1);
    let l = -1;
    let k = 1;
    for (const [x, m] of counts) if (m > k || (m === k && m > 1 && x < l)) {
      l = x;
      k = m;
    }
    if (l < 0) return or(f.map(termForm));
    const { q, r } = weakDivide(f, [[l]]);
    best = { q, d: [[l]], r, saving: k - 1 };
  }
  const product = and([factorSum(best.q, depth + 1), factorSum(best.d, depth + 1)]);
  return best.r.length ? or([product, factorSum(best.r, depth + 1)]) : product;
}
