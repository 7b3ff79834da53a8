import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { correlationFromCovariance, listwiseCovariance } from '../../../app/engine/covariance.ts';
import {
  correlationMatrix,
  covarianceMatrix,
  inverse,
  solve,
  symmetricEigen,
} from '../../../app/engine/linalg.ts';
import { choleskySolve, matMul, transpose } from '../../../app/engine/dense.ts';
import { cronbachAlpha, standardizedAlpha } from '../../../app/engine/reliability/alpha.ts';
import { meanScores, reverseScore, sumScores } from '../../../app/engine/scoring.ts';

/*
 * Properties every correct implementation must have, checked on many random inputs (fast-check,
 * seeded so a failure can be replayed). Each states an identity of the published definitions, not a
 * restatement of our code: Cronbach (1951) for alpha and standardized alpha, the spectral theorem for
 * symmetric matrices, and A·A⁻¹ = I for the solves.
 */

const RUNS = { numRuns: 60, seed: 20261201 };

/** Integer answers on a 1–5 scale: n respondents × k items, each item with at least two values. */
function likert(minN: number, maxN: number, minK: number, maxK: number) {
  return fc
    .record({ n: fc.integer({ min: minN, max: maxN }), k: fc.integer({ min: minK, max: maxK }) })
    .chain(({ n, k }) =>
      fc.array(fc.array(fc.integer({ min: 1, max: 5 }), { minLength: k, maxLength: k }), {
        minLength: n,
        maxLength: n,
      }),
    )
    .filter((rows) => rows[0].every((_, j) => rows.some((row) => row[j] !== rows[0][j])));
}

/** A random symmetric matrix with entries in [−10, 10]. */
const symmetric = fc.integer({ min: 1, max: 12 }).chain((n) =>
  fc
    .array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: n * n, maxLength: n * n })
    .map((flat) => {
      const a = Array.from({ length: n }, (_, i) => flat.slice(i * n, (i + 1) * n));
      return a.map((row, i) => row.map((_, j) => (i <= j ? a[i][j] : a[j][i])));
    }),
);

/** A random symmetric positive-definite matrix B·Bᵀ + n·I with a right-hand side. */
const positiveDefinite = fc.integer({ min: 1, max: 12 }).chain((n) =>
  fc
    .record({
      b: fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: n * n, maxLength: n * n }),
      rhs: fc.array(fc.double({ min: -100, max: 100, noNaN: true }), { minLength: n, maxLength: n }),
    })
    .map(({ b, rhs }) => {
      const rows = Array.from({ length: n }, (_, i) => b.slice(i * n, (i + 1) * n));
      const a = matMul(rows, transpose(rows)).map((row, i) => row.map((x, j) => x + (i === j ? n : 0)));
      return { a, rhs };
    }),
);

function maxAbs(a: number[][]): number {
  return Math.max(...a.map((row) => Math.max(...row.map(Math.abs))));
}

function pearson(x: number[], y: number[]): number {
  return correlationMatrix(x.map((v, i) => [v, y[i]]))[0][1];
}

describe('scoring properties', () => {
  it('reverse keying twice is the identity (x ↦ min + max − x is an involution)', () => {
    fc.assert(
      fc.property(likert(1, 30, 1, 8), fc.integer({ min: 0, max: 255 }), (rows, mask) => {
        const names = rows[0].map((_, j) => `i${j}`);
        const reverse = names.filter((_, j) => (mask >> j) & 1);
        const bounds = { min: 1, max: 5 };
        const twice = reverseScore(reverseScore(rows, names, reverse, bounds), names, reverse, bounds);
        expect(twice).toEqual(rows);
      }),
      RUNS,
    );
  });

  it('sum and mean scores correlate exactly 1 (the mean is the sum divided by k)', () => {
    fc.assert(
      fc.property(likert(3, 40, 2, 10), (rows) => {
        const sums = sumScores(rows) as number[];
        if (sums.every((s) => s === sums[0])) return;
        const means = meanScores(rows) as number[];
        expect(pearson(sums, means)).toBeCloseTo(1, 12);
      }),
      RUNS,
    );
  });
});

