// Editing a cell netlist after mapping (wired-AND, fan-out legalization): add and remove cells
// and nets, move loads, and renumber everything compactly at the end.
import type { CellFunction, CellInstance, CellNetlist, Net, NetLoad } from "./types.js";

/** Whether a name ends in "_" and at least one digit (as `NetlistEditor.newNet`'s names do). */
function endsInNumberSuffix(name: string): boolean {
  let i = name.length - 1;
  while (i >= 0) {
    const c = name.charCodeAt(i);
    if (c < 48 || c > 57) break;
    i--;
  }
  return i < name.length - 1 && i >= 0 && name.charCodeAt(i) === 95;
}

export class NetlistEditor {
  readonly nets: Net[];
  readonly cells: CellInstance[];
  private readonly deadNets = new Set<number>();
  private readonly deadCells = new Set<number>();
  private readonly names = new Set<string>();
  private readonly nextSuffix = new Map<string, number>();

  /** With `adopt`, the editor works on the netlist's own nets and cells (the caller hands it
   *  over and does not use it again) instead of copies. */
  constructor(private readonly base: CellNetlist, adopt = false) {
    if (adopt) {
      this.nets = base.nets;
      this.cells = base.cells;
    } else {
      this.nets = base.nets.map((n) => {
        const x: Net = { ...n, driver: { ...n.driver }, loads: n.loads.map((l) => ({ ...l })) };
        if (n.tiedCells) x.tiedCells = [...n.tiedCells];
        return x;
      });
      this.cells = base.cells.map((c) => ({ ...c, inputs: [...c.inputs] }));
    }
    // newNet only asks about names of the form `<base>_<k>`: only names ending in an underscore
    // and digits can be one of them, so only those are registered.
    for (const n of this.nets) if (endsInNumberSuffix(n.name)) this.names.add(n.name);
  }

  isStateNet(net: number): boolean {
    return this.base.stateNets.includes(net);
  }

  isInputNet(net: number): boolean {
    return this.base.inputs.includes(net);
  }

  /** A new unnamed net with a name not used yet, starting from `base`. */
  newNet(base: string): number {
    let k = this.nextSuffix.get(base) ?? 1;
    let name = `${base}_${k}`;
    while (this.names.has(name)) name = `${base}_${++k}`;
    this.nextSuffix.set(base, k + 1);
    this.names.add(name);
    return this.nets.push({ index: this.nets.length, name, named: false, driver: { kind: "tie", value: 0 }, loads: [] }) - 1;
  }

  addCell(fn: CellFunction, inputs: number[], output: number): number {
    const index = this.cells.length;
    this.cells.push({ index, fn, inputs: [...inputs], output });
    inputs.forEach((net, pin) => this.nets[net]!.loads.push({ cell: index, pin }));
    this.nets[output]!.driver = { kind: "cell", cell: index };
    return index;
  }

  /** Moves the first `count` loads of a net to another net. */
  moveFirstLoads(net: number, count: number, to: number): void {
    const moved = this.nets[net]!.loads.splice(0, count);
    for (const l of moved) {
      this.cells[l.cell]!.inputs[l.pin] = to;
      this.nets[to]!.loads.push(l);
    }
  }

  /** Moves one load (a cell's input pin) from its net to another. */
  moveLoad(load: NetLoad, to: number): void {
    const from = this.cells[load.cell]!.inputs[load.pin]!;
    const list = this.nets[from]!.loads;
    const i = list.findIndex((l) => l.cell === load.cell && l.pin === load.pin);
    if (i >= 0) list.splice(i, 1);
    this.cells[load.cell]!.inputs[load.pin] = to;
    this.nets[to]!.loads.push({ cell: load.cell, pin: load.pin });
  }

  /** Removes one input pin of a cell (the later pins move down by one). */
  removePin(cell: number, pin: number): void {
    const c = this.cells[cell]!;
    const net = c.inputs[pin]!;
    const list = this.nets[net]!.loads;
    const i = list.findIndex((l) => l.cell === cell && l.pin === pin);
    if (i >= 0) list.splice(i, 1);
    c.inputs.splice(pin, 1);
    for (const n of new Set(c.inputs)) for (const l of this.nets[n]!.loads) if (l.cell === cell && l.pin > pin) l.pin--;
  }

