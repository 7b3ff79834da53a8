import { chiSquareSf, noncentralChiSquareCdf } from '../distributions.ts';
import { EngineError } from '../errors.ts';
import { symmetricEigen } from '../linalg.ts';
import { logDeterminant } from '../dense.ts';
import {
  checkCorrelationMatrix,
  positiveDefiniteCorrelation,
  squaredMultipleCorrelations,
  zeros,
} from './common.ts';
import { leadingEigenpairs } from './eigenvalues.ts';
import { minimizeInBox } from './optimize.ts';

export type ExtractionMethod = 'paf' | 'minres' | 'ml';

/** Smallest uniqueness the minres and ML fits may take (a value at this bound is a Heywood case). */
export const MIN_UNIQUENESS = 0.005;
/** Iterations allowed to principal axis factoring and to the minres/ML optimiser. */
export const EXTRACTION_MAX_ITERATIONS = 5000;
/** PAF: largest change in any communality between two steps at convergence. */
export const PAF_TOLERANCE = 1e-9;
/** minres/ML: largest projected-gradient component at convergence. */
export const GRADIENT_TOLERANCE = 1e-9;
/** minres/ML: a projected gradient below this counts as converged once rounding stops all progress. */
export const GRADIENT_STALL_TOLERANCE = 1e-6;
/** Confidence level of the RMSEA interval (Browne & Cudeck 1993 report 90%). */
export const RMSEA_CI_LEVEL = 0.9;

export interface MlFit {
  /** F_ML = ln|Σ| + tr(Σ⁻¹R) − ln|R| − p at the estimate. */
  discrepancy: number;
  chiSquare: number;
  df: number;
  /** Null when df = 0 (a just-identified model has nothing to test). */
  p: number | null;
  rmsea: number | null;
  rmseaCI: { level: number; lower: number; upper: number } | null;
  tli: number | null;
}

export interface Extraction {
  method: ExtractionMethod;
  /** Unrotated loadings, p × m, each column signed so that its sum is positive. */
  loadings: number[][];
  communalities: number[];
  uniquenesses: number[];
  iterations: number;
  converged: boolean;
  /** Items whose communality reached 1 (PAF: ≥ 1; minres/ML: uniqueness at MIN_UNIQUENESS). */
  heywood: number[];
  /** How PAF's communalities started. */
  start: 'squared multiple correlations' | 'largest absolute correlation';
  fit: MlFit | null;
  warnings: string[];
}

function startingCommunalities(r: number[][]): { h2: number[]; start: Extraction['start'] } {
  try {
    const h2 = squaredMultipleCorrelations(r);
    if (h2.every((h) => Number.isFinite(h) && h >= 0 && h <= 1))
      return { h2, start: 'squared multiple correlations' };
  } catch (error) {
    if (!(error instanceof EngineError)) throw error;
  }
  const h2 = r.map((row, i) => Math.max(...row.map((x, j) => (i === j ? 0 : Math.abs(x)))));
  return { h2, start: 'largest absolute correlation' };
}

function topLoadings(
  values: number[],
  vectors: number[][],
  m: number,
  scale?: (i: number, k: number) => number,
): number[][] {
  const p = vectors.length;
  const out = zeros(p, m);
  for (let k = 0; k < m; k++) {
    const root = Math.sqrt(Math.max(values[k], 0));
    for (let i = 0; i < p; i++) out[i][k] = vectors[i][k] * root * (scale ? scale(i, k) : 1);
  }
  return out;
}

function signColumns(l: number[][]): number[][] {
  const m = l[0]?.length ?? 0;
  for (let k = 0; k < m; k++) {
    let s = 0;
    for (const row of l) s += row[k];
    if (s < 0) for (const row of l) row[k] = -row[k];
  }
  return l;
}

function rowSumsOfSquares(l: number[][]): number[] {
  return l.map((row) => row.reduce((s, v) => s + v * v, 0));
}

/** Iterated principal axis factoring from SMCs (registry id `efa.paf`). */
function principalAxis(r: number[][], m: number) {
  const p = r.length;
  const init = startingCommunalities(r);
  let h2 = init.h2;
  const reduced = r.map((row) => row.slice());
  let loadings = zeros(p, m);
  let converged = false;
  let iterations = 0;
  for (; iterations < EXTRACTION_MAX_ITERATIONS && !converged; iterations++) {
    for (let i = 0; i < p; i++) reduced[i][i] = h2[i];
    const { values, vectors } = leadingEigenpairs(reduced, m, symmetricEigen);
    loadings = topLoadings(values, vectors, m);
    const next = rowSumsOfSquares(loadings);
    let change = 0;
    for (let i = 0; i < p; i++) change = Math.max(change, Math.abs(next[i] - h2[i]));
    h2 = next;
    converged = change < PAF_TOLERANCE;
  }
  return { loadings, iterations, converged, start: init.start };
}

