// The structural Verilog front end: `.v` text → flattened DesignSource of the top module.
//
// Reading goes item by item. The moo lexer runs once over the file; the token stream is cut
// into module items (a module header up to its `;`, one declaration or statement up to its
// `;`, or `endmodule`) and each item is parsed on its own by the nearley grammar in
// grammars/verilog.ne (verilog-items.ts). Only one item's tokens are held at a time and each
// module is elaborated as its items arrive (verilog-elaborate.ts), so memory stays linear in
// the file size; after a syntax error reading resumes at the next `;`. The top module is then
// chosen and flattened (verilog-flatten.ts).
//
// Documented limits:
//   - MAX_NESTING (2,000): parentheses plus unary operators open at one point of an
//     expression, counted on the tokens before parsing (GW1006).
//   - MAX_ERRORS (50): errors reported before reading stops (then the note GW1009).
//   - MAX_VECTOR_BITS (65,536) per vector and MAX_FLAT_ITEMS (5,000,000) nets plus assignments
//     after flattening (verilog-elaborate.ts, verilog-flatten.ts).
//
// The subset is IEEE 1364-2005 structural Verilog; the section numbers of the standard cited in
// these files are from memory.
import type { Token } from "moo";
import { diag, hasErrors, type Diagnostic, type StageResult } from "../diagnostics/index.js";
import type { DesignSource } from "../syntax/index.js";
import type { VItem } from "./verilog-ast.js";
import { ModuleBuilder, resolveInstances, type ModuleDef } from "./verilog-elaborate.js";
import type { Reporter } from "./verilog-expr.js";
import { chooseTop, findCycles, flatten } from "./verilog-flatten.js";
import {
  MAX_NESTING,
  Reader,
  SUPPORTED_KEYWORDS,
  nestingTooDeep,
  orList,
  parseStatement,
  show,
  syntaxDiagnostic,
  tokSpan,
} from "./verilog-items.js";

export { MAX_NESTING };
export const MAX_ERRORS = 50;

export interface VerilogOptions {
  /** Name of the module to build; by default the one no other module instantiates. */
  top?: string;
}

/** Reads structural Verilog and returns the flattened top module. Never throws. */
export function parseVerilog(text: string, file: string, options?: { top?: string }): StageResult<DesignSource> {
  try {
    return capErrors(readVerilog(text, file, options ?? {}), file);
  } catch (e) {
    const why = e instanceof Error ? e.message : String(e);
    return {
      diagnostics: [
        diag("GW9001", `internal error while reading Verilog: ${why}`, { file }, {
          hint: "this is a bug in gatewright, not in your file; please report it with the file attached",
        }),
      ],
    };
  }
}

/** Keeps the first MAX_ERRORS errors (and what came before them), then the note GW1009. */
function capErrors(res: StageResult<DesignSource>, file: string): StageResult<DesignSource> {
  let errors = 0;
  let cut = false;
  const kept: Diagnostic[] = [];
  for (const d of res.diagnostics) {
    if (d.code === "GW1009") continue;
    if (errors >= MAX_ERRORS) {
      cut = true;
      continue;
    }
    if (d.severity === "error") errors++;
    kept.push(d);
  }
  if (!cut && kept.length === res.diagnostics.length) return res;
  kept.push(diag("GW1009", `stopped after ${MAX_ERRORS} errors`, { file }, { hint: "fix these and run again" }));
  return res.value ? { value: res.value, diagnostics: kept } : { diagnostics: kept };
}

// ---------------------------------------------------------------------------------------------

interface OpenModule {
  header: Extract<VItem, { k: "module" }> | null; // null: the header could not be read
  builder: ModuleBuilder | null;
  headerToken: Token;
  broken: boolean;
}

