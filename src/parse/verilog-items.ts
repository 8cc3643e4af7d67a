// Reading structural Verilog item by item: the token reader that cuts the stream into module
// items, the nesting limit, nearley parsing of one item (with derivation replay for repeated
// item shapes), and the wording of syntax and unsupported-construct diagnostics.
import nearley from "nearley";
import type { Token } from "moo";
import { diag, type Diagnostic, type Span } from "../diagnostics/index.js";
import compiled from "./generated/verilog.js";
import type { VItem } from "./verilog-ast.js";
import { STRUCTURAL_HINT } from "./verilog-expr.js";
import { newVerilogLexer, tokenTests } from "./verilog-lexer.js";

/** Deepest nesting of parentheses plus unary operators accepted in an expression (GW1006). */
export const MAX_NESTING = 2000;

// ---------------------------------------------------------------------------------------------
// Grammars: one per kind of item, all from the same compiled rules. The first token of an
// item says what it can be, so nearley starts from that rule and predicts less.

type StartRule =
  | "item"
  | "moduleHeader"
  | "endmodule"
  | "portDecl"
  | "wireDecl"
  | "gateStmt"
  | "assignStmt"
  | "instanceStmt";

const grammars = new Map<StartRule, nearley.Grammar>();
function grammarFor(start: StartRule): nearley.Grammar {
  let g = grammars.get(start);
  if (!g) {
    g = nearley.Grammar.fromCompiled({ ...compiled, ParserStart: start } as unknown as nearley.CompiledRules);
    grammars.set(start, g);
  }
  return g;
}

export const GATE_TYPES = new Set(["and", "nand", "or", "nor", "xor", "xnor", "not", "buf"]);
export const SUPPORTED_KEYWORDS = new Set(["module", "endmodule", "input", "output", "wire", "assign", ...GATE_TYPES]);

function startRuleFor(first: Token): StartRule {
  if (first.type === "ident") return "instanceStmt";
  if (first.type !== "keyword") return "item";
  switch (first.value) {
    case "module":
      return "moduleHeader";
    case "endmodule":
      return "endmodule";
    case "input":
    case "output":
      return "portDecl";
    case "wire":
      return "wireDecl";
    case "assign":
      return "assignStmt";
    default:
      return GATE_TYPES.has(first.value) ? "gateStmt" : "item";
  }
}

/** Hands nearley the tokens of one item (nearley's own feed would re-lex a string). */
class TokenFeed {
  private tokens: readonly Token[] = [];
  private i = 0;
  load(tokens: readonly Token[]): void {
    this.tokens = tokens;
    this.i = 0;
  }
  reset(): void {}
  next(): Token | undefined {
    return this.tokens[this.i++];
  }
  save(): Record<string, never> {
    return {};
  }
  formatError(): string {
    return "";
  }
  has(): boolean {
    return true;
  }
}

// ---------------------------------------------------------------------------------------------
// Descriptions of what the subset does not support (GW1005).

