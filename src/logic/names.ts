// Name suggestions for "undefined name" diagnostics.

/** Levenshtein distance with an early exit above `limit`. */
export function editDistance(a: string, b: string, limit = Infinity): number {
  if (Math.abs(a.length - b.length) > limit) return limit + 1;
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    let best = i;
    for (let j = 1; j <= b.length; j++) {
      const cost = a.charCodeAt(i - 1) === b.charCodeAt(j - 1) ? 0 : 1;
      const v = Math.min(prev[j]! + 1, cur[j - 1]! + 1, prev[j - 1]! + cost);
      cur.push(v);
      if (v < best) best = v;
    }
    if (best > limit) return limit + 1;
    prev = cur;
  }
  return prev[b.length]!;
}

/** The closest known name, if it is close enough to be a likely typo. */
export function nearestName(name: string, known: Iterable<string>): string | undefined {
  const limit = Math.max(1, Math.min(3, Math.floor(name.length / 3)));
  let best: string | undefined;
  let bestD = limit + 1;
  const lower = name.toLowerCase();
  for (const k of known) {
    if (k.toLowerCase() === lower) return k;
    const d = editDistance(name, k, bestD);
    if (d < bestD || (d === bestD && best !== undefined && k < best)) {
      bestD = d;
      best = k;
    }
  }
  return bestD <= limit ? best : undefined;
}
