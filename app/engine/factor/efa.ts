import { EngineError } from '../errors.ts';
import { extractFactors, type ExtractionMethod, type MlFit } from './extraction.ts';
import { omegaFromSchmidLeiman, type OmegaCoefficients, schmidLeiman } from './omega-hierarchical.ts';
import { type RotationMethod, type RotationOptions, rotateLoadings } from './rotation.ts';

/** Primary loadings below this are flagged (common practice). */
export const PRIMARY_LOADING_MIN = 0.4;
/** A second loading at or above this is a cross-loading (common practice). */
export const CROSS_LOADING_MIN = 0.3;

export interface EfaOptions extends Omit<RotationOptions, 'method'> {
  factors: number;
  extraction: ExtractionMethod;
  rotation: RotationMethod;
  /** Respondents behind the correlations (for the ML χ²). */
  n: number;
}

export interface EfaResult {
  items: string[];
  factors: number;
  extraction: ExtractionMethod;
  rotation: RotationMethod;
  oblique: boolean;
  normalized: boolean;
  /** Pattern loadings (item × factor); for orthogonal rotations also the structure. */
  loadings: number[][];
  structure: number[][];
  factorCorrelations: number[][];
  communalities: number[];
  uniquenesses: number[];
  /** Unrotated loadings, as extracted. */
  unrotated: number[][];
  /** Sum of squared loadings per factor (pattern loadings for oblique rotations) and its share of p. */
  variance: { ss: number; proportion: number }[];
  /** Sum of squared unrotated loadings over all factors, as a share of p. */
  totalProportion: number;
  converged: boolean;
  iterations: number;
  rotationIterations: number;
  rotationConverged: boolean;
  starts: { tried: number; reachedBest: number };
  heywood: string[];
  fit: MlFit | null;
  /** Per item: the factor of its largest |loading| and rule-of-thumb flags. */
  flags: { item: string; primary: number; notes: string[] }[];
  /** Omega hierarchical and total from a Schmid–Leiman solution (two or more factors). */
  omega: OmegaCoefficients | null;
  warnings: string[];
}

function reorder(result: { pattern: number[][]; structure: number[][]; phi: number[][] }, m: number) {
  const ss = Array.from({ length: m }, (_, k) => result.pattern.reduce((s, row) => s + row[k] ** 2, 0));
  const order = ss.map((_, k) => k).sort((a, b) => ss[b] - ss[a]);
  const sign = order.map((k) => (result.pattern.reduce((s, row) => s + row[k], 0) < 0 ? -1 : 1));
  const pick = (mat: number[][]) => mat.map((row) => order.map((k, c) => row[k] * sign[c]));
  return {
    pattern: pick(result.pattern),
    structure: pick(result.structure),
    phi: order.map((k, a) => order.map((l, b) => result.phi[k][l] * sign[a] * sign[b])),
  };
}

/**
 * Exploratory factor analysis of a correlation matrix: extraction (extractFactors: PAF, minres or ML),
 * rotation (rotateLoadings), factors ordered by their sum of squared loadings and signed to a positive
 * column sum, communalities, variance explained, rule-of-thumb flags (primary loading ≥ .40,
 * cross-loading ≥ .30; common practice, registry ids `rule.primary-loading`, `rule.cross-loading`),
 * and with two or more factors omega hierarchical and omega total from a Schmid–Leiman solution of the
 * same extraction rotated by oblimin (or by the chosen oblique rotation).
 *
 * Cost: extraction plus rotation (see there). Throws EngineError when names and matrix differ in size,
 * and whatever extraction and rotation throw.
 *
 * @example exploratoryFactorAnalysis(names, r, { factors: 2, extraction: 'ml', rotation: 'oblimin', n: 400 })
 */
export function exploratoryFactorAnalysis(items: string[], r: number[][], options: EfaOptions): EfaResult {
  if (items.length !== r.length)
    throw new EngineError(`factor analysis: ${items.length} names for a ${r.length}-item matrix`);
  const m = options.factors;
  const ext = extractFactors(r, { factors: m, method: options.extraction, n: options.n, names: items });
  const rot = rotateLoadings(ext.loadings, { ...options, method: options.rotation });
  const { pattern, structure, phi } = reorder(rot, m);
  const p = items.length;
  const variance = Array.from({ length: m }, (_, k) => {
    const ss = pattern.reduce((s, row) => s + row[k] ** 2, 0);
    return { ss, proportion: ss / p };
  });
  const flags = pattern.map((row, i) => {
    const mags = row.map(Math.abs);
    const primary = mags.indexOf(Math.max(...mags));
    const notes: string[] = [];
    if (mags[primary] < PRIMARY_LOADING_MIN)
      notes.push(`no loading reaches ${PRIMARY_LOADING_MIN.toFixed(2)}`);
    const cross = mags.flatMap((v, k) => (k !== primary && v >= CROSS_LOADING_MIN ? [k + 1] : []));
    if (cross.length > 0)
      notes.push(`cross-loads ≥ ${CROSS_LOADING_MIN.toFixed(2)} on factor ${cross.join(', ')}`);
    return { item: items[i], primary: primary + 1, notes };
  });
  const warnings = [...ext.warnings, ...rot.warnings];
  let omega: OmegaCoefficients | null = null;
  if (m >= 2) {
    try {
      const oblique = rot.oblique
        ? { pattern, phi }
        : reorder(rotateLoadings(ext.loadings, { ...options, method: 'oblimin' }), m);
      const sl = schmidLeiman(oblique.pattern, oblique.phi, ext.communalities);
      const basis = rot.oblique ? options.rotation : 'oblimin';
      omega = omegaFromSchmidLeiman(
        r,
        sl,
        `Schmid–Leiman solution of ${m} ${options.extraction} factors rotated by ${basis}`,
      );
    } catch (error) {
      if (!(error instanceof EngineError)) throw error;
      warnings.push(`omega hierarchical not computed: ${error.message}`);
    }
  }
  return {
    items,
    factors: m,
    extraction: options.extraction,
    rotation: options.rotation,
    oblique: rot.oblique,
    normalized: rot.normalized,
    loadings: pattern,
    structure,
    factorCorrelations: phi,
    communalities: ext.communalities,
    uniquenesses: ext.uniquenesses,
    unrotated: ext.loadings,
    variance,
    totalProportion: ext.communalities.reduce((s, v) => s + v, 0) / p,
    converged: ext.converged,
    iterations: ext.iterations,
    rotationIterations: rot.iterations,
    rotationConverged: rot.converged,
    starts: rot.starts,
    heywood: ext.heywood.map((i) => items[i]),
    fit: ext.fit,
    flags,
    omega,
    warnings,
  };
}
