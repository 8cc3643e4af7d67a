// Generated benchmark designs of our own, as structural Verilog (IEEE 1364 gate primitives):
// ripple-carry and carry-lookahead adders, array multipliers, random layered networks, and the
// ISCAS-85 c17 benchmark (Brglez and Fujiwara, 1985; netlist from memory).
import { seededRandom } from "../../src/logic/evaluate.js";

/** n-bit ripple-carry adder from full adders of two XORs, two ANDs and an OR (common practice). */
export function rippleCarryAdder(n: number): string {
  const lines = [`module rca${n}(a, b, cin, s, cout);`, `  input [${n - 1}:0] a, b;`, `  input cin;`, `  output [${n - 1}:0] s;`, `  output cout;`];
  const wires: string[] = [];
  for (let i = 0; i < n; i++) wires.push(`p${i}`, `g${i}`, `t${i}`, `c${i + 1}`);
  lines.push(`  wire ${wires.join(", ")};`);
  for (let i = 0; i < n; i++) {
    const cin = i === 0 ? "cin" : `c${i}`;
    lines.push(
      `  xor (p${i}, a[${i}], b[${i}]);`,
      `  and (g${i}, a[${i}], b[${i}]);`,
      `  xor (s[${i}], p${i}, ${cin});`,
      `  and (t${i}, p${i}, ${cin});`,
      `  or  (c${i + 1}, g${i}, t${i});`,
    );
  }
  lines.push(`  buf (cout, c${n});`, "endmodule", "");
  return lines.join("\n");
}

/** n-bit carry-lookahead adder in 4-bit groups with rippled group carries (common practice). */
export function carryLookaheadAdder(n: number): string {
  const lines = [`module cla${n}(a, b, cin, s, cout);`, `  input [${n - 1}:0] a, b;`, `  input cin;`, `  output [${n - 1}:0] s;`, `  output cout;`];
  const body: string[] = [];
  const wires = new Set<string>();
  const w = (x: string) => (wires.add(x), x);
  for (let i = 0; i < n; i++) {
    body.push(`  xor (${w(`p${i}`)}, a[${i}], b[${i}]);`, `  and (${w(`g${i}`)}, a[${i}], b[${i}]);`);
  }
  let groupCarry = "cin";
  for (let base = 0; base < n; base += 4) {
    const size = Math.min(4, n - base);
    for (let k = 0; k < size; k++) {
      const i = base + k;
      // c_{i+1} = g_i + p_i g_{i-1} + ... + p_i ... p_base c_base
      const terms: string[] = [`g${i}`];
      for (let j = i - 1; j >= base - 1; j--) {
        const ps: string[] = [];
        for (let m = i; m > j; m--) ps.push(`p${m}`);
        const last = j >= base ? `g${j}` : groupCarry;
        const t = w(`t${i}_${j + 1}`);
        body.push(`  and (${t}, ${[...ps, last].join(", ")});`);
        terms.push(t);
      }
      body.push(`  or (${w(`c${i + 1}`)}, ${terms.join(", ")});`);
      body.push(`  xor (s[${i}], p${i}, ${i === base ? groupCarry : `c${i}`});`);
    }
    groupCarry = `c${base + size}`;
  }
  body.push(`  buf (cout, ${groupCarry});`);
  lines.push(`  wire ${[...wires].join(", ")};`, ...body, "endmodule", "");
  return lines.join("\n");
}

/** n×n array multiplier: AND partial products summed by rows of full and half adders. */
export function arrayMultiplier(n: number): string {
  const lines = [`module mul${n}(a, b, p);`, `  input [${n - 1}:0] a, b;`, `  output [${2 * n - 1}:0] p;`];
  const body: string[] = [];
  const wires = new Set<string>();
  const w = (x: string) => (wires.add(x), x);
  let k = 0;
  const fullAdder = (x: string, y: string, c: string): [string, string] => {
    const id = k++;
    const t = w(`fa${id}_t`), s = w(`fa${id}_s`), g = w(`fa${id}_g`), u = w(`fa${id}_u`), co = w(`fa${id}_c`);
    body.push(`  xor (${t}, ${x}, ${y});`, `  xor (${s}, ${t}, ${c});`, `  and (${g}, ${x}, ${y});`, `  and (${u}, ${t}, ${c});`, `  or (${co}, ${g}, ${u});`);
    return [s, co];
  };
  const halfAdder = (x: string, y: string): [string, string] => {
    const id = k++;
    const s = w(`ha${id}_s`), co = w(`ha${id}_c`);
    body.push(`  xor (${s}, ${x}, ${y});`, `  and (${co}, ${x}, ${y});`);
    return [s, co];
  };
  const pp = (i: number, j: number) => {
    const x = w(`pp${i}_${j}`);
    body.push(`  and (${x}, a[${i}], b[${j}]);`);
    return x;
  };
  // Row 0
  let row: string[] = [];
  for (let i = 0; i < n; i++) row.push(pp(i, 0));
  const outs: string[] = [row[0]!];
  let sums = row.slice(1); // weight 1..n-1
  for (let j = 1; j < n; j++) {
    const next: string[] = [];
    let carry: string | undefined;
    for (let i = 0; i < n; i++) {
      const x = pp(i, j);
      const y = i < sums.length ? sums[i] : undefined;
      let s: string;
      if (y === undefined && carry === undefined) s = x;
      else if (y === undefined) [s, carry] = halfAdder(x, carry!);
      else if (carry === undefined) [s, carry] = halfAdder(x, y);
      else [s, carry] = fullAdder(x, y, carry);
      next.push(s);
    }
    outs.push(next[0]!);
    sums = next.slice(1);
    if (carry) sums.push(carry);
  }
  outs.push(...sums);
  while (outs.length < 2 * n) outs.push("1'b0");
  outs.slice(0, 2 * n).forEach((x, i) => body.push(`  buf (p[${i}], ${x});`));
  lines.push(`  wire ${[...wires].join(", ")};`, ...body, "endmodule", "");
  row = [];
  return lines.join("\n");
}