const KEYWORD_CONSTRUCTS: Record<string, string> = {
  always: "'always' blocks (behavioural code)",
  initial: "'initial' blocks (behavioural code)",
  reg: "'reg' variables",
  integer: "'integer' variables",
  real: "'real' variables",
  realtime: "'realtime' variables",
  time: "'time' variables",
  event: "named events",
  parameter: "parameters",
  localparam: "parameters",
  defparam: "parameter overrides ('defparam')",
  specparam: "specify parameters",
  generate: "generate blocks",
  genvar: "generate variables",
  function: "functions",
  task: "tasks",
  specify: "specify blocks (timing)",
  primitive: "user-defined primitives",
  table: "user-defined primitive tables",
  inout: "'inout' ports",
  supply0: "'supply0' nets",
  supply1: "'supply1' nets",
  tri: "'tri' nets",
  tri0: "'tri0' nets",
  tri1: "'tri1' nets",
  triand: "'triand' nets",
  trior: "'trior' nets",
  trireg: "'trireg' nets",
  wand: "'wand' nets",
  wor: "'wor' nets",
  uwire: "'uwire' nets",
  signed: "signed nets",
  unsigned: "'unsigned'",
  vectored: "'vectored' nets",
  scalared: "'scalared' nets",
  strong0: "drive strengths",
  strong1: "drive strengths",
  weak0: "drive strengths",
  weak1: "drive strengths",
  pull0: "drive strengths",
  pull1: "drive strengths",
  highz0: "drive strengths",
  highz1: "drive strengths",
  small: "charge strengths",
  medium: "charge strengths",
  large: "charge strengths",
  bufif0: "the tri-state primitive 'bufif0'",
  bufif1: "the tri-state primitive 'bufif1'",
  notif0: "the tri-state primitive 'notif0'",
  notif1: "the tri-state primitive 'notif1'",
  pullup: "the 'pullup' primitive",
  pulldown: "the 'pulldown' primitive",
  nmos: "switch primitives",
  pmos: "switch primitives",
  cmos: "switch primitives",
  rnmos: "switch primitives",
  rpmos: "switch primitives",
  rcmos: "switch primitives",
  tran: "switch primitives",
  tranif0: "switch primitives",
  tranif1: "switch primitives",
  rtran: "switch primitives",
  rtranif0: "switch primitives",
  rtranif1: "switch primitives",
  macromodule: "'macromodule'",
  config: "configurations",
  begin: "behavioural statements ('begin')",
  fork: "behavioural statements ('fork')",
  if: "behavioural statements ('if')",
  case: "behavioural statements ('case')",
  casex: "behavioural statements ('casex')",
  casez: "behavioural statements ('casez')",
  for: "behavioural statements ('for')",
  while: "behavioural statements ('while')",
  repeat: "behavioural statements ('repeat')",
  forever: "behavioural statements ('forever')",
  posedge: "event control ('posedge')",
  negedge: "event control ('negedge')",
  force: "'force'",
  release: "'release'",
  deassign: "'deassign'",
  wait: "'wait'",
  disable: "'disable'",
};

const OPERATOR_CONSTRUCTS: Record<string, string> = {
  "{": "concatenation and replication ('{...}')",
  "}": "concatenation and replication ('{...}')",
  "@": "event control ('@')",
  "?": "the conditional operator ('?:')",
  "->": "event triggers ('->')",
  "+:": "indexed part-selects ('+:')",
  "-:": "indexed part-selects ('-:')",
  "<=": "the operator '<=' (non-blocking assignment or comparison)",
};
for (const op of ["+", "-", "*", "/", "%", "**"]) OPERATOR_CONSTRUCTS[op] = `the arithmetic operator '${op}'`;
for (const op of ["<<", ">>", "<<<", ">>>"]) OPERATOR_CONSTRUCTS[op] = `the shift operator '${op}'`;
for (const op of ["<", ">", ">=", "==", "!=", "===", "!=="]) OPERATOR_CONSTRUCTS[op] = `the comparison operator '${op}'`;

/** Keywords that open a block; reading skips the whole block after reporting it. */
const BLOCK_END: Record<string, string> = {
  generate: "endgenerate",
  function: "endfunction",
  task: "endtask",
  specify: "endspecify",
  primitive: "endprimitive",
  table: "endtable",
  config: "endconfig",
};
const STATEMENT_BLOCKS = new Set(["always", "initial", "begin", "fork", "case", "casex", "casez"]);
const OPENERS: Record<string, string> = { begin: "end", fork: "join", case: "endcase", casex: "endcase", casez: "endcase" };
const CLOSERS = new Set(["end", "join", "endcase"]);

export function tokSpan(t: Token): Span {
  return { start: t.offset, length: t.text.length };
}

export function show(t: Token): string {
  const s = t.text.length > 40 ? t.text.slice(0, 37) + "..." : t.text;
  return `'${s}'`;
}

// ---------------------------------------------------------------------------------------------

