// Choosing the top module, finding instantiation cycles, and flattening the hierarchy into one
// DesignSource with hierarchical names (`u1.n`, `u1.u2.n`). Everything is iterative: a deep
// instance hierarchy cannot overflow the stack, and the flattened size (items, hierarchy depth
// and the total length of the names) is computed before any work is done so that a small file
// describing a huge design is refused, not attempted.
import { diag, type Span } from "../diagnostics/index.js";
import type { Assignment, Declaration, DesignSource, Expr } from "../syntax/index.js";
import { build } from "../syntax/index.js";
import { renameExpr, suggest, type InstanceDef, type ModuleDef } from "./verilog-elaborate.js";
import type { Reporter } from "./verilog-expr.js";

/** Most declarations plus assignments a flattened design may have (a documented limit). */
export const MAX_FLAT_ITEMS = 5_000_000;

function relatedAt(message: string, file: string, span: Span) {
  return { message, file, start: span.start, length: span.length };
}

/**
 * Reports every instantiation cycle (GW2010): a module that instantiates itself directly or
 * through other modules. Returns the names of the modules on a cycle.
 */
export function findCycles(modules: ReadonlyMap<string, ModuleDef>, r: Reporter): Set<string> {
  const onCycle = new Set<string>();
  const state = new Map<string, 1 | 2>(); // 1: on the current path, 2: done
  for (const root of modules.values()) {
    if (state.has(root.name)) continue;
    // Depth-first search with an explicit stack of (module, next instance index).
    const path: { def: ModuleDef; next: number }[] = [{ def: root, next: 0 }];
    state.set(root.name, 1);
    while (path.length) {
      const top = path[path.length - 1]!;
      if (top.next >= top.def.instances.length) {
        state.set(top.def.name, 2);
        path.pop();
        continue;
      }
      const inst = top.def.instances[top.next++]!;
      const child = modules.get(inst.module.name);
      if (!child) continue;
      const s = state.get(child.name);
      if (s === 1) {
        const from = path.findIndex((f) => f.def.name === child.name);
        const loop = path.slice(from).map((f) => f.def.name);
        loop.forEach((n) => onCycle.add(n));
        const through = loop.slice(1);
        r.report(
          diag(
            "GW2010",
            through.length === 0
              ? `module '${child.name}' instantiates itself`
              : `module '${child.name}' instantiates itself through ${through.map((n) => `'${n}'`).join(" → ")}`,
            { file: r.file, span: inst.module.span },
            {
              hint: "a module cannot contain itself; the hierarchy must end in gates",
              related: [relatedAt(`module '${child.name}' is defined here`, r.file, child.nameSpan)],
            },
          ),
        );
        continue;
      }
      if (s === 2) continue;
      state.set(child.name, 1);
      path.push({ def: child, next: 0 });
    }
  }
  return onCycle;
}

/** Picks the top module: the one asked for, or the only one no other module instantiates. */
export function chooseTop(
  modules: ReadonlyMap<string, ModuleDef>,
  order: readonly ModuleDef[],
  top: string | undefined,
  r: Reporter,
): ModuleDef | undefined {
  const names = order.map((m) => m.name);
  if (top !== undefined) {
    const m = modules.get(top);
    if (m) return m;
    r.report(
      diag("GW2009", `there is no module named '${top}' in this file (asked for as the top module)`, { file: r.file }, {
        hint: suggest(top, names, "module") ?? "the file defines no modules",
      }),
    );
    return undefined;
  }
  if (order.length === 0) {
    r.report(
      diag("GW2008", "the file defines no module", { file: r.file }, {
        hint: "a structural Verilog file holds at least one 'module name(ports); ... endmodule'",
      }),
    );
    return undefined;
  }
  const instantiated = new Set<string>();
  for (const m of order) for (const i of m.instances) if (i.module.name !== m.name) instantiated.add(i.module.name);
  const candidates = order.filter((m) => !instantiated.has(m.name));
  if (candidates.length === 1) return candidates[0];
  if (candidates.length === 0) {
    r.report(
      diag("GW2008", "every module is instantiated by another one, so there is no top module", { file: r.file }, {
        hint: "choose the top module with the 'top' option (--top NAME)",
      }),
    );
    return undefined;
  }
  r.report(
    diag(
      "GW2008",
      `${candidates.length} modules could be the top module: ${candidates.map((m) => `'${m.name}'`).join(", ")}`,
      { file: r.file, span: candidates[0]!.nameSpan },
      {
        hint: "choose one with the 'top' option (--top NAME)",
        related: candidates.slice(1).map((m) => relatedAt(`module '${m.name}'`, r.file, m.nameSpan)),
      },
    ),
  );
  return undefined;
}

