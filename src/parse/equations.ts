// Front end for equation files (*.logic): text → DesignSource (syntax only; names are
// resolved in src/logic/build.ts). The language is described at the top of
// grammars/equations.ne.
//
// The file is lexed once with the moo lexer from the grammar. The significant tokens are cut at
// each ';' and every statement is parsed on its own by a fresh nearley Parser over the
// precompiled grammar, so memory stays proportional to the longest statement and an error in
// one statement does not hide errors in the next (reading resumes after the next ';').
// A statement whose sequence of token kinds was parsed before reuses that parse (see
// equations-syntax.ts for why that is exact).
//
// What is reported here:
//   GW1001 a character no token matches          GW1002 syntax error, with what was expected
//   GW1003 the file ends inside a statement       GW1004 '/*' without '*/'
//   GW1006 nesting deeper than MAX_NESTING        GW1007 a number other than 0 or 1
//   GW1008 control characters: not a text file    GW1009 stopped after MAX_ERRORS errors
//   GW2005 a name declared twice (input/output)   GW9001 an exception inside gatewright
//   GW1007, GW1020, GW1021 in state statements (init, state elements): see equations-state.ts
//   GW1010-GW1017, GW2016, GW2017 in minterm functions and truth tables (grammar header; GW2016,
//   a variable that is not a declared input, is checked once the whole file is read)
// The result has a value (the statements that were read correctly) unless the file is not
// text or gatewright failed; callers check the diagnostics for errors before going on.
//
// Spans: offsets are UTF-16 code units into `text`. Every node's span covers its own text;
// the parentheses around a parenthesised operand belong to the enclosing node, not to the
// operand: '(a & b)' gives an `and` node spanning 'a & b', and '(x)'' a `not` node spanning
// all of '(x)''. An assignment's span runs from its target to its ';'.
import nearley from "nearley";
import type { Lexer, Token } from "moo";
import grammar, { equationLexer } from "./generated/equations.js";
import type { RawExpr, RawList, RawNameList, RawStatement, StatementToken } from "./equations-syntax.js";
import { diag, type Diagnostic, type RelatedInfo, type Span, type StageResult } from "../diagnostics/index.js";
import type { Assignment, Declaration, DesignSource, DontCareSource, Expr } from "../syntax/index.js";
import { build } from "../syntax/index.js";
import { acceptStateStatement, type StateParts } from "./equations-state.js";

/**
 * Deepest nesting accepted in one statement (GW1006 beyond it). Depth is counted on the token
 * stream before parsing: each open '(' adds one level plus the prefix NOTs written just before
 * it, and a run of NOT operators ('!!!a', 'a''') adds its length to the current level. The
 * tree built is at most about twice as deep as this count.
 *
 * Measured on Node 20 with the limit lifted: nearley and the conversion here both cope with
 * 100,000 nested levels without overflowing the stack (nearley's Earley table is iterative
 * and the tree is built with explicit stacks), but slowly: 1.6 s for 100,000 bare
 * parentheses, 6 s for '(a & (b | ' nested 100,000 times. The limit keeps such a statement
 * to milliseconds and protects later stages and tools that walk trees recursively. 2,000
 * levels parse in about 0.1 s; nobody writes that many by hand.
 */
export const MAX_NESTING = 2000;

/** Most variables of a minterm function or inputs of a truth table (GW1017 beyond). Cubes are
 *  kept as 32-bit masks, and the optimizer and the equivalence check work exhaustively only up
 *  to 20 variables anyway. */
export const MAX_FUNCTION_VARIABLES = 24;

/** Most minterm numbers one function may list, ranges counted in full (GW1017 beyond): keeps
 *  the canonical sum that a short range like m(0-16777215) would write within reason. */
export const MAX_LISTED_POINTS = 65_536;

/** Most don't-care cubes one truth-table output may have after the rows that give values are
 *  taken out of its '-' rows (GW1017 beyond). */
export const MAX_DONT_CARE_CUBES = 65_536;

/** Errors reported before reading stops (with a GW1009 note). */
export const MAX_ERRORS = 50;

/** Longest piece of source quoted in a message. */
const MAX_QUOTED = 24;

/** Statements longer than this (in tokens) are not remembered for reuse. */
const MAX_REUSED_TOKENS = 256;
/** Distinct statement shapes remembered per file. */
const MAX_REUSED_SHAPES = 10_000;

const compiled = nearley.Grammar.fromCompiled(grammar);

/** Reusing parses is exact only if every terminal of the grammar matches by token kind. */
const PARSES_DEPEND_ONLY_ON_KINDS = compiled.rules.every((rule) =>
  rule.symbols.every(
    (s: unknown) =>
      typeof s === "string" || (s !== null && typeof s === "object" && "type" in s && !("test" in s) && !("literal" in s)),
  ),
);

/** Phrases for token kinds in "expected ..." messages, in the order they are listed. */
const EXPECTED_WORDS: Record<string, string> = {
  kwInput: "'input'",
  kwOutput: "'output'",
  kwInit: "'init'",
  kwOscillator: "'oscillator'",
  kwTable: "'table'",
  ident: "a name",
  number: "a constant",
  lparen: "'('",
  notOp: "'!'",
  sigma: "'Σ'",
  pi: "'Π'",
  eq: "'='",
  comma: "','",
  colon: "':'",
  dash: "'-'",
  lbrace: "'{'",
  rbrace: "'}'",
  rparen: "')'",
  semi: "';'",
};
/** Keywords that start a statement; inside a table's braces one means its '}' is missing. */
const KEYWORD_KINDS = ["kwInput", "kwOutput", "kwInit", "kwOscillator", "kwTable"];
const OPERATOR_KINDS = ["andOp", "orOp", "xorOp", "postNot"];
const EXPRESSION_START_KINDS = ["ident", "number", "lparen", "notOp"];

