// Elaboration of one Verilog module: declarations, gate primitives and continuous assignments
// become bit-level assignments in the module's own names; module instances are kept for
// `resolveInstances` (they need the instantiated module's ports) and for flattening.
import { diag, type Span } from "../diagnostics/index.js";
import { build, type Assignment, type Expr } from "../syntax/index.js";
import type { Connections, GateInstance, GateType, ModuleInstance, Name, Range, VExpr, VItem } from "./verilog-ast.js";
import {
  bitName,
  lowerExpr,
  readIndex,
  resolveBit,
  type NetScope,
  type NetShape,
  type Reporter,
} from "./verilog-expr.js";

/** Widest vector accepted, in bits (a documented limit that keeps expansion bounded). */
export const MAX_VECTOR_BITS = 65536;

export type NetKind = "input" | "output" | "wire" | "implicit";

export interface NetDecl extends NetShape {
  name: string;
  kind: NetKind;
  /** A port that also has a `wire` declaration (`output y; wire y;`). */
  wireSeen?: boolean;
}

export interface PortDef {
  name: string;
  dir: "input" | "output";
  net: NetDecl;
}

export interface InstanceDef {
  module: Name;
  name: Name;
  connections: Connections;
  span: Span;
  /** Filled in by resolveInstances when the connections fit the instantiated module. */
  resolved?: ResolvedInstance;
}

export interface ResolvedInstance {
  child: ModuleDef;
  /** Input bits of the child, each driven by an expression in the parent's names. */
  inputs: { childBit: string; expr: Expr; targetSpan: Span; span: Span }[];
  /** Output bits of the child, each driving a net bit of the parent. */
  outputs: { childBit: string; parentBit: string; targetSpan: Span; span: Span }[];
}

export interface ModuleDef {
  name: string;
  nameSpan: Span;
  /** Ports in the order of the module's port list (the order of ordered connections). */
  ports: PortDef[];
  /** Ports in the order of their input/output declarations (the design's port order). */
  declaredPorts: PortDef[];
  nets: Map<string, NetDecl>;
  /** Nets in declaration order (ports included). */
  netOrder: NetDecl[];
  assignments: Assignment[];
  instances: InstanceDef[];
  /** True when the module had errors; it is not flattened. */
  broken: boolean;
}

function cover(a: Span, b: Span): Span {
  const start = Math.min(a.start, b.start);
  return { start, length: Math.max(a.start + a.length, b.start + b.length) - start };
}

function relatedAt(message: string, file: string, span: Span) {
  return { message, file, start: span.start, length: span.length };
}

type Bounds = { msb: number; lsb: number };

function bitsOf(name: string, range: Bounds | null): string[] {
  if (!range) return [name];
  const out: string[] = [];
  const step = range.msb >= range.lsb ? -1 : 1;
  for (let i = range.msb; ; i += step) {
    out.push(bitName(name, i));
    if (i === range.lsb) break;
  }
  return out;
}

const sameRange = (a: Bounds | null, b: Bounds | null) =>
  (a === null && b === null) || (a !== null && b !== null && a.msb === b.msb && a.lsb === b.lsb);
const rangeText = (x: Bounds | null) => (x ? `[${x.msb}:${x.lsb}]` : "a scalar");

/**
 * Elaborates one module item by item, in source order, so that only the module's results
 * (nets and bit-level assignments) are kept, never its syntax. As in Verilog, a name is
 * declared before it is used; a name used as a whole in a gate terminal, a module port
 * connection or as an `assign` target without a declaration is an implicit 1-bit wire
 * (IEEE 1364-2005 §4.5). A later `wire`/`input`/`output` declaration of such a scalar name
 * is accepted as its declaration.
 */
export class ModuleBuilder {
  readonly def: ModuleDef;
  private readonly file: string;
  private readonly report: Reporter;
  private errors = 0;
  private readonly listed = new Map<string, Name>(); // non-ANSI port list: name → where listed
  private readonly listOrder: string[] = [];
  private readonly ansi: boolean;
  private readonly portDecls = new Map<string, PortDef>();
  private readonly instanceNames = new Map<string, Span>();
  /** Names read as a whole before any declaration: they were taken as 1-bit. */
  private readonly readUndeclared = new Map<string, Span>();
  private readonly scope: NetScope;