/** Most levels of module instances below the top module (a documented limit, GW2035; the same
 *  as the expression nesting limit). Each level puts its instance name before every name below
 *  it, so the flattened names grow with the depth and their total length with its square. */
export const MAX_HIERARCHY_DEPTH = 2_000;

/** Most characters of all flattened names together (a documented limit, GW2022): about 100 MB
 *  of names, some hundred times what a 100,000-gate flat netlist needs. */
export const MAX_FLAT_NAME_CHARS = 100_000_000;

/** What flattening a module produces (all counts saturate far above the limits). */
interface Extent {
  /** Declared bits plus assignments. */
  items: number;
  /** Names written in them (declarations, assignment targets, references). */
  names: number;
  /** Characters of those names. */
  chars: number;
  /** Levels of instances below the module (0: gates only). */
  depth: number;
}

/** References (count and characters) in an expression, without recursion. */
function refsOf(e: Expr): { names: number; chars: number } {
  let names = 0;
  let chars = 0;
  const stack: Expr[] = [e];
  while (stack.length) {
    const x = stack.pop()!;
    if (x.kind === "ref") {
      names++;
      chars += x.name.length;
    } else if (x.kind === "not") stack.push(x.arg);
    else if (x.kind !== "const") for (const a of x.args) stack.push(a);
  }
  return { names, chars };
}

/** Extent of the flattened design below each module. */
function flatExtents(top: ModuleDef): Map<string, Extent> | undefined {
  const extent = new Map<string, Extent>();
  // Post-order over the (acyclic) module graph, with an explicit stack.
  const stack: { def: ModuleDef; next: number }[] = [{ def: top, next: 0 }];
  const open = new Set<string>([top.name]);
  while (stack.length) {
    const f = stack[stack.length - 1]!;
    if (f.next < f.def.instances.length) {
      const child = f.def.instances[f.next++]!.resolved?.child;
      if (child && !extent.has(child.name)) {
        if (open.has(child.name)) return undefined; // a cycle; reported by findCycles
        open.add(child.name);
        stack.push({ def: child, next: 0 });
      }
      continue;
    }
    stack.pop();
    open.delete(f.def.name);
    const e: Extent = { items: f.def.assignments.length, names: 0, chars: 0, depth: 0 };
    const named = (name: string) => {
      e.names++;
      e.chars += name.length;
    };
    const refs = (x: Expr) => {
      const r = refsOf(x);
      e.names += r.names;
      e.chars += r.chars;
    };
    for (const a of f.def.assignments) {
      named(a.target);
      refs(a.expr);
    }
    for (const net of f.def.netOrder) {
      e.items += net.bits.length;
      for (const b of net.bits) named(b);
    }
    for (const inst of f.def.instances) {
      const res = inst.resolved;
      if (!res) continue;
      const c = extent.get(res.child.name)!;
      const prefix = inst.name.name.length + 1;
      e.items += res.inputs.length + res.outputs.length + c.items;
      for (const i of res.inputs) {
        named(i.childBit);
        e.chars += prefix;
        refs(i.expr);
      }
      for (const o of res.outputs) {
        named(o.parentBit);
        named(o.childBit);
        e.chars += prefix;
      }
      e.names += c.names;
      e.chars += c.chars + c.names * prefix;
      e.depth = Math.max(e.depth, c.depth + 1);
    }
    extent.set(f.def.name, e);
  }
  return extent;
}

/** The instance at which a hierarchy deeper than the limit passes it: down the deepest path. */
function instanceBeyondDepth(top: ModuleDef, extent: ReadonlyMap<string, Extent>): { inst: InstanceDef; parent: ModuleDef } | undefined {
  let def = top;
  for (let level = 1; ; level++) {
    let deepest: InstanceDef | undefined;
    for (const inst of def.instances) {
      const child = inst.resolved?.child;
      if (!child) continue;
      if (!deepest || extent.get(child.name)!.depth > extent.get(deepest.resolved!.child.name)!.depth) deepest = inst;
    }
    if (!deepest) return undefined;
    if (level > MAX_HIERARCHY_DEPTH) return { inst: deepest, parent: def };
    def = deepest.resolved!.child;
  }
}

const count = (n: number) => (Number.isFinite(n) && n < Number.MAX_SAFE_INTEGER ? Math.round(n).toLocaleString("en") : "more than 10^15");

