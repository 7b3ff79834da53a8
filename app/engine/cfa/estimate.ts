import { EngineError } from '../errors.ts';
import { symmetricEigen } from '../linalg.ts';
import { cholesky } from '../dense.ts';
import {
  type GroupMatrices,
  type GroupMoments,
  groupMatrices,
  type MatrixName,
  type ParameterTable,
  type Slot,
} from './model.ts';

/** Largest number of Fisher-scoring steps before the fit is declared not converged. */
export const MAX_ITERATIONS = 500;
/** Convergence: the squared Newton decrement gᵀH⁻¹g of F_ML falls below this. */
export const DECREMENT_TOL = 1e-14;
/** Smallest eigenvalue of the scaled information matrix, relative to the largest, that counts as identified. */
export const IDENTIFICATION_TOL = 1e-9;
/** A squared Cholesky pivot of the unit-diagonal information matrix above this needs no closer look. */
const CLEAR_PIVOT = 1e-4;

/** What the optimizer needs of each group, precomputed once. */
export interface PreparedGroup {
  moments: GroupMoments;
  weight: number;
  logDetS: number;
}

/** One group's evaluated model: implied moments, inverse, and the gradient pieces. */
interface GroupState {
  m: GroupMatrices;
  /** ΛΦ (p × m). */
  lp: number[][];
  sigma: number[][];
  mu: number[];
  /** Σ⁻¹. */
  w: number[][];
  f: number;
}

/** dΣ = x·yᵀ + y·xᵀ and dμ of one parameter in one group. */
interface Term {
  x: Vec;
  y: Vec;
  mu: Vec;
}

/** The result of minimizing F_ML. */
export interface Estimate {
  theta: number[];
  /** Weighted F_ML, Σ_g (n_g/N)·F_g, at the solution. */
  fmin: number;
  /** F_g of each group. */
  groupF: number[];
  matrices: GroupMatrices[];
  implied: { sigma: number[][]; mu: number[] }[];
  /** Expected Hessian of the weighted F_ML at the solution (q × q). */
  hessian: number[][];
  converged: boolean;
  iterations: number;
  /** Labels of parameters involved in a near-singular information matrix (empty when identified). */
  unidentified: string[];
}

export function spdInverse(a: number[][]): { inv: number[][]; logDet: number } | null {
  let l: number[][];
  try {
    l = cholesky(a);
  } catch {
    return null;
  }
  const n = a.length;
  let logDet = 0;
  for (let i = 0; i < n; i++) logDet += 2 * Math.log(l[i][i]);
  // Invert L (lower triangular) in place into li, then A⁻¹ = L⁻ᵀ·L⁻¹.
  const li = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    li[i][i] = 1 / l[i][i];
    for (let j = 0; j < i; j++) {
      let s = 0;
      for (let k = j; k < i; k++) s += l[i][k] * li[k][j];
      li[i][j] = -s / l[i][i];
    }
  }
  const inv = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = i; k < n; k++) s += li[k][i] * li[k][j];
      inv[i][j] = s;
      inv[j][i] = s;
    }
  }
  return { inv, logDet };
}

function matMul(a: number[][], b: number[][]): number[][] {
  const n = a.length;
  const m = b[0]?.length ?? 0;
  const out = Array.from({ length: n }, () => new Array<number>(m).fill(0));
  for (let i = 0; i < n; i++) {
    const ai = a[i];
    const oi = out[i];
    for (let k = 0; k < ai.length; k++) {
      const v = ai[k];
      if (v === 0) continue;
      const bk = b[k];
      for (let j = 0; j < m; j++) oi[j] += v * bk[j];
    }
  }
  return out;
}

const matVec = (a: number[][], x: number[]) => a.map((row) => dot(row, x));

function dot(a: number[], b: number[]): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

/** Σ = ΛΦΛᵀ + Θ and μ = ν + Λα of one group. */
export function impliedMoments(m: GroupMatrices): { sigma: number[][]; mu: number[]; lp: number[][] } {
  const lp = matMul(m.lambda, m.phi);
  const p = m.lambda.length;
  const sigma = Array.from({ length: p }, (_, i) =>
    Array.from({ length: p }, (_, j) => dot(lp[i], m.lambda[j]) + m.theta[i][j]),
  );
  const mu = m.nu.map((v, i) => v + dot(m.lambda[i], m.alpha));
  return { sigma, mu, lp };
}

