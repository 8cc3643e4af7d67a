// Syntax tree of one Verilog module item, as the grammar's postprocessors build it.
// Names are not resolved and widths are not known here; see verilog-elaborate.ts.
// Lists are built as linked lists (`Chain`) so that a declaration with 100,000 names costs
// linear time; `toArray` turns them into arrays without recursion.
import type { Token } from "moo";
import type { Span } from "../diagnostics/index.js";

export interface Name {
  name: string;
  span: Span;
}

/** A number token as written; its meaning is checked when the item is elaborated. */
export interface NumberLit {
  text: string;
  tokenType: string;
  span: Span;
}

export type BinaryOp = "&" | "|" | "^" | "~^" | "^~" | "&&" | "||";
export type UnaryOp = "~" | "!" | "&" | "~&" | "|" | "~|" | "^" | "~^" | "^~";

export type VExpr =
  | { k: "id"; name: string; span: Span }
  | { k: "bit"; name: string; nameSpan: Span; index: NumberLit; span: Span }
  | { k: "num"; lit: NumberLit; span: Span }
  | { k: "unary"; op: UnaryOp; arg: VExpr; span: Span }
  /** `first op operand op operand ...` as written; precedence is applied in verilog-expr.ts. */
  | { k: "seq"; first: VExpr; rest: Chain<SeqStep>; span: Span }
  | { k: "paren"; arg: VExpr; span: Span };

export interface SeqStep {
  op: BinaryOp;
  opSpan: Span;
  operand: VExpr;
}

export interface Range {
  msb: NumberLit;
  lsb: NumberLit;
  span: Span;
}

export interface AnsiPort {
  dir: "input" | "output";
  range: Range | null;
  name: Name;
  span: Span;
}

export type PortHeader =
  | { style: "none" }
  | { style: "list"; names: Name[] }
  | { style: "ansi"; ports: AnsiPort[] };

export interface WireItem {
  name: Name;
  init: VExpr | null;
  span: Span;
}

export interface GateInstance {
  name: Name | null;
  array: Range | null;
  terminals: VExpr[];
  span: Span;
}

export interface AssignOne {
  lhs: VExpr; // "id" or "bit"
  rhs: VExpr;
  span: Span;
}

export type Connections =
  | { style: "ordered"; items: (VExpr | null)[] }
  | { style: "named"; items: NamedConnection[] };

export interface NamedConnection {
  port: Name;
  expr: VExpr | null;
  span: Span;
}

export interface ModuleInstance {
  name: Name;
  array: Range | null;
  connections: Connections;
  span: Span;
}

export type GateType = "and" | "nand" | "or" | "nor" | "xor" | "xnor" | "not" | "buf";

export type VItem =
  | { k: "module"; name: Name; ports: PortHeader; span: Span }
  | { k: "endmodule"; span: Span }
  | { k: "port"; dir: "input" | "output"; range: Range | null; names: Name[]; span: Span }
  | { k: "wire"; range: Range | null; items: WireItem[]; span: Span }
  | { k: "gate"; gate: GateType; instances: GateInstance[]; span: Span }
  | { k: "assign"; assigns: AssignOne[]; span: Span }
  | { k: "instance"; module: Name; instances: ModuleInstance[]; span: Span };

export interface Chain<T> {
  prev: Chain<T> | null;
  item: T;
}

export function toArray<T>(c: Chain<T> | null): T[] {
  const out: T[] = [];
  for (let x = c; x !== null; x = x.prev) out.push(x.item);
  return out.reverse();
}

function tokSpan(t: Token): Span {
  return { start: t.offset, length: t.text.length };
}

function cover(first: Span, last: Span): Span {
  return { start: first.start, length: last.start + last.length - first.start };
}

type D = any[]; // eslint-disable-line @typescript-eslint/no-explicit-any

function name(t: Token): Name {
  return { name: t.value, span: tokSpan(t) };
}