function readVerilog(text: string, file: string, options: VerilogOptions): StageResult<DesignSource> {
  const diagnostics: Diagnostic[] = [];

  // Not text: NUL or other control characters (tab, newline, carriage return and form feed
  // are white space in Verilog, IEEE 1364-2005 §3.2).
  const ctl = /[\u0000-\u0008\u000b\u000e-\u001f\u007f]/.exec(text);
  if (ctl) {
    const code = ctl[0].charCodeAt(0);
    diagnostics.push(
      diag("GW1008", `the file contains the control character U+${code.toString(16).toUpperCase().padStart(4, "0")}; it does not look like Verilog text`, { file, span: { start: ctl.index, length: 1 } }, {
        hint: "give gatewright a plain-text structural Verilog file",
      }),
    );
    return { diagnostics };
  }

  const errorCount = () => diagnostics.reduce((n, d) => n + (d.severity === "error" ? 1 : 0), 0);
  const reader = new Reader(text, diagnostics, file);
  const modules = new Map<string, ModuleDef>();
  const order: ModuleDef[] = [];
  let open: OpenModule | null = null;
  const r: Reporter = { file, report: (d) => diagnostics.push(d) };
  let stopped = false;

  const closeModule = (m: OpenModule) => {
    if (!m.builder) return;
    const def = m.builder.finish();
    if (m.broken) def.broken = true;
    const prev = modules.get(def.name);
    if (prev) {
      diagnostics.push(
        diag("GW2005", `module '${def.name}' is defined twice`, { file, span: def.nameSpan }, {
          related: [{ message: "first defined here", file, start: prev.nameSpan.start, length: prev.nameSpan.length }],
        }),
      );
      return;
    }
    modules.set(def.name, def);
    order.push(def);
  };

  for (;;) {
    if (errorCount() >= MAX_ERRORS) {
      stopped = true;
      break;
    }
    const item = reader.next();
    if (!item) break;
    if (item.skipped) {
      if (open) open.broken = true;
      continue;
    }
    const first = item.tokens[0]!;
    const isHeader = first.type === "keyword" && first.value === "module";
    if (isHeader && open) {
      diagnostics.push(
        diag("GW1002", `module '${open.header?.name.name ?? "?"}' is not closed: expected 'endmodule' before the next 'module'`, { file, span: tokSpan(first) }, {
          related: open.header ? [{ message: "the module starts here", file, start: open.header.span.start, length: open.header.span.length }] : [],
        }),
      );
      open.broken = true;
      closeModule(open);
      open = null;
    }
    if (!isHeader && !open) {
      if (first.type === "keyword" && first.value === "endmodule") {
        diagnostics.push(diag("GW1002", "'endmodule' without a module", { file, span: tokSpan(first) }));
      } else if (!item.tainted) {
        const attribute = first.text === "(" && item.tokens[1]?.text === "*";
        diagnostics.push(
          (first.type === "keyword" && !SUPPORTED_KEYWORDS.has(first.value)) || attribute
            ? syntaxDiagnostic(item.tokens, first, [], file)
            : diag("GW1002", `expected 'module' but found ${show(first)}`, { file, span: tokSpan(first) }, {
                hint: "declarations and statements belong between 'module name(...);' and 'endmodule'",
              }),
        );
      }
      continue;
    }
    // Parse the item.
    let parsed: VItem | null = null;
    if (item.tainted) {
      // already reported by the reader
    } else if (item.atEof && !(first.type === "keyword" && first.value === "endmodule")) {
      if (!reader.unterminatedComment) {
        diagnostics.push(
          diag("GW1003", "the file ends in the middle of a statement: expected ';'", { file, span: { start: text.length, length: 0 } }, {
            related: [{ message: "the statement starts here", file, start: first.offset, length: first.text.length }],
          }),
        );
      }
    } else {
      const deep = nestingTooDeep(item.tokens);
      if (deep) {
        diagnostics.push(
          diag("GW1006", `the expression is nested more than ${MAX_NESTING} levels deep`, { file, span: tokSpan(deep) }, {
            hint: "split it into several assignments through intermediate wires",
          }),
        );
      } else {
        const outcome = parseStatement(item.tokens);
        if (outcome.ok) parsed = outcome.item;
        else if (outcome.token) diagnostics.push(syntaxDiagnostic(item.tokens, outcome.token, outcome.expected, file));
        else {
          // The item ended before the grammar was satisfied: cut short by module/endmodule.
          const lastTok = item.tokens[item.tokens.length - 1]!;
          const stop = item.stoppedBy ?? lastTok;
          diagnostics.push(
            diag("GW1002", `expected ${orList(outcome.expected)} after ${show(lastTok)} but found ${show(stop)}`, { file, span: tokSpan(stop) }),
          );
        }
      }
    }
    if (isHeader) {
      const header = parsed && parsed.k === "module" ? parsed : null;
      // A header that could not be read still opens a module, so its body is not misread.
      open = { header, builder: header ? new ModuleBuilder(header, r) : null, headerToken: first, broken: header === null };
      continue;
    }
    if (!open) continue;
    if (first.type === "keyword" && first.value === "endmodule" && parsed) {
      closeModule(open);
      open = null;
      continue;
    }
    if (parsed) open.builder?.add(parsed);
    else open.broken = true;
  }

  if (stopped) {
    diagnostics.push(diag("GW1009", `stopped after ${MAX_ERRORS} errors`, { file }));
  } else if (open) {
    if (!reader.unterminatedComment && !diagnostics.some((d) => d.code === "GW1003")) {
      diagnostics.push(
        diag("GW1003", `the file ends inside module '${open.header?.name.name ?? "?"}': expected 'endmodule'`, { file, span: { start: text.length, length: 0 } }, {
          related: [{ message: "the module starts here", file, start: open.headerToken.offset, length: open.headerToken.text.length }],
        }),
      );
    }
    open.broken = true;
    closeModule(open);
  }
  // After a syntax error the module list may be incomplete, so instance checks would only add
  // noise. After other errors they still help; but nothing is flattened.
  if (stopped || diagnostics.some((d) => d.severity === "error" && d.code.startsWith("GW1"))) return { diagnostics };

  for (const def of order) resolveInstances(def, modules, r);
  findCycles(modules, r);
  if (hasErrors(diagnostics)) {
    // Guessing the top module would only add noise now; an unknown --top is still worth saying.
    if (options.top !== undefined && !modules.has(options.top)) chooseTop(modules, order, options.top, r);
    return { diagnostics };
  }
  const top = chooseTop(modules, order, options.top, r);
  if (!top || hasErrors(diagnostics)) return { diagnostics };
  const value = flatten(top, file, r);
  if (!value || hasErrors(diagnostics)) return { diagnostics };
  return { value, diagnostics };
}