function evaluateGroup(m: GroupMatrices, g: PreparedGroup, meanStructure: boolean): GroupState | null {
  const { sigma, mu, lp } = impliedMoments(m);
  const inv = spdInverse(sigma);
  if (!inv) return null;
  const s = g.moments.cov;
  const p = sigma.length;
  let trace = 0;
  for (let i = 0; i < p; i++) trace += dot(s[i], inv.inv[i]);
  let meanTerm = 0;
  if (meanStructure && g.moments.means) {
    const d = g.moments.means.map((v, i) => v - mu[i]);
    meanTerm = dot(d, matVec(inv.inv, d));
  }
  const f = inv.logDet + trace - g.logDetS - p + meanTerm;
  return { m, lp, sigma, mu, w: inv.inv, f };
}

/**
 * A derivative vector: dense, a scaled unit vector (most parameters touch one item), or zero. Keeping
 * unit vectors sparse turns the O(p) products of the information matrix into O(1) lookups.
 */
type Vec = number[] | { at: number; scale: number } | null;

/** aᵀb for a dense (or zero) a. */
function vdot(a: number[] | null, b: Vec): number {
  if (a === null || b === null) return 0;
  if (Array.isArray(b)) return dot(a, b);
  return a[b.at] * b.scale;
}

/** W·b (W symmetric), dense, or null for a zero b. */
function wv(w: number[][], b: Vec): number[] | null {
  if (b === null) return null;
  if (Array.isArray(b)) return matVec(w, b);
  return w[b.at].map((v) => v * b.scale);
}

/** The derivative of Σ and μ with respect to the entry a slot fills. */
function slotTerm(
  matrix: MatrixName,
  row: number,
  col: number,
  st: GroupState,
  meanStructure: boolean,
): Term {
  const lambdaCol = (j: number) => st.m.lambda.map((r) => r[j]);
  switch (matrix) {
    case 'lambda':
      return {
        x: { at: row, scale: 1 },
        y: st.lp.map((r) => r[col]),
        mu: meanStructure && st.m.alpha[col] !== 0 ? { at: row, scale: st.m.alpha[col] } : null,
      };
    case 'phi':
      return row === col
        ? { x: lambdaCol(row), y: lambdaCol(row).map((v) => v / 2), mu: null }
        : { x: lambdaCol(row), y: lambdaCol(col), mu: null };
    case 'theta':
      return { x: { at: row, scale: 1 }, y: { at: col, scale: row === col ? 0.5 : 1 }, mu: null };
    case 'nu':
      return { x: null, y: null, mu: { at: row, scale: 1 } };
    case 'alpha':
      return { x: null, y: null, mu: lambdaCol(row) };
  }
}

/** A term with its Σ⁻¹-products precomputed, for the information matrix. */
interface WTerm extends Term {
  wx: number[] | null;
  wy: number[] | null;
  wmu: number[] | null;
}

function withW(t: Term, w: number[][]): WTerm {
  return { ...t, wx: wv(w, t.x), wy: wv(w, t.y), wmu: wv(w, t.mu) };
}

/** Expected Hessian entry of F_g between two terms: tr(W dΣ_a W dΣ_b) + 2 dμ_aᵀ W dμ_b. */
function termProduct(a: WTerm, b: Term): number {
  return 2 * (vdot(a.wx, b.x) * vdot(a.wy, b.y) + vdot(a.wx, b.y) * vdot(a.wy, b.x) + vdot(a.wmu, b.mu));
}

/** dF_g for one term: tr(G dΣ) + hᵀdμ = 2xᵀGy + hᵀdμ. */
function termGradient(t: Term, G: number[][], h: number[] | null): number {
  return 2 * vdot(wv(G, t.y), t.x) + vdot(h, t.mu);
}

/** Everything the optimizer and the modification hints evaluate at one parameter vector. */
export class Objective {
  readonly q: number;
  constructor(
    readonly table: ParameterTable,
    readonly groups: PreparedGroup[],
  ) {
    this.q = table.params.length;
  }

  states(theta: ArrayLike<number>): GroupState[] | null {
    const mats = groupMatrices(this.table, theta);
    const out: GroupState[] = [];
    for (let g = 0; g < mats.length; g++) {
      const st = evaluateGroup(mats[g], this.groups[g], this.table.meanStructure);
      if (!st) return null;
      out.push(st);
    }
    return out;
  }

