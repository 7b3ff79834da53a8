import { LuDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { createRng } from '../../../app/engine/rng.ts';
import { luFactor, luSingular, luSolve } from '../../../app/engine/lu.ts';

/**
 * luFactor/luSolve port the LU factorization with partial pivoting in the arithmetic order of
 * ml-matrix's LuDecomposition (the library the engine used before, itself the public-domain JAMA
 * form). Their correctness against numpy.linalg.inv/solve is checked through inverse and solve in
 * linalg.test.ts; here they must reproduce ml-matrix's factors and solutions exactly, bit for bit.
 */

/** Arbitrary test values in [−0.5, 0.5) from the engine's seeded generator (only their kinds matter). */
function generator(seed: number): () => number {
  const rng = createRng(seed);
  return () => rng.next() - 0.5;
}

function square(n: number, next: () => number): number[][] {
  return Array.from({ length: n }, () => Array.from({ length: n }, next));
}

describe('luFactor and luSolve reproduce ml-matrix LuDecomposition to the last bit', () => {
  const next = generator(11);
  const cases: [string, number[][]][] = [
    ['1 × 1', [[4]]],
    [
      'needs a row swap',
      [
        [0, 2, 1],
        [3, 1, 0],
        [1, 1, 5],
      ],
    ],
    [
      'singular (a zero pivot)',
      [
        [1, 2],
        [2, 4],
      ],
    ],
    ['random 9 × 9', square(9, next)],
    ['random 60 × 60', square(60, next)],
  ];
  it.each(cases)('%s', (_name, a) => {
    const n = a.length;
    const ours = luFactor(Float64Array.from(a.flat()), n);
    const theirs = new LuDecomposition(new Matrix(a));
    const factors = theirs.lowerTriangularMatrix
      .to2DArray()
      .map((row, i) => row.map((l, j) => (j < i ? l : theirs.upperTriangularMatrix.get(i, j))));
    expect(Array.from(ours.lu)).toEqual(factors.flat());
    expect(Array.from(ours.pivot)).toEqual(theirs.pivotPermutationVector);
    expect(luSingular(ours)).toBe(theirs.isSingular());
    if (!theirs.isSingular()) {
      const b = Array.from({ length: n }, () => [next(), next(), next()]);
      const x = luSolve(ours, Float64Array.from(b.flat()), 3);
      expect(Array.from(x)).toEqual(theirs.solve(new Matrix(b)).to2DArray().flat());
    }
  });
});
