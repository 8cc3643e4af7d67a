// Wired-AND cell netlists built by hand for the sizing tests.
import type { CellNetlist } from "../../src/map/types.js";
import { netlistOf, type GateSpec } from "./fixtures.js";

/**
 * `n` two-input NAND cells with their open-collector outputs tied onto net w (cell 0 drives it
 * and holds R_C; cells 1..n−1 are tied), w read by `f` two-input NAND loads (w, c) → y_j, and w
 * itself a primary output when `f` is 0. n = 1 is the same circuit without wired-AND.
 */
export function wiredNet(n: number, f: number): CellNetlist {
  const inputs: string[] = [];
  const gates: GateSpec[] = [];
  for (let i = 0; i < n; i++) {
    inputs.push(`a${i}`, `b${i}`);
    gates.push({ fn: "nand", inputs: [`a${i}`, `b${i}`], output: i === 0 ? "w" : `t${i}` });
  }
  inputs.push("c");
  const outputs: string[] = [];
  for (let j = 0; j < f; j++) {
    gates.push({ fn: "nand", inputs: ["w", "c"], output: `y${j}` });
    outputs.push(`y${j}`);
  }
  if (f === 0) outputs.push("w");
  const nl = netlistOf(`wired${n}_${f}`, inputs, outputs, gates);
  // Tie cells 1..n−1 onto w: their own output nets go (left empty, as the mapper leaves none).
  const w = nl.nets.find((x) => x.name === "w")!;
  for (let i = 1; i < n; i++) {
    const own = nl.cells[i]!.output;
    nl.cells[i]!.output = w.index;
    nl.cells[i]!.tiedOutput = true;
    nl.nets[own]!.driver = { kind: "tie", value: 1 };
  }
  if (n > 1) w.tiedCells = Array.from({ length: n - 1 }, (_, i) => i + 1);
  return nl;
}
