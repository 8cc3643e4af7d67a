// Feedback analysis: every loop of a logic graph, its signals and its state signals, and whether
// it can hold a value at all.
//
// A loop can rest only in a fixed point of its own logic: an assignment of its state signals
// (the loop cut points) that its gates reproduce, s = F(x, s), for the inputs x it sees. A loop
// with no fixed point for any input (an odd number of inversions around it, like a ring of
// three inverters) cannot hold state: it oscillates, an error (GW3004) unless the user marks it
// as intended with an `oscillator` declaration. A loop with fixed points for some inputs but
// not for others (a gated ring) oscillates under those inputs: a warning (GW3010).
//
// The search is over the loop's support: primary inputs and the state signals of every loop
// (those of other loops are free, since they can hold any value), exhaustively up to
// MAX_EXHAUSTIVE_SUPPORT variables, by seeded random sampling of the inputs beyond.
import { diag, type Diagnostic, type Span } from "../diagnostics/index.js";
import type { LogicGraph } from "./graph.js";
import { analyzeLoops, evaluationOrder } from "./loops.js";
import { enumerationWords, evalOpWords, seededRandom, simulateWords } from "./evaluate.js";

/** Largest number of variables (inputs and state signals) searched exhaustively. */
export const MAX_EXHAUSTIVE_SUPPORT = 20;
/** Input assignments sampled above that. */
const RANDOM_SAMPLES = 512;

export type LoopStability = "always" | "sometimes" | "never";

export interface LoopInfo {
  /** Named signals on the loop, in source order. */
  signals: string[];
  /** The loop's state signals (where it is cut), in source order. */
  stateSignals: string[];
  /** Inputs and other loops' state signals the loop's next state depends on. */
  support: string[];
  /** Whether some state is a fixed point: for every input, for some, or for none. */
  stability: LoopStability;
  /** False when the support was too large and only sampled. */
  exhaustive: boolean;
  /** An input assignment (over `support`) under which the loop has no fixed point. */
  unstableWhen?: Record<string, 0 | 1>;
  /** Marked as meant to oscillate (`oscillator` declaration). */
  intended: boolean;
}

export interface FeedbackAnalysis {
  loops: LoopInfo[];
  /** All state signals (loop cut points) by name, as `analyzeLoops` chooses them. */
  stateNames: string[];
  diagnostics: Diagnostic[];
}

export interface FeedbackOptions {
  /** Signals named in `oscillator` declarations. */
  oscillators?: readonly { name: string; span?: Span }[];
  /** Signals to prefer as cut points. */
  preferred?: ReadonlySet<number>;
}

