// SPICE-safe node names. ngspice folds case and gives meaning to '.', '(', ')', '=', ',' and
// white space, so source names are mapped to [a-z0-9_] names, unique without regard to case,
// never "0" or "gnd". The mapping is kept so the files can say which name became which.

const RESERVED = new Set(["0", "gnd", "vcc", "vbb"]);
/** Lower case, [a-z0-9_], not starting with a digit, at most 60 characters: unchanged by the
 *  mapping below. */
const SAFE = /^[a-z_][a-z0-9_]{0,59}$/;

export class SpiceNamer {
  /** Each SPICE name taken, with the source name it was given to (null: reserved). One table
   *  for both questions, "is this name taken" and "has this source a name already" (a source
   *  that kept its own name owns it), since most names stay as they are. */
  private readonly owner = new Map<string, string | null>(Array.from(RESERVED, (r) => [r, null]));
  /** Source names that had to change, with their SPICE names, in the order they were named. */
  private readonly changed = new Map<string, string>();

  /** Reserves a fixed name (e.g. the supply node) so no signal takes it. */
  reserve(name: string): void {
    const n = name.toLowerCase();
    if (!this.owner.has(n)) this.owner.set(n, null);
  }

  nameOf(source: string): string {
    if (this.owner.get(source) === source) return source;
    const hit = this.changed.get(source);
    if (hit !== undefined) return hit;
    // A name already SPICE-safe (the common case) is its own base.
    let base: string;
    if (SAFE.test(source)) base = source;
    else {
      base = source
        .toLowerCase()
        .replace(/[^a-z0-9_]+/g, "_")
        .replace(/^_+(?=.)/, (m) => m)
        .slice(0, 60);
      if (base === "" || /^[0-9]/.test(base)) base = "n" + base;
    }
    let cand = base;
    for (let k = 2; this.owner.has(cand); k++) cand = `${base}_${k}`;
    this.owner.set(cand, source);
    if (cand !== source) this.changed.set(source, cand);
    return cand;
  }

  /** Source names that had to change, for a comment in the netlist. */
  renamed(): { source: string; spice: string }[] {
    return [...this.changed].map(([source, spice]) => ({ source, spice }));
  }

  /** True if any source name had to change. */
  anyRenamed(): boolean {
    return this.changed.size > 0;
  }

  /** Each source name that had to change, with its SPICE name, in the order they were named. */
  forEachRenamed(f: (source: string, spice: string) => void): void {
    for (const [s, n] of this.changed) f(s, n);
  }
}