/** Hands one statement's tokens to nearley (which asks a lexer for them one at a time). */
class StatementTokens implements nearley.Lexer {
  private tokens: Token[] = [];
  private index = 0;
  load(tokens: Token[]): void {
    this.tokens = tokens;
    this.index = 0;
  }
  reset(): void {
    this.index = 0;
  }
  next(): Token | undefined {
    return this.tokens[this.index++];
  }
  save(): nearley.LexerState {
    return {};
  }
  formatError(): string {
    return "syntax error";
  }
  has(): boolean {
    return true;
  }
}

/** The parts of nearley's parser state that error reporting reads (not in its type definitions). */
interface ParserInternals {
  current: number;
  table: { states: { rule: { symbols: unknown[] }; dot: number }[] }[];
  reportError: (token: unknown) => string;
  reportLexerError: (error: unknown) => string;
}

type StatementKind = "declaration" | "assignment" | "function" | "table";

/** Reads an equation file. Never throws: an exception inside becomes a GW9001 diagnostic. */
export function parseEquations(text: string, file: string): StageResult<DesignSource> {
  const reader = new EquationReader(text, file);
  try {
    reader.read();
    return reader.result();
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    return {
      diagnostics: [
        ...reader.diagnostics,
        diag("GW9001", `internal error while reading the equations: ${message}`, { file }),
      ],
    };
  }
}

/** The design name: the file's base name without its extension (`examples/ctl.logic` → `ctl`). */
export function designNameOf(file: string): string {
  const base = file.split(/[\\/]/).pop() ?? file;
  const dot = base.lastIndexOf(".");
  return dot > 0 ? base.slice(0, dot) : base;
}

class EquationReader {
  readonly diagnostics: Diagnostic[] = [];
  private errorCount = 0;
  private stopped = false;
  private notText = false;
  private readonly inputs: Declaration[] = [];
  private readonly outputs: Declaration[] = [];
  private readonly assignments: Assignment[] = [];
  /** Don't-cares of minterm functions and truth tables. */
  private readonly dontCares: DontCareSource[] = [];
  /** Variables of minterm functions and truth tables, checked against the declarations at the
   *  end (declarations may come after the statements that use them). */
  private readonly functionVariables: Declaration[] = [];
  /** `init`, `oscillator` and state elements (equations-state.ts). */
  private readonly stateParts: StateParts = { initials: [], oscillators: [], stateElements: [] };
  private readonly declared = new Map<string, { direction: "input" | "output"; span: Span }>();
  private readonly statementTokens = new StatementTokens();
  /** Parses by statement shape (token kinds, one character each). */
  private readonly parsedShapes = new Map<string, RawStatement>();
  private readonly kindCodes = new Map<string, string>();
  private readonly work = { nodes: [] as RawExpr[], arities: [] as number[], results: [] as Expr[] };

  constructor(
    private readonly text: string,
    private readonly file: string,
  ) {}

  result(): StageResult<DesignSource> {
    if (this.notText) return { diagnostics: this.diagnostics };
    return {
      value: {
        file: this.file,
        name: designNameOf(this.file),
        inputs: this.inputs,
        outputs: this.outputs,
        wires: [],
        assignments: this.assignments,
        language: "equations",
        ...(this.stateParts.initials.length ? { initials: this.stateParts.initials } : {}),
        ...(this.stateParts.oscillators.length ? { oscillators: this.stateParts.oscillators } : {}),
        ...(this.stateParts.stateElements.length ? { stateElements: this.stateParts.stateElements } : {}),
        ...(this.dontCares.length ? { dontCares: this.dontCares } : {}),
      },
      diagnostics: this.diagnostics,
    };
  }

  private report(d: Diagnostic): void {
    if (this.stopped) return;
    this.diagnostics.push(d);
    if (d.severity !== "error") return;
    this.errorCount++;
    if (this.errorCount >= MAX_ERRORS) {
      this.stopped = true;
      this.diagnostics.push(
        diag("GW1009", `stopped reading after ${MAX_ERRORS} errors; fix these and run again`, { file: this.file }),
      );
    }
  }

  private at(start: number, length: number): { file: string; span: Span } {
    return { file: this.file, span: { start, length } };
  }

  private kindCode(kind: string): string {
    let code = this.kindCodes.get(kind);
    if (code === undefined) {
      code = String.fromCharCode(65 + this.kindCodes.size);
      this.kindCodes.set(kind, code);
    }
    return code;
  }

