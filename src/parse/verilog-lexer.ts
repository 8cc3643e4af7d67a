// The moo lexer for structural Verilog. It knows every token of IEEE 1364-2005 (keywords,
// operators, numbers, strings, system names, compiler directives) so that constructs outside
// the structural subset can be named in a GW1005 diagnostic instead of being called garbage.
import moo from "moo";

/** Reserved words of IEEE 1364-2005 (Annex B, from memory). */
export const VERILOG_KEYWORDS: readonly string[] = [
  "always", "and", "assign", "automatic", "begin", "buf", "bufif0", "bufif1", "case", "casex",
  "casez", "cell", "cmos", "config", "deassign", "default", "defparam", "design", "disable",
  "edge", "else", "end", "endcase", "endconfig", "endfunction", "endgenerate", "endmodule",
  "endprimitive", "endspecify", "endtable", "endtask", "event", "for", "force", "forever",
  "fork", "function", "generate", "genvar", "highz0", "highz1", "if", "ifnone", "incdir",
  "include", "initial", "inout", "input", "instance", "integer", "join", "large", "liblist",
  "library", "localparam", "macromodule", "medium", "module", "nand", "negedge", "nmos", "nor",
  "noshowcancelled", "not", "notif0", "notif1", "or", "output", "parameter", "pmos", "posedge",
  "primitive", "pull0", "pull1", "pulldown", "pullup", "pulsestyle_onevent",
  "pulsestyle_ondetect", "rcmos", "real", "realtime", "reg", "release", "repeat", "rnmos",
  "rpmos", "rtran", "rtranif0", "rtranif1", "scalared", "showcancelled", "signed", "small",
  "specify", "specparam", "strong0", "strong1", "supply0", "supply1", "table", "task", "time",
  "tran", "tranif0", "tranif1", "tri", "tri0", "tri1", "triand", "trior", "trireg", "unsigned",
  "use", "uwire", "vectored", "wait", "wand", "weak0", "weak1", "while", "wire", "wor", "xnor",
  "xor",
];

/**
 * Punctuation that is never the start of a longer token. moo matches these by a table lookup
 * on one character instead of running its regular expression (it does so only for
 * single-character literals in the first rules). Attribute brackets `(*` are therefore read as
 * `(` `*`; verilog-items.ts names them when it reports them.
 */
const PUNCTUATION = ["(", ")", "[", "]", "{", "}", ";", ",", ".", ":", "#", "@", "?"];

/** The other operators of IEEE 1364-2005 §5.1 (moo tries the longest first). */
const OPERATORS = [
  "===", "!==", "<<<", ">>>",
  "~^", "^~", "~&", "~|", "&&", "||", "==", "!=", "<=", ">=", "<<", ">>", "**", "->", "+:", "-:",
  "=", "~", "!", "&", "|", "^", "+", "-", "*", "/", "%", "<", ">",
];

/**
 * Token types. `ws` and the comments are dropped by the reader; `badComment` is an unterminated
 * block comment (GW1004), `badNumber` a malformed based number (GW1007), `invalid` one character
 * no rule matches (GW1001).
 */
export type VerilogTokenType =
  | "ws" | "lineComment" | "blockComment" | "badComment"
  | "based" | "badNumber" | "real" | "decimal"
  | "ident" | "keyword" | "escaped" | "system" | "directive" | "string"
  | "op" | "invalid"; // punctuation has the type "op" too

export const verilogLexer = moo.compile({
  punct: { match: PUNCTUATION, type: () => "op" },
  ws: { match: /[ \t\r\n\f\uFEFF]+/, lineBreaks: true },
  lineComment: /\/\/[^\n]*/,
  blockComment: { match: /\/\*[^]*?\*\//, lineBreaks: true },
  badComment: { match: /\/\*[^]*/, lineBreaks: true },
  based: /(?:[0-9][0-9_]*[ \t]*)?'[sS]?[bBoOdDhH][ \t]*[0-9a-fA-FxXzZ?][0-9a-fA-FxXzZ?_]*/,
  badNumber: /(?:[0-9][0-9_]*[ \t]*)?'[a-zA-Z0-9_?]+/,
  real: /[0-9][0-9_]*\.[0-9][0-9_]*(?:[eE][+-]?[0-9][0-9_]*)?|[0-9][0-9_]*[eE][+-]?[0-9][0-9_]*/,
  decimal: /[0-9][0-9_]*/,
  ident: {
    match: /[a-zA-Z_][a-zA-Z0-9_$]*/,
    type: moo.keywords({ keyword: VERILOG_KEYWORDS as string[] }),
  },
  escaped: /\\[!-~]+/,
  system: /\$[a-zA-Z0-9_$]+/,
  directive: /`[a-zA-Z_][a-zA-Z0-9_$]*/,
  string: /"(?:[^"\\\n]|\\[^\n])*"?/,
  op: OPERATORS,
  invalid: { match: /[^]/, lineBreaks: true },
});

export type VerilogToken = moo.Token;

/** A lexer of its own for one read (moo lexers keep state; `clone` is in moo, not its types). */
export function newVerilogLexer(): moo.Lexer {
  return (verilogLexer as moo.Lexer & { clone(): moo.Lexer }).clone();
}

/** Token types the grammar may name with `%type` (nearley asks the lexer with `has`). */
const GRAMMAR_TOKEN_TYPES = new Set<string>(["ident", "decimal", "based", "real"]);

/**
 * The lexer the compiled grammar names. Only `has` is used: src/parse/verilog.ts lexes the file
 * itself and hands nearley one item's tokens at a time through its own token feed.
 */
export const grammarLexer = {
  reset: (chunk: string, info?: unknown) => verilogLexer.reset(chunk, info as moo.LexerState | undefined),
  next: () => verilogLexer.next(),
  save: () => verilogLexer.save(),
  formatError: (token: moo.Token, message?: string) => verilogLexer.formatError(token, message),
  has: (tokenType: string) => GRAMMAR_TOKEN_TYPES.has(tokenType),
};

const BINARY_OPERATORS = new Set(["&", "|", "^", "~^", "^~", "&&", "||"]);
const UNARY_OPERATORS = new Set(["~", "!", "&", "~&", "|", "~|", "^", "~^", "^~"]);

/** Token tests for the grammar's `%binaryOp` and `%unaryOp`. */
export const tokenTests = {
  binaryOp: { test: (t: moo.Token) => t.type === "op" && BINARY_OPERATORS.has(t.text) },
  unaryOp: { test: (t: moo.Token) => t.type === "op" && UNARY_OPERATORS.has(t.text) },
};