  removeCell(cell: number): void {
    const c = this.cells[cell]!;
    c.inputs.forEach((net) => {
      const list = this.nets[net]!.loads;
      for (let i = list.length - 1; i >= 0; i--) if (list[i]!.cell === cell) list.splice(i, 1);
    });
    this.deadCells.add(cell);
  }

  removeNet(net: number): void {
    this.deadNets.add(net);
  }

  /** Every cell whose output is the net: the driver first, then the tied ones. */
  driversOf(net: number): number[] {
    const n = this.nets[net]!;
    return n.driver.kind === "cell" ? [n.driver.cell, ...(n.tiedCells ?? [])] : [];
  }

  finish(extra: Partial<Pick<CellNetlist, "maxFanout">> = {}): CellNetlist {
    if (this.deadCells.size === 0 && this.deadNets.size === 0) return this.finishInPlace(extra);
    const cellMap = new Map<number, number>();
    const cells: CellInstance[] = [];
    this.cells.forEach((c, i) => {
      if (this.deadCells.has(i)) return;
      cellMap.set(i, cells.length);
      cells.push(c);
    });
    const netMap = new Map<number, number>();
    const nets: Net[] = [];
    this.nets.forEach((n, i) => {
      if (this.deadNets.has(i)) return;
      netMap.set(i, nets.length);
      nets.push(n);
    });
    const mapNet = (x: number) => {
      const y = netMap.get(x);
      if (y === undefined) throw new Error("netlist edit: a removed net is still in use");
      return y;
    };
    const mapCell = (x: number) => {
      const y = cellMap.get(x);
      if (y === undefined) throw new Error("netlist edit: a removed cell is still in use");
      return y;
    };
    const outCells: CellInstance[] = cells.map((c, i) => {
      const x: CellInstance = { index: i, fn: c.fn, inputs: c.inputs.map(mapNet), output: mapNet(c.output) };
      if (c.tiedOutput) x.tiedOutput = true;
      return x;
    });
    const outNets: Net[] = nets.map((n, i) => {
      const x: Net = {
        index: i,
        name: n.name,
        named: n.named,
        driver: n.driver.kind === "cell" ? { kind: "cell", cell: mapCell(n.driver.cell) } : { ...n.driver },
        loads: n.loads.filter((l) => !this.deadCells.has(l.cell)).map((l) => ({ cell: mapCell(l.cell), pin: l.pin })),
      };
      if (n.outputPort !== undefined) x.outputPort = n.outputPort;
      if (n.tiedCells?.length) x.tiedCells = n.tiedCells.map(mapCell);
      return x;
    });
    const out: CellNetlist = {
      name: this.base.name,
      inputs: this.base.inputs.map(mapNet),
      outputs: this.base.outputs.map((o) => ({ name: o.name, net: mapNet(o.net) })),
      nets: outNets,
      cells: outCells,
      stateNets: this.base.stateNets.map(mapNet),
      maxFanin: this.base.maxFanin,
    };
    const fo = extra.maxFanout ?? this.base.maxFanout;
    if (fo !== undefined) out.maxFanout = fo;
    return out;
  }

  /** Nothing removed: every index stands, so the nets and cells are handed on as they are. */
  private finishInPlace(extra: Partial<Pick<CellNetlist, "maxFanout">>): CellNetlist {
    this.nets.forEach((n, i) => {
      n.index = i;
      if (n.tiedCells && n.tiedCells.length === 0) delete n.tiedCells;
    });
    this.cells.forEach((c, i) => (c.index = i));
    const out: CellNetlist = {
      name: this.base.name,
      inputs: [...this.base.inputs],
      outputs: this.base.outputs.map((o) => ({ name: o.name, net: o.net })),
      nets: this.nets,
      cells: this.cells,
      stateNets: [...this.base.stateNets],
      maxFanin: this.base.maxFanin,
    };
    const fo = extra.maxFanout ?? this.base.maxFanout;
    if (fo !== undefined) out.maxFanout = fo;
    return out;
  }
}