  constructor(private readonly header: Extract<VItem, { k: "module" }>, r: Reporter) {
    this.file = r.file;
    this.report = {
      file: r.file,
      report: (d) => {
        if (d.severity === "error") this.errors++;
        r.report(d);
      },
    };
    const nets = new Map<string, NetDecl>();
    this.scope = {
      lookup: (name, span) => {
        const n = nets.get(name);
        if (!n && span && !this.readUndeclared.has(name)) this.readUndeclared.set(name, span);
        return n;
      },
    };
    this.def = {
      name: header.name.name,
      nameSpan: header.name.span,
      ports: [],
      declaredPorts: [],
      nets,
      netOrder: [],
      assignments: [],
      instances: [],
      broken: false,
    };
    this.ansi = header.ports.style === "ansi";
    if (header.ports.style === "list") {
      for (const n of header.ports.names) {
        const prev = this.listed.get(n.name);
        if (prev) {
          this.error("GW2005", `port '${n.name}' is listed twice in the header of module '${this.def.name}'`, n.span, {
            related: [this.rel("first listed here", prev.span)],
          });
          continue;
        }
        this.listed.set(n.name, n);
        this.listOrder.push(n.name);
      }
    } else if (header.ports.style === "ansi") {
      for (const p of header.ports.ports) {
        const range = this.readRange(p.range);
        if (range === undefined) continue;
        const prev = nets.get(p.name.name);
        if (prev) {
          this.error("GW2005", `port '${p.name.name}' is declared twice`, p.name.span, {
            related: [this.rel("first declared here", prev.span)],
          });
          continue;
        }
        const net = this.addNet(p.name, p.dir, range);
        this.def.ports.push({ name: p.name.name, dir: p.dir, net });
      }
    }
  }

  private rel(message: string, span: Span) {
    return relatedAt(message, this.file, span);
  }

  private error(code: Parameters<typeof diag>[0], message: string, span: Span, extra?: Parameters<typeof diag>[3]): void {
    this.report.report(diag(code, message, { file: this.file, span }, extra));
  }

  private readRange(range: Range | null): Bounds | null | undefined {
    if (!range) return null;
    const msb = readIndex(range.msb, this.report, "a range bound");
    const lsb = readIndex(range.lsb, this.report, "a range bound");
    if (msb === null || lsb === null) return undefined;
    if (Math.abs(msb - lsb) + 1 > MAX_VECTOR_BITS) {
      this.error("GW2015", `the range [${msb}:${lsb}] is wider than ${MAX_VECTOR_BITS} bits`, range.span);
      return undefined;
    }
    return { msb, lsb };
  }

  private addNet(name: Name, kind: NetKind, range: Bounds | null): NetDecl {
    const net: NetDecl = { name: name.name, kind, range, bits: bitsOf(name.name, range), span: name.span };
    this.def.nets.set(name.name, net);
    this.def.netOrder.push(net);
    return net;
  }

  /** A vector declared after its name was already used as one bit. */
  private usedBeforeDeclaration(n: Name, range: Bounds | null, firstUse: Span | undefined): boolean {
    if (range === null || firstUse === undefined) return false;
    this.error("GW2021", `'${n.name}' is used as a 1-bit net before its declaration as ${rangeText(range)}`, n.span, {
      hint: "declare vectors before using them",
      related: [this.rel("first used here", firstUse)],
    });
    return true;
  }

