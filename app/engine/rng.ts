import { EngineError } from './errors.ts';

/** The seed used when a study does not choose one; stored with every run like any other seed. */
export const DEFAULT_SEED = 20261201;

/** A seeded stream of pseudo-random numbers. Two streams made from the same seed are identical. */
export interface Rng {
  /** Uniform double in [0, 1) with 53 random bits. */
  next(): number;
  /** Uniform integer in 0..n−1 (unbiased, by rejection); n is a positive integer up to 2⁵³. */
  int(n: number): number;
  /** Standard normal deviate (mean 0, variance 1). */
  normal(): number;
}

const TWO_POW_26 = 67108864;
const TWO_POW_32 = 4294967296;
const TWO_POW_53 = 9007199254740992;
const MASK_64 = (1n << 64n) - 1n;

/** One step of SplitMix64 (Steele, Lea & Flood 2014), used only to expand the seed into a state. */
function splitMix64(state: bigint): { state: bigint; output: bigint } {
  const next = (state + 0x9e3779b97f4a7c15n) & MASK_64;
  let z = next;
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK_64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK_64;
  return { state: next, output: z ^ (z >> 31n) };
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/**
 * Seeded pseudo-random number generator: xoshiro128** (Blackman, D. & Vigna, S. (2021). Scrambled
 * linear pseudorandom number generators. ACM Transactions on Mathematical Software 47(4), 36),
 * 128-bit state, period 2¹²⁸ − 1. The seed is expanded into the four 32-bit state words by two
 * outputs of SplitMix64, as the authors recommend. All state arithmetic is 32-bit integer
 * arithmetic (Math.imul, shifts), so the uniform stream is bit-identical on every platform.
 *
 * normal() uses Marsaglia & Bray's (1964) polar method ("A convenient method for generating normal
 * variables", SIAM Review 6, 260–264) and keeps the second deviate of each pair; it relies on
 * Math.log and Math.sqrt, which are deterministic for a given JavaScript engine.
 *
 * Cost: O(1) per draw. Throws EngineError when the seed is not a safe integer, or when int(n) gets an
 * n that is not a positive integer up to 2⁵³.
 *
 * @example const rng = createRng(DEFAULT_SEED); rng.next(); rng.int(6); rng.normal();
 */
export function createRng(seed: number): Rng {
  if (!Number.isSafeInteger(seed)) {
    throw new EngineError(`random seed must be a whole number within ±2^53, got ${seed}`);
  }
  let sm = BigInt.asUintN(64, BigInt(seed));
  const words: number[] = [];
  for (let i = 0; i < 2; i++) {
    const step = splitMix64(sm);
    sm = step.state;
    words.push(Number(step.output & 0xffffffffn) | 0, Number(step.output >> 32n) | 0);
  }
  let [s0, s1, s2, s3] = words;
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1;

  const nextUint32 = (): number => {
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = rotl(s3, 11);
    return result;
  };

  const next = (): number => {
    const high = nextUint32() >>> 5;
    const low = nextUint32() >>> 6;
    return (high * TWO_POW_26 + low) / TWO_POW_53;
  };

  const int = (n: number): number => {
    if (!Number.isInteger(n) || n < 1 || n > TWO_POW_53) {
      throw new EngineError(`random integer range must be a whole number from 1 to 2^53, got ${n}`);
    }
    if (n <= TWO_POW_32) {
      // Reject the top partial block of 2³² so that every residue is equally likely.
      const limit = TWO_POW_32 - (TWO_POW_32 % n);
      for (;;) {
        const u = nextUint32();
        if (u < limit) return u % n;
      }
    }
    const limit = TWO_POW_53 - (TWO_POW_53 % n);
    for (;;) {
      const u = next() * TWO_POW_53;
      if (u < limit) return u % n;
    }
  };

  let spare: number | null = null;
  const normal = (): number => {
    if (spare !== null) {
      const value = spare;
      spare = null;
      return value;
    }
    for (;;) {
      const u = 2 * next() - 1;
      const v = 2 * next() - 1;
      const s = u * u + v * v;
      if (s > 0 && s < 1) {
        const factor = Math.sqrt((-2 * Math.log(s)) / s);
        spare = v * factor;
        return u * factor;
      }
    }
  };

  return { next, int, normal };
}