  value(states: GroupState[]): number {
    return states.reduce((s, st, g) => s + this.groups[g].weight * st.f, 0);
  }

  /** Per group: G = Σ⁻¹ − Σ⁻¹(S + ddᵀ)Σ⁻¹ and h = −2Σ⁻¹d, so dF_g = tr(G dΣ) + hᵀdμ. */
  private gradientPieces(st: GroupState, g: PreparedGroup): { G: number[][]; h: number[] | null } {
    const p = st.sigma.length;
    const sStar = g.moments.cov.map((r) => [...r]);
    let h: number[] | null = null;
    if (this.table.meanStructure && g.moments.means) {
      const d = g.moments.means.map((v, i) => v - st.mu[i]);
      for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) sStar[i][j] += d[i] * d[j];
      h = matVec(st.w, d).map((v) => -2 * v);
    }
    const wsw = matMul(matMul(st.w, sStar), st.w);
    const G = st.w.map((r, i) => r.map((v, j) => v - wsw[i][j]));
    return { G, h };
  }

  /** Gradient and expected Hessian of the weighted F_ML over the free parameters. */
  derivatives(states: GroupState[]): { gradient: number[]; hessian: number[][] } {
    const q = this.q;
    const gradient = new Array<number>(q).fill(0);
    const hessian = Array.from({ length: q }, () => new Array<number>(q).fill(0));
    states.forEach((st, g) => {
      const weight = this.groups[g].weight;
      const { G, h } = this.gradientPieces(st, this.groups[g]);
      const terms: { a: number; t: WTerm }[] = [];
      this.table.params.forEach((param, a) => {
        for (const s of param.slots) {
          if (s.group !== g) continue;
          const t = withW(slotTerm(s.matrix, s.row, s.col, st, this.table.meanStructure), st.w);
          terms.push({ a, t });
          gradient[a] += weight * termGradient(t, G, h);
        }
      });
      for (let r = 0; r < terms.length; r++) {
        for (let s = 0; s <= r; s++) {
          const v = weight * termProduct(terms[r].t, terms[s].t);
          const a = terms[r].a;
          const b = terms[s].a;
          // The full double sum over ordered pairs of terms: a pair of distinct terms counts twice.
          if (r === s) hessian[a][a] += v;
          else {
            hessian[a][b] += v;
            hessian[b][a] += v;
          }
        }
      }
    });
    return { gradient, hessian };
  }

  /**
   * Score-test pieces for freeing fixed entries: for each candidate slot (a one-group entry not in the
   * table), the gradient of F, its own expected-Hessian entry, and its row against the free parameters.
   */
  candidates(states: GroupState[], slots: Slot[]): { gradient: number; self: number; cross: number[] }[] {
    const perGroup = states.map((st, g) => {
      const { G, h } = this.gradientPieces(st, this.groups[g]);
      const free: { a: number; t: Term }[] = [];
      this.table.params.forEach((param, a) => {
        for (const s of param.slots) {
          if (s.group === g)
            free.push({ a, t: slotTerm(s.matrix, s.row, s.col, st, this.table.meanStructure) });
        }
      });
      return { G, h, free };
    });
    return slots.map((slot) => {
      const st = states[slot.group];
      const { G, h, free } = perGroup[slot.group];
      const weight = this.groups[slot.group].weight;
      const t = withW(slotTerm(slot.matrix, slot.row, slot.col, st, this.table.meanStructure), st.w);
      const gradient = weight * termGradient(t, G, h);
      const cross = new Array<number>(this.q).fill(0);
      for (const f of free) cross[f.a] += weight * termProduct(t, f.t);
      return { gradient, self: weight * termProduct(t, t), cross };
    });
  }
}

/** Solves H·x = b for a symmetric H, adding a ridge when H is not positive definite. */
export function solveSpd(h: number[][], b: number[]): number[] {
  const n = h.length;
  const scale = Math.max(1e-300, ...h.map((r, i) => Math.abs(r[i])));
  for (let ridge = 0; ridge < 40; ridge++) {
    const lambda = ridge === 0 ? 0 : scale * 1e-10 * 10 ** ridge;
    const a = h.map((r, i) => r.map((v, j) => (i === j ? v + lambda : v)));
    let l: number[][];
    try {
      l = cholesky(a);
    } catch {
      continue;
    }
    const y = new Array<number>(n).fill(0);
    for (let i = 0; i < n; i++) y[i] = (b[i] - dot(l[i].slice(0, i), y.slice(0, i))) / l[i][i];
    const x = new Array<number>(n).fill(0);
    for (let i = n - 1; i >= 0; i--) {
      let s = y[i];
      for (let k = i + 1; k < n; k++) s -= l[k][i] * x[k];
      x[i] = s / l[i][i];
    }
    return x;
  }
  throw new EngineError('the information matrix could not be factored; the model is not identified');
}

