import { EngineError } from '../errors.ts';
import { symmetricEigen } from '../linalg.ts';
import { logDeterminant } from '../dense.ts';
import {
  type Estimate,
  impliedMoments,
  minimizeMl,
  Objective,
  type PreparedGroup,
  spdInverse,
} from './estimate.ts';
import { type FitIndices, fitIndices, standardizedResiduals } from './fit-indices.ts';
import {
  buildParameterTable,
  type CfaModel,
  type Constraint,
  type GroupMatrices,
  type GroupMoments,
  groupMatrices,
  type ParameterTable,
  type Slot,
} from './model.ts';

/** χ²(1) critical value at .05: a modification hint is listed only above it. */
export const HINT_MIN_MI = 3.841458820694124;
/** How many modification hints a fit lists at most. */
export const MAX_HINTS = 10;

/** One loading with its standard error, raw and standardized (the whole solution standardized). */
export interface LoadingEstimate {
  group: number;
  item: string;
  factor: string;
  estimate: number;
  se: number | null;
  standardized: number;
  standardizedSE: number | null;
}

export interface CfaGroupSolution {
  name: string;
  n: number;
  /** p × m, zero where the item does not indicate the factor. */
  standardizedLoadings: number[][];
  factorCorrelations: number[][];
  factorVariances: number[];
  factorMeans: number[] | null;
  intercepts: number[] | null;
  residualVariances: number[];
  /** θ_ii/σ_ii: the share of the item's variance the factors leave unexplained. */
  standardizedResidualVariances: number[];
  /** Observed minus implied correlations. */
  residualCorrelations: number[][];
  srmr: number;
  F: number;
}

/** A fixed parameter whose release would lower χ² by about `mi` (a univariate score test). */
export interface ModificationHint {
  kind: 'cross-loading' | 'residual covariance';
  group: number;
  /** For a cross-loading: the factor and the item; for a residual covariance: the two items. */
  a: string;
  b: string;
  mi: number;
  /** Expected parameter change, raw and in the standardized metric. */
  epc: number;
  standardizedEpc: number;
}

export interface CfaResult extends FitIndices {
  constraint: Constraint;
  items: string[];
  factors: string[];
  n: number;
  groups: CfaGroupSolution[];
  parameters: { label: string; estimate: number; se: number | null }[];
  loadings: LoadingEstimate[];
  converged: boolean;
  iterations: number;
  fmin: number;
  /** Negative residual variances, standardized loadings beyond ±1, factor correlations beyond ±1. */
  improper: boolean;
  /** Parameters on a near-singular direction of the information matrix (empirical under-identification). */
  unidentified: string[];
  hints: ModificationHint[];
  warnings: string[];
}