export interface RawItem {
  tokens: Token[];
  /** The token that ended the item without belonging to it (`module`, `endmodule`), if any. */
  stoppedBy?: Token;
  /** Ended at the end of the file without `;`. */
  atEof: boolean;
  /** Has a token that could not be read (already reported). */
  tainted: boolean;
  /** A construct that was reported and skipped as a whole. */
  skipped: boolean;
}

export class Reader {
  private readonly lexer = newVerilogLexer();
  private peeked: Token | undefined | null = null; // null: nothing peeked yet
  private invalidRun: { start: number; end: number } | null = null;
  /** Set when a lexical error was reported since the last item began. */
  private taint = false;
  eof = false;
  unterminatedComment = false;

  constructor(
    private readonly text: string,
    private readonly out: Diagnostic[],
    private readonly file: string,
  ) {
    this.lexer.reset(text);
  }

  private flushInvalid(): void {
    if (!this.invalidRun) return;
    const { start, end } = this.invalidRun;
    this.invalidRun = null;
    const chars = this.text.slice(start, end);
    const code = chars.codePointAt(0)!;
    const what = code > 0x7e ? `U+${code.toString(16).toUpperCase().padStart(4, "0")} '${chars}'` : `'${chars}'`;
    this.out.push(
      diag("GW1001", `unexpected character ${what}`, { file: this.file, span: { start, length: end - start } }, {
        hint: code > 0x7e ? "Verilog names and operators use ASCII characters only" : undefined,
      }),
    );
    this.taint = true;
  }

  /** Next significant token; reports lexical errors on the way. */
  private pull(): Token | undefined {
    for (;;) {
      const t = this.lexer.next();
      if (!t) {
        this.flushInvalid();
        this.eof = true;
        return undefined;
      }
      switch (t.type) {
        case "ws":
        case "lineComment":
        case "blockComment":
          this.flushInvalid();
          continue;
        case "invalid":
          if (this.invalidRun && this.invalidRun.end === t.offset) this.invalidRun.end = t.offset + t.text.length;
          else {
            this.flushInvalid();
            this.invalidRun = { start: t.offset, end: t.offset + t.text.length };
          }
          continue;
        case "badComment":
          this.flushInvalid();
          this.out.push(
            diag("GW1004", "this comment is never closed", { file: this.file, span: { start: t.offset, length: 2 } }, {
              hint: "close it with */",
            }),
          );
          this.unterminatedComment = true;
          this.taint = true;
          continue;
        case "badNumber":
          this.flushInvalid();
          this.out.push(
            diag("GW1007", `${show(t)} is not a valid number`, { file: this.file, span: tokSpan(t) }, {
              hint: "a based number is written size'base digits, e.g. 1'b0",
            }),
          );
          this.taint = true;
          continue;
        default:
          this.flushInvalid();
          return t;
      }
    }
  }

  peek(): Token | undefined {
    if (this.peeked === null) this.peeked = this.pull();
    return this.peeked;
  }

  take(): Token | undefined {
    const t = this.peek();
    this.peeked = null;
    return t;
  }

  /** Reads the next item, or undefined at the end of the file. */
  next(): RawItem | undefined {
    this.taint = false;
    const first = this.take();
    if (!first) return undefined;
    const item: RawItem = { tokens: [first], atEof: false, tainted: false, skipped: false };

    if (first.type === "directive") {
      // A compiler directive runs to the end of its line.
      this.report1005(first, `the compiler directive ${show(first)}`, "remove compiler directives; gatewright reads one self-contained file");
      while (this.peek() && this.peek()!.line === first.line) this.take();
      item.skipped = true;
      return item;
    }
    if (first.type === "keyword" && first.value === "endmodule") return item;
    if (first.type === "keyword" && (BLOCK_END[first.value] || STATEMENT_BLOCKS.has(first.value))) {
      this.report1005(first, KEYWORD_CONSTRUCTS[first.value]!);
      this.skipBlock(first);
      item.skipped = true;
      return item;
    }
    let last = first;
    while (last.text !== ";") {
      const t = this.peek();
      if (!t) {
        item.atEof = true;
        break;
      }
      if (t.type === "keyword" && (t.value === "module" || t.value === "endmodule" || t.value === "macromodule")) {
        item.stoppedBy = t;
        break;
      }
      this.take();
      item.tokens.push(t);
      last = t;
    }
    item.tainted = this.taint;
    return item;
  }

