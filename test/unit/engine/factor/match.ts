/**
 * Compares two loading matrices up to the order and sign of their columns: each reference column is
 * paired with the unused column of `actual` closest to it or to its negative, and the largest absolute
 * difference over the paired columns is returned, with the pairing (to reorder factor correlations).
 */
export function loadingDistance(
  actual: number[][],
  expected: number[][],
): { distance: number; order: number[]; signs: number[] } {
  const m = expected[0].length;
  const used = new Set<number>();
  const order: number[] = [];
  const signs: number[] = [];
  let distance = 0;
  for (let k = 0; k < m; k++) {
    let best = { col: -1, sign: 1, d: Number.POSITIVE_INFINITY };
    for (let c = 0; c < m; c++) {
      if (used.has(c)) continue;
      for (const sign of [1, -1]) {
        const d = Math.max(...expected.map((row, i) => Math.abs(row[k] - sign * actual[i][c])));
        if (d < best.d) best = { col: c, sign, d };
      }
    }
    used.add(best.col);
    order.push(best.col);
    signs.push(best.sign);
    distance = Math.max(distance, best.d);
  }
  return { distance, order, signs };
}

/** Largest absolute difference between two matrices (or vectors) of the same shape. */
export function maxDiff(a: number[] | number[][], b: number[] | number[][]): number {
  const fa = (a as (number | number[])[]).flat() as number[];
  const fb = (b as (number | number[])[]).flat() as number[];
  if (fa.length !== fb.length) return Number.POSITIVE_INFINITY;
  return Math.max(...fa.map((v, i) => Math.abs(v - fb[i])));
}
