import { describe, expect, it } from 'vitest';
import { pairwiseMoments } from '../../../app/engine/covariance.ts';
import { descriptivesOfColumns, summarizeColumns } from '../../../app/engine/item-stats.ts';
import { Arena, kernels, residentColumns } from '../../../app/engine/kernels/index.ts';
import { EngineError } from '../../../app/engine/errors.ts';
import { createRng } from '../../../app/engine/rng.ts';
// @ts-expect-error: plain JavaScript build script without type declarations
import { binarySource, compileKernels, KERNELS_BINARY } from '../../../app/engine/kernels/build.mjs';
import { readFileSync } from 'node:fs';

describe('compiled kernels', () => {
  it('binary.ts is the module compiled from the committed source (rebuild with build.mjs)', async () => {
    const fresh = binarySource(await compileKernels());
    expect(readFileSync(KERNELS_BINARY, 'utf8')).toBe(fresh);
  }, 60_000);

  it('an arena grows the memory, zeroes what it hands out, and places each array on 16 bytes', () => {
    const arena = new Arena();
    const a = arena.f64(3);
    const b = arena.u8(5);
    const big = arena.f64(200_000);
    const memory = arena.ready();
    expect([a % 16, b % 16, big % 16]).toEqual([0, 0, 0]);
    expect(b).toBeGreaterThanOrEqual(a + 24);
    expect(memory.byteLength).toBeGreaterThanOrEqual(big + 1_600_000);
    new Float64Array(memory, big, 200_000).fill(7);
    const again = new Arena();
    again.f64(3);
    again.u8(5);
    const reused = again.f64(200_000);
    expect(new Float64Array(again.ready(), reused, 200_000).every((x) => x === 0)).toBe(true);
    expect(kernels()).toBe(arena.k);
  });

  // Integers: every product and partial sum is exact in doubles, so the kernel's sums, whatever the
  // lanes and blocks, must equal the exact sums computed here with BigInt.
  it('pairwise sums of integer data are exact: the shared counts and the centred cross-products', () => {
    const rng = createRng(20261202);
    const n = 1537; // three blocks of rows and an odd remainder
    const p = 11; // an odd count: the last pair of columns holds a padding column
    const columns = Array.from({ length: p }, () =>
      Float64Array.from({ length: n }, () =>
        rng.next() < 0.1 ? Number.NaN : 1 + Math.floor(rng.next() * 7),
      ),
    );
    const m = pairwiseMoments(columns);
    for (let j = 0; j < p; j++) {
      for (let k = 0; k < j; k++) {
        let count = 0n;
        let sx = 0n;
        let sy = 0n;
        let sxy = 0n;
        for (let i = 0; i < n; i++) {
          const x = columns[j][i];
          const y = columns[k][i];
          if (Number.isNaN(x) || Number.isNaN(y)) continue;
          count++;
          sx += BigInt(x);
          sy += BigInt(y);
          sxy += BigInt(x * y);
        }
        expect(m.n[j][k]).toBe(Number(count));
        // cov = (Σxy − Σx·Σy/c)/(c − 1), from exact sums; the kernel works on shifted values, so
        // the two agree to rounding only.
        const c = Number(count);
        const exact = Number(sxy * count - sx * sy) / (c * (c - 1));
        expect(m.covariance[j][k]).toBeCloseTo(exact, 12);
      }
    }
  });

  it('column summaries: count, mean, variance and central moments of the answered values', () => {
    // Worked by hand: answers 1, 2, 4, 5 (one missing): mean 3, deviations −2, −1, 1, 2.
    const column = Float64Array.of(1, Number.NaN, 2, 4, 5);
    const tooFew = () => new EngineError('too few');
    const { summaries, atFloor, atCeiling } = summarizeColumns([column], tooFew, { min: 1, max: 5 });
    expect(summaries[0]).toEqual({ n: 4, mean: 3, variance: 10 / 3, m2: 10 / 4, m3: 0, m4: 34 / 4 });
    expect([atFloor[0], atCeiling[0]]).toEqual([1, 1]);
    expect(() => summarizeColumns([Float64Array.of(1, Number.NaN)], tooFew)).toThrow('too few');
    expect(() =>
      summarizeColumns([Float64Array.of(1, Number.NaN, Number.POSITIVE_INFINITY)], tooFew),
    ).toThrow('the value at index 1 is Infinity');
  });

  // The columns are laid out end to end, n = the first column's length apart: a shorter column would
  // leave its tail to whatever an earlier computation left in the kernels' memory, and a longer one
  // would run into the next column's place.
  it('columns of unequal length are refused, not read from or written over memory they do not own', () => {
    // Leave other values in the kernels' memory first, where the columns below will be placed.
    residentColumns([Float64Array.from({ length: 64 }, (_, i) => 100 + i)]);
    const shorter = [Float64Array.of(1, 2, 3, 4, 5), Float64Array.of(1, 2, 3)];
    const longer = [Float64Array.of(1, 2, 3), Float64Array.of(5, 4, 3, 2, 1), Float64Array.of(2, 2, 3)];
    for (const columns of [shorter, longer]) {
      expect(() => residentColumns(columns)).toThrow(EngineError);
      expect(() => residentColumns(columns)).toThrow(/column index 1 has \d values, column index 0 has \d/);
      expect(() => descriptivesOfColumns(['a', 'b', 'c'].slice(0, columns.length), columns)).toThrow(
        EngineError,
      );
    }
    // With the summaries given, only the answers at the bounds are counted in the kernels' memory.
    const tooFew = () => new EngineError('too few');
    const given = shorter.map((column) => summarizeColumns([column], tooFew).summaries[0]);
    residentColumns([Float64Array.from({ length: 64 }, () => 5)]);
    expect(() => descriptivesOfColumns(['a', 'b'], shorter, { min: 1, max: 5 }, given)).toThrow(EngineError);
  });
});
