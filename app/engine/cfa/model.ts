import { EngineError } from '../errors.ts';
import { covarianceMatrix } from '../linalg.ts';
import { logDeterminant } from '../dense.ts';
import { kahanSum } from '../numeric.ts';

/**
 * A measurement model: which items indicate which factors, whether the factors correlate, and any
 * residual covariances the researcher allows (each with its rationale, since freeing one changes
 * what the model claims).
 */
export interface CfaModel {
  factors: { name: string; items: string[] }[];
  /** Fix every factor correlation at zero. */
  orthogonal?: boolean;
  residualCovariances?: { a: string; b: string; rationale?: string }[];
}

/** The sample moments of one group: covariance matrix with divisor n (the ML estimate), and means. */
export interface GroupMoments {
  name: string;
  n: number;
  cov: number[][];
  means?: number[];
}

/**
 * Which parameters are held equal across groups. `single`: one group, factor variances 1. The
 * multi-group steps follow the usual sequence of invariance tests: `configural` (same pattern, every
 * group with factor variances 1 and means 0), `metric` (loadings equal; factor variances free after the
 * first group), `scalar` (loadings and intercepts equal; factor means free after the first group).
 */
export type Constraint = 'single' | 'configural' | 'metric' | 'scalar';

export type MatrixName = 'lambda' | 'phi' | 'theta' | 'nu' | 'alpha';

/** A position that a free parameter fills: group, matrix, row, column (symmetric matrices: row ≥ col). */
export interface Slot {
  group: number;
  matrix: MatrixName;
  row: number;
  col: number;
}

export interface Parameter {
  label: string;
  slots: Slot[];
}

/** The matrices of one group: Σ = ΛΦΛᵀ + Θ, μ = ν + Λα. */
export interface GroupMatrices {
  lambda: number[][];
  phi: number[][];
  theta: number[][];
  nu: number[];
  alpha: number[];
}

/** The model laid out as fixed values and a list of free parameters. */
export interface ParameterTable {
  items: string[];
  factors: string[];
  /** pattern[i][j]: item i loads on factor j. */
  pattern: boolean[][];
  groups: number;
  meanStructure: boolean;
  fixed: GroupMatrices[];
  params: Parameter[];
}

const zeros = (r: number, c: number) => Array.from({ length: r }, () => new Array<number>(c).fill(0));

/**
 * Checks a model against the item names and returns the item list in model order (each item once, in
 * the order it first appears). Throws EngineError naming the problem: no factors, a factor without
 * items, a duplicate factor name, an item listed twice under one factor, or a residual covariance that
 * names an item not in the model or pairs an item with itself.
 */
export function modelItems(model: CfaModel): string[] {
  if (model.factors.length === 0) throw new EngineError('the model names no factors');
  const seen = new Set<string>();
  const items: string[] = [];
  for (const f of model.factors) {
    if (seen.has(`factor:${f.name}`)) throw new EngineError(`factor "${f.name}" appears twice in the model`);
    seen.add(`factor:${f.name}`);
    if (f.items.length === 0) throw new EngineError(`factor "${f.name}" lists no items`);
    const own = new Set<string>();
    for (const item of f.items) {
      if (own.has(item)) throw new EngineError(`factor "${f.name}" lists item "${item}" twice`);
      own.add(item);
      if (!items.includes(item)) items.push(item);
    }
  }
  for (const rc of model.residualCovariances ?? []) {
    for (const name of [rc.a, rc.b]) {
      if (!items.includes(name)) {
        throw new EngineError(
          `the residual covariance ${rc.a} ~ ${rc.b} names "${name}", which no factor lists`,
        );
      }
    }
    if (rc.a === rc.b) throw new EngineError(`a residual covariance pairs "${rc.a}" with itself`);
  }
  return items;
}

/**
 * Lays a model out as a parameter table for one group or for the steps of a multi-group invariance
 * test (see Constraint). Identification: factor variances fixed at 1 (in the first group for metric
 * and scalar), factor means fixed at 0 (in the first group for scalar). Registry: `cfa.ml`,
 * `cfa.invariance`.
 *
 * Cost: O(p·m·G). Throws what modelItems throws, and EngineError for `single` with more than one group
 * or a multi-group step with fewer than two.
 */
