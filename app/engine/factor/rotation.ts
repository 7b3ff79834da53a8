import { EngineError } from '../errors.ts';
import { inverse, symmetricEigen } from '../linalg.ts';
import { matMul, transpose } from '../dense.ts';
import { createRng } from '../rng.ts';
import { identity } from './common.ts';

export type RotationMethod = 'none' | 'varimax' | 'quartimax' | 'promax' | 'oblimin' | 'geomin';

/** Default promax power (Hendrickson & White 1964). */
export const DEFAULT_PROMAX_POWER = 4;
/** Default oblimin γ (0 = quartimin; Jennrich 2002). */
export const DEFAULT_OBLIMIN_GAMMA = 0;
/** Geomin's δ, which keeps the product of squared loadings away from zero (Browne 2001). */
export const DEFAULT_GEOMIN_DELTA = 0.01;
/** Starting rotations tried by oblimin and geomin: the identity and random orthogonal matrices. */
export const DEFAULT_RANDOM_STARTS = 10;
/** Gradient projection stops when the Frobenius norm of the projected gradient falls below this. */
export const ROTATION_TOLERANCE = 1e-7;
/**
 * When no step along the projected gradient lowers the criterion any more (rounding has taken over),
 * a projected gradient below this counts as converged.
 */
export const ROTATION_STALL_TOLERANCE = 1e-5;
/** Gradient projection iterations allowed per start. */
export const ROTATION_MAX_ITERATIONS = 10_000;
/** Two criterion values this close count as the same minimum when comparing starts. */
const SAME_MINIMUM = 1e-7;

export interface RotationOptions {
  method: RotationMethod;
  /** Kaiser (1958) row normalization; on by default. */
  normalize?: boolean;
  promaxPower?: number;
  obliminGamma?: number;
  geominDelta?: number;
  /** Starts for oblimin and geomin (1 = the identity only). */
  starts?: number;
  seed?: number;
}

export interface Rotation {
  method: RotationMethod;
  oblique: boolean;
  normalized: boolean;
  /** Pattern loadings p × m (for orthogonal rotations also the structure). */
  pattern: number[][];
  /** Structure = pattern·Φ. */
  structure: number[][];
  /** Factor correlations Φ (identity for orthogonal rotations). */
  phi: number[][];
  /** Rotation matrix T: pattern = A·T for orthogonal rotations, A·(Tᵀ)⁻¹ for oblique ones. */
  t: number[][];
  /** Criterion value at the solution (null for none and promax). */
  criterion: number | null;
  iterations: number;
  converged: boolean;
  /** Starts tried and how many reached the best criterion value. */
  starts: { tried: number; reachedBest: number };
  warnings: string[];
}

type Criterion = (l: number[][]) => { f: number; gq: number[][] };

/** Varimax, as the orthomax criterion with κ = 1 (Kaiser 1958): −¼‖L² − colMeans(L²)‖². */
function varimaxCriterion(l: number[][]): { f: number; gq: number[][] } {
  const p = l.length;
  const m = l[0].length;
  const means = new Array<number>(m).fill(0);
  for (const row of l) for (let k = 0; k < m; k++) means[k] += (row[k] * row[k]) / p;
  let f = 0;
  const gq = l.map((row) =>
    row.map((v, k) => {
      const ql = v * v - means[k];
      f += ql * ql;
      return -v * ql;
    }),
  );
  return { f: -f / 4, gq };
}

/** Quartimax: −¼ΣL⁴ (Carroll 1953; Neuhaus & Wrigley 1954). */
function quartimaxCriterion(l: number[][]): { f: number; gq: number[][] } {
  let f = 0;
  const gq = l.map((row) =>
    row.map((v) => {
      f += v ** 4;
      return -(v ** 3);
    }),
  );
  return { f: -f / 4, gq };
}

/** Oblimin with parameter γ (Carroll 1960; Jennrich 2002): ¼Σ L²∘((I − γ/p·11ᵀ)·L²·(11ᵀ − I)). */
function obliminCriterion(gamma: number): Criterion {
  return (l) => {
    const p = l.length;
    const m = l[0].length;
    const x = l.map((row) => {
      const sq = row.map((v) => v * v);
      const total = sq.reduce((a, b) => a + b, 0);
      return sq.map((v) => total - v);
    });
    if (gamma !== 0) {
      const colMeans = new Array<number>(m).fill(0);
      for (const row of x) for (let k = 0; k < m; k++) colMeans[k] += row[k] / p;
      for (const row of x) for (let k = 0; k < m; k++) row[k] -= gamma * colMeans[k];
    }
    let f = 0;
    const gq = l.map((row, i) =>
      row.map((v, k) => {
        f += v * v * x[i][k];
        return v * x[i][k];
      }),
    );
    return { f: f / 4, gq };
  };
}

