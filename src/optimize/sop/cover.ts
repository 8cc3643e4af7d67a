// Minimum-cost unate covering (the prime implicant chart): choose columns of least total cost so
// that every row is covered. Branch and bound over the rows, with the classical reductions at
// every node: essential columns, row dominance, column dominance (Petrick's problem solved by
// search rather than by multiplying out; McCluskey 1956, common practice), a lower bound from
// a set of pairwise independent rows, and a greedy first solution as the upper bound.
//
// Work is bounded by `workBudget` (roughly the number of row–column visits): when it runs out
// the best cover found so far is returned with `optimal: false`.

export interface CoverProblem {
  rowCount: number;
  columns: { cost: number; rows: readonly number[] }[];
}

export interface CoverSolution {
  chosen: number[];
  cost: number;
  /** True when the search finished: no cheaper cover exists. */
  optimal: boolean;
}

export function solveCover(p: CoverProblem, opts: { workBudget?: number } = {}): CoverSolution | undefined {
  const R = p.rowCount;
  const C = p.columns.length;
  const rowCols: number[][] = Array.from({ length: R }, () => []);
  p.columns.forEach((c, j) => {
    for (const r of c.rows) rowCols[r]!.push(j);
  });
  for (let r = 0; r < R; r++) if (rowCols[r]!.length === 0) return undefined;
  if (R === 0) return { chosen: [], cost: 0, optimal: true };
  const cost = p.columns.map((c) => c.cost);
  const colRows = p.columns.map((c) => c.rows);

  let work = 0;
  const budget = opts.workBudget ?? 20_000_000;
  let exhausted = false;

  // Greedy upper bound.
  const greedy = (rowsAlive: Uint8Array, colsAlive: Uint8Array): number[] => {
    const alive = Uint8Array.from(rowsAlive);
    let left = alive.reduce((s, x) => s + x, 0);
    const chosen: number[] = [];
    while (left > 0) {
      let best = -1;
      let bestScore = -1;
      for (let j = 0; j < C; j++) {
        if (!colsAlive[j]) continue;
        let k = 0;
        for (const r of colRows[j]!) if (alive[r]) k++;
        work += colRows[j]!.length;
        if (k === 0) continue;
        const score = k / cost[j]!;
        if (score > bestScore) {
          bestScore = score;
          best = j;
        }
      }
      if (best < 0) break;
      chosen.push(best);
      for (const r of colRows[best]!) if (alive[r]) {
        alive[r] = 0;
        left--;
      }
    }
    // Drop columns made redundant by later ones (most expensive first).
    const count = new Int32Array(R);
    for (const j of chosen) for (const r of colRows[j]!) count[r]!++;
    const order = [...chosen].sort((a, b) => cost[b]! - cost[a]!);
    const kept = new Set(chosen);
    for (const j of order) {
      if (colRows[j]!.every((r) => !rowsAlive[r] || count[r]! > 1)) {
        kept.delete(j);
        for (const r of colRows[j]!) count[r]!--;
      }
    }
    return [...kept];
  };

  const allRows = new Uint8Array(R).fill(1);
  const allCols = new Uint8Array(C).fill(1);
  let best = greedy(allRows, allCols);
  let bestCost = best.reduce((s, j) => s + cost[j]!, 0);

  const search = (rowsAlive: Uint8Array, colsAlive: Uint8Array, chosen: number[], costSoFar: number): void => {
    if (work > budget) {
      exhausted = true;
      return;
    }
    rowsAlive = Uint8Array.from(rowsAlive);
    colsAlive = Uint8Array.from(colsAlive);
    chosen = [...chosen];
    const choose = (j: number) => {
      chosen.push(j);
      costSoFar += cost[j]!;
      colsAlive[j] = 0;
      for (const r of colRows[j]!) rowsAlive[r] = 0;
    };
    // Reductions until nothing changes.
    for (let changed = true; changed; ) {
      changed = false;
      const liveRows: number[] = [];
      for (let r = 0; r < R; r++) if (rowsAlive[r]) liveRows.push(r);
      if (liveRows.length === 0) break;
      // Essential columns.
      for (const r of liveRows) {
        if (!rowsAlive[r]) continue;
        let only = -1;
        let k = 0;
        for (const j of rowCols[r]!) if (colsAlive[j]) {
          k++;
          only = j;
          if (k > 1) break;
        }
        work += rowCols[r]!.length;
        if (k === 0) return; // infeasible
        if (k === 1) {
          choose(only);
          changed = true;
        }
      }
      if (changed) continue;
      if (costSoFar >= bestCost) return;
      // Column dominance: j2 is dropped if another column covers all its live rows at no more cost.
      const liveCols: number[] = [];
      for (let j = 0; j < C; j++) if (colsAlive[j]) liveCols.push(j);
      if (liveCols.length <= 600 && liveRows.length <= 2000) {
        const mark = new Int32Array(R).fill(-1);
        const live = liveCols.map((j) => colRows[j]!.filter((r) => rowsAlive[r]));
        for (let a = 0; a < liveCols.length; a++) {
          const j1 = liveCols[a]!;
          if (!colsAlive[j1]) continue;
          if (live[a]!.length === 0) {
            colsAlive[j1] = 0;
            changed = true;
            continue;
          }
          for (const r of live[a]!) mark[r] = a;
          for (let b = 0; b < liveCols.length; b++) {
            const j2 = liveCols[b]!;
            if (b === a || !colsAlive[j2] || cost[j2]! < cost[j1]!) continue;
            if (live[b]!.length > live[a]!.length) continue;
            if (live[b]!.length === live[a]!.length && cost[j2] === cost[j1] && b < a) continue; // keep one of equals
            work += live[b]!.length;
            if (live[b]!.every((r) => mark[r] === a)) {
              colsAlive[j2] = 0;
              changed = true;
            }
          }
        }
        if (changed) continue;
      }
      // Row dominance: a row whose columns include all the columns of another live row is dropped.
      if (liveRows.length <= 600) {
        const colsOf = liveRows.map((r) => rowCols[r]!.filter((j) => colsAlive[j]));
        const mark = new Int32Array(C).fill(-1);
        for (let a = 0; a < liveRows.length; a++) {
          if (!rowsAlive[liveRows[a]!]) continue;
          for (const j of colsOf[a]!) mark[j] = a;
          for (let b = 0; b < liveRows.length; b++) {
            if (b === a || !rowsAlive[liveRows[b]!]) continue;
            if (colsOf[b]!.length < colsOf[a]!.length) continue;
            if (colsOf[b]!.length === colsOf[a]!.length && b < a) continue;
            work += colsOf[a]!.length;
            // Does row b's column set contain row a's?
            let all = true;
            const inB = new Set(colsOf[b]!);
            for (const j of colsOf[a]!) if (!inB.has(j)) {
              all = false;
              break;
            }
            if (all) {
              rowsAlive[liveRows[b]!] = 0;
              changed = true;
            }
          }
        }
      }
    }
    const liveRows: number[] = [];
    for (let r = 0; r < R; r++) if (rowsAlive[r]) liveRows.push(r);
    if (liveRows.length === 0) {
      if (costSoFar < bestCost) {
        bestCost = costSoFar;
        best = chosen;
      }
      return;
    }
    // Lower bound: pairwise independent rows each need a column of their own.
    const used = new Uint8Array(C);
    let bound = costSoFar;
    const byFew = liveRows
      .map((r) => ({ r, cols: rowCols[r]!.filter((j) => colsAlive[j]) }))
      .sort((x, y) => x.cols.length - y.cols.length);
    for (const { cols } of byFew) {
      work += cols.length;
      if (cols.some((j) => used[j])) continue;
      let m = Infinity;
      for (const j of cols) {
        used[j] = 1;
        if (cost[j]! < m) m = cost[j]!;
      }
      bound += m;
    }
    if (bound >= bestCost) return;
    // Branch on the row with fewest columns; each later branch excludes the earlier columns.
    const { cols } = byFew[0]!;
    const ordered = [...cols].sort((x, y) => {
      const kx = colRows[x]!.reduce((s, r) => s + rowsAlive[r]!, 0) / cost[x]!;
      const ky = colRows[y]!.reduce((s, r) => s + rowsAlive[r]!, 0) / cost[y]!;
      return ky - kx;
    });
    const excluded = Uint8Array.from(colsAlive);
    for (const j of ordered) {
      const rows2 = Uint8Array.from(rowsAlive);
      for (const r of colRows[j]!) rows2[r] = 0;
      const cols2 = Uint8Array.from(excluded);
      cols2[j] = 0;
      search(rows2, cols2, [...chosen, j], costSoFar + cost[j]!);
      excluded[j] = 0;
      if (exhausted) return;
    }
  };
  search(allRows, allCols, [], 0);
  return { chosen: best.sort((a, b) => a - b), cost: bestCost, optimal: !exhausted };
}
