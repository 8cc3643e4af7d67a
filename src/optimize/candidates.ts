// Candidate realizations of one specified function: the minimum sum of products, the minimum
// product of sums (the complement's sum, inverted), both factored, and an XOR decomposition
// when the function is linear in some variables. The passes price them in the graph and keep
// the cheapest.
import { complementSpec, DC, OFF, ON, type Spec } from "./sop/cube.js";
import { factorSum, termsOfCover } from "./sop/algebra.js";
import { minimizeOne, type TwoLevelLimits, type TwoLevelMethod } from "./sop/minimize.js";
import { lit, not, sopForm, type Form } from "./form.js";

export interface FormCandidate {
  form: Form;
  label: "sop" | "pos" | "factored sop" | "factored pos" | "xor";
  method: TwoLevelMethod;
}

/**
 * Linear variables: f = x_i ⊕ g where g does not depend on x_i (don't-cares filled to make it
 * so), taken greedily in variable order. Returns the variables and g, or undefined if none.
 */
export function linearDecomposition(spec: Spec, n: number): { linear: number[]; residual: Spec } | undefined {
  const s = Uint8Array.from(spec);
  const size = 2 ** n;
  const linear: number[] = [];
  const flip = (v: number) => (v === ON ? OFF : v === OFF ? ON : DC);
  for (let i = 0; i < n; i++) {
    const bit = 2 ** i;
    let ok = true;
    for (let p = 0; p < size && ok; p++) {
      if (p & bit) continue;
      const a = s[p]!;
      const b = s[p + bit]!;
      if (a !== DC && b !== DC && a === b) ok = false;
    }
    if (!ok) continue;
    let useful = false;
    for (let p = 0; p < size; p++) {
      if (p & bit) continue;
      const a = s[p]!;
      const b = s[p + bit]!;
      if (a === DC && b !== DC) s[p] = flip(b);
      else if (b === DC && a !== DC) s[p + bit] = flip(a);
      if (s[p] !== DC) useful = true;
    }
    if (!useful) continue; // all don't-care: nothing to decompose
    // g = f ⊕ x_i: complement the half where x_i = 1.
    for (let p = 0; p < size; p++) if (p & bit) s[p] = flip(s[p]!);
    linear.push(i);
  }
  return linear.length ? { linear, residual: s } : undefined;
}

/** Covers of more product terms than this are not factored (factoring time grows fast with the
 *  number of terms, and such covers rarely win). */
export const MAX_FACTORED_TERMS = 64;

export function twoLevelCandidates(spec: Spec, n: number, opts: { hazardFree?: boolean; limits?: TwoLevelLimits; xor?: boolean }): FormCandidate[] {
  const out: FormCandidate[] = [];
  const hf = !!opts.hazardFree;
  const L = opts.limits ? { limits: opts.limits } : {};
  const on = minimizeOne(spec, n, { hazardFree: hf, ...L });
  if (on) {
    out.push({ form: sopForm(on.cover, n), label: "sop", method: on.method });
    if (on.cover.length > 1 && on.cover.length <= MAX_FACTORED_TERMS) out.push({ form: factorSum(termsOfCover(on.cover, n)), label: "factored sop", method: on.method });
  }
  const off = minimizeOne(complementSpec(spec), n, { hazardFree: hf, ...L });
  if (off) {
    out.push({ form: not(sopForm(off.cover, n)), label: "pos", method: off.method });
    if (off.cover.length > 1 && off.cover.length <= MAX_FACTORED_TERMS) out.push({ form: not(factorSum(termsOfCover(off.cover, n))), label: "factored pos", method: off.method });
  }
  if (opts.xor && !hf) {
    const lin = linearDecomposition(spec, n);
    if (lin) {
      const g = minimizeOne(lin.residual, n, L);
      if (g) {
        const rest = g.cover.length === 0 ? [] : [g.cover.length > 1 && g.cover.length <= MAX_FACTORED_TERMS ? factorSum(termsOfCover(g.cover, n)) : sopForm(g.cover, n)];
        out.push({ form: { t: "xor", args: [...lin.linear.map((i) => lit(i)), ...rest] }, label: "xor", method: g.method });
      }
    }
  }
  return out;
}