/** Geomin (Yates 1987; Browne 2001): Σᵢ (Πₖ (λᵢₖ² + δ))^{1/m}. */
function geominCriterion(delta: number): Criterion {
  return (l) => {
    const m = l[0].length;
    let f = 0;
    const gq = l.map((row) => {
      const l2 = row.map((v) => v * v + delta);
      const pro = Math.exp(l2.reduce((s, v) => s + Math.log(v), 0) / m);
      f += pro;
      return row.map((v, k) => ((2 / m) * v * pro) / l2[k]);
    });
    return { f, gq };
  };
}

function frobenius(a: number[][]): number {
  let s = 0;
  for (const row of a) for (const v of row) s += v * v;
  return Math.sqrt(s);
}

/** U·Vᵀ of X = U·S·Vᵀ, as X·(XᵀX)^{-1/2}: the orthogonal matrix nearest X (its polar factor). */
function nearestOrthogonal(x: number[][]): number[][] {
  const { values, vectors } = symmetricEigen(matMul(transpose(x), x));
  const m = values.length;
  const invRoot: number[][] = Array.from({ length: m }, (_, i) =>
    Array.from({ length: m }, (_, j) => {
      let s = 0;
      for (let k = 0; k < m; k++)
        s += (vectors[i][k] * vectors[j][k]) / Math.sqrt(Math.max(values[k], 1e-300));
      return s;
    }),
  );
  return matMul(x, invRoot);
}

interface GpaResult {
  t: number[][];
  f: number;
  iterations: number;
  converged: boolean;
}

/** Orthogonal gradient projection (Jennrich 2001; Bernaards & Jennrich 2005). */
function gpaOrthogonal(a: number[][], criterion: Criterion, t0: number[][]): GpaResult {
  let t = t0;
  let { f, gq } = criterion(matMul(a, t));
  let g = matMul(transpose(a), gq);
  let alpha = 1;
  for (let iter = 0; iter < ROTATION_MAX_ITERATIONS; iter++) {
    const mtg = matMul(transpose(t), g);
    const sym = mtg.map((row, i) => row.map((v, j) => (v + mtg[j][i]) / 2));
    const ts = matMul(t, sym);
    const gp = g.map((row, i) => row.map((v, j) => v - ts[i][j]));
    const s = frobenius(gp);
    if (s < ROTATION_TOLERANCE) return { t, f, iterations: iter, converged: true };
    alpha *= 2;
    let tt = t;
    let next = { f, gq };
    let improved = false;
    for (let k = 0; k <= 10 && !improved; k++) {
      tt = nearestOrthogonal(t.map((row, i) => row.map((v, j) => v - alpha * gp[i][j])));
      next = criterion(matMul(a, tt));
      improved = next.f < f - 0.5 * s * s * alpha;
      if (!improved) alpha /= 2;
    }
    if (!improved && !(next.f < f))
      return { t, f, iterations: iter, converged: s < ROTATION_STALL_TOLERANCE };
    t = tt;
    f = next.f;
    g = matMul(transpose(a), next.gq);
  }
  return { t, f, iterations: ROTATION_MAX_ITERATIONS, converged: false };
}

