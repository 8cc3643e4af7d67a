// Intermediate parse nodes built by the postprocessors of grammars/equations.ne.
//
// The Earley parser runs a postprocessor every time it completes a rule, including for
// partial parses that are later thrown away, so each builder here does O(1) work and never
// mutates its inputs: operator chains are kept as left-leaning binary nodes and name lists as
// linked lists. parseEquations turns the one surviving parse into the public tree
// (src/syntax/tree.ts) afterwards, without recursion: flattening chains, computing spans and
// checking constants there.
//
// Nodes refer to tokens by their position in the statement (`StatementToken.index`), never
// to token text or offsets. A parse therefore depends only on the sequence of token kinds,
// which lets parseEquations reuse it for every later statement of the same shape.
import type { Token } from "moo";

/** A token of one statement, numbered from 0 within the statement. */
export interface StatementToken extends Token {
  index: number;
}

/** Operator of an n-ary node. */
export type EqOperator = "and" | "or" | "xor";

/** `first` and `last` are the indices of the node's first and last tokens. */
export type RawExpr =
  | { t: "ref"; first: number; last: number }
  | { t: "num"; first: number; last: number }
  /** A parenthesised expression; first/last are the parentheses. */
  | { t: "group"; inner: RawExpr; first: number; last: number }
  | { t: "not"; arg: RawExpr; first: number; last: number }
  | { t: "bin"; op: EqOperator; left: RawExpr; right: RawExpr; first: number; last: number };

/** Names of a declaration, last name first (a linked list, so that appending is O(1)). */
export interface RawNameList {
  /** Token index of the name. */
  at: number;
  prev: RawNameList | null;
}

/** A linked list, last item first (appending is O(1)). */
export interface RawList<T> {
  item: T;
  prev: RawList<T> | null;
}

/** A minterm number or an inclusive range `lo-hi`: token indices. */
export interface RawTermNumber {
  first: number;
  /** The `hi` token of a range. */
  last: number | null;
}

/** `m(1, 3, 5)`: the group's name token, its numbers and its closing parenthesis. */
export interface RawTermGroup {
  name: number;
  numbers: RawList<RawTermNumber> | null;
  close: number;
}

/** The groups of a minterm function, with the prefix token ('Σ', 'Π', 'sum', 'prod') if any. */
export interface RawTermList {
  prefix: number | null;
  groups: RawList<{ group: RawTermGroup; sep: number | null }>;
}

/** A truth-table row: tokens of the input values, of the output values, the ':' and the ';'. */
export interface RawTableRow {
  inputs: RawList<number>;
  outputs: RawList<number>;
  last: number;
}

/** One statement. New statement kinds (state elements) add a member here and a rule under
 *  `statement` in the grammar. */
export type RawStatement =
  | { t: "decl"; direction: "input" | "output"; names: RawNameList; first: number; last: number }
  | { t: "assign"; target: number; expr: RawExpr; first: number; last: number }
  | { t: "function"; target: number; variables: RawNameList; terms: RawTermList; first: number; last: number }
  | {
      t: "table";
      inputs: RawNameList;
      outputs: RawNameList;
      rows: RawList<RawTableRow> | null;
      first: number;
      last: number;
    }
  /** `init q = 0, r = 1;` */
  | { t: "init"; items: RawList<{ name: number; value: number }>; first: number; last: number }
  /** `oscillator ring;` */
  | { t: "oscillator"; names: RawNameList; first: number; last: number }
  /** `q = dff(d, clk);`: a built-in state element. */
  | { t: "call"; target: number; fn: number; args: RawList<RawExpr>; first: number; last: number };

type Tok = StatementToken;

/** Builders called from the grammar's postprocessors. They must look only at token kinds and
 *  indices (see the note at the top of this file). */
export const raw = {
  ref(tok: Tok): RawExpr {
    return { t: "ref", first: tok.index, last: tok.index };
  },
  num(tok: Tok): RawExpr {
    return { t: "num", first: tok.index, last: tok.index };
  },
  group(open: Tok, inner: RawExpr, close: Tok): RawExpr {
    return { t: "group", inner, first: open.index, last: close.index };
  },
  prefixNot(op: Tok, arg: RawExpr): RawExpr {
    return { t: "not", arg, first: op.index, last: arg.last };
  },
  postfixNot(arg: RawExpr, op: Tok): RawExpr {
    return { t: "not", arg, first: arg.first, last: op.index };
  },
  bin(op: EqOperator, left: RawExpr, right: RawExpr): RawExpr {
    return { t: "bin", op, left, right, first: left.first, last: right.last };
  },
  names(prev: RawNameList | null, tok: Tok): RawNameList {
    return { at: tok.index, prev };
  },
  declaration(direction: "input" | "output", keyword: Tok, names: RawNameList, semi: Tok): RawStatement {
    return { t: "decl", direction, names, first: keyword.index, last: semi.index };
  },
  assignment(target: Tok, expr: RawExpr, semi: Tok): RawStatement {
    return { t: "assign", target: target.index, expr, first: target.index, last: semi.index };
  },
  list<T>(prev: RawList<T> | null, item: T): RawList<T> {
    return { item, prev };
  },
  termNumber(first: Tok, last: Tok | null): RawTermNumber {
    return { first: first.index, last: last ? last.index : null };
  },
  termGroup(name: Tok, numbers: RawList<RawTermNumber> | null, close: Tok): RawTermGroup {
    return { name: name.index, numbers, close: close.index };
  },
  termsFirst(prefix: Tok | null, group: RawTermGroup): RawTermList {
    return { prefix: prefix ? prefix.index : null, groups: { item: { group, sep: null }, prev: null } };
  },
  termsMore(list: RawTermList, sep: Tok | null, group: RawTermGroup): RawTermList {
    return { prefix: list.prefix, groups: { item: { group, sep: sep ? sep.index : null }, prev: list.groups } };
  },
  functionDef(target: Tok, variables: RawNameList, terms: RawTermList, semi: Tok): RawStatement {
    return { t: "function", target: target.index, variables, terms, first: target.index, last: semi.index };
  },
  tableRow(inputs: RawList<number>, outputs: RawList<number>, semi: Tok): RawTableRow {
    return { inputs, outputs, last: semi.index };
  },
  initItem(prev: RawList<{ name: number; value: number }> | null, name: Tok, value: Tok): RawList<{ name: number; value: number }> {
    return { item: { name: name.index, value: value.index }, prev };
  },
  initDecl(keyword: Tok, items: RawList<{ name: number; value: number }>, semi: Tok): RawStatement {
    return { t: "init", items, first: keyword.index, last: semi.index };
  },
  oscillatorDecl(keyword: Tok, names: RawNameList, semi: Tok): RawStatement {
    return { t: "oscillator", names, first: keyword.index, last: semi.index };
  },
  args(prev: RawList<RawExpr> | null, expr: RawExpr): RawList<RawExpr> {
    return { item: expr, prev };
  },
  call(target: Tok, fn: Tok, args: RawList<RawExpr>, semi: Tok): RawStatement {
    return { t: "call", target: target.index, fn: fn.index, args, first: target.index, last: semi.index };
  },
  table(keyword: Tok, inputs: RawNameList, outputs: RawNameList, rows: RawList<RawTableRow> | null, close: Tok): RawStatement {
    return { t: "table", inputs, outputs, rows, first: keyword.index, last: close.index };
  },
};
