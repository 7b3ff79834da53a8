import { describe, expect, it } from 'vitest';
import { EngineError } from '../../../app/engine/errors.ts';
import {
  constantColumns,
  correlationMatrix,
  covarianceMatrix,
  inverse,
  pairwiseCorrelation,
  solve,
  symmetricEigen,
} from '../../../app/engine/linalg.ts';
import {
  cholesky,
  choleskySolve,
  conditionNumber,
  isPositiveDefinite,
  logDeterminant,
  matMul,
  smoothToPositiveDefinite,
  transpose,
} from '../../../app/engine/dense.ts';
import fixture from '../../reference/fixtures/linalg.json' with { type: 'json' };

/*
 * Reference values: test/reference/fixtures/linalg.json, written by test/reference/linalg.py with
 * numpy (eigh, inv, slogdet, cholesky, cond, cov, corrcoef; pairwise correlations by corrcoef on each
 * pair's complete rows). Tolerances scale with the condition number where the problem demands it.
 */

const MACHINE = 2.220446049250313e-16;

function maxAbsDiff(a: number[][], b: number[][]): number {
  let worst = 0;
  for (let i = 0; i < a.length; i++)
    for (let j = 0; j < a[i].length; j++) worst = Math.max(worst, Math.abs(a[i][j] - b[i][j]));
  return worst;
}

function maxAbs(a: number[][]): number {
  return Math.max(...a.map((row) => Math.max(...row.map(Math.abs))));
}

function identity(n: number): number[][] {
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
}

function diag(values: number[]): number[][] {
  return values.map((v, i) => values.map((_, j) => (i === j ? v : 0)));
}

describe('symmetricEigen against numpy.linalg.eigh', () => {
  for (const [index, c] of fixture.symmetric.entries()) {
    const n = c.matrix.length;
    it(`case ${index} (${n}×${n}, condition ${c.condition.toExponential(1)})`, () => {
      const { values, vectors } = symmetricEigen(c.matrix);
      const scale = Math.max(...c.eigenvalues.map(Math.abs));
      for (let j = 0; j < n; j++)
        expect(Math.abs(values[j] - c.eigenvalues[j])).toBeLessThan(1e-13 * n * scale);
      for (let j = 1; j < n; j++) expect(values[j]).toBeLessThanOrEqual(values[j - 1]);
      // Eigenvectors agree up to sign: |vᵀv_ref| = 1 (all eigenvalues here are well separated).
      for (let j = 0; j < n; j++) {
        let dot = 0;
        for (let i = 0; i < n; i++) dot += vectors[i][j] * c.eigenvectors[i][j];
        expect(Math.abs(Math.abs(dot) - 1)).toBeLessThan(1e-9);
      }
      // Properties: A·V = V·D and VᵀV = I.
      expect(maxAbsDiff(matMul(c.matrix, vectors), matMul(vectors, diag(values)))).toBeLessThan(
        1e-13 * n * scale,
      );
      expect(maxAbsDiff(matMul(transpose(vectors), vectors), identity(n))).toBeLessThan(1e-13 * n);
    });
  }

  it('signs each eigenvector so its largest component is positive', () => {
    const { vectors } = symmetricEigen(fixture.symmetric[3].matrix);
    for (let j = 0; j < vectors.length; j++) {
      const column = vectors.map((row) => row[j]);
      const largest = column.reduce((best, v) => (Math.abs(v) > Math.abs(best) ? v : best), 0);
      expect(largest).toBeGreaterThan(0);
    }
  });

  it('refuses a matrix that is not symmetric', () => {
    expect(() =>
      symmetricEigen([
        [1, 2],
        [3, 1],
      ]),
    ).toThrow('matrix is not symmetric');
  });
});

