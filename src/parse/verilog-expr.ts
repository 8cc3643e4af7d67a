// Verilog expressions: precedence, constants, widths, and lowering to one `Expr` per bit.
// Everything here walks trees with an explicit stack (`fold`), so neither a deeply nested
// expression nor a very long operator chain can overflow the call stack.
import { diag, type Diagnostic, type Span } from "../diagnostics/index.js";
import { build, type Expr } from "../syntax/index.js";
import { toArray, type BinaryOp, type NumberLit, type VExpr } from "./verilog-ast.js";

/**
 * Walks a tree bottom-up without recursion: `combine` gets a node and the results of its
 * children (in order).
 */
export function fold<N, R>(root: N, kids: (n: N) => readonly N[], combine: (n: N, results: R[]) => R): R {
  interface Frame {
    node: N;
    kids: readonly N[];
    next: number;
    results: R[];
  }
  const stack: Frame[] = [{ node: root, kids: kids(root), next: 0, results: [] }];
  for (;;) {
    const top = stack[stack.length - 1]!;
    if (top.next < top.kids.length) {
      const child = top.kids[top.next++]!;
      stack.push({ node: child, kids: kids(child), next: 0, results: [] });
      continue;
    }
    stack.pop();
    const r = combine(top.node, top.results);
    if (stack.length === 0) return r;
    stack[stack.length - 1]!.results.push(r);
  }
}

function cover(a: Span, b: Span): Span {
  const start = Math.min(a.start, b.start);
  return { start, length: Math.max(a.start + a.length, b.start + b.length) - start };
}

// ---------------------------------------------------------------------------------------------
// Normalised expressions: precedence applied, constants checked, operators classified.

export type NExpr =
  | { k: "ref"; name: string; span: Span }
  | { k: "bit"; name: string; index: number; nameSpan: Span; span: Span }
  | { k: "const"; value: 0 | 1; span: Span }
  | { k: "not"; arg: NExpr; span: Span }
  | { k: "lnot"; arg: NExpr; span: Span }
  | { k: "reduce"; op: "and" | "or" | "xor"; negate: boolean; arg: NExpr; span: Span }
  | { k: "bitwise"; op: "and" | "or" | "xor"; negate: boolean; args: NExpr[]; span: Span }
  | { k: "logical"; op: "and" | "or"; args: NExpr[]; span: Span };

/**
 * Binding strength of the binary operators, IEEE 1364-2005 §5.1.2 Table 5-4:
 * `&` binds tighter than `^ ~^ ^~`, which bind tighter than `|`, then `&&`, then `||`.
 * (Unary operators bind tighter than all of them; the grammar already groups them.)
 */
export const BINARY_PRECEDENCE: Readonly<Record<BinaryOp, number>> = {
  "&": 5,
  "^": 4,
  "~^": 4,
  "^~": 4,
  "|": 3,
  "&&": 2,
  "||": 1,
};

function classify(op: BinaryOp): { k: "bitwise" | "logical"; op: "and" | "or" | "xor"; negate: boolean } {
  switch (op) {
    case "&":
      return { k: "bitwise", op: "and", negate: false };
    case "|":
      return { k: "bitwise", op: "or", negate: false };
    case "^":
      return { k: "bitwise", op: "xor", negate: false };
    case "~^":
    case "^~":
      // a ~^ b = ~(a ^ b); in a chain, each xnor flips the sense of the whole parity.
      return { k: "bitwise", op: "xor", negate: true };
    case "&&":
      return { k: "logical", op: "and", negate: false };
    case "||":
      return { k: "logical", op: "or", negate: false };
  }
}

/**
 * Turns a flat `operand op operand ...` sequence into a tree by precedence climbing
 * (left-associative). Consecutive operators of one class written without parentheses
 * (`a & b & c`, or `a ^ b ~^ c`) become one n-ary node; parenthesised groups are kept.
 */