  private report1005(at: Token, what: string, hint = STRUCTURAL_HINT): void {
    this.out.push(diag("GW1005", `unsupported construct: ${what}`, { file: this.file, span: tokSpan(at) }, { hint }));
  }

  /** Skips a whole unsupported block or statement, stopping before `module`/`endmodule`. */
  private skipBlock(first: Token): void {
    const stopHere = (t: Token | undefined) =>
      !t || (t.type === "keyword" && (t.value === "module" || t.value === "endmodule" || t.value === "macromodule"));
    const endWord = BLOCK_END[first.value];
    if (endWord) {
      let depth = 1;
      while (!stopHere(this.peek())) {
        const t = this.take()!;
        if (t.type !== "keyword") continue;
        if (t.value === first.value) depth++;
        else if (t.value === endWord && --depth === 0) return;
      }
      return;
    }
    // A behavioural statement: up to the `;` or the closing word at depth 0 (an `else` after
    // it continues the statement).
    let depth = first.type === "keyword" && OPENERS[first.value] ? 1 : 0;
    for (;;) {
      if (stopHere(this.peek())) return;
      const t = this.take()!;
      if (t.type === "keyword" && OPENERS[t.value]) depth++;
      else if (t.type === "keyword" && CLOSERS.has(t.value)) depth = Math.max(0, depth - 1);
      const ended = depth === 0 && (t.text === ";" || (t.type === "keyword" && CLOSERS.has(t.value)));
      if (ended) {
        const n = this.peek();
        if (n && n.type === "keyword" && n.value === "else") continue;
        return;
      }
    }
  }
}

// ---------------------------------------------------------------------------------------------

/** Deepest nesting of parentheses and unary operators in an item, and where it is exceeded. */
export function nestingTooDeep(tokens: readonly Token[]): Token | undefined {
  // Each open parenthesis keeps the count of unary operators waiting for their operand.
  const pendingUnary: number[] = [0];
  let depth = 0;
  let operandExpected = true;
  for (const t of tokens) {
    if (t.type === "op") {
      switch (t.text) {
        case "(":
          pendingUnary.push(0);
          depth++;
          operandExpected = true;
          break;
        case ")": {
          depth -= 1 + (pendingUnary.length > 1 ? pendingUnary.pop()! : 0);
          const top = pendingUnary.length - 1;
          depth -= pendingUnary[top]!;
          pendingUnary[top] = 0;
          operandExpected = false;
          break;
        }
        case "~":
        case "!":
        case "~&":
        case "~|":
          pendingUnary[pendingUnary.length - 1]!++;
          depth++;
          operandExpected = true;
          break;
        case "&":
        case "|":
        case "^":
        case "~^":
        case "^~":
          if (operandExpected) {
            pendingUnary[pendingUnary.length - 1]!++;
            depth++;
          }
          operandExpected = true;
          break;
        case "[":
        case "]":
          break;
        default:
          operandExpected = true;
      }
    } else if (t.type === "ident" || t.type === "decimal" || t.type === "based" || t.type === "real") {
      const top = pendingUnary.length - 1;
      depth -= pendingUnary[top]!;
      pendingUnary[top] = 0;
      operandExpected = false;
    }
    if (depth > MAX_NESTING) return t;
  }
  return undefined;
}

export type ParseOutcome =
  | { ok: true; item: VItem }
  | { ok: false; token: Token | undefined; expected: string[] };

const feed = new TokenFeed();

