// Name resolution: DesignSource (syntax) → LogicGraph, with the diagnostics of a design whose
// names do not add up (undefined, driven twice, never driven, unused).
import { diag, DiagnosticLimiter, hasErrors, type StageResult } from "../diagnostics/index.js";
import type { DesignSource, Expr } from "../syntax/index.js";
import type { DontCareSet, LogicGraph, LogicNode, Port } from "./graph.js";
import { nearestName } from "./names.js";

export function buildLogicGraph(src: DesignSource): StageResult<LogicGraph> {
  // Bounded: the first 50 errors and 50 warnings of each code, then a count (GW2034).
  const diagnostics = new DiagnosticLimiter(src.file);
  const file = src.file;
  const at = (span: { start: number; length: number }) => ({ file, span });

  type Kind = "input" | "output" | "wire";
  const declared = new Map<string, { kind: Kind; span: { start: number; length: number } }>();
  const declare = (kind: Kind, d: { name: string; span: { start: number; length: number } }) => {
    const prev = declared.get(d.name);
    if (prev) {
      diagnostics.push(
        diag("GW2005", `'${d.name}' is declared twice (as ${prev.kind} and as ${kind})`, at(d.span), {
          related: [{ message: `first declared here`, file, start: prev.span.start, length: prev.span.length }],
        }),
      );
      return;
    }
    declared.set(d.name, { kind, span: d.span });
  };
  src.inputs.forEach((d) => declare("input", d));
  src.outputs.forEach((d) => declare("output", d));
  src.wires.forEach((d) => declare("wire", d));

  if (src.inputs.length === 0 && src.outputs.length === 0) {
    diagnostics.push(
      diag("GW2013", `the design '${src.name}' declares no inputs and no outputs`, { file }, {
        hint: src.language === "equations" ? "declare them with 'input a, b;' and 'output y;'" : "list the ports in the module header and declare them input or output",
      }),
    );
  }

  const nodes: LogicNode[] = [];
  const signalNode = new Map<string, number>();
  const inputs: Port[] = [];
  for (const d of src.inputs) {
    if (signalNode.has(d.name)) continue;
    const id = nodes.push({ op: "input", fanins: [], name: d.name, span: d.span }) - 1;
    signalNode.set(d.name, id);
    inputs.push({ name: d.name, node: id, span: d.span });
  }

  // One named buffer node per assigned signal, so that references may come before assignments.
  const assignedAt = new Map<string, { start: number; length: number }>();
  const bodies: { node: number; expr: Expr }[] = [];
  for (const a of src.assignments) {
    const decl = declared.get(a.target);
    if (decl?.kind === "input") {
      diagnostics.push(
        diag("GW2004", `'${a.target}' is an input and cannot be assigned`, at(a.targetSpan), {
          related: [{ message: "declared as an input here", file, start: decl.span.start, length: decl.span.length }],
        }),
      );
      continue;
    }
    const first = assignedAt.get(a.target);
    if (first) {
      diagnostics.push(
        diag("GW2002", `'${a.target}' has more than one driver`, at(a.targetSpan), {
          hint: "every signal is assigned exactly once; combine the expressions or rename one signal",
          related: [{ message: "first driven here", file, start: first.start, length: first.length }],
        }),
      );
      continue;
    }
    if (src.language === "verilog" && !decl) {
      // Verilog: an undeclared assignment target is an implicit wire (IEEE 1364-2005 §6.5);
      // we accept it as an internal signal.
    }
    assignedAt.set(a.target, a.targetSpan);
    const id = nodes.push({ op: "buf", fanins: [], name: a.target, span: a.targetSpan }) - 1;
    signalNode.set(a.target, id);
    bodies.push({ node: id, expr: a.expr });
  }

  const used = new Set<string>();
  const known = () => [...new Set([...declared.keys(), ...signalNode.keys()])];
  const undefinedReported = new Set<string>();
  let knownCache: string[] | undefined;

  const resolve = (name: string, span: { start: number; length: number }): number | undefined => {
    used.add(name);
    const id = signalNode.get(name);
    if (id !== undefined) return id;
    if (undefinedReported.has(name)) return undefined;
    undefinedReported.add(name);
    const decl = declared.get(name);
    if (decl && decl.kind !== "input") {
      diagnostics.push(
        diag(
          decl.kind === "wire" ? "GW2014" : "GW2003",
          decl.kind === "wire" ? `wire '${name}' is used but nothing drives it` : `output '${name}' is used but never assigned`,
          at(span),
          { related: [{ message: "declared here", file, start: decl.span.start, length: decl.span.length }] },
        ),
      );
      return undefined;
    }
    // The "did you mean" search is skipped once such errors are no longer shown.
    const near = diagnostics.full("GW2001") ? undefined : nearestName(name, (knownCache ??= known()));
    diagnostics.push(
      diag("GW2001", `'${name}' is not an input and is never assigned`, at(span), {
        hint: near
          ? `did you mean '${near}'?`
          : src.language === "equations"
            ? `declare it with 'input ${name};' or assign it`
            : `declare it as an input or drive it`,
      }),
    );
    return undefined;
  };

  for (const body of bodies) {
    const root = compileExpr(body.expr, nodes, resolve);
    if (root !== undefined) nodes[body.node]!.fanins = [root];
  }

  const outputs: Port[] = [];
  for (const d of src.outputs) {
    const id = signalNode.get(d.name);
    const decl = declared.get(d.name);
    if (decl && decl.kind !== "output") continue; // reported as declared twice
    if (id === undefined) {
      diagnostics.push(
        diag("GW2003", `output '${d.name}' is never assigned`, at(d.span), {
          hint: src.language === "equations" ? `add '${d.name} = <expression>;'` : `drive '${d.name}' from a gate or an assign`,
        }),
      );
      continue;
    }
    outputs.push({ name: d.name, node: id, span: d.span });
  }

  // Warnings: inputs never read, internal signals never read.
  const outputNames = new Set(src.outputs.map((d) => d.name));
  for (const d of src.inputs) {
    if (!used.has(d.name)) diagnostics.push(diag("GW2006", `input '${d.name}' is never used`, at(d.span)));
  }
  for (const a of src.assignments) {
    if (!outputNames.has(a.target) && !used.has(a.target) && assignedAt.get(a.target) === a.targetSpan && declared.get(a.target)?.kind !== "input") {
      diagnostics.push(
        diag("GW2007", `'${a.target}' is assigned but never used`, at(a.targetSpan), {
          hint: "it will not be built; make it an output if you need it",
        }),
      );
    }
  }

  // Don't-cares (minterm functions and truth tables): kept by signal name, over input names.
  const dontCares: DontCareSet[] = [];
  if (src.dontCares?.length) {
    const inputNames = new Set(src.inputs.map((d) => d.name));
    for (const dc of src.dontCares) {
      if (!assignedAt.has(dc.target)) continue; // the assignment itself was refused above
      const bad = dc.variables.find((v) => !inputNames.has(v.name));
      if (bad) {
        diagnostics.push(
          diag("GW2016", `'${bad.name}' is not a declared input; the don't-cares of '${dc.target}' are written over inputs only`, at(bad.span), {
            hint: `declare it with 'input ${bad.name};'`,
          }),
        );
        continue;
      }
      dontCares.push({ signal: dc.target, variables: dc.variables.map((v) => v.name), cubes: [...dc.cubes] });
    }
  }

  const kept = diagnostics.finish();
  if (hasErrors(kept)) return { diagnostics: kept };
  const graph: LogicGraph = { name: src.name, file, nodes, inputs, outputs };
  if (dontCares.length) graph.dontCares = dontCares;
  return { value: graph, diagnostics: kept };
}

