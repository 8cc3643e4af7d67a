// Figures and plain-text tables shared by the benchmark scripts.

/** Median of the runs (the machine is shared and noisy: medians, not means). */
export function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/** A plain-text table: first column left-aligned, the others right-aligned. */
export function table(head: string[], rows: (string | number)[][]): string {
  const cells = [head, ...rows.map((r) => r.map(String))];
  const w = head.map((_, i) => Math.max(...cells.map((r) => r[i]!.length)));
  const line = (r: string[]) => r.map((c, i) => (i === 0 ? c.padEnd(w[i]!) : c.padStart(w[i]!))).join("  ");
  return [line(head), w.map((x) => "-".repeat(x)).join("  "), ...cells.slice(1).map(line)].join("\n");
}
