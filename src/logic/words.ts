// Bit-parallel evaluation of a logic graph as a straight-line program over one flat buffer:
// each node a slot of W words (32 vectors a word), each operation a loop over its operands'
// slots. Used where many nodes are evaluated on many vectors (the equivalence check, the
// testbench's expected values), so no typed array is allocated per node.
import type { LogicGraph } from "./graph.js";

export const OP_ZERO = 0;
export const OP_ONES = 1;
export const OP_BUF = 2;
export const OP_NOT = 3;
export const OP_AND = 4;
export const OP_OR = 5;
export const OP_XOR = 6;

/** The nodes to evaluate, in evaluation order, with their operands' slots. */
export interface WordProgram {
  /** Slots in all (free and computed). */
  slots: number;
  /** Per computed node: operation, output slot, operand slots args[start[k]..start[k+1]). */
  ops: Uint8Array;
  out: Int32Array;
  start: Int32Array;
  args: Int32Array;
  /** Free slots and the variable each holds (a primary input or a state signal). */
  freeSlots: Int32Array;
  freeVars: Int32Array;
}

function opCode(op: string): number {
  switch (op) {
    case "const1":
      return OP_ONES;
    case "buf":
      return OP_BUF;
    case "not":
      return OP_NOT;
    case "and":
      return OP_AND;
    case "or":
      return OP_OR;
    case "xor":
      return OP_XOR;
    default:
      return OP_ZERO; // const0, and an input node nobody gives a value (reads as 0)
  }
}

/**
 * A program evaluating `nodes` (ids in an evaluation order: each after its operands, except free
 * nodes). `freeVar[id]` is the variable of a free node (-1: computed). Each node's slot is
 * `slotOf[id]`, which the caller fills in (-1 for nodes not in the program). `through` lists
 * free nodes whose operation is also computed from their operands (a state signal's next
 * value): their results take the slots after the nodes', in the order given.
 */
export function wordProgram(g: LogicGraph, nodes: ArrayLike<number>, slotOf: Int32Array, freeVar: Int32Array, through: readonly number[] = []): WordProgram {
  let computed = 0;
  let argCount = 0;
  let frees = 0;
  for (let k = 0; k < nodes.length; k++) {
    const id = nodes[k]!;
    if (freeVar[id]! >= 0) frees++;
    else {
      computed++;
      argCount += g.nodes[id]!.fanins.length;
    }
  }
  for (const id of through) {
    computed++;
    argCount += g.nodes[id]!.fanins.length;
  }
  const ops = new Uint8Array(computed);
  const out = new Int32Array(computed);
  const start = new Int32Array(computed + 1);
  const args = new Int32Array(argCount);
  const freeSlots = new Int32Array(frees);
  const freeVars = new Int32Array(frees);
  let c = 0;
  let a = 0;
  let f = 0;
  const emit = (id: number, slot: number) => {
    const node = g.nodes[id]!;
    ops[c] = node.op === "input" ? OP_ZERO : opCode(node.op);
    out[c] = slot;
    start[c] = a;
    for (const x of node.fanins) args[a++] = slotOf[x]!;
    c++;
  };
  for (let k = 0; k < nodes.length; k++) {
    const id = nodes[k]!;
    if (freeVar[id]! >= 0) {
      freeSlots[f] = slotOf[id]!;
      freeVars[f++] = freeVar[id]!;
    } else emit(id, slotOf[id]!);
  }
  let slots = 0;
  for (let k = 0; k < nodes.length; k++) slots = Math.max(slots, slotOf[nodes[k]!]! + 1);
  through.forEach((id) => emit(id, slots++));
  start[c] = a;
  return { slots, ops, out, start, args, freeSlots, freeVars };
}