export function analyzeFeedback(g: LogicGraph, opts: FeedbackOptions = {}): FeedbackAnalysis {
  const diagnostics: Diagnostic[] = [];
  const file = g.file;
  const la = analyzeLoops(g, opts.preferred);
  const cutSet = new Set(la.cuts);
  const order = evaluationOrder(g, cutSet);
  if (!order) throw new Error("analyzeFeedback: loop analysis left a loop uncut");
  const byName = new Map<string, number>();
  g.nodes.forEach((n, id) => {
    if (n.name !== undefined && !byName.has(n.name)) byName.set(n.name, id);
  });
  const srcOrder = (a: number, b: number) => (g.nodes[a]!.span?.start ?? Infinity) - (g.nodes[b]!.span?.start ?? Infinity) || a - b;
  const nameOf = (id: number) => g.nodes[id]!.name ?? `#${id}`;

  const marked = new Map<string, Span | undefined>();
  for (const o of opts.oscillators ?? []) marked.set(o.name, o.span);
  const markUsed = new Set<string>();

  const loops: LoopInfo[] = [];
  for (const group of la.groups) {
    const inGroup = new Set(group);
    const named = group.filter((id) => g.nodes[id]!.name !== undefined).sort(srcOrder);
    const cuts = group.filter((id) => cutSet.has(id)).sort(srcOrder);
    const intendedBy = named.map(nameOf).filter((n) => marked.has(n));
    intendedBy.forEach((n) => markUsed.add(n));
    const result = fixedPoints(g, order, cuts, cutSet, la.cuts);
    const info: LoopInfo = {
      signals: named.map(nameOf),
      stateSignals: cuts.map(nameOf),
      support: result.support,
      stability: result.stability,
      exhaustive: result.exhaustive,
      intended: intendedBy.length > 0,
    };
    if (result.unstableWhen) info.unstableWhen = result.unstableWhen;
    loops.push(info);
    void inGroup;

    const first = g.nodes[named[0] ?? group[0]!]!;
    const where = first.span ? { file, span: first.span } : file !== undefined ? { file } : undefined;
    const list = info.signals.join(", ");
    if (info.intended) continue;
    if (info.stability === "never" && info.exhaustive) {
      diagnostics.push(
        diag("GW3004", `the loop through ${list} cannot hold a value: no state of it is stable for any input, so it oscillates`, where, {
          hint: `an odd number of inversions around a loop makes an oscillator; if you mean one, declare 'oscillator ${info.signals[0]};'`,
          related: named.slice(1).map((id) => ({ message: `'${nameOf(id)}' is on the loop`, ...(file !== undefined ? { file } : {}), ...(g.nodes[id]!.span ? { start: g.nodes[id]!.span!.start, length: g.nodes[id]!.span!.length } : {}) })),
        }),
      );
    } else if (info.stability !== "always") {
      const when = info.unstableWhen ? Object.entries(info.unstableWhen).map(([k, v]) => `${k} = ${v}`).join(", ") : "";
      diagnostics.push(
        diag(
          "GW3010",
          info.stability === "never"
            ? `no stable state of the loop through ${list} was found (a sampled search: the loop has more than ${MAX_EXHAUSTIVE_SUPPORT} inputs and state signals): it may oscillate`
            : `the loop through ${list} has no stable state${when ? ` when ${when}` : " for some inputs"}: it oscillates then`,
          where,
          { hint: `if that is intended, declare 'oscillator ${info.signals[0]};'` },
        ),
      );
    }
  }

  for (const [name, span] of marked) {
    if (markUsed.has(name)) continue;
    const id = byName.get(name);
    const where = span ? (file !== undefined ? { file, span } : { span }) : file !== undefined ? { file } : undefined;
    if (id === undefined) {
      diagnostics.push(diag("GW2001", `'${name}' is not an input and is never assigned`, where, { hint: "an oscillator declaration names a signal on the loop that is meant to oscillate" }));
    } else {
      diagnostics.push(diag("GW3010", `'${name}' is declared an oscillator but lies on no loop`, where, { severity: "warning", hint: "remove the declaration, or name a signal of the loop" }));
    }
  }

  return { loops, stateNames: la.cuts.map(nameOf), diagnostics };
}

interface FixedPointResult {
  support: string[];
  stability: LoopStability;
  exhaustive: boolean;
  unstableWhen?: Record<string, 0 | 1>;
}

/** Does the loop cut at `own` have a fixed point, for every, some or no assignment of the rest
 *  of its support? */