function startMatrices(table: ParameterTable, s: number[][], means: number[] | undefined): GroupMatrices {
  const p = table.items.length;
  const m = table.factors.length;
  const lambda = Array.from({ length: p }, () => new Array<number>(m).fill(0));
  const counts = table.pattern.map((row) => row.filter(Boolean).length);
  for (let j = 0; j < m; j++) {
    const idx = table.items.map((_, i) => i).filter((i) => table.pattern[i][j]);
    const k = idx.length;
    let load: number[];
    if (k >= 3) {
      const block = idx.map((a) => idx.map((b) => s[a][b]));
      const diag = idx.map(
        (a, r) => Math.max(...idx.filter((b) => b !== a).map((b) => Math.abs(s[a][b]))) || 0.5 * block[r][r],
      );
      load = new Array<number>(k).fill(0);
      for (let iter = 0; iter < 10; iter++) {
        const reduced = block.map((row, r) => row.map((v, c) => (r === c ? diag[r] : v)));
        const { values, vectors } = symmetricEigen(reduced);
        const root = Math.sqrt(Math.max(values[0], 1e-6));
        load = vectors.map((v) => v[0] * root);
        for (let r = 0; r < k; r++) diag[r] = Math.min(load[r] ** 2, 0.95 * block[r][r]);
      }
    } else if (k === 2) {
      const [a, b] = idx;
      const cov = s[a][b] === 0 ? 0.1 * Math.sqrt(s[a][a] * s[b][b]) : s[a][b];
      const first = Math.sqrt(Math.abs(cov)) * (s[a][a] / s[b][b]) ** 0.25;
      load = [first, cov / first];
    } else {
      load = [Math.sqrt(0.5 * s[idx[0]][idx[0]])];
    }
    if (load.reduce((x, y) => x + y, 0) < 0) load = load.map((v) => -v);
    idx.forEach((i, r) => {
      lambda[i][j] = load[r] / Math.sqrt(counts[i]);
    });
  }
  const theta = Array.from({ length: p }, (_, i) =>
    Array.from({ length: p }, (_, c) => {
      if (c !== i) return 0;
      const explained = lambda[i].reduce((x, v) => x + v * v, 0);
      return Math.max(s[i][i] - explained, 0.05 * s[i][i]);
    }),
  );
  const phi: number[][] = Array.from({ length: m }, (_, j) =>
    Array.from({ length: m }, (_, k) => (j === k ? 1 : 0)),
  );
  for (let j = 0; j < m; j++) {
    for (let k = 0; k < j; k++) {
      let cov = 0;
      let lj = 0;
      let lk = 0;
      for (let a = 0; a < p; a++) {
        if (table.pattern[a][j]) lj += lambda[a][j];
        if (table.pattern[a][k]) lk += lambda[a][k];
        for (let b = 0; b < p; b++) if (a !== b && table.pattern[a][j] && table.pattern[b][k]) cov += s[a][b];
      }
      const r = lj !== 0 && lk !== 0 ? cov / (lj * lk) : 0;
      phi[j][k] = phi[k][j] = Math.max(-0.9, Math.min(0.9, r));
    }
  }
  for (let shrink = 0; shrink < 20; shrink++) {
    try {
      logDeterminant(phi);
      break;
    } catch {
      for (let j = 0; j < m; j++) for (let k = 0; k < m; k++) if (j !== k) phi[j][k] *= 0.5;
    }
  }
  return {
    lambda,
    phi,
    theta,
    nu: means ? [...means] : new Array<number>(p).fill(0),
    alpha: new Array<number>(m).fill(0),
  };
}

function slotValue(m: GroupMatrices, s: Slot): number {
  if (s.matrix === 'lambda') return m.lambda[s.row][s.col];
  if (s.matrix === 'phi') return m.phi[s.row][s.col];
  if (s.matrix === 'theta') return m.theta[s.row][s.col];
  if (s.matrix === 'nu') return m.nu[s.row];
  return m.alpha[s.row];
}

/** Standardized loadings (p × m), factor correlations and standardized residual variances of one group. */
function standardize(m: GroupMatrices): {
  loadings: number[][];
  correlations: number[][];
  residual: number[];
} {
  const { sigma } = impliedMoments(m);
  const sdF = m.phi.map((r, j) => Math.sqrt(Math.max(r[j], 0)));
  const loadings = m.lambda.map((row, i) => row.map((v, j) => (v * sdF[j]) / Math.sqrt(sigma[i][i])));
  const correlations = m.phi.map((row, j) => row.map((v, k) => (j === k ? 1 : v / (sdF[j] * sdF[k]))));
  const residual = m.theta.map((row, i) => row[i] / sigma[i][i]);
  return { loadings, correlations, residual };
}

/**
 * The standardized loadings at the pattern's free positions, λ_ij·√φ_jj/√σ_ii, from the diagonal of
 * Σ only (the delta method calls this 2q times).
 */
function standardizedPattern(m: GroupMatrices, pattern: boolean[][]): number[] {
  const out: number[] = [];
  const k = m.phi.length;
  m.lambda.forEach((row, i) => {
    let variance = m.theta[i][i];
    for (let a = 0; a < k; a++) {
      if (row[a] === 0) continue;
      for (let b = 0; b < k; b++) variance += row[a] * m.phi[a][b] * row[b];
    }
    const sd = Math.sqrt(variance);
    for (let j = 0; j < k; j++)
      if (pattern[i][j]) out.push((row[j] * Math.sqrt(Math.max(m.phi[j][j], 0))) / sd);
  });
  return out;
}

