import { EngineError } from './errors.ts';

/** A corrected correlation with the reasons to read it carefully. */
export interface DisattenuatedCorrelation {
  /** r̂ = rₓᵧ / √(rₓₓ·rᵧᵧ); may exceed 1 in magnitude when the reliabilities are underestimated. */
  value: number;
  observed: number;
  reliabilityX: number;
  reliabilityY: number;
  warnings: string[];
}

/**
 * Correction for attenuation: the correlation between two measures' true scores, estimated from
 * their observed correlation and reliabilities, r̂ = rₓᵧ / √(rₓₓ·rᵧᵧ). The bias it corrects comes
 * from measurement error, not from sampling, so it does not shrink as n grows.
 *
 * Source: attenuation.spearman (the method registry). Check: a true .60 between measures with
 * reliabilities .81 and .64 is observed as .60·.9·.8 = .432, and the correction recovers .60.
 * Cost: O(1).
 * Throws EngineError when rₓᵧ is not in [−1, 1] or a reliability is not in (0, 1].
 */
export function correctForAttenuation(
  observed: number,
  reliabilityX: number,
  reliabilityY: number,
): DisattenuatedCorrelation {
  if (!Number.isFinite(observed) || observed < -1 || observed > 1) {
    throw new EngineError(
      `an observed correlation must lie between −1 and 1 (got ${observed})`,
      'correlation',
    );
  }
  for (const [label, rel] of [
    ['first', reliabilityX],
    ['second', reliabilityY],
  ] as const) {
    if (!Number.isFinite(rel) || rel <= 0 || rel > 1) {
      throw new EngineError(
        `correction for attenuation requires reliabilities above 0 and at most 1 (the ${label} is ${rel})`,
        'reliability',
      );
    }
  }
  const value = observed / Math.sqrt(reliabilityX * reliabilityY);
  const warnings: string[] = [];
  if (Math.abs(value) > 1) {
    warnings.push(
      `the corrected correlation is ${value.toFixed(3)}, beyond ±1: the reliabilities are probably ` +
        'underestimated, or the two measures share error',
    );
  }
  return { value, observed, reliabilityX, reliabilityY, warnings };
}