// --- Derivation replay ------------------------------------------------------------------------
// Netlists repeat a handful of item shapes (`nand name ( name , name , name ) ;`) thousands of
// times. The grammar matches a token by its type (`%ident`, numbers) or by its text (keywords,
// operators), so two items whose tokens agree on that "shape" have the same derivation. The
// first item of each shape is parsed by nearley with recording postprocessors; the recorded
// derivation is kept as a small post-order program, and every later item of that shape runs
// the grammar's real postprocessors along it. The results are the ones nearley would build;
// nearley's per-token Earley states are simply not rebuilt 100,000 times.

const SHAPE_CACHE_LIMIT = 4096;
const SHAPE_MAX_TOKENS = 128;

interface Recorded {
  rule: number;
  d: unknown[];
}

const recordingGrammars = new Map<StartRule, nearley.Grammar>();
function recordingGrammarFor(start: StartRule): nearley.Grammar {
  let g = recordingGrammars.get(start);
  if (!g) {
    const rules = compiled.ParserRules.map((rule, i) => ({ ...rule, postprocess: (d: unknown[]): Recorded => ({ rule: i, d }) }));
    g = nearley.Grammar.fromCompiled({ ...compiled, ParserRules: rules, ParserStart: start } as unknown as nearley.CompiledRules);
    recordingGrammars.set(start, g);
  }
  return g;
}

/** Post-order program: a value >= 0 is `rule * 16 + argc`; a negative value -(i+1) is token i. */
type Program = number[];

/**
 * The shape cache, a trie over token codes: a token of a type the grammar matches by type
 * (`ident`, numbers) has the code of its type, any other token the code of its text. Walking it
 * allocates nothing per item (a joined string key cost a string per item).
 */
interface ShapeNode {
  next: Map<number, ShapeNode>;
  program?: Program;
}
const shapeRoot: ShapeNode = { next: new Map() };
let shapeCount = 0;
/** Codes of token texts seen in cached shapes (codes 0-3 are the token types matched by type). */
const textCodes = new Map<string, number>();

function typeCode(ty: string | undefined): number {
  return ty === "ident" ? 0 : ty === "decimal" ? 1 : ty === "based" ? 2 : ty === "real" ? 3 : -1;
}

function cachedProgram(tokens: readonly Token[]): Program | undefined {
  let node: ShapeNode | undefined = shapeRoot;
  for (let i = 0; i < tokens.length && node; i++) {
    const t = tokens[i]!;
    let code = typeCode(t.type);
    if (code < 0) {
      const c = textCodes.get(t.text);
      if (c === undefined) return undefined;
      code = c;
    }
    node = node.next.get(code);
  }
  return node?.program;
}

function cacheProgram(tokens: readonly Token[], program: Program): void {
  let node = shapeRoot;
  for (const t of tokens) {
    let code = typeCode(t.type);
    if (code < 0) {
      code = textCodes.get(t.text) ?? textCodes.size + 4;
      textCodes.set(t.text, code);
    }
    let child = node.next.get(code);
    if (!child) {
      child = { next: new Map() };
      node.next.set(code, child);
    }
    node = child;
  }
  if (!node.program) shapeCount++;
  node.program = program;
}

function compileProgram(root: Recorded, tokens: readonly Token[]): Program {
  const index = new Map<unknown, number>();
  tokens.forEach((t, i) => index.set(t, i));
  const program: Program = [];
  // Iterative post-order walk over the recorded derivation.
  const stack: { node: Recorded; next: number }[] = [{ node: root, next: 0 }];
  while (stack.length) {
    const top = stack[stack.length - 1]!;
    if (top.next < top.node.d.length) {
      const child = top.node.d[top.next++];
      const ti = index.get(child);
      if (ti !== undefined) program.push(-(ti + 1));
      else stack.push({ node: child as Recorded, next: 0 });
      continue;
    }
    stack.pop();
    const argc = top.node.d.length;
    if (argc >= 16) throw new Error("grammar rule with 16 or more symbols");
    // `{% id %}` on one symbol passes its value through: nothing to run.
    if (argc === 1 && passThrough && compiled.ParserRules[top.node.rule]!.postprocess === passThrough) continue;
    program.push(top.node.rule * 16 + argc);
  }
  return program;
}

