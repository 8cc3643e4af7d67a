# Grammar of gatewright equation files (*.logic), one statement at a time.
#
# The language
#   Comments: '#' or '//' to the end of the line, and /* block */ comments.
#   Statements end with ';' and may come in any order:
#     input a, b, c;          declares primary inputs (may repeat: input a; input b;)
#     output y, q;            declares primary outputs
#     t = a & !b;             assigns an expression to a signal; a signal that is neither
#                             input nor output is internal. Feedback (q = !(s & qn);
#                             qn = !(r & q);) is allowed here; the logic stage judges it.
#   Names: [A-Za-z_][A-Za-z0-9_.$]*; 'input' and 'output' are keywords.
#   Constants: 0 and 1 (any other number is an error, reported after parsing).
#   Operators, tightest first, all left-associative:
#     NOT  prefix '!' or '~', postfix '''   (a'' is a double NOT, (x)' works)
#     AND  '&' or '*'
#     XOR  '^'
#     OR   '|' or '+'
#   so  a | b & c ^ d  reads as  a | ((b & c) ^ d).
#   A chain of one operator written without parentheses is one n-ary node (a & b * c is
#   and(a, b, c)); parentheses keep their grouping ((a & b) & c is and(and(a, b), c)).
#   One statement may nest at most 2,000 levels (MAX_NESTING in equations.ts).
#
# How it is used (src/parse/equations.ts): the whole file is lexed once with the moo lexer
# below, the tokens are cut at each ';', and each statement is parsed on its own by a fresh
# Parser over this grammar, so memory stays proportional to one statement and one error does
# not hide the next. Whitespace and comment tokens never reach the parser.
#
# Postprocessors only call the O(1) builders in src/parse/equations-syntax.ts (the Earley
# parser runs them for partial parses too); n-ary flattening, spans of the final tree and
# constant checks happen afterwards in equations.ts.
#
# Two rules keep statement parses reusable (equations.ts parses each distinct sequence of token
# kinds once and reuses the result for later statements of the same shape, which halves the
# time for large generated files): match tokens by kind only (%kind, never a "literal"
# or a regular expression; equations.ts switches reuse off if the grammar has any), and let
# postprocessors record token positions (tok.index), never token text.
#
# Extending: add a statement kind as a new alternative of `statement` with its own rule (for
# example a state element `q = dff(d, clk);` or a truth-table block), a RawStatement member in
# equations-syntax.ts, and its conversion in equations.ts. New keywords go in the keyword
# table of the lexer; the error messages name token kinds through EXPECTED_WORDS in
# equations.ts, so give new token kinds a phrase there.

@preprocessor typescript

@{%
import moo from "moo";
import { raw } from "../equations-syntax.js";

/** Lexer for the whole file. Rule order matters: earlier rules win. */
export const equationLexer = moo.compile({
  ws: /[ \t\r\f\uFEFF]+/,
  nl: { match: /\n/, lineBreaks: true },
  lineComment: /(?:#|\/\/)[^\n]*/,
  blockComment: { match: /\/\*[^]*?\*\//, lineBreaks: true },
  // A '/*' without its '*/' swallows the rest of the file; the driver reports it.
  openComment: { match: /\/\*[^]*/, lineBreaks: true },
  // Digits followed by name characters form one token so that '12ab' is one bad constant.
  number: /[0-9][A-Za-z0-9_.$]*/,
  ident: {
    match: /[A-Za-z_][A-Za-z0-9_.$]*/,
    type: moo.keywords({ kwInput: "input", kwOutput: "output" }),
  },
  lparen: "(",
  rparen: ")",
  semi: ";",
  comma: ",",
  eq: "=",
  notOp: ["!", "~"],
  postNot: "'",
  andOp: ["&", "*"],
  xorOp: "^",
  orOp: ["|", "+"],
  // Any other single character (one UTF-16 unit); the driver reports it.
  invalid: { match: /[^]/, lineBreaks: true },
});

const lexer = equationLexer;
%}

@lexer lexer

# ---- statements -----------------------------------------------------------------------------

statement -> declaration {% id %}
           | assignment  {% id %}

declaration -> %kwInput nameList %semi  {% (d) => raw.declaration("input", d[0], d[1], d[2]) %}
             | %kwOutput nameList %semi {% (d) => raw.declaration("output", d[0], d[1], d[2]) %}

nameList -> %ident                  {% (d) => raw.names(null, d[0]) %}
          | nameList %comma %ident  {% (d) => raw.names(d[0], d[2]) %}

assignment -> %ident %eq expr %semi {% (d) => raw.assignment(d[0], d[2], d[3]) %}

# ---- expressions (loosest first) --------------------------------------------------------------

# `expr` is the OR level (no separate wrapper rule: every rule costs Earley states per token).
expr -> xorExpr                {% id %}
      | expr %orOp xorExpr     {% (d) => raw.bin("or", d[0], d[2]) %}

xorExpr -> andExpr               {% id %}
         | xorExpr %xorOp andExpr {% (d) => raw.bin("xor", d[0], d[2]) %}

andExpr -> notExpr               {% id %}
         | andExpr %andOp notExpr {% (d) => raw.bin("and", d[0], d[2]) %}

notExpr -> %notOp notExpr        {% (d) => raw.prefixNot(d[0], d[1]) %}
         | postfixExpr           {% id %}

postfixExpr -> primary              {% id %}
             | postfixExpr %postNot {% (d) => raw.postfixNot(d[0], d[1]) %}

primary -> %ident               {% (d) => raw.ref(d[0]) %}
         | %number              {% (d) => raw.num(d[0]) %}
         | %lparen expr %rparen {% (d) => raw.group(d[0], d[1], d[2]) %}