/** Flattens the top module and everything below it into one DesignSource. */
export function flatten(top: ModuleDef, file: string, r: Reporter): DesignSource | undefined {
  const extents = flatExtents(top);
  if (!extents) return undefined;
  const whole = extents.get(top.name)!;
  const smaller = { hint: "build a smaller part of the hierarchy with the 'top' option (--top NAME)" };
  if (whole.depth > MAX_HIERARCHY_DEPTH) {
    const beyond = instanceBeyondDepth(top, extents);
    const where = beyond ? { file, span: beyond.inst.name.span } : { file, span: top.nameSpan };
    r.report(
      diag(
        "GW2035",
        beyond
          ? `instance '${beyond.inst.name.name}' of module '${beyond.inst.module.name}' in module '${beyond.parent.name}' is level ${(MAX_HIERARCHY_DEPTH + 1).toLocaleString("en")} of the hierarchy below '${top.name}', which is ${whole.depth.toLocaleString("en")} levels deep; gatewright flattens at most ${MAX_HIERARCHY_DEPTH.toLocaleString("en")}`
          : `the hierarchy below module '${top.name}' is ${whole.depth.toLocaleString("en")} levels deep; gatewright flattens at most ${MAX_HIERARCHY_DEPTH.toLocaleString("en")}`,
        where,
        {
          hint: "a hierarchy ends in gates after a few levels; build a lower module with the 'top' option (--top NAME)",
          related: [relatedAt(`the top module '${top.name}'`, file, top.nameSpan)],
        },
      ),
    );
    return undefined;
  }
  if (whole.items > MAX_FLAT_ITEMS) {
    r.report(
      diag(
        "GW2022",
        `module '${top.name}' flattens to about ${count(whole.items)} nets and assignments, more than the limit of ${MAX_FLAT_ITEMS.toLocaleString("en")}`,
        { file, span: top.nameSpan },
        smaller,
      ),
    );
    return undefined;
  }
  if (whole.chars > MAX_FLAT_NAME_CHARS) {
    r.report(
      diag(
        "GW2022",
        `module '${top.name}' flattens to about ${count(whole.chars)} characters of hierarchical names (instance names before every name below them), more than the limit of ${MAX_FLAT_NAME_CHARS.toLocaleString("en")}`,
        { file, span: top.nameSpan },
        { hint: "use shorter instance names or fewer levels, or build a smaller part of the hierarchy with the 'top' option (--top NAME)" },
      ),
    );
    return undefined;
  }

  const inputs: Declaration[] = [];
  const outputs: Declaration[] = [];
  const wires: Declaration[] = [];
  const assignments: Assignment[] = [];

  for (const p of top.declaredPorts) {
    const list = p.dir === "input" ? inputs : outputs;
    for (const b of p.net.bits) list.push({ name: b, span: p.net.span });
  }
  for (const net of top.netOrder) {
    if (net.kind === "wire" || net.kind === "implicit") for (const b of net.bits) wires.push({ name: b, span: net.span });
  }

  // Pre-order walk of the instance tree: a module's own assignments, then each instance's
  // connections and contents, in source order.
  const work: { def: ModuleDef; prefix: string }[] = [{ def: top, prefix: "" }];
  while (work.length) {
    const { def, prefix } = work.pop()!;
    for (const a of def.assignments) {
      assignments.push(
        prefix === ""
          ? a
          : { target: prefix + a.target, targetSpan: a.targetSpan, expr: renameExpr(a.expr, prefix), span: a.span },
      );
    }
    const children: { def: ModuleDef; prefix: string }[] = [];
    for (const inst of def.instances) {
      const res = inst.resolved;
      if (!res) continue;
      const inner = `${prefix}${inst.name.name}.`;
      // Every net of the instance (its ports included) is an internal wire of the design.
      for (const net of res.child.netOrder) for (const b of net.bits) wires.push({ name: inner + b, span: net.span });
      for (const c of res.inputs) {
        assignments.push({
          target: inner + c.childBit,
          targetSpan: c.targetSpan,
          expr: prefix === "" ? c.expr : renameExpr(c.expr, prefix),
          span: c.span,
        });
      }
      for (const c of res.outputs) {
        assignments.push({
          target: prefix + c.parentBit,
          targetSpan: c.targetSpan,
          expr: build.ref(inner + c.childBit, c.span),
          span: c.span,
        });
      }
      children.push({ def: res.child, prefix: inner });
    }
    for (let i = children.length - 1; i >= 0; i--) work.push(children[i]!);
  }

  return { file, name: top.name, inputs, outputs, wires, assignments, language: "verilog" };
}