/** The generated grammar's `id` postprocessor (the one `{% id %}` names). */
const passThrough = compiled.ParserRules.map((r) => r.postprocess).find((f) => f?.name === "id");

function replay(program: Program, tokens: readonly Token[]): unknown {
  const rules = compiled.ParserRules;
  const values: unknown[] = [];
  for (const ins of program) {
    if (ins < 0) {
      values.push(tokens[-ins - 1]);
      continue;
    }
    const argc = ins % 16;
    const rule = rules[(ins - argc) / 16]!;
    const args = values.splice(values.length - argc, argc);
    values.push(rule.postprocess ? rule.postprocess(args) : args);
  }
  return values[0];
}

/**
 * Parses one item's tokens. `useShapes` false always runs nearley with the real
 * postprocessors (tests compare both ways).
 */
export function parseItem(tokens: readonly Token[], useShapes = true): ParseOutcome {
  const start = startRuleFor(tokens[0]!);
  const cacheable = useShapes && tokens.length <= SHAPE_MAX_TOKENS;
  if (cacheable) {
    const program = cachedProgram(tokens);
    if (program) return { ok: true, item: replay(program, tokens) as VItem };
  }
  const recording = cacheable && shapeCount < SHAPE_CACHE_LIMIT;
  const parser = new nearley.Parser(recording ? recordingGrammarFor(start) : grammarFor(start), { lexer: feed });
  // nearley's own error text walks the whole parse stack; we describe errors ourselves.
  const p = parser as unknown as {
    reportError: () => string;
    reportLexerError: () => string;
    table: { scannable: { rule: { symbols: unknown[] }; dot: number }[] }[];
    current: number;
  };
  p.reportError = () => "syntax error";
  p.reportLexerError = () => "syntax error";
  feed.load(tokens);
  let failed: Token | undefined;
  let threw = false;
  try {
    parser.feed("");
  } catch (e) {
    // nearley marks a syntax error with the token it could not use; anything else is a bug.
    if (!(e instanceof Error) || !("token" in e)) throw e;
    threw = true;
    failed = (e as { token?: Token }).token;
  }
  if (!threw && parser.results.length > 0) {
    if (!recording) return { ok: true, item: parser.results[0] as VItem };
    const program = compileProgram(parser.results[0] as Recorded, tokens);
    cacheProgram(tokens, program);
    return { ok: true, item: replay(program, tokens) as VItem };
  }
  const column = p.table[p.current];
  return { ok: false, token: failed, expected: describeExpected(column ? column.scannable : []) };
}

/** Elements per piece when a long list statement is parsed in pieces. */
const LIST_PIECE = 32;

/**
 * Parses one item. A long list statement (`wire n1, n2, ... n100000;`, or many gate instances,
 * assignments or module instances in one statement) is parsed in pieces of LIST_PIECE elements,
 * each piece being the statement's head, some elements and its `;`, and the pieces' lists are
 * joined. Parsing stays linear, and the pieces share shapes, so they replay.
 */