export function buildParameterTable(model: CfaModel, groups: number, constraint: Constraint): ParameterTable {
  const items = modelItems(model);
  if (constraint === 'single' && groups !== 1) throw new EngineError('a single-group model takes one group');
  if (constraint !== 'single' && groups < 2) {
    throw new EngineError(`a ${constraint} invariance model needs at least two groups`);
  }
  const p = items.length;
  const m = model.factors.length;
  const factors = model.factors.map((f) => f.name);
  const pattern = items.map((item) => model.factors.map((f) => f.items.includes(item)));
  const meanStructure = constraint !== 'single';
  const fixed: GroupMatrices[] = Array.from({ length: groups }, () => ({
    lambda: zeros(p, m),
    phi: zeros(m, m).map((row, j) => row.map((_, k) => (j === k ? 1 : 0))),
    theta: zeros(p, p),
    nu: new Array<number>(p).fill(0),
    alpha: new Array<number>(m).fill(0),
  }));
  const params: Parameter[] = [];
  const shared = (label: string, matrix: MatrixName, row: number, col: number, from = 0) => {
    const slots: Slot[] = [];
    for (let g = from; g < groups; g++) slots.push({ group: g, matrix, row, col });
    params.push({ label, slots });
  };
  const perGroup = (label: string, matrix: MatrixName, row: number, col: number, from = 0) => {
    for (let g = from; g < groups; g++) {
      params.push({
        label: groups > 1 ? `${label} [group ${g + 1}]` : label,
        slots: [{ group: g, matrix, row, col }],
      });
    }
  };
  const equalLoadings = constraint === 'metric' || constraint === 'scalar';
  for (let j = 0; j < m; j++) {
    for (let i = 0; i < p; i++) {
      if (!pattern[i][j]) continue;
      const label = `${factors[j]} =~ ${items[i]}`;
      if (equalLoadings) shared(label, 'lambda', i, j);
      else perGroup(label, 'lambda', i, j);
    }
  }
  if (equalLoadings) for (let j = 0; j < m; j++) perGroup(`var(${factors[j]})`, 'phi', j, j, 1);
  if (!model.orthogonal) {
    for (let j = 0; j < m; j++) {
      for (let k = 0; k < j; k++) perGroup(`cov(${factors[k]}, ${factors[j]})`, 'phi', j, k);
    }
  }
  for (let i = 0; i < p; i++) perGroup(`var(e.${items[i]})`, 'theta', i, i);
  for (const rc of model.residualCovariances ?? []) {
    const a = items.indexOf(rc.a);
    const b = items.indexOf(rc.b);
    perGroup(`cov(e.${rc.a}, e.${rc.b})`, 'theta', Math.max(a, b), Math.min(a, b));
  }
  if (meanStructure) {
    for (let i = 0; i < p; i++) {
      if (constraint === 'scalar') shared(`int(${items[i]})`, 'nu', i, 0);
      else perGroup(`int(${items[i]})`, 'nu', i, 0);
    }
    if (constraint === 'scalar')
      for (let j = 0; j < m; j++) perGroup(`mean(${factors[j]})`, 'alpha', j, 0, 1);
  }
  return { items, factors, pattern, groups, meanStructure, fixed, params };
}

/** Fills the table's matrices with a parameter vector (symmetric entries set on both sides). */
export function groupMatrices(table: ParameterTable, theta: ArrayLike<number>): GroupMatrices[] {
  const out = table.fixed.map((f) => ({
    lambda: f.lambda.map((r) => [...r]),
    phi: f.phi.map((r) => [...r]),
    theta: f.theta.map((r) => [...r]),
    nu: [...f.nu],
    alpha: [...f.alpha],
  }));
  table.params.forEach((param, a) => {
    for (const s of param.slots) {
      const g = out[s.group];
      const v = theta[a];
      if (s.matrix === 'lambda') g.lambda[s.row][s.col] = v;
      else if (s.matrix === 'phi') {
        g.phi[s.row][s.col] = v;
        g.phi[s.col][s.row] = v;
      } else if (s.matrix === 'theta') {
        g.theta[s.row][s.col] = v;
        g.theta[s.col][s.row] = v;
      } else if (s.matrix === 'nu') g.nu[s.row] = v;
      else g.alpha[s.row] = v;
    }
  });
  return out;
}

/** Complete cases of a data matrix (rows with a value in every column), with their 0-based indices. */
export function completeCases(data: (number | null)[][]): { rows: number[][]; kept: number[] } {
  const rows: number[][] = [];
  const kept: number[] = [];
  data.forEach((row, i) => {
    if (row.every((v) => v !== null && Number.isFinite(v))) {
      rows.push(row as number[]);
      kept.push(i);
    }
  });
  return { rows, kept };
}

/**
 * Sample moments for ML estimation: means and the covariance matrix with divisor n (not n − 1), from
 * complete data (rows are cases). Registry: `cfa.ml`.
 *
 * Cost: O(n·p²). Throws EngineError with fewer than two rows, on missing values, for a constant column
 * (naming it), or when the covariance matrix is not positive definite (a column that is a linear
 * combination of others, or fewer cases than items).
 */
export function sampleMoments(name: string, items: string[], rows: number[][]): GroupMoments {
  const n = rows.length;
  if (n < 2) throw new EngineError(`group "${name}" has ${n} complete case(s); at least two are needed`);
  const cov = covarianceMatrix(rows).map((r) => r.map((v) => (v * (n - 1)) / n));
  cov.forEach((r, i) => {
    if (!(r[i] > 0)) throw new EngineError(`item "${items[i]}" does not vary in group "${name}"`);
  });
  try {
    logDeterminant(cov);
  } catch {
    throw new EngineError(
      `the item covariance matrix of group "${name}" is singular (${n} cases, ${items.length} items): ` +
        'an item is a linear combination of others, or there are too few cases',
    );
  }
  const means = items.map((_, j) => kahanSum(rows.map((r) => r[j])) / n);
  return { name, n, cov, means };
}