function fixedPoints(g: LogicGraph, order: number[], own: number[], allCuts: Set<number>, cutList: number[]): FixedPointResult {
  // Support of the own cuts' next values, stopping at inputs and at every cut.
  const freeNodes = new Set<number>([...g.inputs.map((p) => p.node), ...cutList]);
  const support = new Set<number>();
  const needed = new Uint8Array(g.nodes.length);
  const stack: number[] = [];
  for (const c of own) for (const each of g.nodes[c]!.fanins) stack.push(each);
  while (stack.length) {
    const id = stack.pop()!;
    if (needed[id]) continue;
    needed[id] = 1;
    if (freeNodes.has(id)) {
      support.add(id);
      continue;
    }
    for (const each of g.nodes[id]!.fanins) stack.push(each);
  }
  for (const c of own) needed[c] = 1;
  const ownSet = new Set(own);
  const external = [...support].filter((id) => !ownSet.has(id)).sort((a, b) => a - b);
  const names = (ids: number[]) => ids.map((id) => g.nodes[id]!.name ?? `#${id}`);
  const k = own.length;
  const e = external.length;
  const supportNames = names([...external, ...own]);

  // Evaluates the own cuts' next values for a batch of vectors, given words for every variable.
  const fixedMask = (assign: Map<number, Uint32Array>, words: number): Uint32Array => {
    const values = simulateWords(g, order, assign, words, needed);
    const ok = new Uint32Array(words).fill(0xffffffff);
    for (const c of own) {
      const node = g.nodes[c]!;
      const next = evalOpWords(node.op, node.fanins.map((f) => values[f] ?? assign.get(f)!), words);
      const cur = assign.get(c)!;
      for (let w = 0; w < words; w++) ok[w] = ok[w]! & ~(next[w]! ^ cur[w]!);
    }
    return ok;
  };
  void allCuts;

  if (k + e <= MAX_EXHAUSTIVE_SUPPORT) {
    // Variables: own cuts as the low bits of the vector index, the rest above them, so that
    // each assignment of the rest owns a block of 2^k consecutive vectors.
    const n = k + e;
    const words = Math.max(1, 2 ** Math.max(0, n - 5));
    const assign = new Map<number, Uint32Array>();
    own.forEach((id, i) => assign.set(id, enumerationWords(i, words)));
    external.forEach((id, i) => assign.set(id, enumerationWords(k + i, words)));
    const ok = fixedMask(assign, words);
    const bit = (v: number) => (ok[v >>> 5]! >>> (v & 31)) & 1;
    let stableCount = 0;
    let firstUnstable = -1;
    const blocks = 2 ** e;
    for (let x = 0; x < blocks; x++) {
      let any = 0;
      for (let s = 0; s < 2 ** k && !any; s++) any = bit(x * 2 ** k + s);
      if (any) stableCount++;
      else if (firstUnstable < 0) firstUnstable = x;
    }
    const r: FixedPointResult = {
      support: supportNames,
      stability: stableCount === blocks ? "always" : stableCount === 0 ? "never" : "sometimes",
      exhaustive: true,
    };
    if (firstUnstable >= 0) {
      const when: Record<string, 0 | 1> = {};
      names(external).forEach((nm, i) => (when[nm] = ((firstUnstable >>> i) & 1) as 0 | 1));
      r.unstableWhen = when;
    }
    return r;
  }

  // Sampled: random assignments of the rest. For each, every own state when there are few
  // (up to 2^12), else a search: from 128 random states, the loop's own iteration
  // s <- F(x, s), which settles on a fixed point within a few rounds for latches and
  // flip-flops.
  const rand = seededRandom(0x10f5);
  const enumerate = k <= 12;
  const words = enumerate ? Math.max(1, 2 ** Math.max(0, k - 5)) : 4;
  const lanes = enumerate ? 2 ** k : 32 * words;
  const rounds = enumerate ? 1 : 2 * k + 8;
  let stable = 0;
  let firstUnstable: Record<string, 0 | 1> | undefined;
  // Few enough input assignments are all tried, in order.
  const samples = 2 ** e <= RANDOM_SAMPLES ? 2 ** e : RANDOM_SAMPLES;
  for (let sample = 0; sample < samples; sample++) {
    const assign = new Map<number, Uint32Array>();
    const when: Record<string, 0 | 1> = {};
    external.forEach((id, j) => {
      const v = (samples === 2 ** e ? (sample >>> j) & 1 : rand() & 1) as 0 | 1;
      when[g.nodes[id]!.name ?? `#${id}`] = v;
      assign.set(id, new Uint32Array(words).fill(v ? 0xffffffff : 0));
    });
    own.forEach((id, i) => {
      if (enumerate) assign.set(id, enumerationWords(i, words));
      else {
        const w = new Uint32Array(words);
        for (let j = 0; j < words; j++) w[j] = rand();
        assign.set(id, w);
      }
    });
    let any = false;
    for (let round = 0; round < rounds && !any; round++) {
      const ok = fixedMask(assign, words);
      for (let v = 0; v < lanes && !any; v++) any = ((ok[v >>> 5]! >>> (v & 31)) & 1) === 1;
      if (!any && !enumerate) {
        // Next round from the next states.
        const values = simulateWords(g, order, assign, words, needed);
        const next = own.map((c) => evalOpWords(g.nodes[c]!.op, g.nodes[c]!.fanins.map((f) => values[f] ?? assign.get(f)!), words));
        own.forEach((c, i) => assign.set(c, next[i]!));
      }
    }
    if (any) stable++;
    else firstUnstable ??= when;
  }
  const r: FixedPointResult = {
    support: supportNames,
    stability: stable === samples ? "always" : stable === 0 ? "never" : "sometimes",
    exhaustive: false,
  };
  if (firstUnstable) r.unstableWhen = firstUnstable;
  return r;
}