/** Compiles an expression tree into graph nodes without recursion. */
function compileExpr(
  root: Expr,
  nodes: LogicNode[],
  resolve: (name: string, span: { start: number; length: number }) => number | undefined,
): number | undefined {
  // A reference (the commonest operand) needs no traversal.
  if (root.kind === "ref") return resolve(root.name, root.span);
  // Post-order traversal with an explicit stack of expressions (and whether each one's operands
  // are done); results on a value stack, -1 for an operand that did not resolve.
  const work: Expr[] = [root];
  const expanded: boolean[] = [false];
  const values: number[] = [];
  let failed = false;
  while (work.length) {
    const e = work.pop()!;
    const done = expanded.pop()!;
    if (e.kind === "ref") {
      const id = resolve(e.name, e.span);
      if (id === undefined) failed = true;
      values.push(id ?? -1);
      continue;
    }
    if (e.kind === "const") {
      values.push(nodes.push({ op: e.value ? "const1" : "const0", fanins: [] }) - 1);
      continue;
    }
    const argc = e.kind === "not" ? 1 : e.args.length;
    if (!done) {
      work.push(e);
      expanded.push(true);
      if (e.kind === "not") {
        work.push(e.arg);
        expanded.push(false);
      } else {
        for (let i = argc - 1; i >= 0; i--) {
          work.push(e.args[i]!);
          expanded.push(false);
        }
      }
      continue;
    }
    const from = values.length - argc;
    let missing = false;
    for (let i = from; i < values.length; i++) if (values[i] === -1) missing = true;
    if (missing) {
      values.length = from;
      values.push(-1);
      continue;
    }
    if (e.kind !== "not" && argc === 1) continue; // a one-operand and/or/xor is its operand
    const fanins = values.slice(from);
    values.length = from;
    values.push(nodes.push({ op: e.kind, fanins }) - 1);
  }
  return failed ? undefined : values[0];
}