/** Runs the program on W words a slot; the free slots must already hold their words. */
export function runWordProgram(p: WordProgram, buf: Uint32Array, W: number): void {
  const { ops, out, start, args } = p;
  for (let k = 0; k < ops.length; k++) {
    const o = out[k]! * W;
    const s = start[k]!;
    const e = start[k + 1]!;
    switch (ops[k]) {
      case OP_ZERO:
        buf.fill(0, o, o + W);
        break;
      case OP_ONES:
        buf.fill(0xffffffff, o, o + W);
        break;
      case OP_BUF: {
        const x = args[s]! * W;
        buf.copyWithin(o, x, x + W);
        break;
      }
      case OP_NOT: {
        const x = args[s]! * W;
        for (let i = 0; i < W; i++) buf[o + i] = ~buf[x + i]!;
        break;
      }
      case OP_AND: {
        const x = args[s]! * W;
        buf.copyWithin(o, x, x + W);
        for (let j = s + 1; j < e; j++) {
          const y = args[j]! * W;
          for (let i = 0; i < W; i++) buf[o + i] &= buf[y + i]!;
        }
        break;
      }
      case OP_OR: {
        const x = args[s]! * W;
        buf.copyWithin(o, x, x + W);
        for (let j = s + 1; j < e; j++) {
          const y = args[j]! * W;
          for (let i = 0; i < W; i++) buf[o + i] |= buf[y + i]!;
        }
        break;
      }
      case OP_XOR: {
        const x = args[s]! * W;
        buf.copyWithin(o, x, x + W);
        for (let j = s + 1; j < e; j++) {
          const y = args[j]! * W;
          for (let i = 0; i < W; i++) buf[o + i] ^= buf[y + i]!;
        }
        break;
      }
    }
  }
}

/**
 * Runs the program in three-valued logic (0, 1, X), dual rail: `one` holds a 1 where a slot is
 * known 1, `zero` where it is known 0; neither means X. AND is 0 if any operand is 0, 1 if all
 * are 1, else X (and dually for OR); XOR is X if any operand is X; NOT swaps the rails
 * (Kleene's strong three-valued logic, as StepSimulator evaluates). The free slots of both
 * rails must already be filled.
 */
export function runTriWordProgram(p: WordProgram, one: Uint32Array, zero: Uint32Array, W: number): void {
  const { ops, out, start, args } = p;
  for (let k = 0; k < ops.length; k++) {
    const o = out[k]! * W;
    const s = start[k]!;
    const e = start[k + 1]!;
    switch (ops[k]) {
      case OP_ZERO:
        one.fill(0, o, o + W);
        zero.fill(0xffffffff, o, o + W);
        break;
      case OP_ONES:
        one.fill(0xffffffff, o, o + W);
        zero.fill(0, o, o + W);
        break;
      case OP_BUF: {
        const x = args[s]! * W;
        one.copyWithin(o, x, x + W);
        zero.copyWithin(o, x, x + W);
        break;
      }
      case OP_NOT: {
        const x = args[s]! * W;
        for (let i = 0; i < W; i++) {
          const a = one[x + i]!;
          one[o + i] = zero[x + i]!;
          zero[o + i] = a;
        }
        break;
      }
      case OP_AND:
      case OP_OR: {
        // AND: one = ∧ ones, zero = ∨ zeros; OR: the rails' roles swapped.
        const [all, any] = ops[k] === OP_AND ? [one, zero] : [zero, one];
        const x = args[s]! * W;
        all.copyWithin(o, x, x + W);
        any.copyWithin(o, x, x + W);
        for (let j = s + 1; j < e; j++) {
          const y = args[j]! * W;
          for (let i = 0; i < W; i++) {
            all[o + i] &= all[y + i]!;
            any[o + i] |= any[y + i]!;
          }
        }
        break;
      }
      case OP_XOR: {
        const x = args[s]! * W;
        // known = ∧ (one | zero); value = ⊕ one.
        for (let i = 0; i < W; i++) {
          zero[o + i] = one[x + i]! | zero[x + i]!; // known, for now
          one[o + i] = one[x + i]!;
        }
        for (let j = s + 1; j < e; j++) {
          const y = args[j]! * W;
          for (let i = 0; i < W; i++) {
            zero[o + i] &= one[y + i]! | zero[y + i]!;
            one[o + i] ^= one[y + i]!;
          }
        }
        for (let i = 0; i < W; i++) {
          const known = zero[o + i]!;
          const v = one[o + i]!;
          one[o + i] = v & known;
          zero[o + i] = ~v & known;
        }
        break;
      }
    }
  }
}