  read(): void {
    const text = this.text;
    // Control characters other than tab, line feed, form feed and carriage return mean the
    // file is binary (or in an encoding we cannot read); one message is enough.
    const control = text.search(/[\u0000-\u0008\u000b\u000e-\u001f\u007f]/);
    if (control >= 0) {
      const code = text.charCodeAt(control).toString(16).toUpperCase().padStart(4, "0");
      this.report(
        diag("GW1008", `this is not a text file: it contains the control character U+${code}`, this.at(control, 1), {
          hint: "equation files are plain text (UTF-8)",
        }),
      );
      this.notText = true;
      return;
    }

    // moo lexers are stateful; a clone keeps parseEquations re-entrant (clone() is in moo 0.5
    // but not in its type definitions).
    const lexer = (equationLexer as Lexer & { clone(): Lexer }).clone();
    lexer.reset(text);
    let statement: StatementToken[] = [];
    let shape = "";
    let skipping = false; // the current statement already has an error; wait for its end
    // Nesting depth (see MAX_NESTING).
    let level = 0;
    let notRun = 0;
    const levels: number[] = [];
    // Braces of a truth table: inside them ';' ends a row, and the closing '}' the statement.
    let braces = 0;
    let openBrace: Token | undefined;

    for (let tok = lexer.next(); tok !== undefined && !this.stopped; tok = lexer.next()) {
      const type = tok.type!;
      if (type === "ws" || type === "nl" || type === "lineComment" || type === "blockComment") continue;
      if (type === "openComment") {
        this.report(diag("GW1004", "this comment is never closed: '/*' without '*/'", this.at(tok.offset, 2)));
        return; // the comment runs to the end of the file; the statement it cut off is lost
      }
      if (braces > 0 && KEYWORD_KINDS.includes(type)) {
        // A keyword inside a table: its '}' is missing. The table is dropped and the keyword
        // starts the next statement.
        if (!skipping) {
          this.report(
            diag("GW1002", `expected '}' to close the table before ${this.quote(tok)}`, this.at(tok.offset, tok.text.length), {
              hint: "a truth table ends with '}'",
              related: openBrace ? [{ message: "this '{' is not closed", file: this.file, start: openBrace.offset, length: 1 }] : [],
            }),
          );
        }
        statement = [];
        shape = "";
        skipping = false;
        level = 0;
        notRun = 0;
        levels.length = 0;
        braces = 0;
      }
      let closes = false;
      if (type === "lbrace") {
        if (braces === 0) openBrace = tok;
        braces++;
      } else if (type === "rbrace" && braces > 0) {
        braces--;
        closes = braces === 0;
      }
      const ends = closes || (type === "semi" && braces === 0);
      if (skipping && !ends) continue;
      if (type === "invalid") {
        this.report(this.invalidCharacter(tok));
        skipping = true;
        continue;
      }
      const st = tok as StatementToken;
      st.index = statement.length;
      statement.push(st);
      if (statement.length <= MAX_REUSED_TOKENS) shape += this.kindCode(type);
      if (ends) {
        if (!skipping) this.statement(statement, shape, false);
        statement = [];
        shape = "";
        skipping = false;
        level = 0;
        notRun = 0;
        levels.length = 0;
        continue;
      }
      // Nesting depth on the token stream.
      if (type === "lparen") {
        levels.push(level);
        level += 1 + notRun;
        notRun = 0;
      } else if (type === "rparen") {
        level = levels.length ? levels.pop()! : 0;
        notRun = 0;
      } else if (type === "notOp" || type === "postNot") {
        notRun++;
      } else {
        notRun = 0;
      }
      if (level + notRun > MAX_NESTING) {
        this.report(
          diag("GW1006", `this statement is nested more than ${MAX_NESTING} levels deep`, this.at(tok.offset, tok.text.length), {
            hint: "split the expression into several assignments through internal signals",
          }),
        );
        skipping = true;
      }
    }
    if (!this.stopped && !skipping && statement.length) this.statement(statement, shape, true);
    this.checkFunctionVariables();
  }

  /** The variables of minterm functions and truth tables must be declared inputs (GW2016). */
  private checkFunctionVariables(): void {
    for (const v of this.functionVariables) {
      const d = this.declared.get(v.name);
      if (d?.direction === "input") continue;
      const shown = v.name.length > MAX_QUOTED ? `${v.name.slice(0, MAX_QUOTED)}...` : v.name;
      this.report(
        diag(
          "GW2016",
          d ? `'${shown}' is an output; the variables of a function or table must be declared inputs` : `'${shown}' is not a declared input; the variables of a function or table must be inputs`,
          { file: this.file, span: v.span },
          d
            ? { related: [{ message: "declared as an output here", file: this.file, start: d.span.start, length: d.span.length }] }
            : { hint: `declare it with 'input ${shown};'` },
        ),
      );
    }
  }

  private invalidCharacter(tok: Token): Diagnostic {
    const cp = this.text.codePointAt(tok.offset)!;
    const length = cp > 0xffff ? 2 : 1;
    const hex = cp.toString(16).toUpperCase().padStart(4, "0");
    const printable = cp > 0x20 && !(cp >= 0x7f && cp <= 0x9f) && !(cp >= 0xd800 && cp <= 0xdfff);
    const shown = printable ? `'${String.fromCodePoint(cp)}' (U+${hex})` : `U+${hex}`;
    return diag("GW1001", `unexpected character ${shown}`, this.at(tok.offset, length), {
      hint: "names are letters, digits, '_', '.' and '$'; operators are ! ~ ' & * ^ | +",
    });
  }

  /** Parses one statement (its tokens end with ';' unless the file ended first). */
  private statement(tokens: StatementToken[], shape: string, atEndOfFile: boolean): void {
    if (tokens.length === 1) {
      if (tokens[0]!.type === "semi") return; // an empty statement
    }
    const reusable = PARSES_DEPEND_ONLY_ON_KINDS && tokens.length <= MAX_REUSED_TOKENS;
    if (reusable) {
      const known = this.parsedShapes.get(shape);
      if (known) {
        this.accept(known, tokens);
        return;
      }
    }
    this.statementTokens.load(tokens);
    const parser = new nearley.Parser(compiled, { lexer: this.statementTokens });
    const internals = parser as unknown as ParserInternals;
    // nearley's own error text walks the whole parse stack recursively; we phrase our own.
    internals.reportError = () => "syntax error";
    internals.reportLexerError = () => "syntax error";
    try {
      parser.feed("");
    } catch (e) {
      if (e !== null && typeof e === "object" && "token" in e) {
        this.syntaxError(tokens, internals);
        return;
      }
      throw e;
    }
    const results = parser.results as RawStatement[];
    if (results.length === 0) {
      // Every statement rule ends in ';', so this happens only when the file ends first.
      if (!atEndOfFile) throw new Error("a statement ending in ';' produced no parse");
      this.endOfFile(tokens, internals);
      return;
    }
    if (results.length > 1) throw new Error(`the equation grammar is ambiguous at offset ${tokens[0]!.offset}`);
    const parsed = results[0]!;
    if (reusable && this.parsedShapes.size < MAX_REUSED_SHAPES) this.parsedShapes.set(shape, parsed);
    this.accept(parsed, tokens);
  }

  // ---- syntax errors --------------------------------------------------------------------------