export function climb(first: NExpr, ops: readonly BinaryOp[], operands: readonly NExpr[]): NExpr {
  const values: NExpr[] = [first];
  const pending: BinaryOp[] = [];
  const fresh = new Set<NExpr>();
  const reduce = () => {
    const op = pending.pop()!;
    const right = values.pop()!;
    const left = values.pop()!;
    const c = classify(op);
    if (fresh.has(left) && left.k === c.k && left.op === c.op) {
      // Same operator class, no parentheses in between: extend the n-ary node.
      left.args.push(right);
      if (left.k === "bitwise" && c.negate) left.negate = !left.negate;
      left.span = cover(left.span, right.span);
      values.push(left);
      return;
    }
    const span = cover(left.span, right.span);
    const node: NExpr =
      c.k === "bitwise"
        ? { k: "bitwise", op: c.op, negate: c.negate, args: [left, right], span }
        : { k: "logical", op: c.op as "and" | "or", args: [left, right], span };
    fresh.add(node);
    values.push(node);
  };
  for (let i = 0; i < ops.length; i++) {
    const op = ops[i]!;
    while (pending.length && BINARY_PRECEDENCE[pending[pending.length - 1]!] >= BINARY_PRECEDENCE[op]) reduce();
    pending.push(op);
    values.push(operands[i]!);
  }
  while (pending.length) reduce();
  return values[0]!;
}

/** Sink for diagnostics, with the file they belong to. */
export interface Reporter {
  file: string;
  report(d: Diagnostic): void;
}

const STRUCTURAL_HINT =
  "gatewright reads structural gate-level Verilog: module/endmodule, input/output/wire, " +
  "gate primitives (and nand or nor xor xnor not buf), continuous assign and module instances";

/** Reads a constant. Only the 1-bit values are accepted: 0, 1, 1'b0, 1'b1, 1'h0, 'b1, ... */
export function readConstant(lit: NumberLit, r: Reporter): 0 | 1 | null {
  const where = { file: r.file, span: lit.span };
  if (lit.tokenType === "real") {
    r.report(diag("GW1007", `'${lit.text}' is a real number; logic needs the constant 0 or 1`, where));
    return null;
  }
  if (lit.tokenType === "decimal") {
    const digits = lit.text.replace(/_/g, "").replace(/^0+(?=.)/, "");
    if (digits === "0" || digits === "1") return digits === "0" ? 0 : 1;
    r.report(
      diag("GW1007", `the constant ${lit.text} does not fit in one bit`, where, {
        hint: "only the 1-bit constants 0, 1, 1'b0 and 1'b1 are supported",
      }),
    );
    return null;
  }
  // Based number: [size]'[s]<base><digits>, IEEE 1364-2005 §3.5.1.
  const m = /^(?:([0-9_]+)[ \t]*)?'[sS]?([bBoOdDhH])[ \t]*([0-9a-zA-Z?_]+)$/.exec(lit.text);
  if (!m) {
    r.report(diag("GW1007", `'${lit.text}' is not a valid number`, where));
    return null;
  }
  const size = m[1] !== undefined ? Number(m[1].replace(/_/g, "")) : undefined;
  const base = m[2]!.toLowerCase();
  const digits = m[3]!.replace(/_/g, "").toLowerCase();
  if (/[xz?]/.test(digits)) {
    r.report(
      diag("GW1005", `unsupported construct: the unknown or high-impedance value in '${lit.text}'`, where, {
        hint: "DTL gates drive 0 or 1; use the constant 0 or 1",
      }),
    );
    return null;
  }
  const valid = base === "b" ? /^[01]+$/ : base === "o" ? /^[0-7]+$/ : base === "d" ? /^[0-9]+$/ : /^[0-9a-f]+$/;
  if (!valid.test(digits)) {
    r.report(diag("GW1007", `'${lit.text}' has a digit that is not allowed in base '${m[2]}'`, where));
    return null;
  }
  if (size !== undefined && size !== 1) {
    r.report(
      diag("GW1007", `the constant ${lit.text} is ${size} bits wide; only 1-bit constants are supported`, where, {
        hint: "write one 1-bit constant (1'b0 or 1'b1) per bit",
      }),
    );
    return null;
  }
  const significant = digits.replace(/^0+/, "");
  if (significant === "") return 0;
  if (significant === "1") return 1;
  r.report(
    diag("GW1007", `the constant ${lit.text} does not fit in one bit`, where, {
      hint: "only the 1-bit constants 0, 1, 1'b0 and 1'b1 are supported",
    }),
  );
  return null;
}