function prepare(groups: GroupMoments[], p: number): PreparedGroup[] {
  const total = groups.reduce((s, g) => s + g.n, 0);
  return groups.map((g) => {
    if (g.cov.length !== p || g.cov.some((r) => r.length !== p)) {
      throw new EngineError(`group "${g.name}": the covariance matrix is not ${p} × ${p}`);
    }
    let logDetS: number;
    try {
      logDetS = logDeterminant(g.cov);
    } catch {
      throw new EngineError(`group "${g.name}": the item covariance matrix is not positive definite`);
    }
    return { moments: g, weight: g.n / total, logDetS };
  });
}

/**
 * Maximum-likelihood confirmatory factor analysis of one group or one step of a multi-group
 * invariance test: estimation (minimizeMl), χ², CFI, TLI, RMSEA with 90% CI, SRMR, standardized
 * loadings with delta-method standard errors from the expected information, factor correlations,
 * residual correlations, and, for a one-group model, modification hints (univariate score tests for
 * cross-loadings and residual covariances; Sörbom 1989). T = N·F_ML with S of divisor N; the baseline is the independence model.
 * Registry: `cfa.ml`, `cfa.chi-square`, `fit.cfi`, `fit.tli`, `rmsea.steiger`, `fit.srmr`,
 * `cfa.modification-indices`.
 *
 * Cost: O(q²·p) per optimizer step, O(c·q²) for c candidate hints. Throws EngineError when the
 * model has more free parameters than sample moments (naming both counts), when a group's matrix has
 * the wrong size or is not positive definite, and what buildParameterTable throws. Non-convergence,
 * improper solutions and empirical under-identification are reported in `warnings`, not thrown.
 * `options.maxIterations` caps the optimizer's steps (default MAX_ITERATIONS).
 *
 * @example fitCfa({ factors: [{ name: 'F', items: ['a', 'b', 'c'] }] }, [moments]).cfi
 */
export function fitCfa(
  model: CfaModel,
  groups: GroupMoments[],
  constraint: Constraint = 'single',
  options: { maxIterations?: number } = {},
): CfaResult {
  const table = buildParameterTable(model, groups.length, constraint);
  const p = table.items.length;
  const G = groups.length;
  if (table.meanStructure && groups.some((g) => !g.means)) {
    throw new EngineError('a multi-group model needs the item means of every group');
  }
  const prepared = prepare(groups, p);
  const q = table.params.length;
  const moments = G * ((p * (p + 1)) / 2 + (table.meanStructure ? p : 0));
  const df = moments - q;
  if (df < 0) {
    throw new EngineError(
      `the model has ${q} free parameters but the data give only ${moments} variances, covariances` +
        `${table.meanStructure ? ' and means' : ''}; it is not identified (add items or fix parameters)`,
    );
  }
  const starts = groups.map((g) => startMatrices(table, g.cov, g.means));
  const start = table.params.map(
    (param) =>
      param.slots.reduce((s, slot) => s + slotValue(starts[slot.group], slot), 0) / param.slots.length,
  );
  const objective = new Objective(table, prepared);
  const est = minimizeMl(objective, start, options.maxIterations);
  return assemble(table, objective, est, groups, df, constraint);
}