export function parseStatement(tokens: readonly Token[]): ParseOutcome {
  const n = tokens.length;
  if (n <= SHAPE_MAX_TOKENS || tokens[n - 1]!.text !== ";") return parseItem(tokens);
  const first = tokens[0]!;
  let head = 1;
  if (first.type === "keyword" && (first.value === "input" || first.value === "output" || first.value === "wire")) {
    if (first.value !== "wire" && tokens[head]?.type === "keyword" && tokens[head]!.value === "wire") head++;
    if (tokens[head]?.text === "[") {
      while (head < n && tokens[head]!.text !== "]") head++;
      head++;
    }
  } else if (first.type === "keyword" && (first.value === "assign" || GATE_TYPES.has(first.value))) {
    if (tokens[1]?.text === "#") return parseItem(tokens);
  } else if (first.type === "ident") {
    if (tokens[1]?.text === "#") return parseItem(tokens);
  } else return parseItem(tokens);
  // Cut the elements at commas outside brackets.
  const starts: number[] = [head];
  let depth = 0;
  for (let i = head; i < n - 1; i++) {
    const t = tokens[i]!.text;
    if (t === "(" || t === "[" || t === "{") depth++;
    else if (t === ")" || t === "]" || t === "}") depth--;
    else if (t === "," && depth === 0) starts.push(i + 1);
  }
  if (starts.length <= LIST_PIECE) return parseItem(tokens);
  const prefix = tokens.slice(0, head);
  const last = tokens[n - 1]!;
  const pieces: VItem[] = [];
  for (let k = 0; k < starts.length; k += LIST_PIECE) {
    const from = starts[k]!;
    const to = k + LIST_PIECE < starts.length ? starts[k + LIST_PIECE]! - 1 : n - 1; // excludes the cutting comma
    const outcome = parseItem(prefix.concat(tokens.slice(from, to), [last]));
    if (!outcome.ok) return outcome;
    pieces.push(outcome.item);
  }
  const all = <T,>(list: (it: VItem) => readonly T[] | undefined): T[] => {
    const out: T[] = [];
    for (const p of pieces) for (const x of list(p) ?? []) out.push(x);
    return out;
  };
  const one = pieces[0]!;
  switch (one.k) {
    case "port":
      return { ok: true, item: { ...one, names: all((p) => (p.k === "port" ? p.names : undefined)) } };
    case "wire":
      return { ok: true, item: { ...one, items: all((p) => (p.k === "wire" ? p.items : undefined)) } };
    case "gate":
      return { ok: true, item: { ...one, instances: all((p) => (p.k === "gate" ? p.instances : undefined)) } };
    case "assign":
      return { ok: true, item: { ...one, assigns: all((p) => (p.k === "assign" ? p.assigns : undefined)) } };
    case "instance":
      return { ok: true, item: { ...one, instances: all((p) => (p.k === "instance" ? p.instances : undefined)) } };
    default:
      return parseItem(tokens);
  }
}

function describeExpected(states: { rule: { symbols: unknown[] }; dot: number }[]): string[] {
  const seen = new Set<string>();
  for (const s of states) {
    const sym = s.rule.symbols[s.dot] as { literal?: string; type?: string; test?: unknown } | undefined;
    if (!sym) continue;
    if (sym.literal !== undefined) seen.add(`'${sym.literal}'`);
    else if (sym.type === "ident") seen.add("a name");
    else if (sym.type === "decimal" || sym.type === "based" || sym.type === "real") seen.add("a number");
    else if (sym.test === tokenTestUnary) seen.add("unary");
    else if (sym.test === tokenTestBinary) seen.add("an operator");
  }
  // An expression can start with a name, a number, '(' or a unary operator: say "an expression".
  if (seen.has("unary") && seen.has("a name") && seen.has("'('")) {
    for (const k of ["unary", "a name", "a number", "'('"]) seen.delete(k);
    seen.add("an expression");
  }
  seen.delete("unary");
  const order = (s: string) => (s.startsWith("'") ? 1 : 0);
  return [...seen].sort((a, b) => order(a) - order(b) || a.localeCompare(b));
}

const tokenTestUnary = tokenTests.unaryOp.test;
const tokenTestBinary = tokenTests.binaryOp.test;

export function orList(xs: readonly string[]): string {
  if (xs.length <= 1) return xs[0] ?? "something else";
  return `${xs.slice(0, -1).join(", ")} or ${xs[xs.length - 1]}`;
}

