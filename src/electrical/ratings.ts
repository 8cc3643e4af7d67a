// Part ratings: each resistor's worst-case dissipation against the standard ratings at 50 %
// derating (common practice), and the semiconductors' voltage, current and power against theirs.

/** Standard resistor power ratings in watts (common practice). */
export const RESISTOR_RATINGS_WATTS = [0.125, 0.25, 0.5, 1, 2] as const;

/** Continuous dissipation allowed as a fraction of the rating (common practice: 50 %). */
export const RESISTOR_DERATING = 0.5;

/** The smallest standard rating that carries `watts` at 50 % derating, or undefined when even
 *  the largest does not. */
export function chooseResistorRating(watts: number): number | undefined {
  for (const r of RESISTOR_RATINGS_WATTS) if (watts <= r * RESISTOR_DERATING) return r;
  return undefined;
}

/** "1/8 W", "1/4 W", "1 W". */
export function formatRating(watts: number): string {
  const fr: Record<number, string> = { 0.125: "1/8", 0.25: "1/4", 0.5: "1/2" };
  return `${fr[watts] ?? String(watts)} W`;
}
