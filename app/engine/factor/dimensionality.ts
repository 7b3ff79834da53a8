import { EngineError } from '../errors.ts';
import { symmetricEigen } from '../linalg.ts';
import {
  checkCorrelationMatrix,
  positiveDefiniteCorrelation,
  squaredMultipleCorrelations,
} from './common.ts';
import { type Factorability, factorability } from './factorability.ts';
import {
  kaiserCount,
  type MinimumAveragePartial,
  minimumAveragePartial,
  type ParallelAnalysis,
  type SimulatedEigenvalues,
  simulateEigenvalues,
  summarizeParallelAnalysis,
} from './factor-count.ts';

/** Default replications of the parallel analysis. */
export const DEFAULT_PA_ITERATIONS = 1000;
/** Default percentile of the simulated eigenvalues (Glorfeld 1995). */
export const DEFAULT_PA_PERCENTILE = 95;

export interface Dimensionality {
  n: number;
  p: number;
  factorability: Factorability;
  /** Eigenvalues of R, descending. */
  eigenvalues: number[];
  /** Eigenvalues of R with SMCs on the diagonal, descending. */
  reducedEigenvalues: number[];
  map: MinimumAveragePartial | null;
  parallel: ParallelAnalysis | null;
  suggested: {
    kaiser: number;
    parallel: number | null;
    parallelFactors: number | null;
    map: number | null;
    mapFourth: number | null;
  };
  warnings: string[];
}

/**
 * Observed eigenvalues for parallel analysis: of R (components) and of R with squared multiple
 * correlations on the diagonal (common factors). An indefinite R is smoothed for the SMCs.
 *
 * Cost: O(p³). Throws EngineError for a matrix that is not a correlation matrix.
 */
export function observedEigenvalues(r: number[][]): { components: number[]; factors: number[] } {
  checkCorrelationMatrix(r, 'eigenvalues');
  const components = symmetricEigen(r).values;
  const smc = squaredMultipleCorrelations(positiveDefiniteCorrelation(r).matrix);
  const reduced = r.map((row, i) => row.map((v, j) => (i === j ? smc[i] : v)));
  return { components, factors: symmetricEigen(reduced).values };
}

/**
 * How many factors: factorability (KMO, MSA, Bartlett, determinant), eigenvalues with Kaiser's rule,
 * Velicer's MAP (squared and 4th-power), and Horn's parallel analysis for components and common factors
 * at a percentile — all reported side by side, none chosen. The simulated eigenvalues may come from
 * elsewhere (`blocks`, e.g. worker threads); otherwise they are simulated here.
 *
 * Cost: O(p⁴) for MAP plus O(iterations·p³) for the simulation. Throws EngineError for a matrix that is
 * not a correlation matrix, fewer than two items, or invalid parallel-analysis settings.
 *
 * @example analyzeDimensionality(r, 300, { iterations: 1000, seed: 1, percentile: 95 }).suggested
 */
export function analyzeDimensionality(
  r: number[][],
  n: number,
  options: {
    iterations: number;
    seed: number;
    percentile: number;
    blocks?: SimulatedEigenvalues[];
    onProgress?: (done: number, total: number) => void;
    shouldStop?: () => boolean;
  },
): Dimensionality {
  const p = checkCorrelationMatrix(r, 'dimensionality');
  if (p < 2) throw new EngineError('dimensionality requires at least two items', 'too-few-items');
  const fact = factorability(r, n);
  const warnings = [...fact.warnings];
  const observed = observedEigenvalues(r);
  let map: MinimumAveragePartial | null = null;
  if (p >= 3) map = minimumAveragePartial(r);
  else warnings.push('the minimum average partial test needs at least three items');
  let parallel: ParallelAnalysis | null = null;
  if (n - 1 >= p) {
    const blocks = options.blocks ?? [
      simulateEigenvalues({
        n,
        p,
        seed: options.seed,
        from: 0,
        count: options.iterations,
        onProgress: options.onProgress,
        shouldStop: options.shouldStop,
      }),
    ];
    parallel = summarizeParallelAnalysis({
      observedComponents: observed.components,
      observedFactors: observed.factors,
      blocks,
      iterations: options.iterations,
      seed: options.seed,
      percentile: options.percentile,
    });
  } else {
    warnings.push(`parallel analysis needs more respondents than items (n = ${n}, p = ${p})`);
  }
  return {
    n,
    p,
    factorability: fact,
    eigenvalues: observed.components,
    reducedEigenvalues: observed.factors,
    map,
    parallel,
    suggested: {
      kaiser: kaiserCount(observed.components),
      parallel: parallel?.components.suggested ?? null,
      parallelFactors: parallel?.factors.suggested ?? null,
      map: map?.suggestedSquared ?? null,
      mapFourth: map?.suggestedFourth ?? null,
    },
    warnings,
  };
}
