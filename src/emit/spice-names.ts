// SPICE-safe node names. ngspice folds case and gives meaning to '.', '(', ')', '=', ',' and
// white space, so source names are mapped to [a-z0-9_] names, unique without regard to case,
// never "0" or "gnd". The mapping is kept so the files can say which name became which.

const RESERVED = new Set(["0", "gnd", "vcc", "vbb"]);
/** Lower case, [a-z0-9_], not starting with a digit, at most 60 characters: unchanged by the
 *  mapping below. */
const SAFE = /^[a-z_][a-z0-9_]{0,59}$/;

export class SpiceNamer {
  private readonly used = new Set<string>(RESERVED);
  private readonly map = new Map<string, string>();

  /** Reserves a fixed name (e.g. the supply node) so no signal takes it. */
  reserve(name: string): void {
    this.used.add(name.toLowerCase());
  }

  nameOf(source: string): string {
    const hit = this.map.get(source);
    if (hit !== undefined) return hit;
    // A name already SPICE-safe (the common case) is its own base.
    let base = SAFE.test(source)
      ? source
      : source
          .toLowerCase()
          .replace(/[^a-z0-9_]+/g, "_")
          .replace(/^_+(?=.)/, (m) => m)
          .slice(0, 60);
    if (base === "" || /^[0-9]/.test(base)) base = "n" + base;
    let cand = base;
    for (let k = 2; this.used.has(cand); k++) cand = `${base}_${k}`;
    this.used.add(cand);
    this.map.set(source, cand);
    return cand;
  }

  /** Source names that had to change, for a comment in the netlist. */
  renamed(): { source: string; spice: string }[] {
    return [...this.map].filter(([s, n]) => s !== n).map(([source, spice]) => ({ source, spice }));
  }

  /** True if any source name had to change. */
  anyRenamed(): boolean {
    for (const [s, n] of this.map) if (s !== n) return true;
    return false;
  }

  /** Each source name that had to change, with its SPICE name, in the order they were named. */
  forEachRenamed(f: (source: string, spice: string) => void): void {
    for (const [s, n] of this.map) if (s !== n) f(s, n);
  }
}