  private expectedKinds(internals: ParserInternals): Set<string> {
    const kinds = new Set<string>();
    const column = internals.table[internals.current];
    for (const state of column?.states ?? []) {
      const symbol = state.rule.symbols[state.dot];
      if (symbol !== null && typeof symbol === "object" && "type" in symbol) kinds.add(String(symbol.type));
    }
    return kinds;
  }

  private describeExpected(kinds: Set<string>): string {
    const rest = new Set(kinds);
    if (rest.has("kwInput") && rest.has("kwOutput") && rest.has("ident")) {
      return "a statement ('input', 'output' or an assignment)";
    }
    const words: string[] = [];
    if (EXPRESSION_START_KINDS.every((k) => rest.has(k))) {
      words.push("an expression");
      for (const k of EXPRESSION_START_KINDS) rest.delete(k);
    }
    if (OPERATOR_KINDS.some((k) => rest.has(k))) {
      words.push("an operator");
      for (const k of OPERATOR_KINDS) rest.delete(k);
    }
    for (const [kind, phrase] of Object.entries(EXPECTED_WORDS)) {
      if (rest.delete(kind)) words.push(phrase);
    }
    for (const kind of rest) words.push(kind); // a token kind without a phrase yet
    if (words.length <= 1) return words[0] ?? "nothing more";
    return `${words.slice(0, -1).join(", ")} or ${words[words.length - 1]}`;
  }

  private quote(tok: Token): string {
    const t = tok.text;
    return t.length > MAX_QUOTED ? `'${t.slice(0, MAX_QUOTED)}...'` : `'${t}'`;
  }

  private kindOf(tokens: Token[]): StatementKind {
    const first = tokens[0]!.type;
    if (first === "kwTable") return "table";
    if (first === "kwInput" || first === "kwOutput" || first === "kwInit" || first === "kwOscillator") return "declaration";
    return tokens[1]?.type === "lparen" ? "function" : "assignment";
  }

  /** The innermost '(' still open before token index `upTo`. */
  private openParen(tokens: Token[], upTo: number): Token | undefined {
    const open: Token[] = [];
    for (let i = 0; i < upTo; i++) {
      const type = tokens[i]!.type;
      if (type === "lparen") open.push(tokens[i]!);
      else if (type === "rparen") open.pop();
    }
    return open[open.length - 1];
  }

  private syntaxError(tokens: Token[], internals: ParserInternals): void {
    const index = internals.current;
    const found = tokens[index]!;
    const previous = index > 0 ? tokens[index - 1] : undefined;
    const kinds = this.expectedKinds(internals);
    // After a complete operand, '(' could only open a state element's arguments
    // (`q = dff(...)`); naming it beside the operators would mislead.
    if (OPERATOR_KINDS.some((k) => kinds.has(k))) kinds.delete("lparen");
    // Right after a statement's first name '(' would start a minterm function; the likely
    // intent of anything else there is an assignment, so only '=' is offered.
    if (index === 1 && tokens[0]!.type === "ident" && kinds.has("eq")) kinds.delete("lparen");
    const kind = this.kindOf(tokens);
    let message: string;
    let hint: string | undefined;
    const related: RelatedInfo[] = [];
    let at = found;
    const before = index > 1 ? tokens[index - 2] : undefined;
    if (kind === "function" && previous?.type === "ident" && kinds.has("lparen") && before && previous.line > before.line + before.lineBreaks) {
      // A minterm function ran on into the next line (its last group took the next name).
      message = `expected ';' after the function, found ${this.quote(previous)}`;
      hint = `every statement ends with ';' (is one missing at the end of line ${before.line}?)`;
      at = previous;
    } else if (previous && kinds.has("semi") && found.line > previous.line + previous.lineBreaks) {
      // The statement runs on into the next line: almost always a forgotten ';'.
      message = `expected ';' after the ${kind}, found ${this.quote(found)}`;
      hint = `every statement ends with ';' (is one missing at the end of line ${previous.line}?)`;
    } else {
      const expected = this.describeExpected(kinds);
      message = previous
        ? `expected ${expected} after ${this.quote(previous)}, found ${this.quote(found)}`
        : `expected ${expected}, found ${this.quote(found)}`;
    }
    const keyword = [found, previous].find((t) => t && KEYWORD_KINDS.includes(t.type!));
    if (keyword && (kinds.has("ident") || (index === 1 && found.type === "eq"))) {
      hint = `'${keyword.text}' is a keyword and cannot name a signal`;
    } else {
      const open = this.openParen(tokens, index);
      if (found.type === "rparen" && !open) {
        hint = "this ')' has no matching '('";
      } else if (open && kinds.has("rparen")) {
        hint ??= "a '(' is still open";
        related.push({ message: "this '(' is not closed", file: this.file, start: open.offset, length: 1 });
      }
    }
    this.report(
      diag("GW1002", message, this.at(at.offset, at.text.length), {
        ...(hint !== undefined ? { hint } : {}),
        related,
      }),
    );
  }

  private endOfFile(tokens: Token[], internals: ParserInternals): void {
    const kinds = this.expectedKinds(internals);
    const last = tokens[tokens.length - 1]!;
    const kind = this.kindOf(tokens);
    const message = kinds.has("semi")
      ? `unexpected end of file: expected ';' after the ${kind}`
      : `unexpected end of file: expected ${this.describeExpected(kinds)} after ${this.quote(last)}`;
    const related: RelatedInfo[] = [
      {
        message: `the unfinished ${kind} starts here`,
        file: this.file,
        start: tokens[0]!.offset,
        length: tokens[0]!.text.length,
      },
    ];
    this.report(diag("GW1003", message, this.at(this.text.length, 0), { related }));
  }

  // ---- building the design source -----------------------------------------------------------