function assemble(
  table: ParameterTable,
  objective: Objective,
  est: Estimate,
  groups: GroupMoments[],
  df: number,
  constraint: Constraint,
): CfaResult {
  const N = groups.reduce((s, g) => s + g.n, 0);
  const p = table.items.length;
  const G = groups.length;
  const warnings: string[] = [];
  const t = N * est.fmin;
  const t0 = objective.groups.reduce(
    (s, g) => s + g.moments.n * (g.moments.cov.reduce((a, r, i) => a + Math.log(r[i]), 0) - g.logDetS),
    0,
  );
  const df0 = (G * p * (p - 1)) / 2;
  const residuals = groups.map((g, i) => standardizedResiduals(g.cov, est.implied[i].sigma));
  const srmr = Math.sqrt(residuals.reduce((s, r, i) => s + objective.groups[i].weight * r.srmr ** 2, 0));
  const indices = fitIndices(Math.max(t, 0), df, t0, df0, N, srmr, G);

  const hInv = est.unidentified.length === 0 ? (spdInverse(est.hessian)?.inv ?? null) : null;
  const cov = hInv ? hInv.map((r) => r.map((v) => (2 / N) * v)) : null;
  const se = (a: number) => (cov && cov[a][a] >= 0 ? Math.sqrt(cov[a][a]) : null);

  // Delta method for the standardized loadings: a central-difference Jacobian of the standardization.
  const stdAt = (theta: number[]) =>
    groupMatrices(table, theta).flatMap((m) => standardizedPattern(m, table.pattern));
  const base = stdAt(est.theta);
  let stdSE: (number | null)[] = base.map(() => null);
  if (cov) {
    const jac: number[][] = [];
    for (let a = 0; a < est.theta.length; a++) {
      const h = 1e-6 * Math.max(1, Math.abs(est.theta[a]));
      const up = [...est.theta];
      const down = [...est.theta];
      up[a] += h;
      down[a] -= h;
      const fu = stdAt(up);
      const fd = stdAt(down);
      jac.push(fu.map((v, k) => (v - fd[k]) / (2 * h)));
    }
    const covMatrix = cov;
    stdSE = base.map((_, k) => {
      let v = 0;
      for (let a = 0; a < jac.length; a++) {
        if (jac[a][k] === 0) continue;
        for (let b = 0; b < jac.length; b++) v += jac[a][k] * covMatrix[a][b] * jac[b][k];
      }
      return Math.sqrt(Math.max(v, 0));
    });
  }

  const loadings: LoadingEstimate[] = [];
  const paramOf = new Map<string, number>();
  table.params.forEach((param, a) => {
    for (const s of param.slots) paramOf.set(`${s.group}:${s.matrix}:${s.row}:${s.col}`, a);
  });
  let k = 0;
  let improper = false;
  const solutions: CfaGroupSolution[] = est.matrices.map((m, g) => {
    const std = standardize(m);
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < table.factors.length; j++) {
        if (!table.pattern[i][j]) continue;
        const a = paramOf.get(`${g}:lambda:${i}:${j}`);
        loadings.push({
          group: g,
          item: table.items[i],
          factor: table.factors[j],
          estimate: m.lambda[i][j],
          se: a === undefined ? null : se(a),
          standardized: std.loadings[i][j],
          standardizedSE: stdSE[k],
        });
        k++;
      }
    }
    const where = G > 1 ? ` in group "${groups[g].name}"` : '';
    m.theta.forEach((row, i) => {
      if (row[i] < 0) {
        improper = true;
        warnings.push(
          `improper solution: item "${table.items[i]}" has a negative residual variance${where} (a Heywood case)`,
        );
      }
    });
    std.loadings.forEach((row, i) => {
      row.forEach((v, j) => {
        if (Math.abs(v) > 1) {
          improper = true;
          warnings.push(
            `improper solution: the standardized loading of "${table.items[i]}" on "${table.factors[j]}" is ${v.toFixed(3)}${where}`,
          );
        }
      });
    });
    std.correlations.forEach((row, j) => {
      row.forEach((v, c) => {
        if (c < j && Math.abs(v) > 1) {
          improper = true;
          warnings.push(
            `improper solution: factors "${table.factors[c]}" and "${table.factors[j]}" correlate ${v.toFixed(3)}${where}`,
          );
        }
      });
    });
    m.phi.forEach((row, j) => {
      if (row[j] <= 0) {
        improper = true;
        warnings.push(`improper solution: factor "${table.factors[j]}" has a non-positive variance${where}`);
      }
    });
    return {
      name: groups[g].name,
      n: groups[g].n,
      standardizedLoadings: std.loadings,
      factorCorrelations: std.correlations,
      factorVariances: m.phi.map((r, j) => r[j]),
      factorMeans: table.meanStructure ? [...m.alpha] : null,
      intercepts: table.meanStructure ? [...m.nu] : null,
      residualVariances: m.theta.map((r, i) => r[i]),
      standardizedResidualVariances: std.residual,
      residualCorrelations: residuals[g].residuals,
      srmr: residuals[g].srmr,
      F: est.groupF[g],
    };
  });
  if (!est.converged) {
    warnings.push(
      `the estimation did not converge in ${est.iterations} steps; the estimates are not trustworthy`,
    );
  }
  if (est.unidentified.length > 0) {
    warnings.push(
      `the model is empirically under-identified (the information matrix is singular); involved: ${est.unidentified.join(', ')}`,
    );
  }
  // Hints serve the one-group model a researcher refines; an invariance step is judged as a whole.
  const hints = hInv && constraint === 'single' ? modificationHints(table, objective, est, hInv, N) : [];
  return {
    ...indices,
    constraint,
    items: table.items,
    factors: table.factors,
    n: N,
    groups: solutions,
    parameters: table.params.map((param, a) => ({ label: param.label, estimate: est.theta[a], se: se(a) })),
    loadings,
    converged: est.converged,
    iterations: est.iterations,
    fmin: est.fmin,
    improper,
    unidentified: est.unidentified,
    hints,
    warnings,
  };
}