/**
 * A random layered network of `gates` NAND/NOR/AND/OR gates with 2–4 inputs (seeded). Each gate
 * draws first on the previous layer's signals nobody reads yet, so every gate reaches an
 * output; whatever is still unread at the end becomes an output.
 */
export function randomNetwork(gates: number, opts: { inputs?: number; seed?: number; layers?: number } = {}): string {
  const rand = seededRandom(opts.seed ?? 7);
  const nIn = opts.inputs ?? Math.max(8, Math.round(Math.sqrt(gates) / 2));
  const layers = opts.layers ?? Math.max(4, Math.round(Math.log2(gates) * 2));
  const perLayer = Math.ceil(gates / layers);
  const kinds = ["nand", "nor", "and", "or", "nand", "nand"];
  const inputs = Array.from({ length: nIn }, (_, i) => `i${i}`);
  let prev = inputs;
  let unread = new Set(inputs);
  const all: string[] = [...inputs];
  const decl: string[] = [];
  const body: string[] = [];
  let g = 0;
  for (let l = 0; l < layers && g < gates; l++) {
    const cur: string[] = [];
    const pending = [...unread];
    for (let k = 0; k < perLayer && g < gates; k++, g++) {
      const name = `n${g}`;
      const fanin = 2 + (rand() % 3);
      const ins = new Set<string>();
      while (ins.size < fanin && pending.length) ins.add(pending.pop()!);
      let guard = 0;
      while (ins.size < fanin && guard++ < 100) {
        const pool = rand() % 4 === 0 ? all : prev;
        ins.add(pool[rand() % pool.length]!);
      }
      for (const x of ins) unread.delete(x);
      body.push(`  ${kinds[rand() % kinds.length]} g${g} (${name}, ${[...ins].join(", ")});`);
      decl.push(name);
      cur.push(name);
    }
    for (const x of pending) unread.add(x);
    all.push(...cur);
    prev = cur;
    for (const x of cur) unread.add(x);
  }
  const outSignals = [...unread].filter((x) => !inputs.includes(x));
  const outputs = outSignals.map((_, i) => `o${i}`);
  const out: string[] = [`module rnd${gates}(${[...inputs, ...outputs].join(", ")});`];
  for (let i = 0; i < inputs.length; i += 20) out.push(`  input ${inputs.slice(i, i + 20).join(", ")};`);
  for (let i = 0; i < outputs.length; i += 20) out.push(`  output ${outputs.slice(i, i + 20).join(", ")};`);
  for (let i = 0; i < decl.length; i += 20) out.push(`  wire ${decl.slice(i, i + 20).join(", ")};`);
  for (const line of body) out.push(line); // not push(...body): 200,000 arguments overflow the stack
  outSignals.forEach((x, i) => out.push(`  buf (o${i}, ${x});`));
  out.push("endmodule", "");
  return out.join("\n");
}

/**
 * A chain of `n` inverters, each output a named wire (the deepest netlist for its size: logic
 * depth n). With an even count it computes y = a; the mapper removes the double inversions.
 * A stress case for stages that settle or walk signal by signal.
 */
export function inverterChain(n: number): string {
  const wires = Array.from({ length: n }, (_, i) => `w${i}`);
  const lines = [`module chain${n}(a, y);`, `  input a;`, `  output y;`];
  for (let i = 0; i < wires.length; i += 20) lines.push(`  wire ${wires.slice(i, i + 20).join(", ")};`);
  lines.push(`  not (w0, a);`);
  for (let i = 1; i < n; i++) lines.push(`  not (w${i}, w${i - 1});`);
  lines.push(`  buf (y, w${n - 1});`, "endmodule", "");
  return lines.join("\n");
}
