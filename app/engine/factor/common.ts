import { EngineError } from '../errors.ts';
import { inverse } from '../linalg.ts';
import { isPositiveDefinite, smoothToPositiveDefinite } from '../dense.ts';

/** |rᵢⱼ − rⱼᵢ| and |rᵢᵢ − 1| tolerated in a correlation matrix handed to the factor engine. */
export const CORRELATION_TOL = 1e-8;

/** A p × m matrix of zeros. */
export function zeros(rows: number, cols: number): number[][] {
  return Array.from({ length: rows }, () => new Array<number>(cols).fill(0));
}

/** p × p identity. */
export function identity(p: number): number[][] {
  const out = zeros(p, p);
  for (let i = 0; i < p; i++) out[i][i] = 1;
  return out;
}

/**
 * Checks that r is a square, symmetric, finite matrix with a unit diagonal and entries in [−1, 1];
 * returns p. Throws EngineError naming the entry that fails, prefixed by `fn`.
 */
export function checkCorrelationMatrix(r: number[][], fn: string): number {
  if (!Array.isArray(r) || r.length === 0)
    throw new EngineError(`${fn} requires a correlation matrix`, 'shape');
  const p = r.length;
  for (let i = 0; i < p; i++) {
    if (!Array.isArray(r[i]) || r[i].length !== p) {
      throw new EngineError(
        `${fn} requires a square correlation matrix; row ${i} has the wrong length`,
        'shape',
      );
    }
    for (let j = 0; j < p; j++) {
      const v = r[i][j];
      if (!Number.isFinite(v)) {
        throw new EngineError(`${fn} requires finite correlations; entry [${i}][${j}] is ${v}`, 'non-finite');
      }
      if (Math.abs(v) > 1 + CORRELATION_TOL) {
        throw new EngineError(`${fn}: entry [${i}][${j}] is ${v}, outside [−1, 1]`, 'not-correlation');
      }
      if (Math.abs(v - r[j][i]) > CORRELATION_TOL) {
        throw new EngineError(`${fn}: matrix is not symmetric at [${i}][${j}]`, 'not-symmetric');
      }
    }
    if (Math.abs(r[i][i] - 1) > CORRELATION_TOL) {
      throw new EngineError(`${fn}: diagonal entry [${i}][${i}] is ${r[i][i]}, not 1`, 'not-correlation');
    }
  }
  return p;
}

/**
 * A correlation matrix made usable for inversion: returned as is when positive definite, otherwise
 * smoothed by eigenvalue clipping (smoothToPositiveDefinite) with `smoothed` true, so callers can say so.
 */
export function positiveDefiniteCorrelation(r: number[][]): { matrix: number[][]; smoothed: boolean } {
  if (isPositiveDefinite(r)) return { matrix: r.map((row) => row.slice()), smoothed: false };
  return smoothToPositiveDefinite(r);
}

/**
 * Squared multiple correlations 1 − 1/(R⁻¹)ᵢᵢ (Guttman 1956; registry id `efa.smc`), each item's R²
 * on all the others. Cost: O(p³). Throws EngineError "matrix is singular" when R cannot be inverted.
 *
 * @example squaredMultipleCorrelations([[1, 0.5], [0.5, 1]]) // [0.25, 0.25]
 */
export function squaredMultipleCorrelations(r: number[][]): number[] {
  const inv = inverse(r);
  return inv.map((row, i) => 1 - 1 / row[i]);
}
