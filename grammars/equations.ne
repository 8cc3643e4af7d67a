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
#     F(a, b, c) = Σm(1, 3, 5) + d(7);
#                             a minterm function (see below)
#     table a, b : y, z { 00 : 1 0;  01 : 1 -;  1- : 0 1; }
#                             a truth table (see below)
#     init q = 0, r = 1;      starting values of state signals (see "State" below)
#     oscillator ring;        marks the loop through 'ring' as meant to oscillate
#     q = dff(d, clk);        a built-in state element (see "State" below)
#   Names: [A-Za-z_][A-Za-z0-9_.$]*; 'input', 'output', 'table', 'init' and 'oscillator' are
#   keywords.
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
# State
#   Feedback written as equations is kept as written; each loop is checked for a stable point
#   (a loop with none, such as a ring of three inverters, is an error, GW3004, unless one of its
#   signals is named in an `oscillator` declaration).
#   Built-in state elements, each a whole right-hand side (not part of an expression); the
#   arguments are expressions; set_n and reset_n are asynchronous and active low (write 1 for
#   one you do not need):
#     q = dff(d, clk);                    positive-edge-triggered D flip-flop
#     q = dff(d, clk, set_n, reset_n);
#     q = dlatch(d, en);                  transparent D latch (follows d while en = 1)
#     q = dlatch(d, en, set_n, reset_n);
#   An unknown function name or a wrong number of arguments is an error (see equations.ts).
#   They expand into NAND gates (src/sequential/elements.ts) whose outputs are named q.g1 ...
#   (q.n is the complement of q); other statements may read them.
#   `init q = 0;` gives the value a state signal starts with in the testbench (ngspice .ic);
#   a loop without one starts with its first state signal at 0.
#
# Minterm functions
#   F(a, b, c) = Σm(1, 3, 5) + d(7);     textbook form; '∑' also works for 'Σ'
#   F(a, b, c) = sum m(1, 3, 5) + d(7);  ASCII spelling ('sum' may be left out:
#   F(a, b, c) = m(1, 3, 5) d(7);          the groups may follow each other without '+')
#   G(a, b, c) = ΠM(0, 2, 4) * d(7);     maxterms: G is 0 exactly at 0, 2 and 4 ('∏' or 'prod')
#   The variables in parentheses must be declared inputs (GW2016), each listed once (GW2017);
#   the first is the most significant bit of a minterm number (F(a,b,c): 1 is a=0 b=0 c=1).
#   Groups: 'm' minterms where F is 1, 'M' maxterms where F is 0 (not both in one function),
#   'd', 'D' or 'dc' don't-cares. Numbers are decimal, 'lo-hi' is an inclusive range, a group
#   may be empty ('m()'). Between groups: '+', '|', '*', '&' or nothing.
#   Errors: a number that is not decimal or not below 2^variables (GW1010), a number listed
#   twice (GW1011), a number both in m (or M) and d (GW1012), a group name other than m, M, d
#   or one that does not fit the prefix (GW1013), more than MAX_FUNCTION_VARIABLES variables
#   or more than MAX_LISTED_POINTS numbers (GW1017).
#   Meaning: F is assigned the canonical sum of its minterms (or product of its maxterms), and
#   the don't-care points travel beside it (DesignSource.dontCares), so that the optimizer may
#   give F any value there.
#
# Truth tables
#   table a, b, c : y, z {      inputs, then ':', then the outputs the table assigns
#     0 0 0 : 1 0;              one row per ';': input values, ':', output values
#     001   : 1 -;              values may be run together; '-' as an output is a don't-care
#     01-   : 0 1;              '-' as an input: the row stands for both values
#     1--   : 0 -;
#   }                           ends the statement (a ';' after it is an empty statement)
#   Input columns must be declared inputs (GW2016); no name twice (GW2017). Input combinations
#   no row covers give 0 on every output. Rows may overlap where they agree; a combination
#   given 0 by one row and 1 by another is an error (GW1016), '-' yields to 0 or 1. A row with
#   the wrong number of values is GW1014, a value other than 0, 1 or '-' GW1015.
#   Meaning: each output is assigned the OR of the rows where it is 1 (as written), its '-'
#   points become don't-cares.
#   Inside '{ }' a ';' ends a row, not the statement; a keyword inside means a '}' is missing.
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
# example a state element `q = dff(d, clk);`), a RawStatement member in
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
    type: moo.keywords({ kwInput: "input", kwOutput: "output", kwTable: "table", kwInit: "init", kwOscillator: "oscillator" }),
  },
  sigma: ["Σ", "∑"],
  pi: ["Π", "∏"],
  lbrace: "{",
  rbrace: "}",
  colon: ":",
  dash: "-",
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
           | function    {% id %}
           | table       {% id %}
           | initDecl       {% id %}
           | oscillatorDecl {% id %}
           | elementAssign  {% id %}