  private accept(statement: RawStatement, tokens: StatementToken[]): void {
    const stateContext = { file: this.file, report: (d: Diagnostic) => this.report(d), toExpr: (e: RawExpr, t: StatementToken[]) => this.toExpr(e, t) };
    if (acceptStateStatement(statement, tokens, this.stateParts, stateContext)) return;
    switch (statement.t) {
      case "decl":
        this.declare(statement.direction, statement.names, tokens);
        return;
      case "assign": {
        const expr = this.toExpr(statement.expr, tokens);
        if (expr === undefined) return;
        const target = tokens[statement.target]!;
        this.assignments.push({
          target: target.text,
          targetSpan: { start: target.offset, length: target.text.length },
          expr,
          span: spanOf(tokens, statement.first, statement.last),
        });
        return;
      }
      case "function":
        this.acceptFunction(statement, tokens);
        return;
      case "table":
        this.acceptTable(statement, tokens);
        return;
    }
  }

  // ---- minterm functions and truth tables ---------------------------------------------------

  private shown(name: string): string {
    return name.length > MAX_QUOTED ? `${name.slice(0, MAX_QUOTED)}...` : name;
  }

  /** The names of a list in order, with GW2017 for a name already in `seen`. */
  private variableList(names: RawNameList, tokens: StatementToken[], seen: Map<string, Span>): Declaration[] | undefined {
    const list: Token[] = [];
    for (let n: RawNameList | null = names; n; n = n.prev) list.push(tokens[n.at]!);
    list.reverse();
    let ok = true;
    const out: Declaration[] = [];
    for (const tok of list) {
      const span: Span = { start: tok.offset, length: tok.text.length };
      const first = seen.get(tok.text);
      if (first) {
        ok = false;
        this.report(
          diag("GW2017", `${this.quote(tok)} is listed twice`, { file: this.file, span }, {
            related: [{ message: "first listed here", file: this.file, start: first.start, length: first.length }],
          }),
        );
        continue;
      }
      seen.set(tok.text, span);
      out.push({ name: tok.text, span });
    }
    return ok ? out : undefined;
  }

  private tooManyVariables(what: string, vars: Declaration[]): boolean {
    if (vars.length <= MAX_FUNCTION_VARIABLES) return false;
    const first = vars[0]!.span;
    const last = vars[vars.length - 1]!.span;
    this.report(
      diag("GW1017", `${what} has ${vars.length} variables; at most ${MAX_FUNCTION_VARIABLES} are allowed`, this.at(first.start, last.start + last.length - first.start), {
        hint: "split it into smaller functions through internal signals, or write it as equations",
      }),
    );
    return true;
  }