  private declarePort(dir: "input" | "output", range: Bounds | null, n: Name): void {
    const prev = this.def.nets.get(n.name);
    if (prev && prev.kind === "implicit") {
      if (this.usedBeforeDeclaration(n, range, prev.span)) return;
    } else if (prev) {
      this.error(
        "GW2005",
        this.ansi && prev.kind !== "wire" ? `port '${n.name}' is already declared in the module header` : `'${n.name}' is declared twice`,
        n.span,
        { related: [this.rel("first declared here", prev.span)] },
      );
      return;
    } else if (this.usedBeforeDeclaration(n, range, this.readUndeclared.get(n.name))) return;
    if (this.ansi) {
      this.error("GW2020", `'${n.name}' is declared as an ${dir}, but module '${this.def.name}' declares its ports in the header`, n.span, {
        hint: "declare every port in the header, or list only names in the header and declare them in the body",
      });
      return;
    }
    if (!this.listed.has(n.name)) {
      this.error("GW2020", `'${n.name}' is declared as an ${dir} but is not in the port list of module '${this.def.name}'`, n.span, {
        hint: `add '${n.name}' to the port list in the module header, or declare it as a wire`,
        related: [this.rel("the port list", this.header.span)],
      });
      return;
    }
    let net: NetDecl;
    if (prev) {
      // An implicit net becomes the port it was meant to be.
      prev.kind = dir;
      prev.span = n.span;
      net = prev;
    } else net = this.addNet(n, dir, range);
    this.portDecls.set(n.name, { name: n.name, dir, net });
  }

  private declareWire(range: Bounds | null, n: Name): boolean {
    const prev = this.def.nets.get(n.name);
    if (!prev) {
      if (this.usedBeforeDeclaration(n, range, this.readUndeclared.get(n.name))) return false;
      this.addNet(n, "wire", range);
      return true;
    }
    if (prev.kind === "implicit") {
      if (this.usedBeforeDeclaration(n, range, prev.span)) return false;
      prev.kind = "wire";
      prev.span = n.span;
      return true;
    }
    // `output y; wire y;` gives the port its net type: the same net, not a new one.
    if ((prev.kind === "input" || prev.kind === "output") && sameRange(prev.range, range) && !prev.wireSeen) {
      prev.wireSeen = true;
      return true;
    }
    this.error(
      "GW2005",
      `'${n.name}' is declared twice` + (sameRange(prev.range, range) ? "" : ` (as ${rangeText(prev.range)} and as ${rangeText(range)})`),
      n.span,
      { related: [this.rel("first declared here", prev.span)] },
    );
    return false;
  }

  private implicit(e: VExpr | null): void {
    if (e && e.k === "id" && !this.def.nets.has(e.name)) this.addNet({ name: e.name, span: e.span }, "implicit", null);
  }

  /** The net a whole-name terminal connects to, declared implicitly if need be. */
  private netFor(e: { name: string; span: Span }): NetDecl {
    return this.def.nets.get(e.name) ?? this.addNet({ name: e.name, span: e.span }, "implicit", null);
  }

  /** The bits an lvalue (`y` or `y[3]`) names, or null after a report. */
  private lvalueBits(e: VExpr): readonly string[] | null {
    if (e.k === "id") {
      const net = this.def.nets.get(e.name);
      return net ? net.bits : [e.name];
    }
    if (e.k === "bit") {
      const index = readIndex(e.index, this.report, "a bit index");
      if (index === null) return null;
      const b = resolveBit(e.name, index, e.span, this.scope, this.report);
      return b === null ? null : [b];
    }
    return null;
  }

  private continuous(lhs: VExpr, rhs: VExpr, span: Span): void {
    const bits = this.lvalueBits(lhs);
    if (!bits) return;
    const exprs = lowerExpr(rhs, this.scope, this.report);
    if (!exprs) return;
    if (exprs.length !== bits.length) {
      this.error("GW2021", `the target is ${bits.length} bit${bits.length > 1 ? "s" : ""} wide but the expression is ${exprs.length}`, cover(lhs.span, rhs.span), {
        hint: "gatewright neither extends nor truncates vectors; assign bits of equal width",
      });
      return;
    }
    for (let p = 0; p < bits.length; p++) {
      this.def.assignments.push({ target: bits[p]!, targetSpan: lhs.span, expr: exprs[p]!, span });
    }
  }