/**
 * Minimizes the ML discrepancy Σ_g (n_g/N)·F_g, F_g = ln|Σ| + tr(SΣ⁻¹) − ln|S| − p (+ (m − μ)ᵀΣ⁻¹(m − μ)
 * with a mean structure), by Fisher scoring with analytic gradients and the expected information
 * (Jöreskog 1969; Lee & Jennrich 1979), with a backtracking line search that keeps Σ positive
 * definite. Registry: `cfa.ml`.
 *
 * Cost: O(q²·p) per step for q free parameters and p items, usually under 20 steps. Returns
 * converged = false rather than throwing when the step limit is reached; throws EngineError when the
 * starting values do not give a positive-definite Σ.
 */
export function minimizeMl(objective: Objective, start: number[], maxIterations = MAX_ITERATIONS): Estimate {
  let theta = [...start];
  let states = objective.states(theta);
  if (!states)
    throw new EngineError(
      'the starting values give an implied covariance matrix that is not positive definite',
    );
  let f = objective.value(states);
  let converged = false;
  let iterations = 0;
  let derivs = objective.derivatives(states);
  for (; iterations < maxIterations; iterations++) {
    const step = solveSpd(derivs.hessian, derivs.gradient).map((v) => -v);
    const decrement = -dot(derivs.gradient, step);
    if (decrement < DECREMENT_TOL) {
      converged = true;
      break;
    }
    let t = 1;
    let accepted = false;
    for (let halvings = 0; halvings < 40; halvings++, t /= 2) {
      const trial = theta.map((v, i) => v + t * step[i]);
      const st = objective.states(trial);
      if (st) {
        const ft = objective.value(st);
        if (ft <= f - 1e-4 * t * decrement || (halvings > 30 && ft <= f)) {
          theta = trial;
          states = st;
          f = ft;
          accepted = true;
          break;
        }
      }
    }
    if (!accepted) {
      // No step lowers F: at the optimum to machine precision when the decrement is tiny.
      converged = decrement < 1e-9;
      break;
    }
    derivs = objective.derivatives(states);
  }
  const unidentified = identificationCheck(objective, derivs.hessian);
  return {
    theta,
    fmin: f,
    groupF: states.map((s) => s.f),
    matrices: states.map((s) => s.m),
    implied: states.map((s) => ({ sigma: s.sigma, mu: s.mu })),
    hessian: derivs.hessian,
    converged,
    iterations,
    unidentified,
  };
}

/**
 * Empirical identification: the information matrix, scaled to unit diagonal, should have no
 * eigenvalue near zero. Returns the labels of the parameters that load on the null direction.
 */
function identificationCheck(objective: Objective, h: number[][]): string[] {
  const d = h.map((r, i) => 1 / Math.sqrt(Math.max(r[i], 1e-300)));
  const scaled = h.map((r, i) => r.map((v, j) => v * d[i] * d[j]));
  // Fast path: a Cholesky factor whose pivots are all far from zero proves the matrix well away from
  // singular; only a doubtful matrix pays for the eigendecomposition that names the parameters.
  if (h.every((r, i) => r[i] > 0)) {
    try {
      const l = cholesky(scaled);
      if (l.every((row, i) => row[i] * row[i] > CLEAR_PIVOT)) return [];
    } catch {
      // not positive definite: fall through to the eigendecomposition
    }
  }
  const { values, vectors } = symmetricEigen(scaled);
  const last = values.length - 1;
  if (values[last] > IDENTIFICATION_TOL * values[0] && h.every((r, i) => r[i] > 0)) return [];
  const labels: string[] = [];
  h.forEach((r, i) => {
    if (!(r[i] > 0) || Math.abs(vectors[i][last]) > 0.2) labels.push(objective.table.params[i].label);
  });
  return labels;
}