  /** `F(a, b, c) = Σm(1, 3) + d(7);` → the canonical sum (or product) and the don't-cares. */
  private acceptFunction(st: Extract<RawStatement, { t: "function" }>, tokens: StatementToken[]): void {
    const target = tokens[st.target]!;
    const vars = this.variableList(st.variables, tokens, new Map());
    if (!vars) return;
    this.functionVariables.push(...vars);
    if (this.tooManyVariables(`'${this.shown(target.text)}'`, vars)) return;
    const n = vars.length;
    const size = 2 ** n;
    let ok = true;

    let prefix: "sum" | "prod" | undefined;
    if (st.terms.prefix !== null) {
      const p = tokens[st.terms.prefix]!;
      const word = p.text.toLowerCase();
      if (p.type === "sigma" || word === "sum") prefix = "sum";
      else if (p.type === "pi" || word === "prod" || word === "product") prefix = "prod";
      else {
        ok = false;
        this.report(
          diag("GW1013", `expected 'sum' or 'prod' before the first group, found ${this.quote(p)}`, this.at(p.offset, p.text.length), {
            hint: "write F(a, b) = sum m(1, 2); or F(a, b) = m(1, 2);",
          }),
        );
      }
    }

    type Group = RawStatement & { t: "function" };
    type GroupItem = Group["terms"]["groups"]["item"];
    const groups: GroupItem[] = [];
    for (let g: RawList<GroupItem> | null = st.terms.groups; g; g = g.prev) groups.push(g.item);
    groups.reverse();

    type Kind = "on" | "off" | "dc";
    const listed: Record<Kind, Map<number, Span>> = { on: new Map(), off: new Map(), dc: new Map() };
    const groupWords: Record<Kind, string> = { on: "m(...)", off: "M(...)", dc: "d(...)" };
    let valueKind: { kind: "on" | "off"; tok: Token } | undefined;
    let count = 0;
    for (const { group } of groups) {
      const nameTok = tokens[group.name]!;
      const name = nameTok.text;
      let kind: Kind;
      if (name === "m") kind = "on";
      else if (name === "M") kind = "off";
      else if (name === "d" || name === "D" || name === "dc" || name === "DC") kind = "dc";
      else {
        ok = false;
        this.report(
          diag("GW1013", `${this.quote(nameTok)} is not a group of a minterm function`, this.at(nameTok.offset, nameTok.text.length), {
            hint: "use m(...) for minterms, M(...) for maxterms and d(...) for don't-cares",
          }),
        );
        continue;
      }
      if (kind !== "dc") {
        if (valueKind && valueKind.kind !== kind) {
          ok = false;
          this.report(
            diag("GW1013", "a function lists its minterms m(...) or its maxterms M(...), not both", this.at(nameTok.offset, nameTok.text.length), {
              related: [{ message: `${valueKind.kind === "on" ? "minterms" : "maxterms"} listed here`, file: this.file, start: valueKind.tok.offset, length: valueKind.tok.text.length }],
            }),
          );
          continue;
        }
        valueKind ??= { kind, tok: nameTok };
        if ((prefix === "sum" && kind === "off") || (prefix === "prod" && kind === "on")) {
          ok = false;
          const p = tokens[st.terms.prefix!]!;
          this.report(
            diag(
              "GW1013",
              prefix === "sum" ? `a sum ('${p.text}') lists minterms m(...), not maxterms M(...)` : `a product ('${p.text}') lists maxterms M(...), not minterms m(...)`,
              this.at(nameTok.offset, nameTok.text.length),
            ),
          );
          continue;
        }
      }
      const items: { first: number; last: number | null }[] = [];
      for (let x = group.numbers; x; x = x.prev) items.push(x.item);
      items.reverse();
      for (const item of items) {
        const lo = this.mintermNumber(tokens[item.first]!, n, target.text);
        const hi = item.last === null ? lo : this.mintermNumber(tokens[item.last]!, n, target.text);
        if (lo === undefined || hi === undefined) {
          ok = false;
          continue;
        }
        const span = spanOf(tokens, item.first, item.last ?? item.first);
        if (hi < lo) {
          ok = false;
          this.report(diag("GW1010", `the range ${lo}-${hi} runs backwards`, { file: this.file, span }, { hint: `write ${hi}-${lo}` }));
          continue;
        }
        count += hi - lo + 1;
        if (count > MAX_LISTED_POINTS) {
          this.report(
            diag("GW1017", `'${this.shown(target.text)}' lists more than ${MAX_LISTED_POINTS} minterms`, { file: this.file, span }, {
              hint: "list the smaller side: maxterms M(...) instead of minterms, or the other way round",
            }),
          );
          return;
        }
        let reported = false;
        for (let k = lo; k <= hi && k < size; k++) {
          const same = listed[kind].get(k);
          const otherKind: Kind | undefined =
            kind === "dc" ? (listed.on.has(k) ? "on" : listed.off.has(k) ? "off" : undefined) : listed.dc.has(k) ? "dc" : undefined;
          const term = kind === "off" || otherKind === "off" ? "maxterm" : "minterm";
          if (!reported && same) {
            ok = false;
            reported = true;
            this.report(
              diag("GW1011", `${term} ${k} is listed twice`, { file: this.file, span }, {
                related: [{ message: "first listed here", file: this.file, start: same.start, length: same.length }],
              }),
            );
          } else if (!reported && otherKind) {
            ok = false;
            reported = true;
            const other = listed[otherKind].get(k)!;
            this.report(
              diag("GW1012", `${term} ${k} is both in ${groupWords[otherKind]} and in ${groupWords[kind]}`, { file: this.file, span }, {
                hint: "a point is either given a value or left free, not both",
                related: [{ message: `listed in ${groupWords[otherKind]} here`, file: this.file, start: other.start, length: other.length }],
              }),
            );
          }
          if (!same) listed[kind].set(k, span);
        }
      }
    }
    if (!ok) return;

    // The canonical sum of the minterms (or product of the maxterms), and the don't-cares.
    const bitOf = (k: number, i: number) => Math.floor(k / 2 ** (n - 1 - i)) % 2;
    const literal = (i: number, positive: boolean): Expr => {
      const r = build.ref(vars[i]!.name, vars[i]!.span);
      return positive ? r : build.not(r, vars[i]!.span);
    };
    const firstGroup = groups[0]!.group;
    const lastGroup = groups[groups.length - 1]!.group;
    const whole = spanOf(tokens, st.terms.prefix ?? firstGroup.name, lastGroup.close);
    const useOff = valueKind?.kind === "off";
    const points = [...listed[useOff ? "off" : "on"].entries()].sort((x, y) => x[0] - y[0]);
    const terms: Expr[] = [];
    for (const [k, span] of points) {
      const lits = vars.map((_, i) => literal(i, useOff ? bitOf(k, i) === 0 : bitOf(k, i) === 1));
      terms.push(lits.length === 1 ? lits[0]! : build.nary(useOff ? "or" : "and", lits, span));
    }
    const expr: Expr =
      terms.length === 0 ? build.constant(useOff ? 1 : 0, whole) : terms.length === 1 ? terms[0]! : build.nary(useOff ? "and" : "or", terms, whole);
    const targetSpan = { start: target.offset, length: target.text.length };
    const stSpan = spanOf(tokens, st.first, st.last);
    this.assignments.push({ target: target.text, targetSpan, expr, span: stSpan });
    if (listed.dc.size) {
      const cubes = [...listed.dc.keys()].sort((x, y) => x - y).map((k) => vars.map((_, i) => String(bitOf(k, i))).join(""));
      this.dontCares.push({ target: target.text, targetSpan, variables: vars, cubes, span: stSpan });
    }
  }

  /** A decimal minterm number below 2^n, or undefined (reported, GW1010). */
  private mintermNumber(tok: Token, n: number, target: string): number | undefined {
    if (!/^[0-9]+$/.test(tok.text)) {
      this.report(diag("GW1010", `${this.quote(tok)} is not a minterm number`, this.at(tok.offset, tok.text.length), { hint: "minterm numbers are written in decimal" }));
      return undefined;
    }
    const k = Number(tok.text);
    if (!(k < 2 ** n)) {
      this.report(
        diag(
          "GW1010",
          `minterm ${this.shown(tok.text)} is out of range: '${this.shown(target)}' has ${n} variable${n > 1 ? "s" : ""}, so its minterms are 0 to ${2 ** n - 1}`,
          this.at(tok.offset, tok.text.length),
        ),
      );
      return undefined;
    }
    return k;
  }