describe('inverse, Cholesky, log-determinant and condition number against numpy', () => {
  for (const [index, c] of [...fixture.symmetric, ...fixture.general].entries()) {
    const n = c.matrix.length;
    it(`inverse case ${index} (${n}×${n}) matches numpy.linalg.inv and satisfies A·A⁻¹ = I`, () => {
      const inv = inverse(c.matrix);
      const tol = c.condition * n * 10 * MACHINE;
      expect(maxAbsDiff(inv, c.inverse) / maxAbs(c.inverse)).toBeLessThan(tol);
      expect(maxAbsDiff(matMul(c.matrix, inv), identity(n))).toBeLessThan(tol);
      expect(Math.abs(conditionNumber(c.matrix) - c.condition) / c.condition).toBeLessThan(1e-6);
    });
  }

  for (const [index, c] of fixture.symmetric.entries()) {
    if (c.logDeterminant === undefined || c.cholesky === undefined) continue;
    it(`case ${index}: Cholesky factor and log-determinant match numpy.linalg.cholesky and slogdet`, () => {
      const l = cholesky(c.matrix);
      // Forward error of a Cholesky factor and of ln|A| grows with n·κ(A)·ε (Higham 2002, §10.1).
      const n = c.matrix.length;
      const forward = n * c.condition * MACHINE;
      expect(maxAbsDiff(l, c.cholesky)).toBeLessThan(forward * Math.sqrt(maxAbs(c.matrix)));
      expect(maxAbsDiff(matMul(l, transpose(l)), c.matrix)).toBeLessThan(1e-13 * maxAbs(c.matrix) * n);
      expect(Math.abs(logDeterminant(c.matrix) - c.logDeterminant)).toBeLessThan(forward + 1e-12);
      expect(isPositiveDefinite(c.matrix)).toBe(true);
    });
  }

  it('reports singular and indefinite matrices by name', () => {
    const singular = [
      [1, 2],
      [2, 4],
    ];
    expect(() => inverse(singular)).toThrow('matrix is singular');
    expect(() =>
      inverse([
        [1, 1],
        [1, 1 + 1e-15],
      ]),
    ).toThrow('matrix is singular');
    expect(() => cholesky(fixture.indefinite.matrix)).toThrow('matrix is not positive definite');
    expect(() => logDeterminant(fixture.indefinite.matrix)).toThrow('matrix is not positive definite');
    expect(isPositiveDefinite(fixture.indefinite.matrix)).toBe(false);
    expect(
      isPositiveDefinite([
        [1, 0.2],
        [0.1, 1],
      ]),
    ).toBe(false);
    expect(conditionNumber(singular)).toBe(Number.POSITIVE_INFINITY);
    expect(() => inverse([[1, 2, 3]])).toThrow('square matrix');
    expect(() => inverse([[Number.NaN]])).toThrow('entry [0][0] is NaN');
    expect(() => cholesky([[1]])).not.toThrow();
  });
});

describe('covariance and correlation against numpy.cov / numpy.corrcoef', () => {
  for (const [index, c] of fixture.data.entries()) {
    it(`data case ${index} (${c.data.length} cases × ${c.data[0].length} variables)`, () => {
      const cov = covarianceMatrix(c.data);
      expect(maxAbsDiff(cov, c.covariance) / maxAbs(c.covariance)).toBeLessThan(1e-10);
      const r = correlationMatrix(c.data);
      expect(maxAbsDiff(r, c.correlation)).toBeLessThan(1e-10);
      for (let j = 0; j < r.length; j++) expect(r[j][j]).toBe(1);
    });
  }

  it('names the column with zero variance', () => {
    const data = [
      [1, 2, 5],
      [2, 3, 5],
      [3, 1, 5],
    ];
    expect(constantColumns(data)).toEqual([2]);
    expect(() => correlationMatrix(data)).toThrow('column index 2');
    expect(() => correlationMatrix(data)).toThrow(EngineError);
  });

  it('names row and column of a bad value and refuses too few rows', () => {
    expect(() =>
      covarianceMatrix([
        [1, 2],
        [3, Number.POSITIVE_INFINITY],
      ]),
    ).toThrow('row index 1, column index 1');
    expect(() => covarianceMatrix([[1, 2]])).toThrow('at least two rows');
    expect(() => correlationMatrix([[1, 2], [3]])).toThrow('row index 1 has 1');
  });
});

describe('pairwiseCorrelation against numpy.corrcoef on pairwise-complete rows', () => {
  for (const [index, c] of fixture.pairwise.entries()) {
    it(`pairwise case ${index}`, () => {
      const { r, n } = pairwiseCorrelation(c.data);
      expect(maxAbsDiff(r, c.r)).toBeLessThan(1e-12);
      expect(n).toEqual(c.n);
    });
  }

  it('equals correlationMatrix when nothing is missing', () => {
    const data = fixture.data[0].data;
    expect(maxAbsDiff(pairwiseCorrelation(data).r, correlationMatrix(data))).toBeLessThan(1e-14);
  });

  it('explains pairs that cannot be correlated', () => {
    expect(() =>
      pairwiseCorrelation([
        [1, null],
        [2, null],
        [null, 3],
        [4, 5],
      ]),
    ).toThrow('column index 0 and column index 1 present, found 1');
    expect(() =>
      pairwiseCorrelation([
        [1, 7],
        [2, 7],
        [3, 7],
        [null, 9],
      ]),
    ).toThrow('column index 1 is constant on the 3 cases');
    expect(() =>
      pairwiseCorrelation([
        [1, 7],
        [1, 8],
      ]),
    ).toThrow('column index 0 is constant');
    expect(() => pairwiseCorrelation([[1, Number.NaN]])).toThrow('row index 0, column index 1 is NaN');
  });
});