describe('alpha properties (Cronbach 1951)', () => {
  it('alpha equals standardized alpha when every item has the same variance', () => {
    fc.assert(
      fc.property(likert(4, 40, 2, 8), (rows) => {
        // z-scores give every item variance 1, so the covariance matrix is the correlation matrix.
        const cov = covarianceMatrix(rows);
        const z = rows.map((row) =>
          row.map((x, j) => {
            const m = rows.reduce((s, r) => s + r[j], 0) / rows.length;
            return (x - m) / Math.sqrt(cov[j][j]);
          }),
        );
        const zc = covarianceMatrix(z);
        const k = zc.length;
        let sum = 0;
        for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) if (i !== j) sum += zc[i][j];
        const meanR = sum / (k * (k - 1));
        expect(cronbachAlpha(zc)).toBeCloseTo(standardizedAlpha(meanR, k), 10);
      }),
      RUNS,
    );
  });

  it('alpha does not depend on the order of the items', () => {
    fc.assert(
      fc.property(
        likert(3, 40, 2, 8).chain((rows) =>
          fc.tuple(
            fc.constant(rows),
            fc.shuffledSubarray(
              rows[0].map((_, j) => j),
              {
                minLength: rows[0].length,
                maxLength: rows[0].length,
              },
            ),
          ),
        ),
        ([rows, order]) => {
          const permuted = rows.map((row) => order.map((j) => row[j]));
          const a = cronbachAlpha(covarianceMatrix(rows));
          const b = cronbachAlpha(covarianceMatrix(permuted));
          expect(Math.abs(a - b)).toBeLessThan(1e-12 * Math.max(1, Math.abs(a)));
        },
      ),
      RUNS,
    );
  });

  it('listwise covariance and correlation agree with the row-wise functions', () => {
    fc.assert(
      fc.property(likert(3, 30, 1, 6), (rows) => {
        const columns = rows[0].map((_, j) => Float64Array.from(rows, (row) => row[j]));
        const cov = listwiseCovariance(columns).covariance;
        expect(cov).toEqual(covarianceMatrix(rows));
        const r = correlationFromCovariance(cov) as number[][];
        const direct = correlationMatrix(rows);
        for (let i = 0; i < r.length; i++)
          for (let j = 0; j < r.length; j++) expect(r[i][j]).toBeCloseTo(direct[i][j], 14);
      }),
      RUNS,
    );
  });
});

describe('linear algebra identities', () => {
  it('symmetric eigendecomposition: A·V = V·D and VᵀV = I', () => {
    fc.assert(
      fc.property(symmetric, (a) => {
        const n = a.length;
        const { values, vectors } = symmetricEigen(a);
        const scale = Math.max(1, maxAbs(a));
        const av = matMul(a, vectors);
        const vd = vectors.map((row) => row.map((x, j) => x * values[j]));
        for (let i = 0; i < n; i++)
          for (let j = 0; j < n; j++) expect(Math.abs(av[i][j] - vd[i][j])).toBeLessThan(1e-12 * n * scale);
        const vtv = matMul(transpose(vectors), vectors);
        for (let i = 0; i < n; i++)
          for (let j = 0; j < n; j++) expect(Math.abs(vtv[i][j] - (i === j ? 1 : 0))).toBeLessThan(1e-12 * n);
        for (let j = 1; j < n; j++) expect(values[j]).toBeLessThanOrEqual(values[j - 1]);
      }),
      RUNS,
    );
  });

  it('the Cholesky solve, the LU solve and the checked inverse give the same x', () => {
    fc.assert(
      fc.property(positiveDefinite, ({ a, rhs }) => {
        const n = a.length;
        const byCholesky = choleskySolve(a, rhs);
        const byLu = solve(a, rhs);
        const byInverse = matMul(
          inverse(a),
          rhs.map((x) => [x]),
        ).map((row) => row[0]);
        const size = Math.max(1, ...byInverse.map(Math.abs));
        for (let i = 0; i < n; i++) {
          expect(Math.abs(byCholesky[i] - byInverse[i])).toBeLessThan(1e-10 * size);
          expect(Math.abs(byLu[i] - byInverse[i])).toBeLessThan(1e-10 * size);
        }
        // And it solves the system: A·x reproduces b.
        const back = matMul(
          a,
          byCholesky.map((x) => [x]),
        ).map((row) => row[0]);
        const bScale = Math.max(1, ...rhs.map(Math.abs)) * Math.max(1, maxAbs(a));
        for (let i = 0; i < n; i++) expect(Math.abs(back[i] - rhs[i])).toBeLessThan(1e-10 * bScale);
      }),
      RUNS,
    );
  });
});