/** ULS discrepancy ½‖R − Ψ − ΛΛᵀ‖² concentrated over Λ, with its gradient in ψ. */
function ulsObjective(r: number[][], m: number) {
  const p = r.length;
  return (psi: number[]) => {
    const a = r.map((row, i) => row.map((v, j) => (i === j ? v - psi[i] : v)));
    const { values, vectors } = leadingEigenpairs(a, m, symmetricEigen);
    let value = 0;
    for (let k = 0; k < p; k++) {
      const residual = k < m ? Math.min(values[k], 0) : values[k];
      value += 0.5 * residual * residual;
    }
    const l = topLoadings(values, vectors, m);
    const gradient = psi.map((_, i) => -(a[i][i] - l[i].reduce((s, v) => s + v * v, 0)));
    return { value, gradient, loadings: l };
  };
}

/** ML discrepancy Σₖ>ₘ (θₖ − ln θₖ − 1) over the eigenvalues θ of Ψ^{-1/2}RΨ^{-1/2}, with its gradient. */
function mlObjective(r: number[][], m: number) {
  const p = r.length;
  return (psi: number[]) => {
    const sc = psi.map((v) => 1 / Math.sqrt(v));
    const s = r.map((row, i) => row.map((v, j) => v * sc[i] * sc[j]));
    const { values, vectors } = leadingEigenpairs(s, m, symmetricEigen);
    let value = 0;
    for (let k = m; k < p; k++) value += values[k] - Math.log(values[k]) - 1;
    const l = zeros(p, m);
    for (let k = 0; k < m; k++) {
      const root = Math.sqrt(Math.max(values[k] - 1, 0));
      for (let i = 0; i < p; i++) l[i][k] = Math.sqrt(psi[i]) * vectors[i][k] * root;
    }
    const gradient = psi.map((v, i) => (l[i].reduce((acc, x) => acc + x * x, 0) + v - r[i][i]) / (v * v));
    return { value: Number.isFinite(value) ? value : Number.POSITIVE_INFINITY, gradient, loadings: l };
  };
}

