# Structural Verilog (a gate-level subset of IEEE 1364-2005), ONE MODULE ITEM AT A TIME.
# src/parse/verilog.ts lexes the whole file with the moo lexer, cuts the token stream into
# items (a module header up to its `;`, one declaration or statement up to its `;`, or
# `endmodule`) and parses each item with this grammar. Memory therefore stays linear in the
# file size and a syntax error resynchronises at the next `;`.
#
# Expression precedence (IEEE 1364-2005 §5.1.2, Table 5-4) is applied after parsing; see below.
# Lists are left-recursive and build linked lists (ast.chain1/ast.chainPush), which keeps long
# lists linear; nearley's EBNF `:*` would copy the list at every element.

@preprocessor typescript

@{%
import { grammarLexer as lexer, tokenTests } from "../verilog-lexer.js";
import { ast } from "../verilog-ast.js";
// nearley declares every %name it cannot find in the lexer as `declare var name: any`.
var binaryOp: any = tokenTests.binaryOp;
var unaryOp: any = tokenTests.unaryOp;
%}

@lexer lexer

item -> moduleHeader {% id %}
      | endmodule    {% id %}
      | portDecl     {% id %}
      | wireDecl     {% id %}
      | gateStmt     {% id %}
      | assignStmt   {% id %}
      | instanceStmt {% id %}

# --- module header ---------------------------------------------------------------------------
moduleHeader -> "module" %ident portHeader:? ";" {% ast.moduleHeader %}

portHeader -> "(" ")"                  {% ast.emptyPorts %}
            | "(" identList ")"        {% ast.listPorts %}
            | "(" ansiPortList ")"     {% ast.ansiPorts %}

ansiPortList -> ansiPort                    {% ast.chain1 %}
              | ansiPortList "," ansiPort   {% ast.chainPush %}
              | ansiPortList "," %ident     {% ast.chainPush %}

ansiPort -> direction "wire":? range:? %ident {% ast.ansiPort %}

endmodule -> "endmodule" {% ast.endmodule %}

# --- declarations ----------------------------------------------------------------------------
direction -> "input" {% id %} | "output" {% id %}

portDecl -> direction "wire":? range:? identList ";" {% ast.portDecl %}

wireDecl -> "wire" range:? wireItems ";" {% ast.wireDecl %}

wireItems -> wireItem               {% ast.chain1 %}
           | wireItems "," wireItem {% ast.chainPush %}

wireItem -> %ident            {% ast.wireItem %}
          | %ident "=" expr   {% ast.wireItem %}

range -> "[" number ":" number "]" {% ast.range %}

identList -> %ident               {% ast.chain1 %}
           | identList "," %ident {% ast.chainPush %}

number -> %decimal {% ast.number %}
        | %based   {% ast.number %}
        | %real    {% ast.number %}

# --- gate primitives (IEEE 1364-2005 §7) -----------------------------------------------------
gateStmt -> gateType gateInsts ";" {% ast.gateStmt %}

gateType -> "and" {% id %} | "nand" {% id %} | "or" {% id %} | "nor" {% id %}
          | "xor" {% id %} | "xnor" {% id %} | "not" {% id %} | "buf" {% id %}

gateInsts -> gateInst               {% ast.chain1 %}
           | gateInsts "," gateInst {% ast.chainPush %}

gateInst -> "(" exprList ")"                 {% ast.gateInstAnon %}
          | %ident range:? "(" exprList ")"  {% ast.gateInstNamed %}

exprList -> expr              {% ast.chain1 %}
          | exprList "," expr {% ast.chainPush %}

# --- continuous assignment (IEEE 1364-2005 §6.1) ---------------------------------------------
assignStmt -> "assign" assigns ";" {% ast.assignStmt %}

assigns -> assignOne             {% ast.chain1 %}
         | assigns "," assignOne {% ast.chainPush %}

assignOne -> lvalue "=" expr {% ast.assignOne %}

lvalue -> %ident                    {% ast.ref %}
        | %ident "[" number "]"     {% ast.bit %}

# --- module instances (IEEE 1364-2005 §12.1.2) -----------------------------------------------
instanceStmt -> %ident modInsts ";" {% ast.instanceStmt %}

modInsts -> modInst              {% ast.chain1 %}
          | modInsts "," modInst {% ast.chainPush %}

modInst -> %ident range:? "(" connections ")" {% ast.modInst %}

connections -> orderedConns {% ast.orderedConns %}
             | namedConns   {% ast.namedConns %}

orderedConns -> exprOpt                  {% ast.chain1 %}
              | orderedConns "," exprOpt {% ast.chainPush %}

exprOpt -> null {% ast.nothing %}
         | expr {% id %}

namedConns -> namedConn                {% ast.chain1 %}
            | namedConns "," namedConn {% ast.chainPush %}

namedConn -> "." %ident "(" expr:? ")" {% ast.namedConn %}

# --- expressions -----------------------------------------------------------------------------
# An expression is parsed as a flat sequence `operand (binaryOp operand)*`; the tree is built by
# precedence climbing when the item is elaborated (verilog-expr.ts), following IEEE 1364-2005
# Table 5-4. A flat sequence needs far fewer Earley states than one nonterminal per precedence
# level, and climbing after the parse is iterative, so long or deep expressions cannot overflow
# the stack.
expr -> operand                    {% id %}
      | expr %binaryOp operand     {% ast.seqPush %}

operand -> primary                 {% id %}
         | %unaryOp operand        {% ast.unary %}

primary -> %ident                 {% ast.ref %}
         | %ident "[" number "]"  {% ast.bit %}
         | number                 {% ast.num %}
         | "(" expr ")"           {% ast.paren %}
