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
import type { RawExpr, RawNameList, RawStatement, StatementToken } from "./equations-syntax.js";
import { diag, type Diagnostic, type RelatedInfo, type Span, type StageResult } from "../diagnostics/index.js";
import type { Assignment, Declaration, DesignSource, Expr } from "../syntax/index.js";
import { build } from "../syntax/index.js";

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
  ident: "a name",
  number: "a constant",
  lparen: "'('",
  notOp: "'!'",
  eq: "'='",
  comma: "','",
  rparen: "')'",
  semi: "';'",
};
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

type StatementKind = "declaration" | "assignment";

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
    let skipping = false; // the current statement already has an error; wait for ';'
    // Nesting depth (see MAX_NESTING).
    let level = 0;
    let notRun = 0;
    const levels: number[] = [];

    for (let tok = lexer.next(); tok !== undefined && !this.stopped; tok = lexer.next()) {
      const type = tok.type!;
      if (type === "ws" || type === "nl" || type === "lineComment" || type === "blockComment") continue;
      if (type === "openComment") {
        this.report(diag("GW1004", "this comment is never closed: '/*' without '*/'", this.at(tok.offset, 2)));
        return; // the comment runs to the end of the file; the statement it cut off is lost
      }
      if (skipping && type !== "semi") continue;
      if (type === "invalid") {
        this.report(this.invalidCharacter(tok));
        skipping = true;
        continue;
      }
      const st = tok as StatementToken;
      st.index = statement.length;
      statement.push(st);
      if (statement.length <= MAX_REUSED_TOKENS) shape += this.kindCode(type);
      if (type === "semi") {
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
    return first === "kwInput" || first === "kwOutput" ? "declaration" : "assignment";
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
    const kind = this.kindOf(tokens);
    let message: string;
    let hint: string | undefined;
    const related: RelatedInfo[] = [];
    if (previous && kinds.has("semi") && found.line > previous.line + previous.lineBreaks) {
      // The statement runs on into the next line: almost always a forgotten ';'.
      message = `expected ';' after the ${kind}, found ${this.quote(found)}`;
      hint = `every statement ends with ';' (is one missing at the end of line ${previous.line}?)`;
    } else {
      const expected = this.describeExpected(kinds);
      message = previous
        ? `expected ${expected} after ${this.quote(previous)}, found ${this.quote(found)}`
        : `expected ${expected}, found ${this.quote(found)}`;
    }
    const keyword = [found, previous].find((t) => t && (t.type === "kwInput" || t.type === "kwOutput"));
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
      diag("GW1002", message, this.at(found.offset, found.text.length), {
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