describe('smoothToPositiveDefinite', () => {
  it('matches the eigenvalue clip-and-rescale computed with numpy and yields a positive-definite correlation matrix', () => {
    const { matrix, smoothed } = smoothToPositiveDefinite(fixture.indefinite.matrix);
    expect(fixture.indefinite.eigenvalues[3]).toBeLessThan(0);
    expect(smoothed).toBe(true);
    expect(maxAbsDiff(matrix, fixture.indefinite.smoothed)).toBeLessThan(1e-10);
    expect(isPositiveDefinite(matrix)).toBe(true);
    for (let i = 0; i < matrix.length; i++) expect(matrix[i][i]).toBe(1);
  });

  it('leaves a positive-definite matrix unchanged', () => {
    const r = fixture.symmetric[3].matrix;
    const { matrix, smoothed } = smoothToPositiveDefinite(r);
    expect(smoothed).toBe(false);
    expect(matrix).toEqual(r);
    expect(matrix).not.toBe(r);
  });

  it('rejects a bad floor', () => {
    expect(() => smoothToPositiveDefinite(fixture.indefinite.matrix, 0)).toThrow('minimum eigenvalue > 0');
  });
});

describe('matMul and transpose', () => {
  it('multiplies and transposes rectangular matrices', () => {
    expect(
      matMul(
        [
          [1, 2, 3],
          [4, 5, 6],
        ],
        [[1], [0], [-1]],
      ),
    ).toEqual([[-2], [-2]]);
    expect(transpose([[1, 2, 3]])).toEqual([[1], [2], [3]]);
    expect(() => matMul([[1, 2]], [[1, 2]])).toThrow('1×2 times 1×2');
  });
});

describe('solve and choleskySolve against numpy.linalg.solve', () => {
  const relative = (x: number[][], y: number[][]) => maxAbsDiff(x, y) / maxAbs(y);
  const asMatrix = (v: number[] | number[][]) =>
    Array.isArray(v[0]) ? (v as number[][]) : (v as number[]).map((x) => [x]);
  for (const [index, c] of fixture.solve.general.entries()) {
    const n = c.matrix.length;
    it(`general case ${index} (${n}×${n}, condition ${c.condition.toExponential(1)})`, () => {
      // Backward-stable LU: forward error within a small multiple of n·κ(A)·ε (Higham 2002, §9.3).
      const tol = n * c.condition * 10 * MACHINE;
      const x = Array.isArray(c.rhs[0])
        ? solve(c.matrix, c.rhs as number[][])
        : solve(c.matrix, c.rhs as number[]);
      expect(relative(asMatrix(x), asMatrix(c.solution))).toBeLessThan(tol);
    });
  }
  for (const [index, c] of fixture.solve.positiveDefinite.entries()) {
    const n = c.matrix.length;
    it(`positive-definite case ${index} (${n}×${n}, condition ${c.condition.toExponential(1)}): both agree with numpy`, () => {
      const tol = n * c.condition * 10 * MACHINE;
      const rhs = c.rhs as number[] | number[][];
      const byCholesky = Array.isArray(rhs[0])
        ? choleskySolve(c.matrix, rhs as number[][])
        : choleskySolve(c.matrix, rhs as number[]);
      const byLu = Array.isArray(rhs[0])
        ? solve(c.matrix, rhs as number[][])
        : solve(c.matrix, rhs as number[]);
      expect(relative(asMatrix(byCholesky), asMatrix(c.solution))).toBeLessThan(tol);
      expect(relative(asMatrix(byLu), asMatrix(c.solution))).toBeLessThan(tol);
    });
  }

  it('names a singular, indefinite or mismatched system', () => {
    expect(() =>
      solve(
        [
          [1, 2],
          [2, 4],
        ],
        [1, 1],
      ),
    ).toThrow('matrix is singular');
    expect(() => choleskySolve(fixture.indefinite.matrix, [1, 1, 1, 1])).toThrow(
      'matrix is not positive definite',
    );
    expect(() =>
      choleskySolve(
        [
          [1, 2],
          [0, 1],
        ],
        [1, 1],
      ),
    ).toThrow('matrix is not symmetric');
    expect(() =>
      solve(
        [
          [1, 0],
          [0, 1],
        ],
        [1, 2, 3],
      ),
    ).toThrow('right-hand side with 2 rows, got 3');
    expect(() =>
      solve(
        [
          [1, 0],
          [0, 1],
        ],
        [1, Number.NaN],
      ),
    ).toThrow('entry [1][0] is NaN');
  });
});