function rmseaBound(chiSquare: number, df: number, target: number): number {
  // noncentralChiSquareCdf(χ², df, λ) falls as λ grows; find the λ where it equals target.
  if (noncentralChiSquareCdf(chiSquare, df, 0) < target) return 0;
  let lo = 0;
  let hi = Math.max(chiSquare, df, 1);
  while (noncentralChiSquareCdf(chiSquare, df, hi) > target) {
    lo = hi;
    hi *= 2;
  }
  for (let k = 0; k < 200 && hi - lo > 1e-10 * Math.max(1, hi); k++) {
    const mid = (lo + hi) / 2;
    if (noncentralChiSquareCdf(chiSquare, df, mid) > target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Fit of an ML factor model: χ² with Bartlett's correction (n − 1 − (2p + 5)/6 − 2m/3)·F_ML on
 * df = ((p − m)² − (p + m))/2 (Lawley & Maxwell 1971; registry id `efa.ml-chisquare`); RMSEA =
 * √(max(χ² − df, 0)/(df·(n − 1))) with its 90% interval by inverting the noncentral χ² (Steiger 1990;
 * Browne & Cudeck 1993; registry id `rmsea.steiger`); TLI against the independence model, whose χ² is
 * Bartlett's sphericity statistic (Tucker & Lewis 1973; registry id `fit.tli`).
 *
 * Cost: O(p³). Throws EngineError when R is not positive definite.
 */
export function mlFitStatistics(r: number[][], discrepancy: number, n: number, m: number): MlFit {
  const p = r.length;
  const df = ((p - m) ** 2 - (p + m)) / 2;
  const chiSquare = Math.max(0, (n - 1 - (2 * p + 5) / 6 - (2 * m) / 3) * discrepancy);
  if (df <= 0) return { discrepancy, chiSquare, df, p: null, rmsea: null, rmseaCI: null, tli: null };
  const rmsea = Math.sqrt(Math.max(chiSquare - df, 0) / (df * (n - 1)));
  const tail = (1 - RMSEA_CI_LEVEL) / 2;
  const toRmsea = (lambda: number) => Math.sqrt(lambda / (df * (n - 1)));
  const rmseaCI = {
    level: RMSEA_CI_LEVEL,
    lower: toRmsea(rmseaBound(chiSquare, df, 1 - tail)),
    upper: toRmsea(rmseaBound(chiSquare, df, tail)),
  };
  const nullChi = Math.max(0, -(n - 1 - (2 * p + 5) / 6) * logDeterminant(r));
  const nullDf = (p * (p - 1)) / 2;
  const nullRatio = nullChi / nullDf;
  const tli = nullRatio === 1 ? null : (nullRatio - chiSquare / df) / (nullRatio - 1);
  return { discrepancy, chiSquare, df, p: chiSquareSf(chiSquare, df), rmsea, rmseaCI, tli };
}

/**
 * Extracts m common factors from a correlation matrix:
 * - `paf`: iterated principal axis factoring, communalities started at the SMCs and iterated to a fixed
 *   point (Harman 1976; registry id `efa.paf`);
 * - `minres`: minimum residual (unweighted least squares) over the uniquenesses, ½‖R − ΛΛᵀ − Ψ‖²
 *   concentrated over Λ (Harman & Jones 1966; registry id `efa.minres`);
 * - `ml`: maximum likelihood over the uniquenesses with Λ = Ψ^{1/2}Ω(Θ − I)^{1/2} (Jöreskog 1967;
 *   Lawley & Maxwell 1971; registry id `efa.ml`), with χ², df, p, RMSEA and TLI (mlFitStatistics).
 * minres and ML keep ψ in [MIN_UNIQUENESS, 1] by a projected quasi-Newton search; a uniqueness at the
 * floor (or a PAF communality ≥ 1) is reported as a Heywood case. An indefinite R is smoothed first,
 * with a warning. Loadings are unrotated, columns signed to a positive sum.
 *
 * Cost: O(p³) per iteration (one symmetric eigendecomposition), usually tens to hundreds of iterations.
 * Throws EngineError for a matrix that is not a correlation matrix, m outside 1 … p − 1, ML with
 * negative degrees of freedom, or n < 2. `names` (optional) names the items in warnings.
 *
 * @example extractFactors(r, { factors: 2, method: 'ml', n: 300 }).fit?.rmsea
 */
export function extractFactors(
  r: number[][],
  options: { factors: number; method: ExtractionMethod; n: number; names?: string[] },
): Extraction {
  const p = checkCorrelationMatrix(r, 'factor extraction');
  const m = options.factors;
  const { n, method } = options;
  if (!Number.isInteger(m) || m < 1 || m >= p) {
    throw new EngineError(
      `the number of factors must be a whole number from 1 to ${p - 1} for ${p} items, got ${m}`,
      'factors',
    );
  }
  if (!Number.isInteger(n) || n < 2)
    throw new EngineError(`factor extraction requires n ≥ 2 respondents, got ${n}`);
  const df = ((p - m) ** 2 - (p + m)) / 2;
  if (method === 'ml' && df < 0) {
    let most = m;
    while (most > 0 && (p - most) ** 2 - (p + most) < 0) most--;
    throw new EngineError(
      `${m} factors on ${p} items leave ${df} degrees of freedom; maximum likelihood can fit at most ${most}`,
      'factors',
    );
  }
  const warnings: string[] = [];
  const pd = positiveDefiniteCorrelation(r);
  if (pd.smoothed) {
    warnings.push(
      'the correlation matrix is not positive definite; the factors were extracted from a smoothed matrix',
    );
  }
  const work = pd.matrix;
  if (n <= p)
    warnings.push(
      `only ${n} respondents for ${p} items: the correlation matrix is singular and the solution is unstable`,
    );
  let loadings: number[][];
  let iterations: number;
  let converged: boolean;
  let start: Extraction['start'] = 'squared multiple correlations';
  let fit: MlFit | null = null;
  let heywood: number[];
  if (method === 'paf') {
    const out = principalAxis(work, m);
    ({ loadings, iterations, converged, start } = out);
    heywood = rowSumsOfSquares(loadings).flatMap((h, i) => (h >= 1 ? [i] : []));
  } else {
    const init = startingCommunalities(work);
    start = init.start;
    const objective = method === 'ml' ? mlObjective(work, m) : ulsObjective(work, m);
    const psi0 =
      method === 'ml'
        ? init.h2.map((h) => Math.min(1, Math.max(MIN_UNIQUENESS, (1 - (0.5 * m) / p) * (1 - h))))
        : init.h2.map((h) => 1 - h);
    const best = minimizeInBox((x) => objective(x), psi0, MIN_UNIQUENESS, 1, {
      tolerance: GRADIENT_TOLERANCE,
      stallTolerance: GRADIENT_STALL_TOLERANCE,
      maxIterations: EXTRACTION_MAX_ITERATIONS,
    });
    const final = objective(best.x);
    loadings = final.loadings;
    iterations = best.iterations;
    converged = best.converged;
    heywood = best.x.flatMap((v, i) => (v <= MIN_UNIQUENESS * (1 + 1e-9) ? [i] : []));
    if (method === 'ml') fit = mlFitStatistics(work, final.value, n, m);
  }
  signColumns(loadings);
  const communalities = rowSumsOfSquares(loadings);
  if (!converged)
    warnings.push(
      `${method} extraction did not converge in ${iterations} iterations; treat the loadings with caution`,
    );
  if (heywood.length > 0) {
    warnings.push(
      `Heywood case: ${heywood.length === 1 ? 'item' : 'items'} ${heywood.map((i) => (options.names ? `"${options.names[i]}"` : String(i + 1))).join(', ')} reached a communality of 1 (or more); too many factors, too few respondents, or an item that duplicates another`,
    );
  }
  if (fit && fit.df === 0)
    warnings.push('the model is just identified (df = 0): χ², RMSEA and TLI are not defined');
  return {
    method,
    loadings,
    communalities,
    uniquenesses: communalities.map((h) => 1 - h),
    iterations,
    converged,
    heywood,
    start,
    fit,
    warnings,
  };
}