/** Oblique gradient projection (Jennrich 2002; Bernaards & Jennrich 2005): pattern A·(Tᵀ)⁻¹. */
function gpaOblique(a: number[][], criterion: Criterion, t0: number[][]): GpaResult {
  let t = t0;
  let tInv = inverse(t);
  let l = matMul(a, transpose(tInv));
  let { f, gq } = criterion(l);
  let g = transpose(matMul(matMul(transpose(l), gq), tInv)).map((row) => row.map((v) => -v));
  let alpha = 1;
  const m = t.length;
  for (let iter = 0; iter < ROTATION_MAX_ITERATIONS; iter++) {
    const colDot = new Array<number>(m).fill(0);
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) colDot[j] += t[i][j] * g[i][j];
    const gp = g.map((row, i) => row.map((v, j) => v - t[i][j] * colDot[j]));
    const s = frobenius(gp);
    if (s < ROTATION_TOLERANCE) return { t, f, iterations: iter, converged: true };
    alpha *= 2;
    let tt = t;
    let next = { f, gq };
    let nextL = l;
    let improved = false;
    for (let k = 0; k <= 10 && !improved; k++) {
      const x = t.map((row, i) => row.map((v, j) => v - alpha * gp[i][j]));
      const norms = new Array<number>(m).fill(0);
      for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) norms[j] += x[i][j] * x[i][j];
      tt = x.map((row) => row.map((v, j) => v / Math.sqrt(norms[j])));
      try {
        tInv = inverse(tt);
      } catch (error) {
        if (!(error instanceof EngineError)) throw error;
        alpha /= 2;
        continue;
      }
      nextL = matMul(a, transpose(tInv));
      next = criterion(nextL);
      improved = next.f < f - 0.5 * s * s * alpha;
      if (!improved) alpha /= 2;
    }
    if (!improved && !(next.f < f))
      return { t, f, iterations: iter, converged: s < ROTATION_STALL_TOLERANCE };
    t = tt;
    tInv = inverse(t);
    l = nextL;
    f = next.f;
    g = transpose(matMul(matMul(transpose(l), next.gq), tInv)).map((row) => row.map((v) => -v));
  }
  return { t, f, iterations: ROTATION_MAX_ITERATIONS, converged: false };
}

/** A random orthogonal m × m matrix: the polar factor of a standard-normal matrix (uniform on O(m)). */
function randomOrthogonal(m: number, next: () => number): number[][] {
  return nearestOrthogonal(Array.from({ length: m }, () => Array.from({ length: m }, next)));
}

function rowNorms(a: number[][]): number[] {
  return a.map((row) => Math.sqrt(row.reduce((s, v) => s + v * v, 0)));
}

/**
 * Promax (Hendrickson & White 1964): varimax of the (normalized) loadings, then a least-squares oblique
 * fit of the unnormalized varimax loadings V to the target V∘|V|^{power−1}, with the columns scaled so
 * that the factor correlations have a unit diagonal. Returns T with pattern = A·(Tᵀ)⁻¹.
 */
function promax(a: number[][], work: number[][], power: number): { t: number[][]; varimax: GpaResult } {
  const m = a[0].length;
  const vari = gpaOrthogonal(work, varimaxCriterion, identity(m));
  const v = matMul(a, vari.t);
  const target = v.map((row) => row.map((x) => x * Math.abs(x) ** (power - 1)));
  const vt = transpose(v);
  // U = (VᵀV)⁻¹VᵀQ, columns rescaled so that Φ = (UᵀU)⁻¹ has a unit diagonal.
  const u = matMul(inverse(matMul(vt, v)), matMul(vt, target));
  const d = inverse(matMul(transpose(u), u)).map((row, i) => Math.sqrt(row[i]));
  const scaled = u.map((row) => row.map((x, j) => x * d[j]));
  // pattern = A·Tv·U = A·(Tᵀ)⁻¹ with T = ((Tv·U)⁻¹)ᵀ.
  return { t: transpose(inverse(matMul(vari.t, scaled))), varimax: vari };
}

/**
 * Rotates unrotated loadings A (p × m):
 * - orthogonal: varimax (Kaiser 1958; registry id `rotation.varimax`), quartimax (registry id
 *   `rotation.quartimax`) by gradient projection (Jennrich 2001; Bernaards & Jennrich 2005);
 * - oblique: oblimin with γ (default 0, quartimin; registry id `rotation.oblimin`) and geomin with δ =
 *   0.01 (registry id `rotation.geomin`) by oblique gradient projection (Jennrich 2002), each from the
 *   identity and random orthogonal starts (seeded) keeping the lowest criterion; promax with a
 *   configurable power (default 4; Hendrickson & White 1964; registry id `rotation.promax`).
 * Kaiser row normalization (registry id `rotation.kaiser-normalization`) is applied unless
 * `normalize` is false. Returns pattern, structure = pattern·Φ and Φ = TᵀT; with one factor, or
 * method none, A itself. Columns are not reordered or re-signed here (see efa.ts).
 *
 * Cost: O(p·m² + m³) per gradient-projection iteration; usually tens to hundreds of iterations per
 * start. Throws EngineError for a promax power ≤ 1, a geomin δ ≤ 0, starts < 1, or ragged input.
 *
 * @example rotateLoadings(a, { method: 'oblimin' }).phi
 */