/** Reads a bit index or range bound: a plain decimal number. */
export function readIndex(lit: NumberLit, r: Reporter, what: string): number | null {
  if (lit.tokenType !== "decimal") {
    r.report(diag("GW1007", `${what} must be a plain decimal number, not '${lit.text}'`, { file: r.file, span: lit.span }));
    return null;
  }
  const v = Number(lit.text.replace(/_/g, ""));
  if (!Number.isSafeInteger(v)) {
    r.report(diag("GW1007", `${what} ${lit.text} is too large`, { file: r.file, span: lit.span }));
    return null;
  }
  return v;
}

function vkids(v: VExpr): readonly VExpr[] {
  switch (v.k) {
    case "unary":
    case "paren":
      return [v.arg];
    case "seq": {
      const steps = toArray(v.rest);
      const out: VExpr[] = [v.first];
      for (const s of steps) out.push(s.operand);
      return out;
    }
    default:
      return [];
  }
}

/** Applies precedence and checks constants; `null` when something was reported. */
export function normalize(v: VExpr, r: Reporter): NExpr | null {
  return fold<VExpr, NExpr | null>(v, vkids, (n, rs) => {
    if (rs.some((x) => x === null)) return null;
    const kids = rs as NExpr[];
    switch (n.k) {
      case "id":
        return { k: "ref", name: n.name, span: n.span };
      case "bit": {
        const index = readIndex(n.index, r, "a bit index");
        return index === null ? null : { k: "bit", name: n.name, index, nameSpan: n.nameSpan, span: n.span };
      }
      case "num": {
        const value = readConstant(n.lit, r);
        return value === null ? null : { k: "const", value, span: n.span };
      }
      case "paren":
        return kids[0]!;
      case "unary": {
        const arg = kids[0]!;
        const span = n.span;
        switch (n.op) {
          case "~":
            return { k: "not", arg, span };
          case "!":
            return { k: "lnot", arg, span };
          case "&":
            return { k: "reduce", op: "and", negate: false, arg, span };
          case "~&":
            return { k: "reduce", op: "and", negate: true, arg, span };
          case "|":
            return { k: "reduce", op: "or", negate: false, arg, span };
          case "~|":
            return { k: "reduce", op: "or", negate: true, arg, span };
          case "^":
            return { k: "reduce", op: "xor", negate: false, arg, span };
          case "~^":
          case "^~":
            return { k: "reduce", op: "xor", negate: true, arg, span };
        }
        return null;
      }
      case "seq": {
        const steps = toArray(n.rest);
        return climb(kids[0]!, steps.map((s) => s.op), kids.slice(1));
      }
    }
  });
}

// ---------------------------------------------------------------------------------------------
// Widths and lowering

/** What the lowering needs to know about a name: its bits, MSB first, and its index range. */
export interface NetShape {
  /** Bit names, MSB first: `a[3] a[2] a[1] a[0]`, or just `a` for a scalar. */
  bits: readonly string[];
  /** Declared range, or null for a scalar. */
  range: { msb: number; lsb: number } | null;
  span: Span;
}

export interface NetScope {
  /** The declaration of `name`; `span` is given when the name is read as a whole. */
  lookup(name: string, span?: Span): NetShape | undefined;
}

/** Name of bit `index` of vector `name`, as it appears in the design: `name[index]`. */
export function bitName(name: string, index: number): string {
  return `${name}[${index}]`;
}