  /** Takes one body item (anything but the module header and `endmodule`). */
  add(item: VItem): void {
    switch (item.k) {
      case "port": {
        const range = this.readRange(item.range);
        if (range !== undefined) for (const n of item.names) this.declarePort(item.dir, range, n);
        break;
      }
      case "wire": {
        const range = this.readRange(item.range);
        if (range === undefined) break;
        for (const w of item.items) {
          if (!this.declareWire(range, w.name) || !w.init) continue;
          this.continuous({ k: "id", name: w.name.name, span: w.name.span }, w.init, item.items.length === 1 ? item.span : w.span);
        }
        break;
      }
      case "assign":
        for (const a of item.assigns) {
          this.implicit(a.lhs);
          this.continuous(a.lhs, a.rhs, item.assigns.length === 1 ? item.span : a.span);
        }
        break;
      case "gate":
        for (const g of item.instances) this.gate(item.gate, g, item.instances.length === 1 ? item.span : g.span);
        break;
      case "instance":
        for (const inst of item.instances) {
          const c = inst.connections;
          if (c.style === "ordered") for (const e of c.items) this.implicit(e);
          else for (const n of c.items) this.implicit(n.expr);
          this.instance(item.module, inst, item.instances.length === 1 ? item.span : inst.span);
        }
        break;
      default:
        break;
    }
  }

  private instance(module: Name, inst: ModuleInstance, span: Span): void {
    if (inst.array) {
      this.error("GW1005", `unsupported construct: the instance array '${inst.name.name}[...]'`, inst.array.span, {
        hint: "write one instance per bit",
      });
      return;
    }
    const prev = this.instanceNames.get(inst.name.name);
    if (prev) {
      this.error("GW2005", `instance name '${inst.name.name}' is used twice in module '${this.def.name}'`, inst.name.span, {
        related: [this.rel("first used here", prev)],
      });
      return;
    }
    this.instanceNames.set(inst.name.name, inst.name.span);
    this.def.instances.push({ module, name: inst.name, connections: inst.connections, span });
  }

  private gate(type: GateType, g: GateInstance, span: Span): void {
    if (g.array) {
      this.error("GW1005", `unsupported construct: the gate instance array '${g.name?.name ?? ""}[...]'`, g.array.span, {
        hint: "write one gate per bit",
      });
      return;
    }
    const multiOutput = type === "buf" || type === "not";
    const terms = g.terminals;
    if (terms.length < 2) {
      this.error(
        "GW2012",
        `'${type}' needs ${multiOutput ? "at least one output and one input" : "an output and at least one input"}, but this instance has ${terms.length} terminal`,
        g.span,
        { hint: multiOutput ? `write '${type} (y, a);'` : `write '${type} (y, a, b);': the output comes first` },
      );
      return;
    }
    if (!multiOutput && this.simpleGate(type, terms, g.span, span)) return;
    const outs = multiOutput ? terms.slice(0, -1) : terms.slice(0, 1);
    const ins = multiOutput ? terms.slice(-1) : terms.slice(1);
    const inputs: Expr[] = [];
    let ok = true;
    for (const t of ins) {
      const bits = t.k === "id" ? this.netFor(t).bits.map((b) => build.ref(b, t.span)) : lowerExpr(t, this.scope, this.report);
      if (!bits) {
        ok = false;
        continue;
      }
      if (bits.length !== 1) {
        this.error("GW2012", `a '${type}' input must be 1 bit, but this one is ${bits.length} bits wide`, t.span, {
          hint: "gate primitives work on single bits; select one bit, e.g. a[0]",
        });
        ok = false;
        continue;
      }
      inputs.push(bits[0]!);
    }
    const targets: { bit: string; span: Span }[] = [];
    for (const t of outs) {
      if (t.k !== "id" && t.k !== "bit") {
        this.error("GW2012", `the output terminal of '${type}' must be a net name or a bit-select`, t.span, {
          hint: multiOutput ? "the last terminal is the input; all others are outputs" : "the first terminal is the output",
        });
        ok = false;
        continue;
      }
      const bits = t.k === "id" ? this.netFor(t).bits : this.lvalueBits(t);
      if (!bits) {
        ok = false;
        continue;
      }
      if (bits.length !== 1) {
        this.error("GW2012", `the output of '${type}' must be 1 bit, but '${t.name}' is ${bits.length} bits wide`, t.span, {
          hint: "gate primitives drive single bits; select one bit, e.g. y[0]",
        });
        ok = false;
        continue;
      }
      targets.push({ bit: bits[0]!, span: t.span });
    }
    if (!ok) return;
    const inSpan = inputs.length === 1 ? ins[0]!.span : cover(ins[0]!.span, ins[ins.length - 1]!.span);
    for (let i = 0; i < targets.length; i++) {
      // Each output gets a tree of its own: later stages may rewrite trees in place.
      const a = i === 0 ? inputs : inputs.map(cloneExpr);
      let fn: Expr;
      switch (type) {
        case "buf":
          fn = a[0]!;
          break;
        case "not":
          fn = build.not(a[0]!, g.span);
          break;
        case "and":
        case "or":
        case "xor":
          fn = a.length === 1 ? a[0]! : build.nary(type, a, inSpan);
          break;
        case "nand":
        case "nor":
        case "xnor": {
          const kind = type === "nand" ? "and" : type === "nor" ? "or" : "xor";
          fn = build.not(a.length === 1 ? a[0]! : build.nary(kind, a, inSpan), g.span);
          break;
        }
      }
      const t = targets[i]!;
      this.def.assignments.push({ target: t.bit, targetSpan: t.span, expr: fn, span });
    }
  }