/** The diagnostic for an item nearley rejected at `token` (the first token it could not use). */
export function syntaxDiagnostic(tokens: readonly Token[], token: Token, expected: string[], file: string): Diagnostic {
  const at = { file, span: tokSpan(token) };
  const idx = tokens.indexOf(token);
  const prev = idx > 0 ? tokens[idx - 1] : undefined;
  const next = idx >= 0 ? tokens[idx + 1] : undefined;
  const structural = { hint: STRUCTURAL_HINT };
  if (token.type === "keyword" && !SUPPORTED_KEYWORDS.has(token.value)) {
    return diag("GW1005", `unsupported construct: ${KEYWORD_CONSTRUCTS[token.value] ?? `the keyword '${token.value}'`}`, at, structural);
  }
  if (token.type === "op" && token.text === "(" && next?.type === "keyword" && KEYWORD_CONSTRUCTS[next.value]?.includes("strength")) {
    return diag("GW1005", "unsupported construct: drive strengths", { file, span: tokSpan(next) }, structural);
  }
  if (token.type === "op" && token.text === "#") {
    const delay = prev === undefined || (prev.type === "keyword" && (GATE_TYPES.has(prev.value) || prev.value === "assign" || prev.value === "wire"));
    return delay
      ? diag("GW1005", "unsupported construct: delays ('#')", at, {
          hint: "timing comes from the sized circuit, not from the source; remove the delay",
        })
      : diag("GW1005", "unsupported construct: parameter values ('#(...)')", at, {
          hint: "modules have no parameters in gate-level netlists; write the module for the size you need",
        });
  }
  if (token.type === "op" && token.text === ":" && prev?.type === "decimal" && tokens[idx - 2]?.text === "[") {
    return diag("GW1005", "unsupported construct: part-selects ('a[m:n]')", { file, span: { start: tokens[idx - 2]!.offset, length: 1 } }, {
      hint: "select one bit at a time, e.g. a[3]",
    });
  }
  if (token.type === "op" && token.text === "." && prev?.type === "ident" && next?.type === "ident") {
    return diag("GW1005", "unsupported construct: hierarchical names ('a.b')", at, {
      hint: "connect through the ports of the instance instead",
    });
  }
  const attributeAt =
    token.text === "(" && next?.text === "*" && next.offset === token.offset + 1
      ? token
      : token.text === "*" && prev?.text === "(" && prev.offset + 1 === token.offset
        ? prev
        : undefined;
  if (attributeAt) {
    return diag("GW1005", "unsupported construct: attributes ('(* ... *)')", { file, span: { start: attributeAt.offset, length: 2 } }, {
      hint: "remove the attribute; gatewright reads structural gate-level Verilog",
    });
  }
  if (token.type === "op" && OPERATOR_CONSTRUCTS[token.text]) {
    return diag("GW1005", `unsupported construct: ${OPERATOR_CONSTRUCTS[token.text]}`, at, structural);
  }
  if (token.type === "string") return diag("GW1005", "unsupported construct: strings", at, structural);
  if (token.type === "system") return diag("GW1005", `unsupported construct: the system task or function ${show(token)}`, at, structural);
  if (token.type === "directive") return diag("GW1005", `unsupported construct: the macro or directive ${show(token)}`, at, structural);
  if (token.type === "escaped") {
    return diag("GW1005", `unsupported construct: the escaped name ${show(token)}`, at, {
      hint: "use plain names: a letter or '_' followed by letters, digits, '_' or '$'",
    });
  }
  const found = token.text === ";" ? "';'" : show(token);
  const extra: { hint?: string } = {};
  if (idx === 0) {
    return diag("GW1002", `expected a declaration, a gate, an 'assign', a module instance or 'endmodule' but found ${found}`, at, { hint: STRUCTURAL_HINT });
  }
  if (token.text === "=" && idx === 1 && tokens[0]!.type === "ident") extra.hint = "a continuous assignment starts with 'assign'";
  if (token.type === "keyword" && token.value === "module") extra.hint = "is an 'endmodule' missing?";
  return diag("GW1002", `expected ${orList(expected)} but found ${found}`, at, extra);
}