/** Checks a bit-select against the declaration; returns the bit's name or null. */
export function resolveBit(
  name: string,
  index: number,
  span: Span,
  scope: NetScope,
  r: Reporter,
): string | null {
  const net = scope.lookup(name);
  // An undeclared name is left for name resolution (src/logic) to report.
  if (!net) return bitName(name, index);
  if (!net.range) {
    r.report(
      diag("GW2015", `'${name}' is a scalar; it has no bit ${index}`, { file: r.file, span }, {
        related: [{ message: `'${name}' is declared here`, file: r.file, start: net.span.start, length: net.span.length }],
      }),
    );
    return null;
  }
  const { msb, lsb } = net.range;
  if (index < Math.min(msb, lsb) || index > Math.max(msb, lsb)) {
    r.report(
      diag("GW2015", `bit ${index} is outside '${name}[${msb}:${lsb}]'`, { file: r.file, span }, {
        related: [{ message: `'${name}' is declared here`, file: r.file, start: net.span.start, length: net.span.length }],
      }),
    );
    return null;
  }
  return bitName(name, index);
}

function nkids(n: NExpr): readonly NExpr[] {
  switch (n.k) {
    case "not":
    case "lnot":
    case "reduce":
      return [n.arg];
    case "bitwise":
    case "logical":
      return n.args;
    default:
      return [];
  }
}

function nary(op: "and" | "or" | "xor", args: Expr[], span: Span): Expr {
  return args.length === 1 ? args[0]! : build.nary(op, args, span);
}

function describeWidths(args: readonly (readonly Expr[])[]): string {
  return args.map((a) => String(a.length)).join(", ");
}

const OP_TEXT = { and: "&", or: "|", xor: "^" } as const;

/**
 * Lowers a normalised expression to one `Expr` per bit, MSB first. Bitwise operators need
 * operands of one width (gatewright neither extends nor truncates); `!`, `&&`, `||` and the
 * reduction operators give one bit, treating a vector operand as "any bit is 1"
 * (IEEE 1364-2005 §5.1.9, §5.1.11).
 */
export function lowerBits(e: NExpr, scope: NetScope, r: Reporter): Expr[] | null {
  return fold<NExpr, Expr[] | null>(e, nkids, (n, rs) => {
    if (rs.some((x) => x === null)) return null;
    const kids = rs as Expr[][];
    switch (n.k) {
      case "ref": {
        const net = scope.lookup(n.name, n.span);
        if (!net) return [build.ref(n.name, n.span)];
        return net.bits.map((b) => build.ref(b, n.span));
      }
      case "bit": {
        const b = resolveBit(n.name, n.index, n.span, scope, r);
        return b === null ? null : [build.ref(b, n.span)];
      }
      case "const":
        return [build.constant(n.value, n.span)];
      case "not":
        return kids[0]!.map((x) => build.not(x, n.span));
      case "lnot":
        return [build.not(nary("or", kids[0]!, n.arg.span), n.span)];
      case "reduce": {
        const x = nary(n.op, kids[0]!, n.span);
        return [n.negate ? build.not(x, n.span) : x];
      }
      case "logical":
        return [nary(n.op, kids.map((k, i) => nary("or", k, n.args[i]!.span)), n.span)];
      case "bitwise": {
        const width = kids[0]!.length;
        if (kids.some((k) => k.length !== width)) {
          r.report(
            diag(
              "GW2021",
              `the operands of '${n.negate && n.op === "xor" ? "~^" : OP_TEXT[n.op]}' have different widths (${describeWidths(kids)} bits)`,
              { file: r.file, span: n.span },
              { hint: "gatewright neither extends nor truncates vectors; use operands of one width or select bits" },
            ),
          );
          return null;
        }
        const out: Expr[] = [];
        for (let p = 0; p < width; p++) {
          const x = nary(n.op, kids.map((k) => k[p]!), n.span);
          out.push(n.negate ? build.not(x, n.span) : x);
        }
        return out;
      }
    }
  });
}

/** Normalises and lowers in one call. */
export function lowerExpr(v: VExpr, scope: NetScope, r: Reporter): Expr[] | null {
  if (v.k === "id") {
    // The common case in netlists, without building the intermediate tree.
    const net = scope.lookup(v.name, v.span);
    if (!net) return [build.ref(v.name, v.span)];
    return net.bits.map((b) => build.ref(b, v.span));
  }
  const n = normalize(v, r);
  return n === null ? null : lowerBits(n, scope, r);
}

export { STRUCTURAL_HINT };
