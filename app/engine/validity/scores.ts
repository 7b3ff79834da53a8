import { EngineError } from '../errors.ts';
import { meanScores, type ResponseMatrix, reverseScore, type ScaleBounds, sumScores } from '../scoring.ts';

/** A scale or facet: its items and which of them are reverse-keyed. */
export interface ScoreKey {
  name: string;
  items: string[];
  reverse?: string[];
}

/**
 * Scale and facet scores for relations to other variables: each key's items picked from the data,
 * reverse keys applied as min + max − x with the declared bounds, then summed or averaged (either way a
 * respondent missing any of the key's items gets no score). Registry: `scoring.reverse-keys`.
 *
 * Cost: O(n·k) per key. Throws EngineError naming an item that is not in `names`, a reversed item
 * not among the key's items, or reverse keys without bounds.
 */
export function scaleScores(
  names: string[],
  data: ResponseMatrix,
  keys: ScoreKey[],
  method: 'sum' | 'mean',
  bounds?: ScaleBounds,
): Record<string, (number | null)[]> {
  const out: Record<string, (number | null)[]> = {};
  for (const key of keys) {
    const idx = key.items.map((item) => {
      const i = names.indexOf(item);
      if (i < 0)
        throw new EngineError(`score "${key.name}" names item "${item}", which the data do not hold`);
      return i;
    });
    const reverse = key.reverse ?? [];
    for (const r of reverse) {
      if (!key.items.includes(r))
        throw new EngineError(`score "${key.name}" reverses "${r}", which it does not include`);
    }
    if (reverse.length > 0 && !bounds) {
      throw new EngineError(`score "${key.name}" has reverse-keyed items but no declared scale bounds`);
    }
    let block: ResponseMatrix = data.map((row) => idx.map((i) => row[i]));
    if (reverse.length > 0 && bounds) block = reverseScore(block, key.items, reverse, bounds);
    out[key.name] = method === 'sum' ? sumScores(block) : meanScores(block);
  }
  return out;
}