  /**
   * The common netlist case, `nand g (y, a, b);` with 1-bit names only, without intermediate
   * arrays. Returns false (having changed nothing but implicit nets) for anything else.
   */
  private simpleGate(type: Exclude<GateType, "buf" | "not">, terms: readonly VExpr[], instSpan: Span, span: Span): boolean {
    for (const t of terms) if (t.k !== "id") return false;
    const outTerm = terms[0] as Extract<VExpr, { k: "id" }>;
    const out = this.netFor(outTerm);
    if (out.bits.length !== 1) return false;
    const args: Expr[] = [];
    for (let i = 1; i < terms.length; i++) {
      const t = terms[i] as Extract<VExpr, { k: "id" }>;
      const net = this.netFor(t);
      if (net.bits.length !== 1) return false;
      args.push(build.ref(net.bits[0]!, t.span));
    }
    let fn: Expr;
    if (args.length === 1) fn = args[0]!;
    else {
      const last = terms[terms.length - 1]!.span;
      const inSpan = { start: terms[1]!.span.start, length: last.start + last.length - terms[1]!.span.start };
      const kind = type === "and" || type === "nand" ? "and" : type === "or" || type === "nor" ? "or" : "xor";
      fn = build.nary(kind, args, inSpan);
    }
    if (type === "nand" || type === "nor" || type === "xnor") fn = build.not(fn, instSpan);
    this.def.assignments.push({ target: out.bits[0]!, targetSpan: outTerm.span, expr: fn, span });
    return true;
  }

  /** Ends the module: checks the port list against the declarations. */
  finish(): ModuleDef {
    if (!this.ansi) {
      for (const name of this.listOrder) {
        const p = this.portDecls.get(name);
        if (!p) {
          this.error("GW2020", `port '${name}' of module '${this.def.name}' is not declared as an input or an output`, this.listed.get(name)!.span, {
            hint: `add 'input ${name};' or 'output ${name};' to the module body`,
          });
          continue;
        }
        this.def.ports.push(p);
      }
    }
    this.def.declaredPorts = this.ansi ? this.def.ports : [...this.portDecls.values()];
    if (this.errors > 0) this.def.broken = true;
    return this.def;
  }
}

function cloneExpr(e: Expr): Expr {
  return renameExpr(e, "");
}

/** Copies an expression, putting `prefix` before every name (iteratively). */
export function renameExpr(e: Expr, prefix: string): Expr {
  const kids = (x: Expr): readonly Expr[] => (x.kind === "not" ? [x.arg] : x.kind === "ref" || x.kind === "const" ? [] : x.args);
  interface Frame {
    e: Expr;
    next: number;
    results: Expr[];
  }
  const stack: Frame[] = [{ e, next: 0, results: [] }];
  for (;;) {
    const top = stack[stack.length - 1]!;
    const ks = kids(top.e);
    if (top.next < ks.length) {
      stack.push({ e: ks[top.next++]!, next: 0, results: [] });
      continue;
    }
    stack.pop();
    const x = top.e;
    let r: Expr;
    switch (x.kind) {
      case "ref":
        r = { kind: "ref", name: prefix + x.name, span: x.span };
        break;
      case "const":
        r = { kind: "const", value: x.value, span: x.span };
        break;
      case "not":
        r = { kind: "not", arg: top.results[0]!, span: x.span };
        break;
      default:
        r = { kind: x.kind, args: top.results, span: x.span };
    }
    if (stack.length === 0) return r;
    stack[stack.length - 1]!.results.push(r);
  }
}