/** Postprocessors used by grammars/verilog.ne. Each builds a plain object. */
export const ast = {
  chain1: (d: D): Chain<unknown> => ({ prev: null, item: d[0] }),
  /** `list "," item` */
  chainPush: (d: D): Chain<unknown> => ({ prev: d[0], item: d[2] }),
  name: (d: D): Name => name(d[0]),
  number: (d: D): NumberLit => {
    const t: Token = d[0];
    return { text: t.text, tokenType: t.type ?? "", span: tokSpan(t) };
  },
  range: (d: D): Range => ({ msb: d[1], lsb: d[3], span: cover(tokSpan(d[0]), tokSpan(d[4])) }),

  moduleHeader: (d: D): VItem => ({
    k: "module",
    name: name(d[1]),
    ports: d[2] ?? { style: "none" },
    span: cover(tokSpan(d[0]), tokSpan(d[3])),
  }),
  emptyPorts: (): PortHeader => ({ style: "none" }),
  listPorts: (d: D): PortHeader => ({ style: "list", names: toArray<Token>(d[1]).map(name) }),
  ansiPorts: (d: D): PortHeader => {
    // Entries after the first may be bare names that inherit the previous direction and range.
    const entries = toArray<AnsiPort | Token>(d[1]);
    const ports: AnsiPort[] = [];
    let last: AnsiPort | undefined;
    for (const e of entries) {
      if ("dir" in e) last = e;
      else if (last) {
        const n = name(e as Token);
        last = { dir: last.dir, range: last.range, name: n, span: n.span };
      }
      if (last) ports.push(last);
    }
    return { style: "ansi", ports };
  },
  /** `direction "wire"? range? name`; d[0] is the direction keyword token. */
  ansiPort: (d: D): AnsiPort => {
    const dir: Token = d[0];
    const n = name(d[3]);
    return { dir: dir.value as "input" | "output", range: d[2], name: n, span: cover(tokSpan(dir), n.span) };
  },
  endmodule: (d: D): VItem => ({ k: "endmodule", span: tokSpan(d[0]) }),
  portDecl: (d: D): VItem => ({
    k: "port",
    dir: (d[0] as Token).value as "input" | "output",
    range: d[2],
    names: toArray<Token>(d[3]).map(name),
    span: cover(tokSpan(d[0]), tokSpan(d[4])),
  }),
  wireDecl: (d: D): VItem => ({
    k: "wire",
    range: d[1],
    items: toArray<WireItem>(d[2]),
    span: cover(tokSpan(d[0]), tokSpan(d[3])),
  }),
  wireItem: (d: D): WireItem => {
    const n = name(d[0]);
    if (d.length === 1) return { name: n, init: null, span: n.span };
    const init: VExpr = d[2];
    return { name: n, init, span: cover(n.span, init.span) };
  },
  gateStmt: (d: D): VItem => ({
    k: "gate",
    gate: (d[0] as Token).value as GateType,
    instances: toArray<GateInstance>(d[1]),
    span: cover(tokSpan(d[0]), tokSpan(d[2])),
  }),
  gateInstAnon: (d: D): GateInstance => ({
    name: null,
    array: null,
    terminals: toArray<VExpr>(d[1]),
    span: cover(tokSpan(d[0]), tokSpan(d[2])),
  }),
  gateInstNamed: (d: D): GateInstance => ({
    name: name(d[0]),
    array: d[1],
    terminals: toArray<VExpr>(d[3]),
    span: cover(tokSpan(d[0]), tokSpan(d[4])),
  }),
  assignStmt: (d: D): VItem => ({
    k: "assign",
    assigns: toArray<AssignOne>(d[1]),
    span: cover(tokSpan(d[0]), tokSpan(d[2])),
  }),
  assignOne: (d: D): AssignOne => {
    const lhs: VExpr = d[0];
    const rhs: VExpr = d[2];
    return { lhs, rhs, span: cover(lhs.span, rhs.span) };
  },
  instanceStmt: (d: D): VItem => ({
    k: "instance",
    module: name(d[0]),
    instances: toArray<ModuleInstance>(d[1]),
    span: cover(tokSpan(d[0]), tokSpan(d[2])),
  }),
  modInst: (d: D): ModuleInstance => ({
    name: name(d[0]),
    array: d[1],
    connections: d[3],
    span: cover(tokSpan(d[0]), tokSpan(d[4])),
  }),
  orderedConns: (d: D): Connections => {
    return { style: "ordered", items: toArray<VExpr | null>(d[0]) };
  },
  namedConns: (d: D): Connections => ({ style: "named", items: toArray<NamedConnection>(d[0]) }),
  namedConn: (d: D): NamedConnection => ({
    port: name(d[1]),
    expr: d[3],
    span: cover(tokSpan(d[0]), tokSpan(d[4])),
  }),
  nothing: (): null => null,

  // Expressions
  ref: (d: D): VExpr => {
    const t: Token = d[0];
    return { k: "id", name: t.value, span: tokSpan(t) };
  },
  bit: (d: D): VExpr => {
    const t: Token = d[0];
    return { k: "bit", name: t.value, nameSpan: tokSpan(t), index: d[2], span: cover(tokSpan(t), tokSpan(d[3])) };
  },
  num: (d: D): VExpr => {
    const lit: NumberLit = d[0];
    return { k: "num", lit, span: lit.span };
  },
  paren: (d: D): VExpr => ({ k: "paren", arg: d[1], span: cover(tokSpan(d[0]), tokSpan(d[2])) }),
  unary: (d: D): VExpr => {
    const op: Token = d[0];
    const arg: VExpr = d[1];
    return { k: "unary", op: op.value as UnaryOp, arg, span: cover(tokSpan(op), arg.span) };
  },
  /** `expr binaryOp operand`: extends the flat sequence (a new object; nothing is mutated). */
  seqPush: (d: D): VExpr => {
    const left: VExpr = d[0];
    const opTok: Token = d[1];
    const operand: VExpr = d[2];
    const step: SeqStep = { op: opTok.text as BinaryOp, opSpan: tokSpan(opTok), operand };
    const span = cover(left.span, operand.span);
    if (left.k === "seq") return { k: "seq", first: left.first, rest: { prev: left.rest, item: step }, span };
    return { k: "seq", first: left, rest: { prev: null, item: step }, span };
  },
};