  /** `table a, b : y { 00 : 1; ... }` → one assignment per output, and the don't-cares. */
  private acceptTable(st: Extract<RawStatement, { t: "table" }>, tokens: StatementToken[]): void {
    const seen = new Map<string, Span>();
    const ins = this.variableList(st.inputs, tokens, seen);
    const outs = this.variableList(st.outputs, tokens, seen);
    if (ins) this.functionVariables.push(...ins);
    if (!ins || !outs) return;
    if (this.tooManyVariables("this table", ins)) return;
    const n = ins.length;
    const full = (2 ** n - 1) >>> 0;

    type Row = { mask: number; value: number; outs: string; span: Span; index: number };
    const rows: Row[] = [];
    type RawRow = NonNullable<typeof st.rows>["item"];
    const rawRows: RawRow[] = [];
    for (let r = st.rows; r; r = r.prev) rawRows.push(r.item);
    rawRows.reverse();
    let ok = true;
    const cellsOf = (list: RawList<number>): { text: string; first: number; last: number } | undefined => {
      const idx: number[] = [];
      for (let x: RawList<number> | null = list; x; x = x.prev) idx.push(x.item);
      idx.reverse();
      let text = "";
      let good = true;
      for (const i of idx) {
        const tok = tokens[i]!;
        if (tok.type === "dash") text += "-";
        else if (/^[01]+$/.test(tok.text)) text += tok.text;
        else {
          good = false;
          this.report(
            diag("GW1015", `${this.quote(tok)} is not a truth-table value`, this.at(tok.offset, tok.text.length), {
              hint: "values are 0, 1 or - (either), and may be run together: 01-",
            }),
          );
        }
      }
      return good ? { text, first: idx[0]!, last: idx[idx.length - 1]! } : undefined;
    };
    const names = (ds: Declaration[]) => {
      const list = ds.slice(0, 6).map((d) => this.shown(d.name)).join(", ");
      return ds.length > 6 ? `${list}, ...` : list;
    };
    rawRows.forEach((raw, index) => {
      const a = cellsOf(raw.inputs);
      const b = cellsOf(raw.outputs);
      if (!a || !b) {
        ok = false;
        return;
      }
      if (a.text.length !== n) {
        ok = false;
        this.report(
          diag(
            "GW1014",
            `this row gives ${a.text.length} input value${a.text.length === 1 ? "" : "s"}; the table has ${n} input${n === 1 ? "" : "s"} (${names(ins)})`,
            { file: this.file, span: spanOf(tokens, a.first, a.last) },
          ),
        );
        return;
      }
      if (b.text.length !== outs.length) {
        ok = false;
        this.report(
          diag(
            "GW1014",
            `this row gives ${b.text.length} output value${b.text.length === 1 ? "" : "s"}; the table has ${outs.length} output${outs.length === 1 ? "" : "s"} (${names(outs)})`,
            { file: this.file, span: spanOf(tokens, b.first, b.last) },
          ),
        );
        return;
      }
      let mask = 0;
      let value = 0;
      for (let i = 0; i < n; i++) {
        const c = a.text[i];
        if (c === "-") continue;
        mask |= 1 << i;
        if (c === "1") value |= 1 << i;
      }
      rows.push({ mask: mask >>> 0, value: value >>> 0, outs: b.text, span: spanOf(tokens, a.first, raw.last), index });
    });
    if (!ok) return;

    const cubeText = (mask: number, value: number) => {
      let t = "";
      for (let i = 0; i < n; i++) t += (mask >>> i) & 1 ? ((value >>> i) & 1 ? "1" : "0") : "-";
      return t;
    };
    const meets = (x: { mask: number; value: number }, y: { mask: number; value: number }) => ((x.value ^ y.value) & x.mask & y.mask) === 0;

    // Rows that disagree: one gives 0 and another 1 at a common input combination.
    for (let j = 0; j < outs.length && ok; j++) {
      const fullRows = new Map<number, Row>();
      const dashRows: Row[] = [];
      const given: Row[] = [];
      for (const r of rows) {
        if (r.outs[j] === "-") continue;
        let other: Row | undefined;
        if (r.mask === full) {
          const prev = fullRows.get(r.value);
          if (prev && prev.outs[j] !== r.outs[j]) other = prev;
          if (!prev) fullRows.set(r.value, r);
          other ??= dashRows.find((d) => d.outs[j] !== r.outs[j] && meets(d, r));
        } else {
          other = given.find((x) => x.outs[j] !== r.outs[j] && meets(x, r));
          dashRows.push(r);
        }
        given.push(r);
        if (other) {
          ok = false;
          const point = ((r.value | other.value) & (r.mask | other.mask)) >>> 0;
          const at = ins.map((d, i) => `${this.shown(d.name)}=${(point >>> i) & 1}`).join(" ");
          this.report(
            diag("GW1016", `rows ${other.index + 1} and ${r.index + 1} of the table disagree on '${this.shown(outs[j]!.name)}' at ${at}`, { file: this.file, span: r.span }, {
              hint: "give each input combination one value, or '-' to leave it free",
              related: [{ message: `row ${other.index + 1} gives ${other.outs[j]} here`, file: this.file, start: other.span.start, length: other.span.length }],
            }),
          );
          break;
        }
      }
    }
    if (!ok) return;

    const stSpan = spanOf(tokens, st.first, st.last);
    const made: { assignment: Assignment; dc?: DontCareSource }[] = [];
    for (let j = 0; j < outs.length; j++) {
      const out = outs[j]!;
      const terms: Expr[] = [];
      for (const r of rows) {
        if (r.outs[j] !== "1") continue;
        const lits: Expr[] = [];
        for (let i = 0; i < n; i++) {
          if (!((r.mask >>> i) & 1)) continue;
          const ref = build.ref(ins[i]!.name, ins[i]!.span);
          lits.push((r.value >>> i) & 1 ? ref : build.not(ref, ins[i]!.span));
        }
        terms.push(lits.length === 0 ? build.constant(1, r.span) : lits.length === 1 ? lits[0]! : build.nary("and", lits, r.span));
      }
      const expr = terms.length === 0 ? build.constant(0, stSpan) : terms.length === 1 ? terms[0]! : build.nary("or", terms, stSpan);
      const item: { assignment: Assignment; dc?: DontCareSource } = { assignment: { target: out.name, targetSpan: out.span, expr, span: stSpan } };
      // Don't-cares: the '-' rows less every row that gives a value.
      const givenRows = rows.filter((r) => r.outs[j] !== "-");
      const givenFull = new Set(givenRows.filter((r) => r.mask === full).map((r) => r.value));
      const givenDash = givenRows.filter((r) => r.mask !== full);
      const cubes = new Set<string>();
      for (const r of rows) {
        if (r.outs[j] !== "-") continue;
        if (r.mask === full) {
          if (!givenFull.has(r.value) && !givenDash.some((g) => meets(g, r))) cubes.add(cubeText(r.mask, r.value));
          continue;
        }
        let pieces = [{ mask: r.mask, value: r.value }];
        for (const g of givenRows) {
          if (!meets(g, r)) continue;
          const next: { mask: number; value: number }[] = [];
          for (const p of pieces) next.push(...sharpCube(p, g));
          pieces = next;
          if (pieces.length > MAX_DONT_CARE_CUBES) break;
        }
        for (const p of pieces) cubes.add(cubeText(p.mask, p.value));
        if (cubes.size > MAX_DONT_CARE_CUBES) break;
      }
      if (cubes.size > MAX_DONT_CARE_CUBES) {
        this.report(
          diag("GW1017", `the '-' rows of '${this.shown(out.name)}' break into more than ${MAX_DONT_CARE_CUBES} pieces around the rows that give values`, { file: this.file, span: out.span }, {
            hint: "write the don't-care rows with fewer '-' inputs",
          }),
        );
        return;
      }
      if (cubes.size) item.dc = { target: out.name, targetSpan: out.span, variables: ins, cubes: [...cubes], span: stSpan };
      made.push(item);
    }
    for (const m of made) {
      this.assignments.push(m.assignment);
      if (m.dc) this.dontCares.push(m.dc);
    }
  }