/** Levenshtein distance (small inputs: module and port names). */
function editDistance(a: string, b: string): number {
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    for (let j = 1; j <= b.length; j++) {
      const cost = a.charCodeAt(i - 1) === b.charCodeAt(j - 1) ? 0 : 1;
      cur.push(Math.min(prev[j]! + 1, cur[j - 1]! + 1, prev[j - 1]! + cost));
    }
    prev = cur;
  }
  return prev[b.length]!;
}

/** The known name closest to `name` (ties: alphabetical), or undefined when there is none. */
export function nearestOf(name: string, known: Iterable<string>): string | undefined {
  let best: string | undefined;
  let bestD = Infinity;
  for (const k of known) {
    const d = k.toLowerCase() === name.toLowerCase() ? 0 : editDistance(name, k);
    if (d < bestD || (d === bestD && best !== undefined && k < best)) {
      best = k;
      bestD = d;
    }
  }
  return best;
}

/** "did you mean" for a missing name: the nearest one when it is plausibly a typo, else a list. */
export function suggest(name: string, known: readonly string[], what: string): string | undefined {
  if (known.length === 0) return undefined;
  const near = nearestOf(name, known)!;
  const limit = Math.max(2, Math.floor(name.length / 2));
  if (editDistance(name.toLowerCase(), near.toLowerCase()) <= limit) return `did you mean '${near}'?`;
  const shown = [...known].sort().slice(0, 10);
  return `the ${what}s are: ${shown.map((k) => `'${k}'`).join(", ")}${known.length > 10 ? ", ..." : ""}`;
}

/**
 * Checks every module instance against the module it names and turns its connections into
 * bit-level drivers: parent expression → child input bit, child output bit → parent net bit.
 */
