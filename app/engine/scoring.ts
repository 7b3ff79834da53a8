import { EngineError } from './errors.ts';

/** A scale's declared response bounds (e.g. 1 and 5 for a five-point agreement scale). */
export interface ScaleBounds {
  min: number;
  max: number;
}

/** Responses: one row per respondent, one column per item; `null` marks a missing answer. */
export type ResponseMatrix = (number | null)[][];

/**
 * Checks declared scale bounds once at the door.
 *
 * Cost: O(1). Throws EngineError when a bound is not a finite number or when min is not below max.
 */
export function checkBounds(bounds: ScaleBounds): void {
  if (!Number.isFinite(bounds.min) || !Number.isFinite(bounds.max)) {
    throw new EngineError('scale bounds must be finite numbers');
  }
  if (bounds.min >= bounds.max) {
    throw new EngineError(
      `scale bounds need min below max (got min ${bounds.min}, max ${bounds.max})`,
      'bounds',
    );
  }
}

/**
 * Reverse keying from declared bounds: x' = min + max − x, using the scale's declared min and max,
 * never the observed ones (so a sample that happens not to use the top category is still reversed
 * correctly). Returns a new matrix; the input is not changed. Missing answers stay missing.
 *
 * Source: scoring.reverse-keying (the method registry; common practice): the declared bounds, never the
 * observed ones.
 * Cost: O(n·k) for n respondents and k items.
 * Throws EngineError when a name in `reverse` is not among `names`, when the bounds are invalid, or
 * when a reversed item holds a value outside the declared bounds (named by respondent row and item).
 */
export function reverseScore(
  data: ResponseMatrix,
  names: string[],
  reverse: string[],
  bounds: ScaleBounds,
): ResponseMatrix {
  checkBounds(bounds);
  const columns = reverse.map((name) => {
    const index = names.indexOf(name);
    if (index < 0) throw new EngineError(`reverse-keyed item "${name}" is not among the items`, 'item');
    return index;
  });
  const pivot = bounds.min + bounds.max;
  return data.map((row, r) => {
    const out = row.slice();
    for (const c of columns) {
      const x = row[c];
      if (x === null) continue;
      if (x < bounds.min || x > bounds.max) {
        throw new EngineError(
          `respondent ${r + 1}, item "${names[c]}": value ${x} lies outside the declared bounds ` +
            `${bounds.min}–${bounds.max}, so it cannot be reverse scored`,
          'bounds',
        );
      }
      out[c] = pivot - x;
    }
    return out;
  });
}

/**
 * Sum score per respondent: the sum of the item responses, or `null` when any item is missing
 * (a sum over fewer items is not on the same scale as a complete one).
 *
 * Cost: O(n·k). Throws nothing.
 */
export function sumScores(data: ResponseMatrix): (number | null)[] {
  return data.map((row) => {
    let total = 0;
    for (const x of row) {
      if (x === null) return null;
      total += x;
    }
    return total;
  });
}

/**
 * Mean score per respondent: the mean of the answered items, or `null` when fewer than
 * `minAnswered` items were answered (default: all of them, which makes it sum/k).
 *
 * Cost: O(n·k). Throws EngineError when `minAnswered` is not an integer from 1 to k.
 */
export function meanScores(data: ResponseMatrix, minAnswered?: number): (number | null)[] {
  const k = data.length > 0 ? data[0].length : 0;
  const needed = minAnswered ?? k;
  if (!Number.isInteger(needed) || needed < 1 || (k > 0 && needed > k)) {
    throw new EngineError(`mean scores need minAnswered between 1 and ${k} (got ${needed})`);
  }
  return data.map((row) => {
    let total = 0;
    let answered = 0;
    for (const x of row) {
      if (x === null) continue;
      total += x;
      answered++;
    }
    return answered >= needed ? total / answered : null;
  });
}
