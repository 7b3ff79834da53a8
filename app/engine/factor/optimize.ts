import { EngineError } from '../errors.ts';

/** Armijo sufficient-decrease constant of the projected line search. */
const ARMIJO = 1e-4;
/** Step halvings tried before a line search gives up. */
const MAX_HALVINGS = 50;

export interface BoxMinimum {
  x: number[];
  value: number;
  iterations: number;
  converged: boolean;
}

/**
 * Minimises a smooth function over a box lo ≤ x ≤ hi by projected quasi-Newton steps: BFGS updates of
 * an inverse-Hessian approximation on the free variables, variables at a bound whose gradient points
 * outward held fixed, and a backtracking (Armijo) line search along the projected path (Bertsekas
 * 1982, "Projected Newton methods for optimization problems with simple constraints", SIAM J. Control
 * and Optimization 20, 221–246, from memory; Nocedal & Wright 2006, Numerical Optimization, ch. 6).
 * Converged when the largest projected-gradient component falls below `tolerance`, or falls below
 * `stallTolerance` when no step lowers the function any more (its rounding has taken over).
 *
 * Cost: O(d²) per iteration plus the evaluations of `fg`. Throws EngineError when `fg` returns a
 * non-finite value at the start.
 */
export function minimizeInBox(
  fg: (x: number[]) => { value: number; gradient: number[] },
  start: number[],
  lo: number,
  hi: number,
  options: { tolerance: number; stallTolerance: number; maxIterations: number },
): BoxMinimum {
  const d = start.length;
  const clamp = (v: number) => Math.min(hi, Math.max(lo, v));
  let x = start.map(clamp);
  let { value: f, gradient: g } = fg(x);
  if (!Number.isFinite(f))
    throw new EngineError('the fitting function is not finite at the starting values', 'not-finite');
  let h: number[][] | null = null;
  let lastFree = '';
  for (let iter = 1; iter <= options.maxIterations; iter++) {
    const free = x.map((xi, i) => !((xi <= lo && g[i] > 0) || (xi >= hi && g[i] < 0)));
    let projected = 0;
    for (let i = 0; i < d; i++) if (free[i]) projected = Math.max(projected, Math.abs(g[i]));
    if (projected < options.tolerance) return { x, value: f, iterations: iter - 1, converged: true };
    const freeKey = free.map((b) => (b ? '1' : '0')).join('');
    if (freeKey !== lastFree) h = null;
    lastFree = freeKey;
    let dir = new Array<number>(d).fill(0);
    if (h) {
      for (let i = 0; i < d; i++) {
        if (!free[i]) continue;
        let s = 0;
        for (let j = 0; j < d; j++) if (free[j]) s -= h[i][j] * g[j];
        dir[i] = s;
      }
    }
    let slope = 0;
    for (let i = 0; i < d; i++) slope += dir[i] * g[i];
    if (!h || !(slope < 0)) {
      h = null;
      dir = g.map((gi, i) => (free[i] ? -gi : 0));
      const norm = Math.sqrt(dir.reduce((s, v) => s + v * v, 0));
      const scale = Math.min(1, 0.1 / norm);
      dir = dir.map((v) => v * scale);
    }
    let t = 1;
    let accepted: { x: number[]; value: number; gradient: number[] } | null = null;
    for (let k = 0; k < MAX_HALVINGS; k++) {
      const trial = x.map((xi, i) => clamp(xi + t * dir[i]));
      let decrease = 0;
      for (let i = 0; i < d; i++) decrease += g[i] * (trial[i] - x[i]);
      const out = fg(trial);
      if (Number.isFinite(out.value) && out.value <= f + ARMIJO * decrease) {
        accepted = { x: trial, ...out };
        break;
      }
      t /= 2;
    }
    if (!accepted) return { x, value: f, iterations: iter, converged: projected < options.stallTolerance };
    const s = accepted.x.map((v, i) => v - x[i]);
    const y = accepted.gradient.map((v, i) => v - g[i]);
    const sy = s.reduce((acc, v, i) => acc + v * y[i], 0);
    const yy = y.reduce((acc, v) => acc + v * v, 0);
    if (sy > 1e-16) {
      if (!h) {
        const gamma = sy / yy;
        h = Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? gamma : 0)));
      }
      // H ← (I − ρsyᵀ)H(I − ρysᵀ) + ρssᵀ
      const rho = 1 / sy;
      const hy = h.map((row) => row.reduce((acc, v, j) => acc + v * y[j], 0));
      const yhy = y.reduce((acc, v, i) => acc + v * hy[i], 0);
      for (let i = 0; i < d; i++) {
        for (let j = 0; j < d; j++) {
          h[i][j] += -rho * (hy[i] * s[j] + s[i] * hy[j]) + (rho * rho * yhy + rho) * s[i] * s[j];
        }
      }
    }
    const change = Math.abs(f - accepted.value);
    x = accepted.x;
    f = accepted.value;
    g = accepted.gradient;
    if (change === 0 && s.every((v) => v === 0)) {
      return { x, value: f, iterations: iter, converged: projected < options.stallTolerance };
    }
  }
  return { x, value: f, iterations: options.maxIterations, converged: false };
}
