import { chiSquareSf } from '../distributions.ts';
import { EngineError } from '../errors.ts';
import { inverse } from '../linalg.ts';
import { logDeterminant } from '../dense.ts';
import { checkCorrelationMatrix, positiveDefiniteCorrelation } from './common.ts';

/** Kaiser's (1974) labels for KMO and MSA, lowest bound first. */
export const KMO_LABELS: readonly { from: number; label: string }[] = [
  { from: 0.9, label: 'marvelous' },
  { from: 0.8, label: 'meritorious' },
  { from: 0.7, label: 'middling' },
  { from: 0.6, label: 'mediocre' },
  { from: 0.5, label: 'miserable' },
  { from: Number.NEGATIVE_INFINITY, label: 'unacceptable' },
];

/** Kaiser's (1974) label for a KMO or MSA value (registry id `efa.kmo-labels`). */
export function kmoLabel(value: number): string {
  return (KMO_LABELS.find((b) => value >= b.from) ?? KMO_LABELS[KMO_LABELS.length - 1]).label;
}

export interface Factorability {
  /** Overall Kaiser–Meyer–Olkin measure of sampling adequacy. */
  kmo: number;
  /** Per-item measure of sampling adequacy, in item order. */
  msa: number[];
  /** Anti-image correlations −qᵢⱼ/√(qᵢᵢqⱼⱼ) with Q = R⁻¹ (off-diagonal), 1 on the diagonal. */
  antiImage: number[][];
  /** Bartlett's test of sphericity; null when ln|R| is undefined (a singular matrix). */
  bartlett: { chiSquare: number; df: number; p: number } | null;
  /** |R| and ln|R|; null when R is singular. */
  determinant: number | null;
  logDeterminant: number | null;
  /** True when R was not positive definite and KMO/MSA rest on a smoothed matrix. */
  smoothed: boolean;
  warnings: string[];
}

/**
 * Factorability of a correlation matrix: Kaiser–Meyer–Olkin KMO and per-item MSA from the
 * anti-image correlations (Kaiser 1970; Kaiser & Rice 1974; registry id `efa.kmo`), Bartlett's (1950)
 * test of sphericity χ² = −(n − 1 − (2p + 5)/6)·ln|R|, df = p(p − 1)/2 (registry id `efa.bartlett`),
 * and the determinant. A singular or indefinite R is smoothed (eigenvalue clipping) for KMO/MSA with a
 * warning, and Bartlett's test and the determinant are then null.
 *
 * Cost: O(p³). Throws EngineError for a matrix that is not a correlation matrix, fewer than two items,
 * or n < 2.
 *
 * @example factorability([[1, .5, .4], [.5, 1, .3], [.4, .3, 1]], 100).bartlett?.df // 3
 */
export function factorability(r: number[][], n: number): Factorability {
  const p = checkCorrelationMatrix(r, 'factorability');
  if (p < 2) throw new EngineError('factorability requires at least two items', 'too-few-items');
  if (!Number.isInteger(n) || n < 2)
    throw new EngineError(`factorability requires n ≥ 2 respondents, got ${n}`);
  const warnings: string[] = [];
  const { matrix, smoothed } = positiveDefiniteCorrelation(r);
  if (smoothed) {
    warnings.push(
      'the correlation matrix is singular or not positive definite; KMO and MSA use a smoothed matrix, and Bartlett’s test and the determinant are not defined',
    );
  }
  const q = inverse(matrix);
  const antiImage = q.map((row, i) => row.map((v, j) => (i === j ? 1 : -v / Math.sqrt(q[i][i] * q[j][j]))));
  let sumR = 0;
  let sumA = 0;
  const msa = r.map((row, i) => {
    let rowR = 0;
    let rowA = 0;
    for (let j = 0; j < p; j++) {
      if (j === i) continue;
      rowR += row[j] * row[j];
      rowA += antiImage[i][j] * antiImage[i][j];
    }
    sumR += rowR;
    sumA += rowA;
    return rowR + rowA === 0 ? 0 : rowR / (rowR + rowA);
  });
  const kmo = sumR + sumA === 0 ? 0 : sumR / (sumR + sumA);
  let bartlett: Factorability['bartlett'] = null;
  let logDet: number | null = null;
  if (!smoothed) {
    logDet = logDeterminant(matrix);
    const df = (p * (p - 1)) / 2;
    const chiSquare = Math.max(0, -(n - 1 - (2 * p + 5) / 6) * logDet);
    bartlett = { chiSquare, df, p: chiSquareSf(chiSquare, df) };
    if (n - 1 - (2 * p + 5) / 6 <= 0) {
      warnings.push(
        `Bartlett’s test needs n > ${Math.ceil(1 + (2 * p + 5) / 6)} for ${p} items; its χ² is 0 here`,
      );
    }
  }
  return {
    kmo,
    msa,
    antiImage,
    bartlett,
    determinant: logDet === null ? null : Math.exp(logDet),
    logDeterminant: logDet,
    smoothed,
    warnings,
  };
}
