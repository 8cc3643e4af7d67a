// A small expression form over numbered leaves, used by the passes to describe a replacement
// for a node (a factored sum of products, an XOR decomposition, ...) and to build it into a
// graph through the GraphBuilder (so that equal sub-forms become one node).
import type { GraphBuilder } from "./builder.js";
import type { Cube } from "./sop/cube.js";

export type Form =
  | { t: "lit"; v: number; neg: boolean }
  | { t: "const"; value: 0 | 1 }
  | { t: "not"; arg: Form }
  | { t: "and" | "or" | "xor"; args: Form[] };

export const lit = (v: number, neg = false): Form => ({ t: "lit", v, neg });
export const constant = (value: 0 | 1): Form => ({ t: "const", value });
export const not = (arg: Form): Form => ({ t: "not", arg });
export const and = (args: Form[]): Form => (args.length === 0 ? constant(1) : args.length === 1 ? args[0]! : { t: "and", args });
export const or = (args: Form[]): Form => (args.length === 0 ? constant(0) : args.length === 1 ? args[0]! : { t: "or", args });

/** The sum of products of a cover over variables 0..n-1 (variable i is leaf i). */
export function sopForm(cover: readonly Cube[], n: number): Form {
  return or(
    cover.map((c) => {
      const lits: Form[] = [];
      for (let i = 0; i < n; i++) if ((c.mask >>> i) & 1) lits.push(lit(i, !((c.value >>> i) & 1)));
      return and(lits);
    }),
  );
}

/** Builds a form; `leaf(v)` gives the builder node of leaf v. Iterative (forms may be deep). */
export function buildForm(b: GraphBuilder, form: Form, leaf: (v: number) => number): number {
  const out = new Map<Form, number>();
  const stack: { f: Form; expanded: boolean }[] = [{ f: form, expanded: false }];
  while (stack.length) {
    const top = stack.pop()!;
    const f = top.f;
    if (out.has(f)) continue;
    if (f.t === "lit") {
      const x = leaf(f.v);
      out.set(f, f.neg ? b.not(x) : x);
      continue;
    }
    if (f.t === "const") {
      out.set(f, b.constant(f.value));
      continue;
    }
    const kids = f.t === "not" ? [f.arg] : f.args;
    if (!top.expanded) {
      stack.push({ f, expanded: true });
      for (const k of kids) if (!out.has(k)) stack.push({ f: k, expanded: false });
      continue;
    }
    const ids = kids.map((k) => out.get(k)!);
    out.set(f, f.t === "not" ? b.not(ids[0]!) : f.t === "and" ? b.and(ids) : f.t === "or" ? b.or(ids) : b.xor(ids));
  }
  return out.get(form)!;
}

/** Leaves a form uses. */
export function formLeaves(form: Form): Set<number> {
  const s = new Set<number>();
  const stack = [form];
  while (stack.length) {
    const f = stack.pop()!;
    if (f.t === "lit") s.add(f.v);
    else if (f.t === "not") stack.push(f.arg);
    else if (f.t !== "const") for (const each of f.args) stack.push(each);
  }
  return s;
}

/** Literal count of a form (a rough size, for ordering candidates). */
export function formLiterals(form: Form): number {
  let k = 0;
  const stack = [form];
  while (stack.length) {
    const f = stack.pop()!;
    if (f.t === "lit") k++;
    else if (f.t === "not") stack.push(f.arg);
    else if (f.t !== "const") for (const each of f.args) stack.push(each);
  }
  return k;
}