declaration -> %kwInput nameList %semi  {% (d) => raw.declaration("input", d[0], d[1], d[2]) %}
             | %kwOutput nameList %semi {% (d) => raw.declaration("output", d[0], d[1], d[2]) %}

nameList -> %ident                  {% (d) => raw.names(null, d[0]) %}
          | nameList %comma %ident  {% (d) => raw.names(d[0], d[2]) %}

assignment -> %ident %eq expr %semi {% (d) => raw.assignment(d[0], d[2], d[3]) %}

# ---- state: initial values, intended oscillators, built-in state elements ---------------------

initDecl -> %kwInit initList %semi {% (d) => raw.initDecl(d[0], d[1], d[2]) %}

initList -> %ident %eq %number                   {% (d) => raw.initItem(null, d[0], d[2]) %}
          | initList %comma %ident %eq %number   {% (d) => raw.initItem(d[0], d[2], d[4]) %}

oscillatorDecl -> %kwOscillator nameList %semi {% (d) => raw.oscillatorDecl(d[0], d[1], d[2]) %}

# q = dff(d, clk);  the function name and argument count are checked in equations.ts.
elementAssign -> %ident %eq %ident %lparen argList %rparen %semi {% (d) => raw.call(d[0], d[2], d[4], d[6]) %}

argList -> expr                 {% (d) => raw.args(null, d[0]) %}
         | argList %comma expr  {% (d) => raw.args(d[0], d[2]) %}

# ---- minterm functions ------------------------------------------------------------------------

function -> %ident %lparen nameList %rparen %eq termList %semi {% (d) => raw.functionDef(d[0], d[2], d[5], d[6]) %}

# The first group may carry a prefix: 'Σ', 'Π', or a word ('sum', 'prod'; checked after parsing).
termList -> termGroup                   {% (d) => raw.termsFirst(null, d[0]) %}
          | %sigma termGroup            {% (d) => raw.termsFirst(d[0], d[1]) %}
          | %pi termGroup               {% (d) => raw.termsFirst(d[0], d[1]) %}
          | %ident termGroup            {% (d) => raw.termsFirst(d[0], d[1]) %}
          | termList termGroup          {% (d) => raw.termsMore(d[0], null, d[1]) %}
          | termList %orOp termGroup    {% (d) => raw.termsMore(d[0], d[1], d[2]) %}
          | termList %andOp termGroup   {% (d) => raw.termsMore(d[0], d[1], d[2]) %}

termGroup -> %ident %lparen %rparen             {% (d) => raw.termGroup(d[0], null, d[2]) %}
           | %ident %lparen termNumbers %rparen {% (d) => raw.termGroup(d[0], d[2], d[3]) %}

termNumbers -> termNumber                      {% (d) => raw.list(null, d[0]) %}
             | termNumbers %comma termNumber   {% (d) => raw.list(d[0], d[2]) %}

termNumber -> %number                 {% (d) => raw.termNumber(d[0], null) %}
            | %number %dash %number   {% (d) => raw.termNumber(d[0], d[2]) %}

# ---- truth tables -----------------------------------------------------------------------------

table -> %kwTable nameList %colon nameList %lbrace tableRows %rbrace {% (d) => raw.table(d[0], d[1], d[3], d[5], d[6]) %}

tableRows -> null                 {% () => null %}
           | tableRows tableRow   {% (d) => raw.list(d[0], d[1]) %}

tableRow -> tableCells %colon tableCells %semi {% (d) => raw.tableRow(d[0], d[2], d[3]) %}

tableCells -> tableCell               {% (d) => raw.list(null, d[0]) %}
            | tableCells tableCell    {% (d) => raw.list(d[0], d[1]) %}

tableCell -> %number {% (d) => d[0].index %}
           | %dash   {% (d) => d[0].index %}

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
