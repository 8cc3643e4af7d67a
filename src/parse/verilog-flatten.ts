// Choosing the top module, finding instantiation cycles, and flattening the hierarchy into one
// DesignSource with hierarchical names (`u1.n`, `u1.u2.n`). Everything is iterative: a deep
// instance hierarchy cannot overflow the stack, and the flattened size is computed before any
// work is done so that a small file describing a huge design is refused, not attempted.
import { diag, type Span } from "../diagnostics/index.js";
import type { Assignment, Declaration, DesignSource } from "../syntax/index.js";
import { build } from "../syntax/index.js";
import { renameExpr, suggest, type ModuleDef } from "./verilog-elaborate.js";
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

/** Size of the flattened design below each module (declared bits + assignments). */
function flatSizes(top: ModuleDef): Map<string, number> | undefined {
  const size = new Map<string, number>();
  // Post-order over the (acyclic) module graph, with an explicit stack.
  const stack: { def: ModuleDef; next: number }[] = [{ def: top, next: 0 }];
  const open = new Set<string>([top.name]);
  while (stack.length) {
    const f = stack[stack.length - 1]!;
    if (f.next < f.def.instances.length) {
      const child = f.def.instances[f.next++]!.resolved?.child;
      if (child && !size.has(child.name)) {
        if (open.has(child.name)) return undefined; // a cycle; reported by findCycles
        open.add(child.name);
        stack.push({ def: child, next: 0 });
      }
      continue;
    }
    stack.pop();
    open.delete(f.def.name);
    let n = f.def.assignments.length;
    for (const net of f.def.netOrder) n += net.bits.length;
    for (const inst of f.def.instances) {
      const res = inst.resolved;
      if (!res) continue;
      n += res.inputs.length + res.outputs.length + size.get(res.child.name)!;
    }
    size.set(f.def.name, Math.min(n, Number.MAX_SAFE_INTEGER));
  }
  return size;
}

/** Flattens the top module and everything below it into one DesignSource. */
export function flatten(top: ModuleDef, file: string, r: Reporter): DesignSource | undefined {
  const sizes = flatSizes(top);
  if (!sizes) return undefined;
  const total = sizes.get(top.name)!;
  if (total > MAX_FLAT_ITEMS) {
    r.report(
      diag(
        "GW2022",
        `module '${top.name}' flattens to about ${total.toLocaleString("en")} nets and assignments, more than the limit of ${MAX_FLAT_ITEMS.toLocaleString("en")}`,
        { file, span: top.nameSpan },
        { hint: "build a smaller part of the hierarchy with the 'top' option (--top NAME)" },
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