export function rotateLoadings(a: number[][], options: RotationOptions): Rotation {
  const p = a.length;
  const m = a[0]?.length ?? 0;
  if (p === 0 || m === 0 || a.some((row) => row.length !== m || row.some((v) => !Number.isFinite(v)))) {
    throw new EngineError('rotation requires a finite loading matrix with rows of equal length', 'shape');
  }
  const method = options.method;
  const normalize = options.normalize ?? true;
  const power = options.promaxPower ?? DEFAULT_PROMAX_POWER;
  const gamma = options.obliminGamma ?? DEFAULT_OBLIMIN_GAMMA;
  const delta = options.geominDelta ?? DEFAULT_GEOMIN_DELTA;
  const starts = options.starts ?? DEFAULT_RANDOM_STARTS;
  if (!(power > 1) || !Number.isFinite(power))
    throw new EngineError(`the promax power must be a number above 1, got ${power}`);
  if (!(delta > 0)) throw new EngineError(`the geomin δ must be positive, got ${delta}`);
  if (!Number.isFinite(gamma)) throw new EngineError(`the oblimin γ must be a number, got ${gamma}`);
  if (!Number.isInteger(starts) || starts < 1)
    throw new EngineError(`rotation starts must be a whole number ≥ 1, got ${starts}`);
  const oblique = method === 'promax' || method === 'oblimin' || method === 'geomin';
  const warnings: string[] = [];
  if (method === 'none' || m === 1) {
    const copy = a.map((row) => row.slice());
    return {
      method,
      oblique,
      normalized: false,
      pattern: copy,
      structure: copy.map((row) => row.slice()),
      phi: identity(m),
      t: identity(m),
      criterion: null,
      iterations: 0,
      converged: true,
      starts: { tried: 0, reachedBest: 0 },
      warnings,
    };
  }
  const norms = rowNorms(a);
  const useNorm = normalize && norms.every((h) => h > 0);
  if (normalize && !useNorm)
    warnings.push('an item has no common variance; Kaiser normalization was skipped');
  const work = useNorm ? a.map((row, i) => row.map((v) => v / norms[i])) : a;

  let t: number[][];
  let criterion: number | null = null;
  let iterations = 0;
  let converged = true;
  let tried = 1;
  let reachedBest = 1;
  if (method === 'promax') {
    const out = promax(a, work, power);
    t = out.t;
    iterations = out.varimax.iterations;
    converged = out.varimax.converged;
  } else if (method === 'varimax' || method === 'quartimax') {
    const out = gpaOrthogonal(
      work,
      method === 'varimax' ? varimaxCriterion : quartimaxCriterion,
      identity(m),
    );
    ({ t, iterations, converged } = out);
    criterion = out.f;
  } else {
    const crit = method === 'oblimin' ? obliminCriterion(gamma) : geominCriterion(delta);
    const rng = createRng(options.seed ?? 0);
    let best: GpaResult | null = null;
    const values: number[] = [];
    for (let s = 0; s < starts; s++) {
      const t0 = s === 0 ? identity(m) : randomOrthogonal(m, () => rng.normal());
      const out = gpaOblique(work, crit, t0);
      values.push(out.f);
      // Prefer a converged start, then the lowest criterion.
      if (!best || (out.converged && (!best.converged || out.f < best.f))) best = out;
    }
    const chosen = best as GpaResult;
    ({ t, iterations, converged } = chosen);
    criterion = chosen.f;
    tried = starts;
    reachedBest = values.filter(
      (v) => Math.abs(v - chosen.f) <= SAME_MINIMUM * Math.max(1, Math.abs(chosen.f)),
    ).length;
    if (starts > 1 && reachedBest < starts / 2) {
      warnings.push(
        `${method}: only ${reachedBest} of ${starts} starts reached the best criterion value; the rotation has competing local minima`,
      );
    }
  }
  if (!converged)
    warnings.push(`${method} rotation did not converge in ${ROTATION_MAX_ITERATIONS} iterations`);
  // T was found on the normalized rows; applied to A it gives the same rows rescaled back.
  const pattern = oblique ? matMul(a, transpose(inverse(t))) : matMul(a, t);
  const phi = oblique ? matMul(transpose(t), t) : identity(m);
  return {
    method,
    oblique,
    normalized: useNorm,
    pattern,
    structure: oblique ? matMul(pattern, phi) : pattern.map((row) => row.slice()),
    phi,
    t,
    criterion,
    iterations,
    converged,
    starts: { tried, reachedBest },
    warnings,
  };
}