export function resolveInstances(def: ModuleDef, modules: ReadonlyMap<string, ModuleDef>, r: Reporter): void {
  const file = r.file;
  const at = (span: Span) => ({ file, span });
  const scope: NetScope = { lookup: (name) => def.nets.get(name) };
  let errors = 0;
  const report: Reporter = {
    file,
    report(d) {
      if (d.severity === "error") errors++;
      r.report(d);
    },
  };
  for (const inst of def.instances) {
    const child = modules.get(inst.module.name);
    if (!child) {
      report.report(
        diag("GW2009", `there is no module named '${inst.module.name}' in this file`, at(inst.module.span), {
          hint: suggest(inst.module.name, [...modules.keys()], "module") ?? "define the module in the same file",
        }),
      );
      continue;
    }
    const where = `instance '${inst.name.name}' of module '${child.name}'`;
    // Which expression (if any) each port of the child gets, and where it is written.
    const given: ({ expr: VExpr | null; targetSpan: Span; span: Span } | undefined)[] = child.ports.map(() => undefined);
    let ok = true;
    let misnamed = false; // an unknown port name was reported: do not also call ports unconnected
    const c = inst.connections;
    if (c.style === "ordered") {
      // `m u1 ();` connects nothing (IEEE 1364-2005 §12.3.6 reads it as one empty connection
      // only for a module with one port; either way nothing is connected).
      const items = c.items.length === 1 && c.items[0] === null ? [] : c.items;
      if (items.length !== child.ports.length && items.length > 0) {
        report.report(
          diag(
            "GW2011",
            `module '${child.name}' has ${child.ports.length} port${child.ports.length === 1 ? "" : "s"}, but ${where} connects ${items.length}`,
            at(inst.span),
            {
              hint: `the ports are, in order: ${child.ports.map((p) => p.name).join(", ") || "(none)"}; or connect by name, e.g. .${child.ports[0]?.name ?? "a"}(net)`,
              related: [relatedAt(`module '${child.name}' is defined here`, file, child.nameSpan)],
            },
          ),
        );
        continue;
      }
      items.forEach((e, i) => {
        if (e) given[i] = { expr: e, targetSpan: e.span, span: e.span };
      });
    } else {
      const index = new Map(child.ports.map((p, i) => [p.name, i] as const));
      const seen = new Map<string, Span>();
      for (const n of c.items) {
        const i = index.get(n.port.name);
        if (i === undefined) {
          report.report(
            diag("GW2011", `module '${child.name}' has no port named '${n.port.name}'`, at(n.port.span), {
              hint: suggest(n.port.name, child.ports.map((p) => p.name), "port") ?? `module '${child.name}' has no ports`,
              related: [relatedAt(`module '${child.name}' is defined here`, file, child.nameSpan)],
            }),
          );
          ok = false;
          misnamed = true;
          continue;
        }
        const prev = seen.get(n.port.name);
        if (prev) {
          report.report(
            diag("GW2011", `port '${n.port.name}' is connected twice in ${where}`, at(n.span), {
              related: [relatedAt("first connected here", file, prev)],
            }),
          );
          ok = false;
          continue;
        }
        seen.set(n.port.name, n.span);
        given[i] = { expr: n.expr, targetSpan: { start: n.span.start, length: n.port.span.start + n.port.span.length - n.span.start }, span: n.span };
      }
    }
    const resolved: ResolvedInstance = { child, inputs: [], outputs: [] };
    child.ports.forEach((port, i) => {
      const g = given[i];
      const width = port.net.bits.length;
      if (!g || !g.expr) {
        if (port.dir === "input" && !misnamed) {
          report.report(
            diag("GW2011", `input port '${port.name}' of ${where} is not connected`, at(g ? g.span : inst.span), {
              hint: `connect it, e.g. .${port.name}(net), or tie it to 1'b0 or 1'b1`,
            }),
          );
          ok = false;
        }
        return; // an unconnected output simply drives nothing outside
      }
      const expr = g.expr;
      if (port.dir === "input") {
        const bits = lowerExpr(expr, scope, report);
        if (!bits) {
          ok = false;
          return;
        }
        if (bits.length !== width) {
          report.report(
            diag("GW2011", `port '${port.name}' of ${where} is ${width} bit${width === 1 ? "" : "s"} wide, but the connection is ${bits.length}`, at(expr.span), {
              hint: "connect a net of the same width",
            }),
          );
          ok = false;
          return;
        }
        bits.forEach((e, p) => resolved.inputs.push({ childBit: port.net.bits[p]!, expr: e, targetSpan: g.targetSpan, span: g.span }));
        return;
      }
      // Output port: the connection must name a net (or one bit of one).
      let parentBits: string[] | null = null;
      if (expr.k === "id") {
        const net = def.nets.get(expr.name);
        parentBits = net ? [...net.bits] : [expr.name];
      } else if (expr.k === "bit") {
        const index = readIndex(expr.index, report, "a bit index");
        const b = index === null ? null : resolveBit(expr.name, index, expr.span, scope, report);
        if (b === null) {
          ok = false;
          return;
        }
        parentBits = [b];
      } else {
        report.report(
          diag("GW2011", `output port '${port.name}' of ${where} must connect to a net name or a bit-select`, at(expr.span)),
        );
        ok = false;
        return;
      }
      if (parentBits.length !== width) {
        report.report(
          diag("GW2011", `port '${port.name}' of ${where} is ${width} bit${width === 1 ? "" : "s"} wide, but '${expr.k === "id" ? expr.name : ""}' is ${parentBits.length}`, at(expr.span), {
            hint: "connect a net of the same width",
          }),
        );
        ok = false;
        return;
      }
      parentBits.forEach((b, p) =>
        resolved.outputs.push({ childBit: port.net.bits[p]!, parentBit: b, targetSpan: expr.span, span: g.span }),
      );
    });
    if (ok) inst.resolved = resolved;
  }
  if (errors > 0) def.broken = true;
}