/**
 * Univariate modification indices MI = (N/2)·g²/c and expected parameter changes −g/c for every fixed
 * cross-loading and residual covariance, with c the conditional expected Hessian (Sörbom 1989).
 * Registry: `cfa.modification-indices`.
 */
function modificationHints(
  table: ParameterTable,
  objective: Objective,
  est: Estimate,
  hInv: number[][],
  N: number,
): ModificationHint[] {
  const states = objective.states(est.theta);
  if (!states) return [];
  const p = table.items.length;
  const m = table.factors.length;
  const free = new Set<string>();
  for (const param of table.params)
    for (const s of param.slots) free.add(`${s.group}:${s.matrix}:${s.row}:${s.col}`);
  const slots: Slot[] = [];
  for (let g = 0; g < table.groups; g++) {
    for (let i = 0; i < p; i++)
      for (let j = 0; j < m; j++)
        if (!table.pattern[i][j]) slots.push({ group: g, matrix: 'lambda', row: i, col: j });
    for (let i = 0; i < p; i++)
      for (let j = 0; j < i; j++)
        if (!free.has(`${g}:theta:${i}:${j}`)) slots.push({ group: g, matrix: 'theta', row: i, col: j });
  }
  const hints: ModificationHint[] = [];
  for (const [slot, c] of objective.candidates(states, slots).entries()) {
    const s = slots[slot];
    let conditional = c.self;
    for (let a = 0; a < c.cross.length; a++) {
      if (c.cross[a] === 0) continue;
      let v = 0;
      for (let b = 0; b < c.cross.length; b++) v += hInv[a][b] * c.cross[b];
      conditional -= c.cross[a] * v;
    }
    if (!(conditional > 1e-12 * Math.max(1, c.self))) continue;
    const mi = ((N / 2) * (c.gradient * c.gradient)) / conditional;
    if (!(mi >= HINT_MIN_MI)) continue;
    const epc = -c.gradient / conditional;
    const mats = est.matrices[s.group];
    const sigma = est.implied[s.group].sigma;
    if (s.matrix === 'lambda') {
      hints.push({
        kind: 'cross-loading',
        group: s.group,
        a: table.factors[s.col],
        b: table.items[s.row],
        mi,
        epc,
        standardizedEpc: (epc * Math.sqrt(mats.phi[s.col][s.col])) / Math.sqrt(sigma[s.row][s.row]),
      });
    } else {
      hints.push({
        kind: 'residual covariance',
        group: s.group,
        a: table.items[s.col],
        b: table.items[s.row],
        mi,
        epc,
        standardizedEpc: epc / Math.sqrt(Math.abs(mats.theta[s.row][s.row] * mats.theta[s.col][s.col])),
      });
    }
  }
  return hints.sort((x, y) => y.mi - x.mi).slice(0, MAX_HINTS);
}
