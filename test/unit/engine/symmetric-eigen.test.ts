import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { createRng } from '../../../app/engine/rng.ts';
import { tridiagonalQl } from '../../../app/engine/symmetric-eigen.ts';

/**
 * tridiagonalQl ports the tred2/tql2 procedures in the arithmetic order of ml-matrix's
 * EigenvalueDecomposition (the library the engine used before, itself the public-domain JAMA form).
 * Its correctness against numpy.linalg.eigh is checked through symmetricEigen in linalg.test.ts;
 * here it must reproduce ml-matrix's decomposition exactly, bit for bit, on matrices of every kind.
 */

/** Arbitrary test values in [−0.5, 0.5) from the engine's seeded generator (only their kinds matter). */
function generator(seed: number): () => number {
  const rng = createRng(seed);
  return () => rng.next() - 0.5;
}

function symmetric(n: number, next: () => number): number[][] {
  const a = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      a[i][j] = next();
      a[j][i] = a[i][j];
    }
  }
  return a;
}

function ours(a: number[][]) {
  const n = a.length;
  const { values, vectors } = tridiagonalQl(Float64Array.from(a.flat()), n);
  // Logical V(i, c) is row c, element i.
  const v = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, c) => vectors[c * n + i]));
  return { values: Array.from(values), vectors: v };
}

function library(a: number[][]) {
  const evd = new EigenvalueDecomposition(new Matrix(a), { assumeSymmetric: true });
  return { values: evd.realEigenvalues, vectors: evd.eigenvectorMatrix.to2DArray() };
}

describe('tridiagonalQl reproduces ml-matrix EigenvalueDecomposition to the last bit', () => {
  const next = generator(7);
  const cases: [string, number[][]][] = [
    ['1 × 1', [[3.5]]],
    [
      '2 × 2',
      [
        [2, 1],
        [1, 2],
      ],
    ],
    [
      'zero matrix',
      [
        [0, 0, 0],
        [0, 0, 0],
        [0, 0, 0],
      ],
    ],
    [
      'diagonal with a repeated eigenvalue',
      [
        [2, 0, 0, 0],
        [0, 5, 0, 0],
        [0, 0, 2, 0],
        [0, 0, 0, -1],
      ],
    ],
    [
      'identity 6 × 6',
      Array.from({ length: 6 }, (_, i) => Array.from({ length: 6 }, (_, j) => (i === j ? 1 : 0))),
    ],
    [
      'rank one (all 0.3 off the diagonal, 1 on it)',
      Array.from({ length: 12 }, (_, i) => Array.from({ length: 12 }, (_, j) => (i === j ? 1 : 0.3))),
    ],
    ['random 5 × 5', symmetric(5, next)],
    ['random 17 × 17', symmetric(17, next)],
    ['random 60 × 60', symmetric(60, next)],
  ];
  it.each(cases)('%s', (_name, a) => {
    const got = ours(a);
    const want = library(a);
    expect(got.values).toEqual(want.values);
    expect(got.vectors).toEqual(want.vectors);
    for (let i = 0; i < got.values.length; i++) {
      expect(Object.is(got.values[i], want.values[i])).toBe(true);
    }
  });
});