  private declare(direction: "input" | "output", names: RawNameList, tokens: StatementToken[]): void {
    const list: Token[] = [];
    for (let n: RawNameList | null = names; n; n = n.prev) list.push(tokens[n.at]!);
    list.reverse();
    for (const tok of list) {
      const span: Span = { start: tok.offset, length: tok.text.length };
      const first = this.declared.get(tok.text);
      if (first) {
        const as = first.direction === "input" ? "an input" : "an output";
        this.report(
          diag("GW2005", `${this.quote(tok)} is already declared as ${as}`, { file: this.file, span }, {
            related: [{ message: "first declared here", file: this.file, start: first.span.start, length: first.span.length }],
            ...(first.direction !== direction
              ? { hint: "a signal is either an input or an output; to pass an input through, assign it to an output of another name" }
              : {}),
          }),
        );
        continue;
      }
      this.declared.set(tok.text, { direction, span });
      (direction === "input" ? this.inputs : this.outputs).push({ name: tok.text, span });
    }
  }

  /** Builds the public tree without recursion; undefined when a constant is bad (reported). */
  private toExpr(root: RawExpr, tokens: StatementToken[]): Expr | undefined {
    // Two parallel stacks of work: a node to visit (arity -1), or a node whose `arity`
    // converted operands are on top of `results` and are to be combined. The stacks are
    // reused from statement to statement (they are empty again at the end).
    const { nodes, arities, results } = this.work;
    nodes.push(root);
    arities.push(-1);
    let ok = true;
    while (nodes.length) {
      let r = nodes.pop()!;
      const arity = arities.pop()!;
      while (r.t === "group") r = r.inner;
      const span = spanOf(tokens, r.first, r.last);
      if (arity >= 0) {
        if (r.t === "not") results.push(build.not(results.pop()!, span));
        else if (r.t === "bin") results.push(build.nary(r.op, results.splice(results.length - arity), span));
        continue;
      }
      switch (r.t) {
        case "ref":
          results.push(build.ref(tokens[r.first]!.text, span));
          break;
        case "num": {
          const tok = tokens[r.first]!;
          if (tok.text !== "0" && tok.text !== "1") {
            ok = false;
            this.report(
              diag("GW1007", `${this.quote(tok)} is not a constant: only 0 and 1 are allowed`, { file: this.file, span }),
            );
          }
          results.push(build.constant(tok.text === "1" ? 1 : 0, span));
          break;
        }
        case "not":
          nodes.push(r, r.arg);
          arities.push(1, -1);
          break;
        case "bin": {
          // A chain of one operator written without parentheses is one n-ary node: the chain is
          // the left spine of binary nodes of that operator (a parenthesised operand is a group).
          nodes.push(r);
          const at = arities.length;
          arities.push(0);
          let count = 0;
          let n: RawExpr = r;
          while (n.t === "bin" && n.op === r.op) {
            nodes.push(n.right); // last operand first, so that the first is visited first
            arities.push(-1);
            count++;
            n = n.left;
          }
          nodes.push(n);
          arities.push(-1);
          arities[at] = count + 1;
          break;
        }
      }
    }
    const expr = results.pop();
    return ok ? expr : undefined;
  }
}

function spanOf(tokens: Token[], first: number, last: number): Span {
  const start = tokens[first]!.offset;
  const end = tokens[last]!.offset + tokens[last]!.text.length;
  return { start, length: end - start };
}

/** The part of cube `a` outside cube `b`, as disjoint cubes (bit i of mask: variable i given). */
function sharpCube(a: { mask: number; value: number }, b: { mask: number; value: number }): { mask: number; value: number }[] {
  if ((a.value ^ b.value) & a.mask & b.mask) return [a];
  const out: { mask: number; value: number }[] = [];
  let mask = a.mask;
  let value = a.value;
  let free = (b.mask & ~a.mask) >>> 0;
  while (free) {
    const bit = (free & -free) >>> 0;
    free = (free & ~bit) >>> 0;
    out.push({ mask: (mask | bit) >>> 0, value: (value | (b.value & bit ? 0 : bit)) >>> 0 });
    mask = (mask | bit) >>> 0;
    value = (value | (b.value & bit)) >>> 0;
  }
  return out;
}
